/**
 * Chi-square upper tail probability P(χ²_ν ≥ x), through the regularised upper incomplete gamma
 * function Q(ν/2, x/2) (Press et al. 2007, §6.2: series for x < a + 1, continued fraction
 * otherwise, Lentz's method).
 *
 * Edges: x ≤ 0 gives 1; ν must be a positive number (misuse throws); x = +∞ gives 0.
 *
 * @example
 * chiSquareSurvival(18.307, 10) // ≈ 0.05 (scipy.stats.chi2.sf)
 */
export function chiSquareSurvival(chiSquare: number, degreesOfFreedom: number): number {
  if (!(degreesOfFreedom > 0) || !Number.isFinite(degreesOfFreedom)) {
    throw new RangeError(`chiSquareSurvival: degrees of freedom must be a positive finite number, got ${degreesOfFreedom}`);
  }
  if (Number.isNaN(chiSquare)) throw new RangeError('chiSquareSurvival: chi-square is NaN');
  if (chiSquare <= 0) return 1;
  if (chiSquare === Number.POSITIVE_INFINITY) return 0;
  return regularisedUpperGamma(degreesOfFreedom / 2, chiSquare / 2);
}

const EPSILON = 1e-15;
const TINY = 1e-300;
const MAX_ITERATIONS = 10_000;

/** Q(a, x) = Γ(a, x)/Γ(a), a > 0, x > 0. */
export function regularisedUpperGamma(shape: number, x: number): number {
  const logPrefactor = -x + shape * Math.log(x) - logGamma(shape);
  if (x < shape + 1) {
    // Series for the lower function P(a, x); Q = 1 − P.
    let term = 1 / shape;
    let sum = term;
    let denominator = shape;
    for (let iteration = 0; iteration < MAX_ITERATIONS; iteration += 1) {
      denominator += 1;
      term *= x / denominator;
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * EPSILON) break;
    }
    return 1 - sum * Math.exp(logPrefactor);
  }
  // Continued fraction for Q(a, x), modified Lentz.
  let b = x + 1 - shape;
  let c = 1 / TINY;
  let d = 1 / b;
  let fraction = d;
  for (let iteration = 1; iteration < MAX_ITERATIONS; iteration += 1) {
    const an = -iteration * (iteration - shape);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < TINY) d = TINY;
    c = b + an / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const delta = d * c;
    fraction *= delta;
    if (Math.abs(delta - 1) < EPSILON) break;
  }
  return Math.exp(logPrefactor) * fraction;
}

const LANCZOS = [
  676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059, 12.507343278686905,
  -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];

/** ln Γ(z) for z > 0 by the Lanczos approximation (g = 7, n = 9), ~15 digits. */
export function logGamma(z: number): number {
  if (z < 0.5) return Math.log(Math.PI / Math.abs(Math.sin(Math.PI * z))) - logGamma(1 - z);
  const shifted = z - 1;
  let sum = 0.99999999999980993;
  LANCZOS.forEach((coefficient, k) => {
    sum += coefficient / (shifted + k + 1);
  });
  const t = shifted + LANCZOS.length - 0.5;
  return 0.5 * Math.log(2 * Math.PI) + (shifted + 0.5) * Math.log(t) - t + Math.log(sum);
}
