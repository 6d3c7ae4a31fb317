/**
 * Huber M-estimate of a straight line t = a + b·x by iteratively reweighted least squares (IRLS)
 * (Huber 1964, `Huber1964`; Huber 1981, `Huber1981`; Holland & Welsch 1977, `Holland1977`), as
 * METHODS §3 prescribes: picks near the line count fully, mispicks far from it count less.
 *
 * Recipe:
 * 1. Scale σ̂ = 1.4826·MAD of the Theil–Sen residuals (MAD = median |r − median r|), held fixed.
 * 2. From the Theil–Sen line, repeat: u = r/σ̂, weights w = min(1, k/|u|) with k = 1.345, refit by
 *    weighted least squares (`leastSquaresLine`), until the fitted times change by no more than
 *    1e-12 of their largest magnitude (at most 1000 steps; the Huber loss with fixed scale is
 *    convex, so the iteration converges to its one minimum).
 * 3. Approximate covariance (Huber 1981 ch. 7, small-sample factor omitted):
 *      Cov = σ̂²·[Σψ(u)²/(n − p)] / [Σψ′(u)/n]² · (XᵀX)⁻¹,
 *    ψ(u) = max(−k, min(k, u)), ψ′(u) = 1 when |u| ≤ k else 0; the count Σψ′ is floored at one
 *    pick so it never divides by zero (`huberCovarianceFactor`).
 * The reported `robustWeights` are min(1, k/|u|) at the final line; the 95 % velocity interval uses
 * Student's t on n − p degrees of freedom.
 *
 * Edges: refusals as for an unweighted fit (`refuseFitInput`). A scale counts as zero when it is
 * below 1e-9·max|t| (rounding error, far below any pick resolution). When the MAD is zero (more
 * than half the picks lie on the Theil–Sen line, as noise-free picks do), σ̂ falls back to the
 * residual SD √(Σr²/(n − p)) of the Theil–Sen line; when that is zero too, every pick lies on one
 * line, every weight is 1, and the Huber estimate is the least-squares line, reported with its
 * least-squares standard errors. Pick sigmas are not used.
 *
 * @example
 * // METHODS check case 3.2 (8 ms outlier on the 6th refracted pick)
 * fitHuber(offsets, times) // intercept 31.0988 ms, V = 2003.041 m/s, weight of the outlier 0.064
 */
import { assembleLineFit, symmetricInterval } from './fit-result.js';
import { refuseFitInput } from './fit-input.js';
import { fitLeastSquares, leastSquaresLine } from './least-squares.js';
import { median } from './median.js';
import { studentTQuantile } from './student-t.js';
import { theilSenLine } from './theil-sen.js';
import type { FitOutcome } from './types.js';

/** Huber's tuning constant: 95 % efficiency at the normal distribution (Huber 1981). */
export const HUBER_TUNING = 1.345;
/** 1/Φ⁻¹(¾): turns a median absolute deviation into a normal standard deviation. */
export const MAD_TO_SD = 1.4826;
const RELATIVE_CHANGE = 1e-12;
/** A scale below this fraction of the largest time is rounding error, not scatter. */
const SCALE_FLOOR = 1e-9;
const MAX_STEPS = 1000;

/** Options of `fitHuber`. */
export interface HuberOptions {
  /** Force the line through t = 0 at x = 0. Default false. */
  readonly throughOrigin?: boolean;
}

export function fitHuber(offsets: readonly number[], times: readonly number[], options: HuberOptions = {}): FitOutcome {
  const throughOrigin = options.throughOrigin ?? false;
  const refused = refuseFitInput(offsets, times, null, { throughOrigin, weighted: false });
  if (refused) return refused;
  const count = offsets.length;
  const parameterCount = throughOrigin ? 1 : 2;

  const start = theilSenLine(offsets, times, throughOrigin);
  const startResiduals = start.residuals;
  const centre = median(startResiduals);
  const negligible = SCALE_FLOOR * times.reduce((largest, time) => Math.max(largest, Math.abs(time)), 0);
  let scale = MAD_TO_SD * median(startResiduals.map((residual) => Math.abs(residual - centre)));
  if (scale <= negligible) scale = start.residualSD;
  if (scale <= negligible) {
    const exact = fitLeastSquares(offsets, times, null, { throughOrigin });
    return exact.ok ? { ok: true, fit: { ...exact.fit, method: 'huber', robustWeights: offsets.map(() => 1) } } : exact;
  }

  let slope = start.slope;
  let intercept = start.intercept;
  const weights = new Array<number>(count).fill(1);
  for (let step = 0; step < MAX_STEPS; step += 1) {
    for (let position = 0; position < count; position += 1) {
      const residual = (times[position] as number) - intercept - slope * (offsets[position] as number);
      weights[position] = huberWeight(residual / scale);
    }
    const next = leastSquaresLine(offsets, times, weights, throughOrigin);
    let largestChange = 0;
    let largestFitted = 0;
    for (const offset of offsets) {
      const fitted = next.intercept + next.slope * offset;
      largestChange = Math.max(largestChange, Math.abs(fitted - intercept - slope * offset));
      largestFitted = Math.max(largestFitted, Math.abs(fitted));
    }
    slope = next.slope;
    intercept = next.intercept;
    if (largestChange <= RELATIVE_CHANGE * largestFitted) break;
  }

  const standardised = offsets.map((offset, position) => ((times[position] as number) - intercept - slope * offset) / scale);
  const finalWeights = standardised.map(huberWeight);
  const design = leastSquaresLine(offsets, times, null, throughOrigin);
  const varianceScale = scale * scale * huberCovarianceFactor(standardised, parameterCount);
  const slopeVariance = varianceScale * design.unscaledSlopeVariance;
  return {
    ok: true,
    fit: assembleLineFit(
      {
        method: 'huber',
        weighted: false,
        throughOrigin,
        slope,
        intercept,
        slopeVariance,
        interceptVariance: varianceScale * design.unscaledInterceptVariance,
        covariance: varianceScale * design.unscaledCovariance,
        slopeInterval95: symmetricInterval(slope, Math.sqrt(slopeVariance), studentTQuantile(0.975, count - parameterCount)),
        robustWeights: finalWeights,
      },
      offsets,
      times,
      null,
    ),
  };
}

/** Huber's IRLS weight min(1, k/|u|) of a standardised residual u. */
export function huberWeight(standardisedResidual: number): number {
  const magnitude = Math.abs(standardisedResidual);
  return magnitude <= HUBER_TUNING ? 1 : HUBER_TUNING / magnitude;
}

/**
 * The factor [Σψ(u)²/(n − p)] / [Σψ′(u)/n]² of Huber's approximate covariance (Huber 1981 ch. 7),
 * for standardised residuals u and p fitted parameters. Σψ′ (the count of |u| ≤ k) is floored at 1.
 */
export function huberCovarianceFactor(standardisedResiduals: readonly number[], parameterCount: number): number {
  const count = standardisedResiduals.length;
  let psiSquares = 0;
  let inside = 0;
  for (const residual of standardisedResiduals) {
    const psi = Math.max(-HUBER_TUNING, Math.min(HUBER_TUNING, residual));
    psiSquares += psi * psi;
    if (Math.abs(residual) <= HUBER_TUNING) inside += 1;
  }
  const meanDerivative = Math.max(inside, 1) / count;
  return psiSquares / (count - parameterCount) / (meanDerivative * meanDerivative);
}
