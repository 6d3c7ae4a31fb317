/**
 * Least-squares straight line t = a + b·x through travel-time picks: ordinary least squares (OLS)
 * when the picks carry no sigmas, weighted least squares (WLS, w = 1/σ²) when they do, with or
 * without a free intercept.
 *
 * Formulas (METHODS §3; Draper & Smith 1998 ch. 1, `Draper1998`; Press et al. 2007 §15.2,
 * `Press2007`; Bevington & Robinson 2003 ch. 6, `Bevington2003`):
 *   OLS   b = Σ(x−x̄)(t−t̄)/S_xx, a = t̄ − b·x̄, σ̂² = Σr²/(n−2),
 *         Var b = σ̂²/S_xx, Var a = σ̂²·(1/n + x̄²/S_xx), Cov(a, b) = −x̄·σ̂²/S_xx
 *   origin b = Σxt/Σx², σ̂² = Σr²/(n−1), Var b = σ̂²/Σx²
 *   WLS   the same with weighted sums and weighted means (x̄_w = Σwx/Σw), and the covariance
 *         (XᵀWX)⁻¹ taken as is: the sigmas are absolute one-SD pick uncertainties, so the
 *         covariance is not rescaled by χ²/(n−2) (compare χ² with n−2 to judge them).
 *   Written with centred sums, (XᵀWX)⁻¹ has Var b = 1/S_xx,w, Var a = 1/Σw + x̄_w²/S_xx,w and
 *   Cov = −x̄_w/S_xx,w, identical to METHODS' S/Δ, S_xx/Δ, −S_x/Δ with Δ = Σw·S_xx,w.
 *
 * Computation: x and t are centred on their (weighted) means before anything is summed, since raw
 * sums lose digits at crustal offsets (x² ~ 1e11 m²). The coefficients come from the
 * `ml-regression` package: `SimpleLinearRegression` on the centred picks for OLS, and
 * `MultivariateLinearRegression` without its own intercept on √w-scaled centred rows for WLS and
 * for every line through the origin (its columns are then orthogonal, so its normal equations are
 * well conditioned).
 *
 * Intervals: the 95 % slope interval is b ± t₀.₉₇₅,ν·SE(b) with Student's t on ν = n − p degrees
 * of freedom when σ̂ is estimated (OLS), and b ± z₀.₉₇₅·SE(b) with the normal quantile when the
 * sigmas are absolute (WLS), since then no variance is estimated.
 *
 * Edges: see `refuseFitInput` (too few picks, all offsets equal, non-finite input are refused as
 * values). A weighted fit through exactly as many picks as parameters has zero degrees of freedom:
 * its SEs still come from the sigmas.
 *
 * @example
 * // METHODS check case 3.1, refracted branch
 * fitLeastSquares([24, 28, 32, …, 68], [0.0432839, …, 0.0649839], null)
 * // → slope 4.99650e-4 s/m (V = 2001.400 m/s ± 27.770), intercept 0.0310000 s ± 0.000333
 */
import { MultivariateLinearRegression, SimpleLinearRegression } from 'ml-regression';
import { assembleLineFit, symmetricInterval } from './fit-result.js';
import { refuseFitInput } from './fit-input.js';
import { normalQuantile } from './normal.js';
import { studentTQuantile } from './student-t.js';
import type { FitOutcome } from './types.js';

/** Options of `fitLeastSquares`. */
export interface LeastSquaresOptions {
  /** Force the line through t = 0 at x = 0. Default false. */
  readonly throughOrigin?: boolean;
}

export function fitLeastSquares(
  offsets: readonly number[],
  times: readonly number[],
  sigmas: readonly number[] | null,
  options: LeastSquaresOptions = {},
): FitOutcome {
  const throughOrigin = options.throughOrigin ?? false;
  const weighted = sigmas !== null;
  const refused = refuseFitInput(offsets, times, sigmas, { throughOrigin, weighted });
  if (refused) return refused;

  const weights = sigmas === null ? null : sigmas.map((sigma) => 1 / (sigma * sigma));
  const line = leastSquaresLine(offsets, times, weights, throughOrigin);
  const parameterCount = throughOrigin ? 1 : 2;
  const degreesOfFreedom = offsets.length - parameterCount;

  // OLS: scale the unscaled covariance by σ̂²; WLS: (XᵀWX)⁻¹ is the covariance.
  let varianceScale = 1;
  if (!weighted) {
    let residualSumOfSquares = 0;
    offsets.forEach((offset, position) => {
      residualSumOfSquares += ((times[position] as number) - line.intercept - line.slope * offset) ** 2;
    });
    varianceScale = residualSumOfSquares / degreesOfFreedom;
  }
  const slopeVariance = varianceScale * line.unscaledSlopeVariance;
  const quantile = weighted ? normalQuantile(0.975) : studentTQuantile(0.975, degreesOfFreedom);
  return {
    ok: true,
    fit: assembleLineFit(
      {
        method: 'least-squares',
        weighted,
        throughOrigin,
        slope: line.slope,
        intercept: line.intercept,
        slopeVariance,
        interceptVariance: varianceScale * line.unscaledInterceptVariance,
        covariance: varianceScale * line.unscaledCovariance,
        slopeInterval95: symmetricInterval(line.slope, Math.sqrt(slopeVariance), quantile),
        robustWeights: null,
      },
      offsets,
      times,
      sigmas,
    ),
  };
}

