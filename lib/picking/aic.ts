/**
 * AIC picker (Maeda1985): the onset in a window is the split point that best divides it into two
 * stationary parts, noise before and signal after, by Akaike's information criterion computed
 * directly from the samples (METHODS §11):
 *
 * ```
 * AIC(k) = k·ln var(w[0:k]) + (M − k − 1)·ln var(w[k:M]),   k = 2 … M − 2
 * onset  = argmin_k AIC(k)   (the first sample of the second part)
 * ```
 *
 * w is the window of M samples, var the population variance (divided by the count). Both
 * variances come from running sums of w and w² (`running-sums.ts`), after subtracting the
 * window's mean (a DC level would otherwise cancel digits), so the curve costs O(M).
 *
 * AIC always finds a minimum: use it on a window that holds one onset — noise, then the first
 * arrival — placed by a first estimate (STA/LTA or the modified energy ratio).
 *
 * **Akaike weights** (BurnhamAnderson2002) turn the curve into a spread of plausible onsets:
 * w_k ∝ exp(−(AIC(k) − AIC_min)/2), and the onset's spread in samples is √(Σ w_k·(k − k̄)²),
 * k̄ = Σ w_k·k. A sharp minimum gives a spread under a sample; a shallow one (low signal-to-noise)
 * several samples. `pick-quality.ts` calibrates it into a pick sigma.
 *
 * Edges:
 * - A window of fewer than 4 samples has no split with two samples on each side: no onset
 *   (null) and an all-NaN curve.
 * - A part with zero variance (a zero-padded stretch, a clipped flat top) has its variance
 *   floored at `VARIANCE_FLOOR` × the window's variance, so the curve stays finite; a window of
 *   constant samples has no onset (null).
 * Entries of the curve outside k = 2 … M − 2 are NaN.
 *
 * @example
 * // METHODS check case 11.1: the window [trigger − 60, trigger + 40) around the STA/LTA trigger 162
 * aicOnset(trace.subarray(102, 202))?.index; // 58, i.e. sample 160, the model onset
 */
import { prefixSums } from './running-sums.js';

/** A part's variance is floored at this fraction of the whole window's variance (module comment). */
export const VARIANCE_FLOOR = 1e-12;

/** AIC(k) of `window` for k = 2 … M − 2 (NaN elsewhere). */
export function aicCurve(window: ArrayLike<number>): Float64Array {
  const count = window.length;
  const curve = new Float64Array(count).fill(Number.NaN);
  if (count < 4) return curve;
  let mean = 0;
  for (let k = 0; k < count; k += 1) mean += window[k] as number;
  mean /= count;
  const centred = new Float64Array(count);
  for (let k = 0; k < count; k += 1) centred[k] = (window[k] as number) - mean;
  const sums = prefixSums(centred, false);
  const squares = prefixSums(centred, true);
  const totalVariance = (squares[count] as number) / count;
  if (!(totalVariance > 0)) return curve;
  const floor = VARIANCE_FLOOR * totalVariance;
  const variance = (start: number, end: number): number => {
    const size = end - start;
    const partMean = ((sums[end] as number) - (sums[start] as number)) / size;
    const value = ((squares[end] as number) - (squares[start] as number)) / size - partMean * partMean;
    return Math.max(value, floor);
  };
  for (let k = 2; k <= count - 2; k += 1) {
    curve[k] = k * Math.log(variance(0, k)) + (count - k - 1) * Math.log(variance(k, count));
  }
  return curve;
}

/** The AIC onset of a window: its index in the window, the curve, and the Akaike-weight spread. */
export interface AicOnset {
  /** 0-based index in the window of the first sample after the split. */
  readonly index: number;
  /** AIC(k), NaN outside k = 2 … M − 2. */
  readonly curve: Float64Array;
  /** √(Σ w_k·(k − k̄)²), samples: the spread of plausible onsets by Akaike weights. */
  readonly spread: number;
  /** Mean over the curve of AIC(k) − AIC_min, per sample of the window: how deep the minimum is. */
  readonly depth: number;
}

/** The onset of `window` by the AIC minimum, or null when the window has none (module comment). */
export function aicOnset(window: ArrayLike<number>): AicOnset | null {
  const curve = aicCurve(window);
  let index = -1;
  let minimum = Number.POSITIVE_INFINITY;
  for (let k = 2; k <= window.length - 2; k += 1) {
    const value = curve[k] as number;
    if (value < minimum) {
      minimum = value;
      index = k;
    }
  }
  if (index < 0 || !Number.isFinite(minimum)) return null;
  let weightSum = 0;
  let weightedIndex = 0;
  let excessSum = 0;
  let defined = 0;
  for (let k = 2; k <= window.length - 2; k += 1) {
    const excess = (curve[k] as number) - minimum;
    const weight = Math.exp(-excess / 2);
    weightSum += weight;
    weightedIndex += weight * k;
    excessSum += excess;
    defined += 1;
  }
  const centre = weightedIndex / weightSum;
  let spreadSum = 0;
  for (let k = 2; k <= window.length - 2; k += 1) {
    const weight = Math.exp(-((curve[k] as number) - minimum) / 2);
    spreadSum += weight * (k - centre) * (k - centre);
  }
  return { index, curve, spread: Math.sqrt(spreadSum / weightSum), depth: excessSum / defined / window.length };
}
