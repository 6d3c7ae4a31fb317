/**
 * STA/LTA, the short-term over long-term average of a characteristic function (Allen1978), in
 * its classic non-recursive form with the long window just before the short one (METHODS §11):
 *
 * ```
 * CF_k  = y_k² + C·(y_k − y_{k−1})²            (C = 0: energy; Allen's C weights the derivative; y_{−1} = y_0)
 * STA_k = mean CF over [k − n_s + 1, k]
 * LTA_k = mean CF over [max(0, k − n_s − n_l + 1), k − n_s]
 * R_k   = STA_k / max(LTA_k, F),   F = LTA_FLOOR · mean CF over the trace
 * ```
 *
 * The ratio rises as the short window fills with signal while the long one still holds noise;
 * it lags the onset (by up to n_s samples), so a trigger is only a first estimate that places the
 * AIC window (`aic.ts`). Allen used recursive (exponential) averages; boxcar averages are used
 * here so that the ratio is a published formula a test can recompute exactly.
 *
 * Edges:
 * - Near the trace start the long window is clipped at sample 0; R_k is computed only where it
 *   holds at least n_s samples (k ≥ 2·n_s − 1) and is 0 before, so an arrival in the first 2·n_s
 *   samples can trigger only late (the AIC window still reaches back to sample 0).
 * - Where the long window is all zeros (a zero-padded start), the floor F keeps R_k finite (very
 *   large where the short window holds signal); an all-zero trace gives R ≡ 0.
 * - A trace shorter than 2·n_s samples gives R ≡ 0.
 * Misuse throws a RangeError: windows not positive integers, C negative or not finite.
 *
 * @example
 * // METHODS check case 11.1 (0.25 ms, onset at sample 160): n_s = 8, n_l = 64, threshold 4
 * staLtaTrigger(staLtaRatio(trace, 8, 64), 4); // 162
 */
import { prefixSums, windowSum } from './running-sums.js';

/** The long-term average is floored at this fraction of the trace's mean CF (module comment). */
export const LTA_FLOOR = 1e-10;

/** CF_k = y_k² + C·(y_k − y_{k−1})² with y_{−1} = y_0 (C = `derivativeWeight`). */
export function staLtaCharacteristic(samples: ArrayLike<number>, derivativeWeight = 0): Float64Array {
  if (!(derivativeWeight >= 0) || !Number.isFinite(derivativeWeight)) {
    throw new RangeError(`staLtaCharacteristic: derivativeWeight (Allen's C) must be a finite number ≥ 0, got ${derivativeWeight}`);
  }
  const characteristic = new Float64Array(samples.length);
  let previous = samples.length > 0 ? (samples[0] as number) : 0;
  for (let k = 0; k < samples.length; k += 1) {
    const value = samples[k] as number;
    const change = value - previous;
    characteristic[k] = value * value + derivativeWeight * change * change;
    previous = value;
  }
  return characteristic;
}

function checkWindow(name: string, value: number): void {
  if (!Number.isInteger(value) || value < 1) throw new RangeError(`staLtaRatio: ${name} must be a positive whole number of samples, got ${value}`);
}

/** R_k = STA_k/LTA_k of `samples` for windows of `shortWindow` and `longWindow` samples. */
export function staLtaRatio(samples: ArrayLike<number>, shortWindow: number, longWindow: number, derivativeWeight = 0): Float64Array {
  checkWindow('shortWindow', shortWindow);
  checkWindow('longWindow', longWindow);
  const characteristic = staLtaCharacteristic(samples, derivativeWeight);
  const count = characteristic.length;
  const ratio = new Float64Array(count);
  // CF ≥ 0, so its prefix sums are the "sums of squares" that windowSum floors.
  const prefix = prefixSums(characteristic, false);
  const meanCharacteristic = count === 0 ? 0 : (prefix[count] as number) / count;
  if (meanCharacteristic === 0) return ratio;
  const floor = LTA_FLOOR * meanCharacteristic;
  for (let k = 2 * shortWindow - 1; k < count; k += 1) {
    const shortAverage = windowSum(prefix, k - shortWindow + 1, k + 1) / shortWindow;
    const longStart = Math.max(0, k - shortWindow - longWindow + 1);
    const longEnd = k - shortWindow + 1;
    const longAverage = windowSum(prefix, longStart, longEnd) / (longEnd - longStart);
    ratio[k] = shortAverage / Math.max(longAverage, floor);
  }
  return ratio;
}

/** The first sample where the ratio reaches `threshold`, or null when it never does. */
export function staLtaTrigger(ratio: ArrayLike<number>, threshold: number): number | null {
  for (let k = 0; k < ratio.length; k += 1) if ((ratio[k] as number) >= threshold) return k;
  return null;
}
