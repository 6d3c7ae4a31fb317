/**
 * Zero-phase (forward–backward) filtering by a cascade of second-order sections: the trace is
 * filtered forward, the result reversed, filtered again and reversed back, so the phase cancels
 * and the magnitude response is squared. This is scipy's `sosfiltfilt` with its defaults, against which it is
 * tested:
 *
 * ```
 * P = 3·(2·n_sections + 1)                      (pad length; fewer when the trace is short, below)
 * odd extension   x₋ⱼ = 2·x₀ − xⱼ,  x_{n−1+j} = 2·x_{n−1} − x_{n−1−j},  j = 1…P
 * forward pass    from the steady-state states × the first padded sample
 * backward pass   from the steady-state states × the last forward output
 * ```
 *
 * **Why the picker does not use it by default.** A zero-phase filter's impulse response is
 * symmetric, so energy of the onset is spread to times *before* it: a precursor of about one
 * period of the band's low edge, which makes energy-ratio and AIC picks early by up to that much
 * (see `condition.ts`). It suits display; the picker filters causally unless asked otherwise.
 *
 * Edges: a trace of P samples or fewer is padded by n − 1 samples instead (scipy refuses such a
 * trace); one sample is returned as filtered from steady state (itself times the DC gain, 0 for a
 * band-pass); an empty trace gives an empty output. The input is never modified.
 *
 * @example
 * // a constant trace through a band-pass comes back as (nearly) zero everywhere, with no edge ringing
 * sosFiltFilt(butterworthBandPass(2, 10, 100, 0.001), new Array(500).fill(3)); // all |y| < 1e-12
 */
import type { SecondOrderSection } from './butterworth.js';
import { sosFilter, steadyStateStates } from './sos-filter.js';

/** Filter `samples` forward and backward through `sections` (zero phase, squared magnitude). */
export function sosFiltFilt(sections: readonly SecondOrderSection[], samples: ArrayLike<number>): Float64Array {
  const count = samples.length;
  if (count === 0) return new Float64Array(0);
  const padLength = Math.min(3 * (2 * sections.length + 1), count - 1);
  const extended = new Float64Array(count + 2 * padLength);
  const first = samples[0] as number;
  const last = samples[count - 1] as number;
  for (let j = 1; j <= padLength; j += 1) {
    extended[padLength - j] = 2 * first - (samples[j] as number);
    extended[padLength + count - 1 + j] = 2 * last - (samples[count - 1 - j] as number);
  }
  for (let k = 0; k < count; k += 1) extended[padLength + k] = samples[k] as number;

  const unitStates = steadyStateStates(sections);
  const forward = sosFilter(sections, extended, unitStates.map((state) => state * (extended[0] as number)));
  forward.reverse();
  const backward = sosFilter(sections, forward, unitStates.map((state) => state * (forward[0] as number)));
  backward.reverse();
  return backward.slice(padLength, padLength + count);
}
