/**
 * Theil–Sen line (Theil 1950, `Theil1950`; Sen 1968, `Sen1968`): a straight line t = a + b·x
 * that up to about 29 % of wild picks cannot pull away (its breakdown point).
 *
 * Slope b = median of the pairwise slopes (t_j − t_k)/(x_j − x_k) over all pairs with x_j ≠ x_k.
 * Intercept a = median(t − b·x) (METHODS §3 and "Where sources disagree" 3: Sen 1968 defines no
 * intercept; scipy.stats.theilslopes defaults to median(t) − b·median(x), which can differ by
 * milliseconds — 2 ms in check case 3.2; its `method='joint'` is ours).
 *
 * Slope interval (Sen 1968, eq. 2.6, with the order statistics scipy.stats.theilslopes uses):
 * with the N pairwise slopes sorted, n picks, and tie groups of sizes k in x and in t,
 *   σ_S² = [n(n−1)(2n+5) − Σ_x k(k−1)(2k+5) − Σ_t k(k−1)(2k+5)]/18,
 *   upper = slope[min(round((N + z·σ_S)/2), N−1)], lower = slope[max(round((N − z·σ_S)/2) − 1, 0)]
 * (0-based, z = z₀.₉₇₅ = 1.95996…, `round` half to even as numpy rounds). When heavy ties make
 * σ_S² negative it is taken as 0 (the interval then shrinks to the middle slopes).
 *
 * Covariance for the depth stage (our choice, documented): SE(b) = (upper − lower)/(2·z₀.₉₇₅), and
 * the 2×2 covariance is taken proportional to the OLS shape (XᵀX)⁻¹ with the slope variance
 * matched: Var a = SE(b)²·Σx²/n, Cov(a, b) = −x̄·SE(b)². This keeps the strong slope–intercept
 * anti-correlation that a depth calculation must not drop. The velocity interval inverts the
 * Kendall-τ slope interval itself.
 *
 * Through the origin (direct wave of a surface shot), the slope is the median of the ratios t/x
 * over picks with x ≠ 0, and its interval takes the sign-test order statistics of the sorted
 * ratios with σ_S = √m for m ratios (the count of ratios below the true slope is Binomial(m, ½)),
 * by the same rounding rule.
 *
 * Pick sigmas are not used: the method is rank-based. Cost O(n² log n) time and O(n²) memory
 * (n = 3000 picks: 4.5 million slopes, about 0.7 s measured).
 *
 * Edges: refusals as in `refuseFitInput` for an unweighted fit (3 picks for a free line, 2 through
 * the origin; all offsets equal; non-finite values). With 3 picks the interval is the full range
 * of the 3 slopes.
 *
 * @example
 * // METHODS check case 3.2 (refracted picks of 3.1 with 8 ms added to the 6th)
 * fitTheilSen(offsets, times) // slope 4.96652e-4 s/m (2013.483 m/s), intercept 31.2080 ms,
 *                              // slope interval [4.75e-4, 5.25e-4] s/m
 */
import { assembleLineFit } from './fit-result.js';
import { refuseFitInput } from './fit-input.js';
import { median, medianOfSorted } from './median.js';
import { normalQuantile } from './normal.js';
import type { FitOutcome, LineFit } from './types.js';

/** Options of `fitTheilSen`. */
export interface TheilSenOptions {
  /** Force the line through t = 0 at x = 0. Default false. */
  readonly throughOrigin?: boolean;
}

export function fitTheilSen(
  offsets: readonly number[],
  times: readonly number[],
  options: TheilSenOptions = {},
): FitOutcome {
  const throughOrigin = options.throughOrigin ?? false;
  const refused = refuseFitInput(offsets, times, null, { throughOrigin, weighted: false });
  if (refused) return refused;
  return { ok: true, fit: theilSenLine(offsets, times, throughOrigin) };
}

