/**
 * The picker's options, their defaults and their validation.
 *
 * Options are checked once, when they are resolved (`resolvePickingOptions`); a bad option is a
 * programming error here (the CLI and the service validate user input against their schemas
 * first), so it throws a RangeError naming the option, the value and the fix — no list of
 * problems. The band-pass is checked against each trace's Nyquist frequency when that trace is
 * conditioned, since the sample interval belongs to the trace; that RangeError names the trace.
 *
 * Windows are in seconds and become whole numbers of samples per trace (at least two; see
 * `samplesIn`), so one set of options serves 0.125 ms and 1 ms sampling alike.
 *
 * **Defaults and why**, measured on the synthetic gathers of tests/picking/acceptance.test.ts
 * with its tuning seeds (64 gathers, 0.125–1 ms, SNR 3–20 per trace; share of accepted picks
 * within one sample + 1 ms of the truth, defaults 96.4 %, 93 % of traces accepted):
 * - Band-pass 20–1000 Hz, prototype order 1, **causal**. Overall it picks as well as no filter
 *   (96.4 % both): it gains where the noise has a low-frequency share (wind, traffic — usual in
 *   field records) and loses a little on flat noise, and it clears DC drift from the display. A
 *   zero-phase filter scored 94.6 % (its precursor makes high-SNR picks early); order 2 scored
 *   95.4 % and accepted fewer picks; a 20–400 Hz order-2 band 92.1 % (a steep causal filter rounds
 *   the onset and makes picks late). The high edge sits far above the signal band so the causal
 *   filter barely delays the onset; it is lowered to 0.8 × Nyquist on coarse sampling
 *   (`highCutFor`).
 * - No AGC (93.0 % with a 50 ms window, and fewer picks accepted): it raises the noise before the
 *   onset to the level of the signal and so blunts the contrast every picker relies on.
 * - Normalisation by the largest |sample|: for display; the pickers are scale-free.
 * - The energy ratio as first estimate, L = 5 ms, onset level 5 (STA/LTA 3 ms / 30 ms, trigger 4,
 *   scored 95.3 %; L = 3 ms 96.5 % with fewer picks accepted, 7 ms 95.8 %; levels 3 and 8 94.5 %
 *   and 96.4 % with fewer accepted).
 * - AIC window 15 ms before and 5 ms after the estimate.
 * - Neighbour check on (86.9 % without it), 4 neighbours a side, 3 SD; re-picking on (without
 *   it the share is the same but 89 % of traces are accepted instead of 93 %).
 */
import type { NormalisationMode } from './normalise.js';

export interface PickingOptions {
  /** Butterworth band-pass edges, Hz; null = none. */
  readonly bandPass: { readonly low: number; readonly high: number } | null;
  /** Prototype order N of the band-pass (2N poles). */
  readonly bandPassOrder: number;
  /** `causal` (one forward pass) or `zero-phase` (forward–backward; smears energy ahead of the onset). */
  readonly bandPassPhase: 'causal' | 'zero-phase';
  /** AGC window, s; null = none. */
  readonly gain: { readonly window: number } | null;
  /** Trace normalisation before picking. */
  readonly normalise: boolean;
  readonly normalisation: NormalisationMode;
  /** First estimate, refined by the AIC picker. */
  readonly estimator: 'sta-lta' | 'energy-ratio';
  /** STA window, s. */
  readonly shortWindow: number;
  /** LTA window, s. */
  readonly longWindow: number;
  /** STA/LTA trigger level. */
  readonly triggerRatio: number;
  /** Allen's C: weight of the squared first difference in the STA/LTA characteristic function. */
  readonly derivativeWeight: number;
  /** Energy-ratio window L, s. */
  readonly energyWindow: number;
  /** The first estimate is the earliest onset whose energy ratio reaches this (else the sharpest peak). */
  readonly onsetRatio: number;
  /** The AIC window reaches this far before the first estimate, s. */
  readonly aicBefore: number;
  /** … and this far after it, s. */
  readonly aicAfter: number;
  /** Window on each side of a pick for its amplitude ratio, s. */
  readonly qualityWindow: number;
  /** Picks with confidence below this are flagged `lowConfidence`. */
  readonly lowConfidenceBelow: number;
  /** Neighbour-trace rejection. */
  readonly consistency: boolean;
  /** Accepted neighbours used on each side of a trace. */
  readonly neighbours: number;
  /** A pick is rejected beyond this many standard deviations of the local scatter and its sigma. */
  readonly consistencyThreshold: number;
  /** Re-pick a rejected trace in a window around its neighbours' prediction. */
  readonly repick: boolean;
}

/** The default band-pass's high edge; lowered per trace to 0.8 × Nyquist when that is lower. */
export const DEFAULT_HIGH_CUT = 1000;

export const DEFAULT_PICKING_OPTIONS: PickingOptions = {
  bandPass: { low: 20, high: DEFAULT_HIGH_CUT },
  bandPassOrder: 1,
  bandPassPhase: 'causal',
  gain: null,
  normalise: true,
  normalisation: 'max-abs',
  estimator: 'energy-ratio',
  shortWindow: 0.003,
  longWindow: 0.03,
  triggerRatio: 4,
  derivativeWeight: 0,
  energyWindow: 0.005,
  onsetRatio: 5,
  aicBefore: 0.015,
  aicAfter: 0.005,
  qualityWindow: 0.005,
  lowConfidenceBelow: 0.5,
  consistency: true,
  neighbours: 4,
  consistencyThreshold: 3,
  repick: true,
};

