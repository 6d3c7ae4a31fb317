/**
 * Automatic first-break picking of one shot gather: every trace conditioned (`condition.ts`),
 * its onset found by a first estimate and the AIC picker (`trace-onset.ts`), given a confidence
 * and a sigma (`pick-quality.ts`), then held against its neighbours (`consistency.ts`).
 *
 * **Pick time.** The AIC split falls between the last sample of noise (k − 1) and the first of
 * signal (k); the onset is reported at the midpoint, t = delay + (k − ½)·T. For onsets placed at
 * random between samples this removes the T/2 average lateness of "the first sample after the
 * onset"; the quantisation's SD T/√12 is part of the sigma.
 *
 * **Neighbour check** (option `consistency`). Picks that are not low-confidence are the anchors
 * that predict their neighbours; a confident pick is held to 3 SD of its own sigma and the local
 * scatter, a low-confidence pick to the local scatter alone, so a doubtful pick off a clear trend
 * is caught while a clear pick needs a clear misfit. With `repick`, a rejected trace is picked
 * again by AIC in a window of ± max(tolerance, L/2) around the prediction; the new pick replaces
 * the old when it lies within the same tolerance of the prediction and has a confidence of at
 * least `REPICK_MIN_CONFIDENCE` × `lowConfidenceBelow` (a split inside the coda, where a wrong
 * prediction can put the window, shows no contrast).
 *
 * Every trace gets a `TracePick`, in input order:
 * - dead (all zeros), too short, or with non-finite samples: `time` null, `rejected`, a note;
 * - a low-confidence pick: kept (`lowConfidence`), with a note giving its amplitude ratio, or why
 *   the onset test failed;
 * - a pick rejected by its neighbours: `rejected`, `time` the rejected candidate, a note such as
 *   "12.4 ms later than its neighbours predict (tolerance 2.1 ms)";
 * - a re-picked trace: the new pick, not rejected, with a note giving the first pick's misfit.
 *
 * Positions for the neighbour check are the signed offsets when every trace has one, else the
 * trace numbers (the check then assumes the traces are in spread order, and its notes say
 * "in trace order").
 *
 * Misuse throws a RangeError naming the trace or option: options out of range
 * (`resolvePickingOptions`), a band-pass at or above a trace's Nyquist frequency, a sample
 * interval not positive and finite, a delay or offset not finite.
 *
 * Cost: O(n) per trace of n samples (running sums throughout), and O(traces × neighbours²) per
 * rejection for the neighbour check: a 48-trace gather of 4000 samples takes about 20 ms once
 * warm (about 70 ms on the first call, while the JIT compiles).
 *
 * @example
 * const picks = pickFirstBreaks(gather.traces.map(pickableTrace));
 * picks.filter((pick) => !pick.rejected).map((pick) => pick.time); // s after the shot
 */
import { formatQuantity } from '../checks/wording.js';
import { conditionTrace } from './condition.js';
import { neighbourConsistency, type ConsistencyItem } from './consistency.js';
import { resolvePickingOptions, type PickingOptions } from './options.js';
import { pickQuality } from './pick-quality.js';
import { onsetInWindow, traceOnset, type TraceOnset } from './trace-onset.js';
import type { PickableTrace, TracePick } from './types.js';

interface WorkingPick {
  traceIndex: number;
  time: number | null;
  sigma: number | null;
  confidence: number;
  /** Amplitude ratio at the pick, dB (null when there is no pick). */
  ratioDb: number | null;
  rejected: boolean;
  note: string | null;
}

/** A re-pick is kept only with at least this fraction of the low-confidence threshold as its confidence. */
export const REPICK_MIN_CONFIDENCE = 0.5;

const milliseconds = (seconds: number): string => formatQuantity(seconds * 1000, 'ms', 3);

function checkTrace(trace: PickableTrace, index: number): void {
  if (!(trace.sampleInterval > 0) || !Number.isFinite(trace.sampleInterval)) {
    throw new RangeError(`pickFirstBreaks: trace ${index}: sampleInterval must be a positive number of seconds, got ${trace.sampleInterval}`);
  }
  if (!Number.isFinite(trace.delay)) throw new RangeError(`pickFirstBreaks: trace ${index}: delay must be a finite number of seconds, got ${trace.delay}`);
  if (trace.offset !== null && !Number.isFinite(trace.offset)) {
    throw new RangeError(`pickFirstBreaks: trace ${index}: offset must be a finite number of metres or null, got ${trace.offset}`);
  }
}

function onsetTime(trace: PickableTrace, index: number): number {
  return trace.delay + (Math.max(index, 0.5) - 0.5) * trace.sampleInterval;
}

function pickOf(trace: PickableTrace, traceIndex: number, onset: TraceOnset, options: PickingOptions): WorkingPick {
  const quality = pickQuality(onset, trace.sampleInterval, options.aicBefore + options.aicAfter);
  return { traceIndex, time: onsetTime(trace, onset.index), sigma: quality.sigma, confidence: quality.confidence, ratioDb: quality.amplitudeRatioDb, rejected: false, note: onset.note };
}

