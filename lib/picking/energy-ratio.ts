/**
 * Modified energy ratio (HanWongBancroft2009): the energy in a window after each sample over the
 * energy in a window before it, sharpened by the sample's own amplitude (METHODS §11):
 *
 * ```
 * ER_k  = Σ_{j=k}^{k+L−1} y_j² / Σ_{j=k−L}^{k−1} y_j²
 * MER_k = (ER_k · |y_k|)³,      first-break estimate = argmax_k MER_k
 * ```
 *
 * The windows are equal (L samples, about one dominant period); the ratio peaks where noise ends
 * and signal begins, and the |y_k| factor moves the maximum onto the first strong sample of the
 * arrival — at or just after the onset, so the estimate is refined by the AIC picker (`aic.ts`).
 * Variants in use differ by one sample in the window limits; these are the limits above.
 *
 * Edges:
 * - Near either end of the trace the windows are clipped to the samples that exist and ER_k is
 *   the ratio of the two *mean* energies (with full windows this is the ratio of sums above);
 *   ER_k is computed only where each clipped window holds at least ⌈L/4⌉ samples (and at least
 *   2), and is 0 elsewhere — so an onset in the first ⌈L/4⌉ samples is not seen.
 * - The energy before is floored at `ENERGY_FLOOR` times the trace's mean energy, so a
 *   zero-padded start gives a large, finite ratio; an all-zero trace gives ER ≡ 0.
 * Misuse throws a RangeError: L not a positive whole number of samples.
 *
 * @example
 * // METHODS check case 11.1 (0.25 ms, onset at sample 160): L = 20
 * argmax(modifiedEnergyRatio(trace, 20)); // 162
 */
import { prefixSums, windowSum } from './running-sums.js';

/** The energy before a sample is floored at this fraction of the trace's mean energy (module comment). */
export const ENERGY_FLOOR = 1e-10;

/** The fewest samples a clipped window may hold, for a window of `window` samples. */
export function shortestEnergyWindow(window: number): number {
  return Math.max(2, Math.ceil(window / 4));
}

/** ER_k for windows of `window` samples (module comment). */
export function energyRatio(samples: ArrayLike<number>, window: number): Float64Array {
  if (!Number.isInteger(window) || window < 1) {
    throw new RangeError(`energyRatio: window must be a positive whole number of samples, got ${window}`);
  }
  const count = samples.length;
  const ratio = new Float64Array(count);
  const energy = prefixSums(samples, true);
  const meanEnergy = count === 0 ? 0 : (energy[count] as number) / count;
  if (meanEnergy === 0) return ratio;
  const floor = ENERGY_FLOOR * meanEnergy;
  const shortest = shortestEnergyWindow(window);
  for (let k = shortest; k <= count - shortest; k += 1) {
    const beforeStart = Math.max(0, k - window);
    const afterEnd = Math.min(count, k + window);
    const before = windowSum(energy, beforeStart, k) / (k - beforeStart);
    const after = windowSum(energy, k, afterEnd) / (afterEnd - k);
    ratio[k] = after / Math.max(before, floor);
  }
  return ratio;
}

/** MER_k = (ER_k·|y_k|)³ for windows of `window` samples. */
export function modifiedEnergyRatio(samples: ArrayLike<number>, window: number): Float64Array {
  const ratio = energyRatio(samples, window);
  for (let k = 0; k < ratio.length; k += 1) ratio[k] = ((ratio[k] as number) * Math.abs(samples[k] as number)) ** 3;
  return ratio;
}