/** A window of `seconds` as a whole number of samples of `sampleInterval`, at least `minimum` (default 2). */
export function samplesIn(seconds: number, sampleInterval: number, minimum = 2): number {
  return Math.max(minimum, Math.round(seconds / sampleInterval));
}

/**
 * The high edge actually used on a trace: the option's, except that the default band (20–1000 Hz,
 * recognised by its values, so options stored as JSON and read back behave the same) has its high
 * edge lowered to 0.8 × Nyquist on coarsely sampled traces, so the defaults work at 2 ms and
 * beyond; where that leaves less than an octave above the low edge (sampling of 10 ms or coarser)
 * the default band is not applied (null). Any other band is used as given (and refused at or
 * above Nyquist by `conditionTrace`).
 */
export function highCutFor(options: PickingOptions, sampleInterval: number): number | null {
  const band = options.bandPass;
  if (band === null) return null;
  const fallback = DEFAULT_PICKING_OPTIONS.bandPass;
  const isDefault = fallback !== null && band.low === fallback.low && band.high === fallback.high;
  if (!isDefault) return band.high;
  const high = Math.min(band.high, 0.4 / sampleInterval);
  return high >= 2 * band.low ? high : null;
}

function positiveSeconds(name: keyof PickingOptions, value: unknown): void {
  if (typeof value !== 'number' || !(value > 0) || !Number.isFinite(value)) {
    throw new RangeError(`picking option ${name} must be a positive number of seconds, got ${String(value)}`);
  }
}

/** Defaults overlaid by `options`, checked (module comment). */
export function resolvePickingOptions(options: Partial<PickingOptions> = {}): PickingOptions {
  const resolved: PickingOptions = { ...DEFAULT_PICKING_OPTIONS, ...options };
  validatePickingOptions(resolved);
  return resolved;
}

/** Throws a RangeError naming the first bad option (module comment). */
export function validatePickingOptions(options: PickingOptions): void {
  const { bandPass, gain } = options;
  if (bandPass !== null) {
    if (typeof bandPass !== 'object' || !Number.isFinite(bandPass.low) || !Number.isFinite(bandPass.high) || !(bandPass.low > 0) || !(bandPass.high > bandPass.low)) {
      throw new RangeError(
        `picking option bandPass must be null or { low, high } in Hz with 0 < low < high, got ${JSON.stringify(bandPass)}`,
      );
    }
  }
  if (!Number.isInteger(options.bandPassOrder) || options.bandPassOrder < 1 || options.bandPassOrder > 12) {
    throw new RangeError(`picking option bandPassOrder must be a whole number from 1 to 12, got ${options.bandPassOrder}`);
  }
  if (options.bandPassPhase !== 'causal' && options.bandPassPhase !== 'zero-phase') {
    throw new RangeError(`picking option bandPassPhase must be 'causal' or 'zero-phase', got ${String(options.bandPassPhase)}`);
  }
  if (gain !== null) {
    if (typeof gain !== 'object' || typeof gain.window !== 'number' || !(gain.window > 0) || !Number.isFinite(gain.window)) {
      throw new RangeError(`picking option gain must be null or { window } with a positive window in seconds, got ${JSON.stringify(gain)}`);
    }
  }
  if (typeof options.normalise !== 'boolean') throw new RangeError(`picking option normalise must be true or false, got ${String(options.normalise)}`);
  if (options.normalisation !== 'max-abs' && options.normalisation !== 'rms') {
    throw new RangeError(`picking option normalisation must be 'max-abs' or 'rms', got ${String(options.normalisation)}`);
  }
  if (options.estimator !== 'sta-lta' && options.estimator !== 'energy-ratio') {
    throw new RangeError(`picking option estimator must be 'sta-lta' or 'energy-ratio', got ${String(options.estimator)}`);
  }
  for (const name of ['shortWindow', 'longWindow', 'energyWindow', 'aicBefore', 'aicAfter', 'qualityWindow'] as const) positiveSeconds(name, options[name]);
  if (!(options.onsetRatio > 1) || !Number.isFinite(options.onsetRatio)) {
    throw new RangeError(`picking option onsetRatio must be a number above 1, got ${options.onsetRatio}`);
  }
  if (!(options.triggerRatio > 1) || !Number.isFinite(options.triggerRatio)) {
    throw new RangeError(`picking option triggerRatio must be a number above 1 (3 to 5 is usual), got ${options.triggerRatio}`);
  }
  if (!(options.derivativeWeight >= 0) || !Number.isFinite(options.derivativeWeight)) {
    throw new RangeError(`picking option derivativeWeight must be a finite number ≥ 0, got ${options.derivativeWeight}`);
  }
  if (!(options.lowConfidenceBelow >= 0 && options.lowConfidenceBelow <= 1)) {
    throw new RangeError(`picking option lowConfidenceBelow must be between 0 and 1, got ${options.lowConfidenceBelow}`);
  }
  if (typeof options.consistency !== 'boolean') throw new RangeError(`picking option consistency must be true or false, got ${String(options.consistency)}`);
  if (!Number.isInteger(options.neighbours) || options.neighbours < 2) {
    throw new RangeError(`picking option neighbours must be a whole number ≥ 2 (neighbours on each side), got ${options.neighbours}`);
  }
  if (!(options.consistencyThreshold > 0) || !Number.isFinite(options.consistencyThreshold)) {
    throw new RangeError(`picking option consistencyThreshold must be a positive number of standard deviations, got ${options.consistencyThreshold}`);
  }
  if (typeof options.repick !== 'boolean') throw new RangeError(`picking option repick must be true or false, got ${String(options.repick)}`);
}