/** First breaks of every trace of one shot gather (module comment). */
export function pickFirstBreaks(traces: readonly PickableTrace[], options: Partial<PickingOptions> = {}): TracePick[] {
  const resolved = resolvePickingOptions(options);
  traces.forEach(checkTrace);
  const conditioned: (Float64Array | null)[] = [];
  const picks: WorkingPick[] = traces.map((trace, traceIndex) => {
    let nonFinite = 0;
    for (let k = 0; k < trace.samples.length; k += 1) if (!Number.isFinite(trace.samples[k] as number)) nonFinite += 1;
    if (nonFinite > 0) {
      conditioned.push(null);
      return { traceIndex, time: null, sigma: null, confidence: 0, ratioDb: null, rejected: true, note: `the trace holds ${nonFinite} non-finite samples (NaN or infinite); not picked` };
    }
    let samples: Float64Array;
    try {
      samples = conditionTrace(trace, resolved);
    } catch (error) {
      if (error instanceof RangeError) throw new RangeError(`pickFirstBreaks: trace ${traceIndex}: ${error.message}`);
      throw error;
    }
    conditioned.push(samples);
    const outcome = traceOnset(samples, trace.sampleInterval, resolved);
    if (!outcome.ok) return { traceIndex, time: null, sigma: null, confidence: 0, ratioDb: null, rejected: true, note: outcome.reason };
    return pickOf(trace, traceIndex, outcome.onset, resolved);
  });

  if (resolved.consistency) checkNeighbours(traces, picks, conditioned, resolved);

  return picks.map((pick) => {
    const lowConfidence = pick.confidence < resolved.lowConfidenceBelow;
    const weak = lowConfidence && pick.note === null && pick.ratioDb !== null;
    return {
      traceIndex: pick.traceIndex,
      time: pick.time,
      sigma: pick.time === null ? null : pick.sigma,
      confidence: pick.confidence,
      lowConfidence,
      rejected: pick.rejected,
      note: weak ? `weak onset: amplitude ratio ${formatQuantity(pick.ratioDb as number, 'dB', 3)} across it (confidence ${pick.confidence.toFixed(2)})` : pick.note,
    };
  });
}

function checkNeighbours(traces: readonly PickableTrace[], picks: WorkingPick[], conditioned: readonly (Float64Array | null)[], options: PickingOptions): void {
  const byOffset = traces.every((trace) => trace.offset !== null);
  const items: ConsistencyItem[] = picks.map((pick, index) => ({
    position: byOffset ? (traces[index]?.offset as number) : index,
    time: pick.time,
    sigma: pick.sigma ?? 0,
    usable: !pick.rejected && pick.time !== null,
    anchor: pick.confidence >= options.lowConfidenceBelow,
  }));
  const verdicts = neighbourConsistency(items, { neighbours: options.neighbours, threshold: options.consistencyThreshold, offsets: byOffset });
  verdicts.forEach((verdict, index) => {
    const pick = picks[index] as WorkingPick;
    if (!verdict.rejected || verdict.prediction === null || verdict.misfit === null || verdict.tolerance === null) return;
    const trace = traces[index] as PickableTrace;
    const direction = verdict.misfit > 0 ? 'later' : 'earlier';
    const where = byOffset ? 'its neighbours predict' : 'its neighbours in trace order predict (offsets unknown)';
    const misfitText = verdict.earliest !== null && verdict.misfit < 0
      ? `${milliseconds(verdict.earliest - (pick.time as number))} earlier than the earliest its neighbours allow (${milliseconds(verdict.earliest)} at this offset; tolerance ${milliseconds(verdict.tolerance)})`
      : `${milliseconds(Math.abs(verdict.misfit))} ${direction} than ${where} (tolerance ${milliseconds(verdict.tolerance)})`;
    const samples = conditioned[index];
    if (options.repick && samples !== null && samples !== undefined) {
      const dt = trace.sampleInterval;
      const centre = (verdict.prediction - trace.delay) / dt + 0.5;
      const halfWidth = Math.max(verdict.tolerance, options.energyWindow / 2) / dt;
      const onset = onsetInWindow(samples, dt, options, centre, Math.max(halfWidth, 4));
      if (onset !== null) {
        const candidate = pickOf(trace, index, onset, options);
        const candidateMisfit = (candidate.time as number) - verdict.prediction;
        // The new pick must agree with the prediction by the same tolerance, and show an onset of
        // its own: a split in the coda of a wrong prediction has no contrast.
        if (Math.abs(candidateMisfit) <= verdict.tolerance && candidate.confidence >= REPICK_MIN_CONFIDENCE * options.lowConfidenceBelow) {
          picks[index] = { ...candidate, note: `re-picked near its neighbours' prediction; the first pick, at ${milliseconds(pick.time as number)}, was ${misfitText}` };
          return;
        }
      }
    }
    picks[index] = { ...pick, rejected: true, note: misfitText + (pick.note === null ? '' : `; ${pick.note}`) };
  });
}
