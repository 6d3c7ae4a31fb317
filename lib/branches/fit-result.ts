/**
 * Assembly of a `LineFit` from a fitted slope, intercept and covariance: residuals, scatter,
 * χ², apparent velocity with its standard error, and the 95 % velocity interval. Shared by the
 * least-squares, Theil–Sen and Huber fits so that every method reports the same quantities the
 * same way.
 *
 * Velocity (METHODS §3): V = 1/b, SE(V) = SE(b)/b² (first-order propagation, JCGM 100:2008 §5.1,
 * `JCGM2008`). The 95 % interval inverts a slope interval [b_lo, b_hi] into [1/b_hi, 1/b_lo]; it
 * is asymmetric about V. When b_lo ≤ 0 the velocity has no upper bound (or the slope is not
 * positive at all) and the interval is null.
 *
 * Edges: a slope of exactly 0 gives an infinite apparent velocity and velocity SE; a negative
 * slope gives a negative apparent velocity (reported as is, for the checks to flag); zero residual
 * degrees of freedom (only weighted fits allow them: the line then passes exactly through as many
 * picks as it has parameters) give a residual SD of 0.
 */
import type { FitMethod, LineFit } from './types.js';

export interface FittedLine {
  readonly method: FitMethod;
  readonly weighted: boolean;
  readonly throughOrigin: boolean;
  readonly slope: number;
  readonly intercept: number;
  readonly slopeVariance: number;
  readonly interceptVariance: number;
  readonly covariance: number;
  /** 95 % interval of the slope, s/m, by the method's own rule. */
  readonly slopeInterval95: readonly [number, number];
  readonly robustWeights: readonly number[] | null;
}

export function assembleLineFit(
  line: FittedLine,
  offsets: readonly number[],
  times: readonly number[],
  sigmas: readonly number[] | null,
): LineFit {
  const count = offsets.length;
  const residuals = new Array<number>(count);
  let residualSumOfSquares = 0;
  let chiSquare = 0;
  for (let position = 0; position < count; position += 1) {
    const residual = (times[position] as number) - line.intercept - line.slope * (offsets[position] as number);
    residuals[position] = residual;
    residualSumOfSquares += residual * residual;
    if (line.weighted && sigmas !== null) chiSquare += (residual / (sigmas[position] as number)) ** 2;
  }
  const degreesOfFreedom = count - (line.throughOrigin ? 1 : 2);
  const residualSD = degreesOfFreedom > 0 ? Math.sqrt(residualSumOfSquares / degreesOfFreedom) : 0;
  const slopeSE = Math.sqrt(line.slopeVariance);
  const [slopeLow, slopeHigh] = line.slopeInterval95;
  return {
    method: line.method,
    weighted: line.weighted,
    throughOrigin: line.throughOrigin,
    slope: line.slope,
    intercept: line.throughOrigin ? 0 : line.intercept,
    slopeSE,
    interceptSE: line.throughOrigin ? 0 : Math.sqrt(line.interceptVariance),
    covariance: line.throughOrigin ? 0 : line.covariance,
    count,
    degreesOfFreedom,
    residualSD,
    residualSumOfSquares,
    chiSquare: line.weighted ? chiSquare : null,
    residuals,
    robustWeights: line.robustWeights,
    apparentVelocity: 1 / line.slope,
    apparentVelocitySE: line.slope === 0 ? Number.POSITIVE_INFINITY : slopeSE / (line.slope * line.slope),
    velocityInterval95: slopeLow > 0 ? [1 / slopeHigh, 1 / slopeLow] : null,
  };
}

/** The symmetric interval b ± quantile·SE(b). */
export function symmetricInterval(slope: number, slopeSE: number, quantile: number): readonly [number, number] {
  return [slope - quantile * slopeSE, slope + quantile * slopeSE];
}
