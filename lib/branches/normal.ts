/**
 * The standard normal distribution: upper tail and quantile, for the Kendall-τ interval of the
 * Theil–Sen slope and the intervals of fits with known (absolute) pick uncertainties.
 *
 * The tail is Q(z) = ½·erfc(z/√2) = ½·Γ(½, z²/2)/Γ(½) for z ≥ 0, through the project's
 * regularised upper incomplete gamma function (Press et al. 2007, §6.2, `Press2007`); the
 * quantile inverts it by safeguarded Newton steps (`invertUpperTail`).
 *
 * Edges: p = ½ gives 0; p outside (0, 1) or NaN is misuse and throws.
 *
 * @example
 * normalQuantile(0.975) // 1.959963984540054 (scipy.stats.norm.ppf)
 */
import { regularisedUpperGamma } from '../stats/chi-square.js';
import { invertUpperTail } from './tail-inversion.js';

export function normalQuantile(probability: number): number {
  if (!(probability > 0 && probability < 1)) {
    throw new RangeError(`normalQuantile: probability must lie strictly between 0 and 1, got ${probability}`);
  }
  const magnitude = invertUpperTail(normalUpperTail, normalDensity, Math.min(probability, 1 - probability));
  return probability < 0.5 ? -magnitude : magnitude;
}

/** P(Z > z) for the standard normal; any real z. */
export function normalUpperTail(point: number): number {
  if (Number.isNaN(point)) throw new RangeError('normalUpperTail: z is NaN');
  if (point === 0) return 0.5;
  if (!Number.isFinite(point)) return point > 0 ? 0 : 1;
  const halfTail = 0.5 * regularisedUpperGamma(0.5, (point * point) / 2);
  return point > 0 ? halfTail : 1 - halfTail;
}

/** Density of the standard normal. */
export function normalDensity(point: number): number {
  return Math.exp((-point * point) / 2) / Math.sqrt(2 * Math.PI);
}
