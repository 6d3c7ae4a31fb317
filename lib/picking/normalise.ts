/**
 * Trace normalisation: the trace divided by one number, its largest absolute sample (`max-abs`,
 * so the trace spans [−1, 1]) or its root-mean-square (`rms`, so its RMS is 1). Common practice
 * for display and for comparing traces; the pickers' characteristic functions are ratios and do
 * not change under it.
 *
 * ```
 * max-abs:  y_k = x_k / max_j |x_j|        rms:  y_k = x_k / √(Σ_j x_j² / n)
 * ```
 *
 * Edges: a trace of zeros (a dead trace) or an empty trace comes back as zeros (nothing to divide
 * by; no NaN). Non-finite samples are misuse (callers check first) and give non-finite output.
 * The input is never modified.
 *
 * @example
 * normaliseTrace([1, -4, 2], 'max-abs'); // Float64Array [0.25, -1, 0.5]
 */

export type NormalisationMode = 'max-abs' | 'rms';

/** `samples` divided by their largest absolute value or by their RMS. */
export function normaliseTrace(samples: ArrayLike<number>, mode: NormalisationMode): Float64Array {
  const output = Float64Array.from(samples);
  let divisor = 0;
  if (mode === 'max-abs') {
    for (const value of output) divisor = Math.max(divisor, Math.abs(value));
  } else {
    let sumOfSquares = 0;
    for (const value of output) sumOfSquares += value * value;
    divisor = output.length === 0 ? 0 : Math.sqrt(sumOfSquares / output.length);
  }
  if (divisor === 0) return output.fill(0);
  for (let k = 0; k < output.length; k += 1) output[k] = (output[k] as number) / divisor;
  return output;
}
