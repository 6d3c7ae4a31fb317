/**
 * The onset of one conditioned trace, in two steps (METHODS §11):
 *
 * 1. **First estimate** e, by `estimator`:
 *    - `energy-ratio` (HanWongBancroft2009, `energy-ratio.ts`): the *earliest* sample k where the
 *      energy after it stands out — ER_k ≥ `onsetRatio` and also
 *      ER_k·min(1, E_before(k)/E_typical) ≥ `onsetRatio`, E_typical the trace's typical window
 *      energy (`typicalWindowEnergy`), so that a window before k that is quiet by chance (few
 *      samples near the trace start, a lull in the noise) does not fake an onset — then the largest
 *      modified energy ratio in the 2L samples after k, the arrival's first strong sample. The
 *      earliest onset, not the largest ratio: first breaks are often weaker than later arrivals
 *      (the direct wave beyond the crossover, ground roll), which a plain argmax of MER would pick.
 *      When no sample passes, the largest MER of the trace, with a note.
 *    - `sta-lta` (Allen1978, `sta-lta.ts`): the first sample where STA/LTA reaches
 *      `triggerRatio` with the same guard, R_k·min(1, LTA_k/CF_typical) (CF_typical the typical
 *      long-window mean of the characteristic function); when none does, the largest STA/LTA,
 *      with a note. The trigger lags the onset, so the AIC window reaches back from it.
 * 2. **Refinement**: the AIC minimum (Maeda1985, `aic.ts`) in the window
 *    [e − `aicBefore`, e + `aicAfter`] (clipped to the trace), where the trace turns from noise to
 *    signal.
 *
 * Also measured at the onset k, for `pick-quality.ts`: the amplitude ratio
 * RMS(y[k, k + Q)) / RMS(y[k − Q, k)) (Q = `qualityWindow`, clipped to the trace); the rise, the
 * samples from k to the largest |y| in the L samples after it, plus ½ (the onset lies half a sample
 * before k; see `pick-first-breaks.ts`); the AIC minimum's Akaike-weight spread (samples).
 *
 * `onsetInWindow` is the refinement alone, in a window the caller gives: the neighbour check
 * re-picks a rejected trace that way, around the time its neighbours predict.
 *
 * Edges: a trace of fewer than `MIN_PICKABLE_SAMPLES` samples, or whose conditioned samples are
 * all zero, has no onset (`ok: false`, with the reason in words). An onset with no sample before
 * it (k = 0) has amplitude ratio 1 (no evidence). A window too short or constant for AIC keeps the
 * first estimate. The trace is never modified.
 *
 * @example
 * // METHODS check case 11.1 (no conditioning, L = 20 samples): estimate 162, onset 160
 * traceOnset(trace, 0.00025, { ...options, energyWindow: 0.005, aicBefore: 0.015, aicAfter: 0.01 });
 */
import { aicOnset } from './aic.js';
import { energyRatio } from './energy-ratio.js';
import { samplesIn, type PickingOptions } from './options.js';
import { prefixSums, windowSum } from './running-sums.js';
import { staLtaCharacteristic, staLtaRatio, staLtaTrigger } from './sta-lta.js';

/** Fewer samples than this and a trace is not picked. */
export const MIN_PICKABLE_SAMPLES = 8;

export interface TraceOnset {
  /** Sample index of the onset (the first sample after the AIC split). */
  readonly index: number;
  /** Sample index of the first estimate. */
  readonly estimate: number;
  /** RMS after over RMS before the onset, each over the quality window. */
  readonly amplitudeRatio: number;
  /** Akaike-weight spread of the AIC minimum, samples. */
  readonly spread: number;
  /** Samples from the onset to the largest |y| within one energy window after it (about a quarter period). */
  readonly riseSamples: number;
  /** True when the onset test passed (energy ratio or STA/LTA reached its level). */
  readonly triggered: boolean;
  /** Words about the estimate (e.g. no STA/LTA trigger), or null. */
  readonly note: string | null;
}

export type TraceOnsetOutcome = { readonly ok: true; readonly onset: TraceOnset } | { readonly ok: false; readonly reason: string };

