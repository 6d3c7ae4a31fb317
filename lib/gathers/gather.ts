/**
 * The in-memory shot gather that every gather reader (SEG-2, SEG-Y) returns, and the problems
 * such a reader reports.
 *
 * A gather is the traces of one file in the order the file lists them. Everything is SI: times in
 * seconds, positions and elevations in metres. A value the file does not give (or gives in a form
 * the reader cannot decode) is `null`, never a guess; the raw text of anything not decoded into a
 * typed field stays in the trace's or the gather's `metadata`.
 *
 * Readers are pure: they take the file's bytes and return an outcome, never throw on bad input.
 */
import type { Problem } from '../problems.js';

/** A point given by a gather file: along-line (or easting) x, optional y, optional elevation, in metres. */
export interface GatherLocation {
  /** First coordinate, metres: the position along the line for a 2-D refraction profile. */
  readonly x: number;
  /** Second horizontal coordinate, metres, or null when the file gives only x. */
  readonly y: number | null;
  /** Elevation, metres (positive up), or null when the file gives none. */
  readonly elevation: number | null;
}

/** One trace: its samples and the header values a first-break picker and the geometry need. */
export interface GatherTrace {
  /**
   * The samples in file order, in the file's amplitude units (no descaling applied).
   * Float32Array where float32 holds every value exactly (16-bit and 20-bit integers, 32-bit
   * floats); Float64Array otherwise (32-bit integers, 64-bit floats).
   */
  readonly samples: Float32Array | Float64Array;
  /** Time between samples, seconds (> 0). */
  readonly sampleInterval: number;
  /**
   * Time of the first sample after the shot instant, seconds: sample k is at
   * `delay + k · sampleInterval`. Negative when recording began before the shot.
   */
  readonly delay: number;
  /** Receiver position, or null when the file gives none (or none in a known length unit). */
  readonly receiver: GatherLocation | null;
  /** Source position for this trace, or null when the file gives none. */
  readonly source: GatherLocation | null;
  /** Receiver station identifier as the file writes it, or null. */
  readonly receiverStation: string | null;
  /** Source station identifier as the file writes it, or null. */
  readonly sourceStation: string | null;
  /** Every other header value of the trace, by the format's own keyword or field name. */
  readonly metadata: ReadonlyMap<string, string>;
}

/** The traces of one file, with the file-level header values. */
export interface Gather {
  /** The format the bytes were read as. */
  readonly format: 'SEG-2' | 'SEG-Y';
  /** The traces in file order (at least one). */
  readonly traces: readonly GatherTrace[];
  /** File-level header values, by the format's own keyword or field name. */
  readonly metadata: ReadonlyMap<string, string>;
}

/**
 * A problem found in a binary gather file. A binary file has no lines, so `line` is 0 (the input
 * as a whole) and `column` is null; `byteOffset` says where the fault is (0-based from the start
 * of the file) and `field` names the header field concerned.
 */
export interface GatherProblem extends Problem {
  /** 0-based offset in the file of the field or block at fault; null for the file as a whole. */
  readonly byteOffset: number | null;
}

/** A gather with its warnings, or the problems that refused the file (never both). */
export type GatherOutcome =
  | { readonly ok: true; readonly value: Gather; readonly warnings: readonly GatherProblem[] }
  | { readonly ok: false; readonly problems: readonly GatherProblem[] };