/** Slope, intercept and (XᵀWX)⁻¹ of a least-squares line; input already checked. */
export interface LeastSquaresLine {
  readonly slope: number;
  /** 0 for a line through the origin. */
  readonly intercept: number;
  readonly unscaledSlopeVariance: number;
  readonly unscaledInterceptVariance: number;
  readonly unscaledCovariance: number;
}

/**
 * The least-squares core: coefficients through `ml-regression` on centred data and the unscaled
 * covariance (XᵀWX)⁻¹ from centred sums. `weights` null means all weights 1. Used by
 * `fitLeastSquares` and by each IRLS step of `fitHuber`. Input must already pass
 * `refuseFitInput`.
 */
export function leastSquaresLine(
  offsets: readonly number[],
  times: readonly number[],
  weights: readonly number[] | null,
  throughOrigin: boolean,
): LeastSquaresLine {
  const count = offsets.length;
  const weightAt = (position: number): number => (weights === null ? 1 : (weights[position] as number));

  if (throughOrigin) {
    const rows: number[][] = [];
    const responses: number[][] = [];
    let weightedSquares = 0;
    for (let position = 0; position < count; position += 1) {
      const root = Math.sqrt(weightAt(position));
      const offset = offsets[position] as number;
      rows.push([root * offset]);
      responses.push([root * (times[position] as number)]);
      weightedSquares += weightAt(position) * offset * offset;
    }
    const regression = new MultivariateLinearRegression(rows, responses, { intercept: false, statistics: false });
    return {
      slope: coefficient(regression.weights, 0),
      intercept: 0,
      unscaledSlopeVariance: 1 / weightedSquares,
      unscaledInterceptVariance: 0,
      unscaledCovariance: 0,
    };
  }

  let weightSum = 0;
  let offsetSum = 0;
  let timeSum = 0;
  for (let position = 0; position < count; position += 1) {
    const weight = weightAt(position);
    weightSum += weight;
    offsetSum += weight * (offsets[position] as number);
    timeSum += weight * (times[position] as number);
  }
  const meanOffset = offsetSum / weightSum;
  const meanTime = timeSum / weightSum;
  const centredOffsets = new Float64Array(count);
  const centredTimes = new Float64Array(count);
  let centredSquares = 0;
  for (let position = 0; position < count; position += 1) {
    const centredOffset = (offsets[position] as number) - meanOffset;
    centredOffsets[position] = centredOffset;
    centredTimes[position] = (times[position] as number) - meanTime;
    centredSquares += weightAt(position) * centredOffset * centredOffset;
  }

  let slope: number;
  let centredIntercept: number;
  if (weights === null) {
    const regression = new SimpleLinearRegression(centredOffsets, centredTimes);
    slope = regression.slope;
    centredIntercept = regression.intercept;
  } else {
    const rows: number[][] = [];
    const responses: number[][] = [];
    for (let position = 0; position < count; position += 1) {
      const root = Math.sqrt(weightAt(position));
      rows.push([root, root * (centredOffsets[position] as number)]);
      responses.push([root * (centredTimes[position] as number)]);
    }
    const regression = new MultivariateLinearRegression(rows, responses, { intercept: false, statistics: false });
    centredIntercept = coefficient(regression.weights, 0);
    slope = coefficient(regression.weights, 1);
  }
  return {
    slope,
    intercept: meanTime + centredIntercept - slope * meanOffset,
    unscaledSlopeVariance: 1 / centredSquares,
    unscaledInterceptVariance: 1 / weightSum + (meanOffset * meanOffset) / centredSquares,
    unscaledCovariance: -meanOffset / centredSquares,
  };
}

function coefficient(weights: readonly (readonly number[])[], row: number): number {
  const value = weights[row]?.[0];
  if (value === undefined) throw new RangeError(`leastSquaresLine: ml-regression returned no coefficient ${row}`);
  return value;
}