function argmax(values: ArrayLike<number>, start: number, end: number): number {
  let best = start;
  let bestValue = Number.NEGATIVE_INFINITY;
  for (let k = start; k < end; k += 1) {
    const value = values[k] as number;
    if (value > bestValue) {
      bestValue = value;
      best = k;
    }
  }
  return best;
}

/**
 * The trace's typical energy level: the median of the mean energies of consecutive
 * non-overlapping windows of `window` samples (a trace is mostly noise and coda, so this is about
 * the noise level; it is too high where signal fills most of the trace, which only makes the onset
 * test stricter). Never 0 for a trace that is not all zeros: falls back to the mean energy.
 */
export function typicalWindowEnergy(energy: Float64Array, window: number): number {
  const count = energy.length - 1;
  const means: number[] = [];
  for (let start = 0; start + window <= count; start += window) means.push(windowSum(energy, start, start + window) / window);
  const mean = (energy[count] as number) / Math.max(1, count);
  if (means.length === 0) return mean;
  means.sort((left, right) => left - right);
  const middle = means.length >> 1;
  const median = means.length % 2 === 1 ? (means[middle] as number) : 0.5 * ((means[middle - 1] as number) + (means[middle] as number));
  return median > 0 ? median : mean;
}

/** RMS(y[k, k + Q)) / RMS(y[k − Q, k)) at sample `index`; 1 when either side is empty or silent. */
export function amplitudeRatioAt(energy: Float64Array, index: number, window: number): number {
  const count = energy.length - 1;
  const beforeStart = Math.max(0, index - window);
  const afterEnd = Math.min(count, index + window);
  if (index - beforeStart < 1 || afterEnd - index < 1) return 1;
  const before = windowSum(energy, beforeStart, index) / (index - beforeStart);
  const after = windowSum(energy, index, afterEnd) / (afterEnd - index);
  if (before === 0) return after === 0 ? 1 : Number.POSITIVE_INFINITY;
  return Math.sqrt(after / before);
}

