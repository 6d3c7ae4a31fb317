/**
 * The contract types of the first-break picker: the trace it reads and the pick it returns.
 */

/** One trace as the picker needs it; a `GatherTrace` gives one through `pickableTraces`. */
export interface PickableTrace {
  readonly samples: ArrayLike<number>;
  /** s (> 0). */
  readonly sampleInterval: number;
  /** s, time of sample 0 after the shot (negative when recording began before it). */
  readonly delay: number;
  /** m, receiverX − sourceX (null: unknown; the neighbour check then uses trace order). */
  readonly offset: number | null;
}

/** The picker's answer for one trace. */
export interface TracePick {
  /** Position of the trace in the input. */
  readonly traceIndex: number;
  /** s after the shot; null when no onset was found. */
  readonly time: number | null;
  /** s, one standard deviation; null when time is null. */
  readonly sigma: number | null;
  /** 0…1: how clearly the trace shows an onset there (`pick-quality.ts`). */
  readonly confidence: number;
  /** True below the `lowConfidenceBelow` option: worth a look before it is used. */
  readonly lowConfidence: boolean;
  /** True = keep out of the pick set (time is then the rejected candidate, or null). */
  readonly rejected: boolean;
  /** Why it was doubted, re-picked or rejected, in words; null otherwise. */
  readonly note: string | null;
}
