/**
 * Causal filtering by a cascade of second-order sections, each in transposed direct form II
 * (OppenheimSchafer2010 ch. 6, chapter as recalled), from rest or from given section states:
 *
 * ```
 * y_k   = b₀·x_k + s₁
 * s₁   ← b₁·x_k − a₁·y_k + s₂
 * s₂   ← b₂·x_k − a₂·y_k
 * ```
 *
 * The output of one section is the input of the next. This is the recursion of scipy's `sosfilt`
 * (zero initial state unless `initialStates` is given), against which it is tested.
 *
 * Also here: the steady-state section states for a constant input (scipy's `sosfilt_zi`), which
 * start a filter "already settled" on the first sample so that a trace's DC level does not ring:
 * for section j with gain so far G_j = Π_{i<j} H_i(1),
 * ```
 * s₁ = G_j·(B₁ + B₂)/(1 + a₁ + a₂),  s₂ = G_j·B₂ − a₂·s₁,   B₁ = b₁ − a₁·b₀,  B₂ = b₂ − a₂·b₀
 * ```
 * (the solution of s = A·s + B for the section's companion matrix A, scaled by G_j).
 *
 * Edges: an empty input gives an empty output; no sections return a copy of the input. The input
 * is never modified.
 *
 * @example
 * sosFilter([{ b0: 0.5, b1: 0.5, b2: 0, a1: 0, a2: 0 }], [1, 1, 1]); // Float64Array [0.5, 1, 1]
 */
import type { SecondOrderSection } from './butterworth.js';

/** The two states (s₁, s₂) of every section, flattened: [s₁ of section 0, s₂ of section 0, s₁ of 1, …]. */
export type SectionStates = Float64Array;

/** Filter `samples` causally through `sections`, from rest or from `initialStates` (not modified). */
export function sosFilter(
  sections: readonly SecondOrderSection[],
  samples: ArrayLike<number>,
  initialStates?: SectionStates,
): Float64Array {
  const output = Float64Array.from(samples);
  if (initialStates !== undefined && initialStates.length !== 2 * sections.length) {
    throw new RangeError(`sosFilter: initialStates must hold 2 values per section (${2 * sections.length}), got ${initialStates.length}`);
  }
  sections.forEach((section, index) => {
    const { b0, b1, b2, a1, a2 } = section;
    let first = initialStates?.[2 * index] ?? 0;
    let second = initialStates?.[2 * index + 1] ?? 0;
    for (let k = 0; k < output.length; k += 1) {
      const input = output[k] as number;
      const value = b0 * input + first;
      first = b1 * input - a1 * value + second;
      second = b2 * input - a2 * value;
      output[k] = value;
    }
  });
  return output;
}

/** Section states in steady state for a constant unit input (multiply by the input level). */
export function steadyStateStates(sections: readonly SecondOrderSection[]): SectionStates {
  const states = new Float64Array(2 * sections.length);
  let gainSoFar = 1;
  sections.forEach((section, index) => {
    const { b0, b1, b2, a1, a2 } = section;
    const forced1 = b1 - a1 * b0;
    const forced2 = b2 - a2 * b0;
    const first = (forced1 + forced2) / (1 + a1 + a2);
    states[2 * index] = gainSoFar * first;
    states[2 * index + 1] = gainSoFar * (forced2 - a2 * first);
    gainSoFar *= (b0 + b1 + b2) / (1 + a1 + a2);
  });
  return states;
}