/** The onset of `samples` (already conditioned) (module comment). */
export function traceOnset(samples: Float64Array, sampleInterval: number, options: PickingOptions): TraceOnsetOutcome {
  const count = samples.length;
  if (count < MIN_PICKABLE_SAMPLES) return { ok: false, reason: `the trace has ${count} samples, too few to pick (at least ${MIN_PICKABLE_SAMPLES})` };
  let silent = true;
  for (const value of samples) {
    if (value !== 0) {
      silent = false;
      break;
    }
  }
  if (silent) return { ok: false, reason: 'dead trace: every sample is zero' };

  let estimate: number;
  let note: string | null = null;
  if (options.estimator === 'energy-ratio') {
    const window = samplesIn(options.energyWindow, sampleInterval);
    const ratio = energyRatio(samples, window);
    const sharpened = (k: number): number => ((ratio[k] as number) * Math.abs(samples[k] as number)) ** 3;
    const energy = prefixSums(samples, true);
    const noise = typicalWindowEnergy(energy, window);
    let trigger = -1;
    for (let k = 0; k < count; k += 1) {
      const ratioValue = ratio[k] as number;
      if (ratioValue < options.onsetRatio) continue;
      // ER·before/max(before, noise): the energy after k over the larger of the energy before it and
      // the trace's typical level, so that a window before k that is quiet by chance is no onset.
      const before = windowSum(energy, Math.max(0, k - window), k) / Math.min(window, k);
      if (ratioValue * Math.min(1, before / noise) >= options.onsetRatio) {
        trigger = k;
        break;
      }
    }
    // The energy ratio rises as its after-window reaches the onset, up to L samples before it; the
    // modified energy ratio's largest value in the next 2L samples is the arrival's first strong sample.
    const from = trigger >= 0 ? trigger : 0;
    const to = trigger >= 0 ? Math.min(count, trigger + 2 * window) : count;
    estimate = from;
    let best = Number.NEGATIVE_INFINITY;
    for (let k = from; k < to; k += 1) {
      const value = sharpened(k);
      if (value > best) {
        best = value;
        estimate = k;
      }
    }
    if (trigger < 0) {
      let largest = 0;
      for (const value of ratio) largest = Math.max(largest, value);
      note = `the energy ratio never reached ${options.onsetRatio} (at most ${largest.toPrecision(3)}); its sharpest peak placed the AIC window`;
    }
  } else {
    const shortWindow = samplesIn(options.shortWindow, sampleInterval);
    const longWindow = samplesIn(options.longWindow, sampleInterval);
    const ratio = staLtaRatio(samples, shortWindow, longWindow, options.derivativeWeight);
    // As for the energy ratio: a long window quiet by chance (or clipped at the trace start) is
    // held to the trace's typical level before its ratio counts as a trigger.
    const characteristic = prefixSums(staLtaCharacteristic(samples, options.derivativeWeight), false);
    const typical = typicalWindowEnergy(characteristic, longWindow);
    const guarded = ratio.map((value, k) => {
      const longStart = Math.max(0, k - shortWindow - longWindow + 1);
      const longEnd = k - shortWindow + 1;
      if (longEnd <= longStart) return value;
      const longAverage = windowSum(characteristic, longStart, longEnd) / (longEnd - longStart);
      return value * Math.min(1, longAverage / typical);
    });
    const trigger = staLtaTrigger(guarded, options.triggerRatio);
    if (trigger === null) {
      estimate = argmax(ratio, 0, count);
      note = `STA/LTA never reached ${options.triggerRatio} (at most ${(ratio[estimate] as number).toPrecision(3)}); its maximum placed the AIC window`;
    } else {
      estimate = trigger;
    }
  }

  const windowStart = Math.max(0, estimate - samplesIn(options.aicBefore, sampleInterval));
  const windowEnd = Math.min(count, estimate + samplesIn(options.aicAfter, sampleInterval) + 1);
  const aic = aicOnset(samples.subarray(windowStart, windowEnd));
  // A window too short or constant for AIC (only at the very ends of a trace): keep the estimate.
  const index = aic === null ? estimate : windowStart + aic.index;
  const spread = aic === null ? windowEnd - windowStart : aic.spread;
  return { ok: true, onset: { index, estimate, spread, note, triggered: note === null, ...onsetMeasures(samples, index, sampleInterval, options) } };
}

/** The amplitude ratio and rise at onset `index` (module comment). */
function onsetMeasures(samples: Float64Array, index: number, sampleInterval: number, options: PickingOptions): { amplitudeRatio: number; riseSamples: number } {
  const energy = prefixSums(samples, true);
  const amplitudeRatio = amplitudeRatioAt(energy, index, samplesIn(options.qualityWindow, sampleInterval));
  const riseEnd = Math.min(samples.length, index + samplesIn(options.energyWindow, sampleInterval));
  let peakAt = index;
  for (let k = index; k < riseEnd; k += 1) if (Math.abs(samples[k] as number) > Math.abs(samples[peakAt] as number)) peakAt = k;
  return { amplitudeRatio, riseSamples: peakAt - index + 0.5 };
}

/**
 * The AIC onset in the window [centre − halfWidth, centre + halfWidth] (clipped to the trace), with
 * no first estimate: the neighbour check re-picks a rejected trace this way around the time its
 * neighbours predict. Null when the window is too short or constant for AIC.
 */
export function onsetInWindow(samples: Float64Array, sampleInterval: number, options: PickingOptions, centre: number, halfWidth: number): TraceOnset | null {
  const windowStart = Math.max(0, Math.round(centre - halfWidth));
  const windowEnd = Math.min(samples.length, Math.round(centre + halfWidth) + 1);
  if (windowEnd - windowStart < 4) return null;
  const aic = aicOnset(samples.subarray(windowStart, windowEnd));
  if (aic === null) return null;
  const index = windowStart + aic.index;
  return { index, estimate: Math.round(centre), spread: aic.spread, note: null, triggered: true, ...onsetMeasures(samples, index, sampleInterval, options) };
}