/** The Theil–Sen fit of input already checked by `refuseFitInput`. */
export function theilSenLine(offsets: readonly number[], times: readonly number[], throughOrigin: boolean): LineFit {
  const count = offsets.length;
  const z = normalQuantile(0.975);
  let slopes: Float64Array;
  let spread: number;
  if (throughOrigin) {
    slopes = new Float64Array(count);
    let ratioCount = 0;
    for (let position = 0; position < count; position += 1) {
      const offset = offsets[position] as number;
      if (offset !== 0) slopes[ratioCount++] = (times[position] as number) / offset;
    }
    slopes = slopes.subarray(0, ratioCount);
    spread = Math.sqrt(ratioCount);
  } else {
    slopes = pairwiseSlopes(offsets, times);
    const variance = (tieSum([count]) - tieSum(tieGroupSizes(offsets)) - tieSum(tieGroupSizes(times))) / 18;
    spread = Math.sqrt(Math.max(variance, 0));
  }
  slopes.sort();
  const slopeCount = slopes.length;
  const slope = medianOfSorted(slopes);
  const upper = slopes[Math.min(roundHalfEven((slopeCount + z * spread) / 2), slopeCount - 1)] as number;
  const lower = slopes[Math.max(roundHalfEven((slopeCount - z * spread) / 2) - 1, 0)] as number;
  const intercept = throughOrigin ? 0 : median(offsets.map((offset, position) => (times[position] as number) - slope * offset));

  const slopeSE = (upper - lower) / (2 * z);
  const slopeVariance = slopeSE * slopeSE;
  let meanOffset = 0;
  let meanSquare = 0;
  for (const offset of offsets) {
    meanOffset += offset / count;
    meanSquare += (offset * offset) / count;
  }
  return assembleLineFit(
    {
      method: 'theil-sen',
      weighted: false,
      throughOrigin,
      slope,
      intercept,
      slopeVariance,
      interceptVariance: slopeVariance * meanSquare,
      covariance: -meanOffset * slopeVariance,
      slopeInterval95: [lower, upper],
      robustWeights: null,
    },
    offsets,
    times,
    null,
  );
}

/** Every (t_j − t_k)/(x_j − x_k) with x_j ≠ x_k, unsorted. */
function pairwiseSlopes(offsets: readonly number[], times: readonly number[]): Float64Array {
  const count = offsets.length;
  const slopes = new Float64Array((count * (count - 1)) / 2);
  let filled = 0;
  for (let first = 0; first < count; first += 1) {
    const firstOffset = offsets[first] as number;
    const firstTime = times[first] as number;
    for (let second = first + 1; second < count; second += 1) {
      const offsetDifference = (offsets[second] as number) - firstOffset;
      if (offsetDifference !== 0) slopes[filled++] = ((times[second] as number) - firstTime) / offsetDifference;
    }
  }
  return slopes.subarray(0, filled);
}

/** Sizes of the groups of exactly equal values that hold more than one value. */
function tieGroupSizes(values: readonly number[]): number[] {
  const sorted = Float64Array.from(values).sort();
  const sizes: number[] = [];
  let run = 1;
  for (let position = 1; position <= sorted.length; position += 1) {
    if (position < sorted.length && sorted[position] === sorted[position - 1]) {
      run += 1;
    } else {
      if (run > 1) sizes.push(run);
      run = 1;
    }
  }
  return sizes;
}

/** Σ k(k−1)(2k+5) over group sizes k (Sen 1968, eq. 2.6). */
function tieSum(sizes: readonly number[]): number {
  return sizes.reduce((sum, size) => sum + size * (size - 1) * (2 * size + 5), 0);
}

/** Round to the nearest integer, halves to the even neighbour (numpy.round). */
export function roundHalfEven(value: number): number {
  const floor = Math.floor(value);
  const fraction = value - floor;
  if (fraction > 0.5) return floor + 1;
  if (fraction < 0.5) return floor;
  return floor % 2 === 0 ? floor : floor + 1;
}
