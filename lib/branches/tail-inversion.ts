/**
 * Inversion of a symmetric distribution's upper tail, shared by the Student-t and normal quantiles.
 *
 * Finds the point `z ≥ 0` where a continuous, strictly decreasing upper-tail function
 * `Q(z) = P(Z > z)` equals a target in (0, ½], by Newton's method on Q with the density as its
 * derivative, kept inside a bracket that every evaluation narrows (bisection whenever a Newton
 * step would leave the bracket). This is the safeguarded Newton iteration of Press et al. (2007)
 * §9.4 (`Press2007`).
 *
 * Edges: a target of exactly ½ returns 0 (the median); the iteration stops when a step changes z by
 * less than 1e-15·z or the bracket has closed to one ulp. Targets outside (0, ½] are misuse and
 * throw (callers map p to min(p, 1 − p) first).
 *
 * @example
 * // the standard normal's upper 2.5 % point
 * invertUpperTail(normalUpperTail, normalDensity, 0.025) // 1.959963984540054 (scipy.stats.norm.isf)
 */
export function invertUpperTail(
  upperTail: (point: number) => number,
  density: (point: number) => number,
  target: number,
): number {
  if (!(target > 0 && target <= 0.5)) {
    throw new RangeError(`invertUpperTail: the target tail probability must lie in (0, 0.5], got ${target}`);
  }
  if (target === 0.5) return 0;
  let lower = 0;
  let upper = 1;
  while (upperTail(upper) > target) {
    lower = upper;
    upper *= 2;
    if (!Number.isFinite(upper)) throw new RangeError(`invertUpperTail: no finite quantile for tail ${target}`);
  }
  let point = 0.5 * (lower + upper);
  for (let iteration = 0; iteration < 200; iteration += 1) {
    const excess = upperTail(point) - target;
    if (excess > 0) lower = point;
    else upper = point;
    const slope = density(point);
    let next = slope > 0 ? point + excess / slope : Number.NaN;
    if (!(next > lower && next < upper)) next = 0.5 * (lower + upper);
    const step = Math.abs(next - point);
    point = next;
    if (step <= 1e-15 * point || upper - lower <= Number.EPSILON * upper) break;
  }
  return point;
}
