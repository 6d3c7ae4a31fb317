/**
 * Automatic gain control by sliding-window RMS (common practice; Yilmaz2001 §1, section as
 * recalled): each sample divided by the RMS of the samples in a window centred on it, so that
 * weak late arrivals and strong early ones display at one level.
 *
 * ```
 * y_k = x_k / √( Σ_{j=k−h}^{k+h} x_j² / m_k ),   h = ⌊window/(2T)⌋,  m_k = samples of the window inside the trace
 * ```
 *
 * The window is 2h + 1 samples (at least 1), clipped at the trace ends (m_k counts the samples
 * inside). AGC flattens the amplitude contrast that marks a first break: energy-ratio and AIC
 * pickers see noise raised to the level of the signal ahead of the onset. It is off by default in
 * the picker and meant for display (or for picking on traces whose coda swamps the onset).
 *
 * Edges: where the window holds only zeros (a dead stretch) the output is 0; a window longer than
 * the trace uses the whole trace; an empty trace gives an empty output. Misuse throws a
 * RangeError: a window or sample interval not positive and finite. The input is never modified.
 *
 * @example
 * automaticGainControl([0, 2, 0, -2, 0], 0.003, 0.001); // h = 1: [0, 1.732…, 0, −1.732…, 0]
 */
import { prefixSums, windowSum } from './running-sums.js';

/** `samples` divided by their sliding RMS over a centred window of `window` seconds. */
export function automaticGainControl(samples: ArrayLike<number>, window: number, sampleInterval: number): Float64Array {
  if (!(window > 0) || !Number.isFinite(window)) {
    throw new RangeError(`automaticGainControl: window must be a positive number of seconds, got ${window}`);
  }
  if (!(sampleInterval > 0) || !Number.isFinite(sampleInterval)) {
    throw new RangeError(`automaticGainControl: sampleInterval must be a positive number of seconds, got ${sampleInterval}`);
  }
  const count = samples.length;
  const halfWidth = Math.floor(window / (2 * sampleInterval));
  const energy = prefixSums(samples, true);
  const output = new Float64Array(count);
  for (let k = 0; k < count; k += 1) {
    const start = Math.max(0, k - halfWidth);
    const end = Math.min(count, k + halfWidth + 1);
    const sum = windowSum(energy, start, end);
    output[k] = sum === 0 ? 0 : (samples[k] as number) / Math.sqrt(sum / (end - start));
  }
  return output;
}
