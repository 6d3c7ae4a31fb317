/**
 * One straight line t = intercept + slope·x through the picks of a branch, by the method asked
 * for, with everything a depth calculation needs: slope and intercept, their standard errors and
 * covariance, residuals, σ̂, χ² when weighted, apparent velocity with its SE and 95 % interval.
 *
 * Dispatch on `options.method` (default `least-squares`):
 * - `least-squares` (`fitLeastSquares`): OLS, or WLS with absolute sigmas when `sigmas` is given;
 * - `theil-sen` (`fitTheilSen`): median of pairwise slopes, Kendall-τ interval; sigmas unused;
 * - `huber` (`fitHuber`): Huber M-estimate by IRLS from the Theil–Sen line; with sigmas, the
 *   residuals are standardised by them (absolute pick uncertainties, as for least squares).
 * `options.throughOrigin` forces t = 0 at x = 0 (the direct wave of a surface shot).
 * Sources are named in each method's module (METHODS §3).
 *
 * Edges: refusals are values, never throws — too few picks (3 for a free line, 2 through the
 * origin; 2 and 1 for weighted least squares), all offsets equal (all zero through the origin),
 * non-finite offsets, times or used sigmas (see `refuseFitInput`). Sigmas given to Theil–Sen are
 * ignored and not checked. Arrays of different lengths throw (a programming error).
 *
 * @example
 * // METHODS check case 3.1, direct branch through the origin
 * fitLine([2, 4, 6, 8, 10, 12, 14, 16], [0.0042, 0.00785, 0.01205, 0.01575, 0.0201, 0.0243, 0.0278, 0.03195],
 *         null, { throughOrigin: true })
 * // → { ok: true, fit: { apparentVelocity: 500.276, apparentVelocitySE: 1.718, … } }
 */
import { fitHuber } from './huber.js';
import { fitLeastSquares } from './least-squares.js';
import { fitTheilSen } from './theil-sen.js';
import type { FitOptions, FitOutcome } from './types.js';

export function fitLine(
  offsets: readonly number[],
  times: readonly number[],
  sigmas: readonly number[] | null,
  options: FitOptions = {},
): FitOutcome {
  const throughOrigin = options.throughOrigin ?? false;
  const method = options.method ?? 'least-squares';
  switch (method) {
    case 'least-squares':
      return fitLeastSquares(offsets, times, sigmas, { throughOrigin });
    case 'theil-sen':
      return fitTheilSen(offsets, times, { throughOrigin });
    case 'huber':
      return fitHuber(offsets, times, { throughOrigin, sigmas });
    default:
      throw new RangeError(`fitLine: unknown fit method ${String(method satisfies never)}`);
  }
}
