/**
 * Huber M-estimate of a straight line t = a + b·x by iteratively reweighted least squares (IRLS)
 * (Huber 1964, `Huber1964`; Huber 1981, `Huber1981`; Holland & Welsch 1977, `Holland1977`), as
 * METHODS §3 prescribes: picks near the line count fully, mispicks far from it count less.
 *
 * Each residual r_k is standardised by a pick scale s_k, u_k = r_k/s_k, chosen by whether the picks
 * carry sigmas:
 * - No sigmas: one scale s_k = σ̂ for the branch, estimated from the picks and held fixed,
 *     σ̂ = max(1.4826·MAD of the Theil–Sen residuals, ½·σ_P2)   (MAD = median |r − median r|).
 *   σ_P2 (`cappedResidualScale`) is Huber's "Proposal 2" scale of the Theil–Sen residuals: the σ
 *   that solves Σ min(r_k², k²σ²) = (n − p)·β·σ², β = E_Φ[ψ(u)²] = 0.7102 — a least-squares
 *   residual SD in which no pick counts for more than k·σ. Why the floor: the MAD of a short
 *   branch collapses, because the Theil–Sen line passes through one or two of its picks and their
 *   zero residuals fill the lower half; on 5 picks with normal scatter the MAD scale falls below a
 *   quarter of the true SD in about 28 % of draws, and the branch then claims a scatter, and standard
 *   errors, several times smaller than its least-squares ones. The floor is taken from σ_P2 and
 *   not from the plain least-squares residual SD, because an outlier inflates the latter without
 *   bound: in METHODS check case 3.2 (8 ms on one of 12 picks) it is 2.34 ms, and half of it would
 *   replace the MAD scale 0.3607 ms and undo the robustness, while σ_P2 is 0.4427 ms, since each
 *   pick adds at most k² to its sum. Half of σ_P2, because the floor should stop only a collapse:
 *   the check case keeps its MAD scale (½·σ_P2 = 0.2214 ms), and on 12 picks with normal scatter the
 *   floor decides in about 5 % of draws, on 5 picks in about 46 % (2000 seeded draws each, numpy,
 *   measured while choosing the floor; 12 picks with one 8-SD outlier: 6 %).
 * - Sigmas given (absolute one-SD pick uncertainties, as weighted least squares takes them):
 *   s_k = σ_k and the scale is held at 1. The sigmas already say how far a pick may stray, so no
 *   scale is estimated from the picks, and a short branch cannot claim less scatter than they do.
 *
 * Recipe:
 * 1. From the Theil–Sen line, repeat: u = r/s, weights w = min(1, k/|u|) with k = 1.345, refit by
 *    weighted least squares with weights w_k/s_k² (`leastSquaresLine`), until the fitted times
 *    change by no more than 1e-12 of their largest magnitude (at most 1000 steps; the Huber loss
 *    with fixed scales is convex, so the iteration converges to its one minimum).
 * 2. Approximate covariance, with the Huber factor of METHODS §3 (Huber 1981 ch. 7, small-sample
 *    factor omitted; `huberCovarianceFactor`)
 *      F(u) = [Σψ(u)²/(n − p)] / [Σψ′(u)/n]²,  ψ(u) = max(−k, min(k, u)),  ψ′(u) = 1 when |u| ≤ k else 0
 *    (the count Σψ′ floored at one pick so it never divides by zero):
 *    - no sigmas:    Cov = σ̂²·F(u)·(XᵀX)⁻¹;
 *    - sigmas given: Cov = F_σ(u)·(XᵀWX)⁻¹, W = diag(1/σ_k²): the covariance of weighted least
 *      squares with absolute sigmas (`fitLeastSquares`) scaled by the Huber factor in the form
 *        F_σ(u) = max(Σψ(u)²/(n − p), β) / E_Φ[ψ′]²,   β = E_Φ[ψ²] = 0.7102,  E_Φ[ψ′] = 2Φ(k) − 1 = 0.8214
 *      (`sigmaHuberFactor`). Two changes to F(u), both because the sigmas are absolute:
 *      (a) the denominator is the share of picks inside ±k that the sigmas imply, not the count on
 *          the branch: counting it on 5 picks makes the factor jump by (5/4)² = 1.56 whenever one
 *          clean pick crosses ±k (18 % of them do), which on clean 12-pick branches put the SE more
 *          than 1.5 × the weighted least-squares SE in 5 % of seeded draws, against none with the
 *          implied share (2000 draws, measured with numpy while choosing); this is the expected
 *          rather than the observed curvature of the Huber loss, as one uses expected information;
 *      (b) the mean ψ² is floored at its value β when the picks scatter as their sigmas say, so the
 *          factor is never below F_Φ = β/E_Φ[ψ′]² = 1.0526 (1/0.95, the Huber estimate's variance
 *          relative to least squares at the normal with known scale; Huber 1981 ch. 4, recalled from
 *          memory): as weighted least squares does not shrink its covariance when χ² falls below
 *          n − p, a few picks that happen to lie closer to the line than their sigmas do not make
 *          the fit more precise than the sigmas allow. Picks that stray further (a mispick,
 *          understated sigmas) raise Σψ² — each by at most k² — and the covariance with it.
 *      With n = p (allowed with sigmas, as for weighted least squares) Σψ²/(n − p) is 0/0 and
 *      F_σ = F_Φ.
 * The reported `robustWeights` are min(1, k/|u|) at the final line (without the 1/σ_k²); the 95 %
 * velocity interval uses Student's t on n − p degrees of freedom without sigmas, and the normal
 * quantile with sigmas (nothing is estimated), as weighted least squares does. With sigmas the fit
 * is `weighted` and reports χ² = Σ(r/σ)² of the Huber line.
 *
 * Edges: refusals as for an unweighted fit without sigmas, as for weighted least squares with them
 * (`refuseFitInput`). Without sigmas, a scale counts as zero when it is below 1e-9·max|t| (rounding
 * error, far below any pick resolution); when the MAD is zero (more than half the picks lie on the
 * Theil–Sen line, as noise-free picks do), σ̂ falls back to the residual SD √(Σr²/(n − p)) of the
 * Theil–Sen line before the floor is applied; when the scale is still zero, every pick lies on one
 * line, every weight is 1, and the Huber estimate is the least-squares line, reported with its
 * least-squares standard errors. With sigmas, picks exactly on one line give every weight 1, the
 * weighted least-squares line and F_Φ times its covariance.
 *
 * @example
 * // METHODS check case 3.2 (8 ms outlier on the 6th refracted pick), no sigmas
 * fitHuber(offsets, times) // intercept 31.0988 ms, V = 2003.041 m/s, weight of the outlier 0.064
 */
import { assembleLineFit, symmetricInterval } from './fit-result.js';
import { refuseFitInput } from './fit-input.js';
import { fitLeastSquares, leastSquaresLine } from './least-squares.js';
import { median } from './median.js';
import { normalDensity, normalQuantile, normalUpperTail } from './normal.js';
import { studentTQuantile } from './student-t.js';
import { theilSenLine } from './theil-sen.js';
import type { FitOutcome } from './types.js';

/** Huber's tuning constant: 95 % efficiency at the normal distribution (Huber 1981). */
export const HUBER_TUNING = 1.345;
/** 1/Φ⁻¹(¾): turns a median absolute deviation into a normal standard deviation. */
export const MAD_TO_SD = 1.4826;
/** Share of σ_P2 below which the MAD scale of a branch without sigmas is not allowed to fall (see above). */
export const SCALE_FLOOR_SHARE = 0.5;

/** E_Φ[ψ′(u)] = P(|u| ≤ k) = 2Φ(k) − 1 for standard normal u (0.8214). */
export const INSIDE_AT_NORMAL = 1 - 2 * normalUpperTail(HUBER_TUNING);
/** β = E_Φ[ψ(u)²] = P(|u| ≤ k) − 2k·φ(k) + 2k²·P(u > k): the Proposal 2 target per degree of freedom (0.7102). */
export const PSI_SQUARE_AT_NORMAL =
  INSIDE_AT_NORMAL - 2 * HUBER_TUNING * normalDensity(HUBER_TUNING) + 2 * HUBER_TUNING * HUBER_TUNING * normalUpperTail(HUBER_TUNING);
/** F_Φ = E_Φ[ψ²]/E_Φ[ψ′]² (1.0526): the Huber factor when picks scatter exactly as their sigmas say. */
export const HUBER_FACTOR_AT_NORMAL = PSI_SQUARE_AT_NORMAL / (INSIDE_AT_NORMAL * INSIDE_AT_NORMAL);

const RELATIVE_CHANGE = 1e-12;
/** A scale below this fraction of the largest time is rounding error, not scatter. */
const SCALE_FLOOR = 1e-9;
const MAX_STEPS = 1000;

/** Options of `fitHuber`. */
export interface HuberOptions {
  /** Force the line through t = 0 at x = 0. Default false. */
  readonly throughOrigin?: boolean;
  /**
   * Absolute one-SD pick uncertainties, s, in input order: each residual is standardised by its
   * own sigma and no scale is estimated. Default null (one scale from the picks).
   */
  readonly sigmas?: readonly number[] | null;
}

export function fitHuber(offsets: readonly number[], times: readonly number[], options: HuberOptions = {}): FitOutcome {
  const throughOrigin = options.throughOrigin ?? false;
  const sigmas = options.sigmas ?? null;
  const weighted = sigmas !== null;
  const refused = refuseFitInput(offsets, times, sigmas, { throughOrigin, weighted });
  if (refused) return refused;
  const count = offsets.length;
  const parameterCount = throughOrigin ? 1 : 2;
  const start = theilSenLine(offsets, times, throughOrigin);

  let pickScales: readonly number[];
  if (sigmas !== null) {
    pickScales = sigmas;
  } else {
    const scale = branchScale(start.residuals, start.residualSD, times, parameterCount);
    if (scale === 0) {
      const exact = fitLeastSquares(offsets, times, null, { throughOrigin });
      return exact.ok ? { ok: true, fit: { ...exact.fit, method: 'huber', robustWeights: offsets.map(() => 1) } } : exact;
    }
    pickScales = offsets.map(() => scale);
  }

  const { slope, intercept } = huberLine(offsets, times, pickScales, start, throughOrigin);
  const standardised = offsets.map((offset, position) => ((times[position] as number) - intercept - slope * offset) / (pickScales[position] as number));
  const finalWeights = standardised.map(huberWeight);
  // Without sigmas: σ̂²·F(u)·(XᵀX)⁻¹ and Student's t; with them: F_σ(u)·(XᵀWX)⁻¹ and the normal quantile.
  const design = leastSquaresLine(offsets, times, sigmas === null ? null : sigmas.map((sigma) => 1 / (sigma * sigma)), throughOrigin);
  const scale = sigmas === null ? (pickScales[0] as number) : 1;
  const varianceScale =
    sigmas === null ? scale * scale * huberCovarianceFactor(standardised, parameterCount) : sigmaHuberFactor(standardised, parameterCount);
  const quantile = sigmas === null ? studentTQuantile(0.975, count - parameterCount) : normalQuantile(0.975);
  const slopeVariance = varianceScale * design.unscaledSlopeVariance;
  return {
    ok: true,
    fit: assembleLineFit(
      {
        method: 'huber',
        weighted,
        throughOrigin,
        slope,
        intercept,
        slopeVariance,
        interceptVariance: varianceScale * design.unscaledInterceptVariance,
        covariance: varianceScale * design.unscaledCovariance,
        slopeInterval95: symmetricInterval(slope, Math.sqrt(slopeVariance), quantile),
        robustWeights: finalWeights,
      },
      offsets,
      times,
      sigmas,
    ),
  };
}

/**
 * The fixed scale σ̂ of a branch without sigmas, from its Theil–Sen residuals: the MAD scale (the
 * Theil–Sen residual SD when the MAD is negligible), floored at ½·σ_P2; 0 when even that is
 * negligible (below 1e-9·max|t|), i.e. the picks lie on one line to rounding error.
 */
function branchScale(residuals: readonly number[], residualSD: number, times: readonly number[], parameterCount: number): number {
  const negligible = SCALE_FLOOR * times.reduce((largest, time) => Math.max(largest, Math.abs(time)), 0);
  const centre = median(residuals);
  let scale = MAD_TO_SD * median(residuals.map((residual) => Math.abs(residual - centre)));
  if (scale <= negligible) scale = residualSD;
  scale = Math.max(scale, SCALE_FLOOR_SHARE * cappedResidualScale(residuals, parameterCount));
  return scale <= negligible ? 0 : scale;
}

/** IRLS from `start` with residuals standardised by `pickScales`; input already checked. */
function huberLine(
  offsets: readonly number[],
  times: readonly number[],
  pickScales: readonly number[],
  start: { readonly slope: number; readonly intercept: number },
  throughOrigin: boolean,
): { slope: number; intercept: number } {
  const count = offsets.length;
  let slope = start.slope;
  let intercept = start.intercept;
  const weights = new Array<number>(count).fill(1);
  for (let step = 0; step < MAX_STEPS; step += 1) {
    for (let position = 0; position < count; position += 1) {
      const pickScale = pickScales[position] as number;
      const residual = (times[position] as number) - intercept - slope * (offsets[position] as number);
      weights[position] = huberWeight(residual / pickScale) / (pickScale * pickScale);
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
  return { slope, intercept };
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

/**
 * The Huber factor F_σ(u) = max(Σψ(u)²/(n − p), β)/E_Φ[ψ′]² for residuals u = r/σ standardised by
 * absolute pick sigmas and p fitted parameters (see `fitHuber` for why the denominator is the
 * normal share inside ±k and the mean ψ² is floored at β). With n ≤ p the mean ψ² is undefined and
 * β is used, giving F_Φ = `HUBER_FACTOR_AT_NORMAL`.
 */
export function sigmaHuberFactor(standardisedResiduals: readonly number[], parameterCount: number): number {
  const freedom = standardisedResiduals.length - parameterCount;
  let psiSquares = 0;
  for (const residual of standardisedResiduals) psiSquares += Math.min(residual * residual, HUBER_TUNING * HUBER_TUNING);
  const meanPsiSquare = freedom > 0 ? Math.max(psiSquares / freedom, PSI_SQUARE_AT_NORMAL) : PSI_SQUARE_AT_NORMAL;
  return meanPsiSquare / (INSIDE_AT_NORMAL * INSIDE_AT_NORMAL);
}

/** Relative slack on the piece boundaries of `cappedResidualScale` (rounding of σ² = S/(T − m·k²)). */
const PIECE_SLACK = 1e-12;

/**
 * Huber's "Proposal 2" scale of residuals r_k from a line of p parameters (Huber 1964; Huber 1981
 * ch. 7, with n − p degrees of freedom in place of n, recalled from memory): the σ > 0 solving
 *   Σ min(r_k², k²σ²) = (n − p)·β·σ²,   β = E_Φ[ψ(u)²] = `PSI_SQUARE_AT_NORMAL`,
 * i.e. Σψ(r/σ)² equals its expectation at the normal. With no residual beyond k·σ it is
 * √(Σr²/((n − p)·β)); each residual beyond adds only k² to the sum, so one outlier cannot inflate
 * it without bound. Solved exactly: with the m largest |r| capped, σ² = S_m/((n − p)·β − m·k²),
 * S_m the sum of the other squares; the m for which exactly those m exceed k·σ is the solution.
 *
 * Edges: 0 when no σ > 0 solves it — too few non-zero residuals for the target (each adds at most
 * k²): all residuals zero, or all zero but a few outliers. Fewer residuals than p + 1 is misuse and
 * throws.
 *
 * @example
 * // METHODS check case 3.2, Theil–Sen residuals of the 12 refracted picks with the 8 ms outlier
 * cappedResidualScale(residuals, 2) // 4.427e-4 s
 */
export function cappedResidualScale(residuals: readonly number[], parameterCount: number): number {
  const count = residuals.length;
  if (!(count > parameterCount)) {
    throw new RangeError(`cappedResidualScale: ${count} residuals leave no degree of freedom for ${parameterCount} parameters`);
  }
  const target = (count - parameterCount) * PSI_SQUARE_AT_NORMAL;
  const capSquare = HUBER_TUNING * HUBER_TUNING;
  const squares = Float64Array.from(residuals, (residual) => residual * residual).sort().reverse();
  const tailSums = new Float64Array(count + 1);
  for (let position = count - 1; position >= 0; position -= 1) tailSums[position] = (tailSums[position + 1] as number) + (squares[position] as number);
  for (let capped = 0; capped <= count; capped += 1) {
    const denominator = target - capped * capSquare;
    const rest = tailSums[capped] as number;
    if (denominator <= 0 || rest === 0) return 0;
    const variance = rest / denominator;
    const largestFree = capped < count ? (squares[capped] as number) : 0;
    const smallestCapped = capped > 0 ? (squares[capped - 1] as number) : Number.POSITIVE_INFINITY;
    if (largestFree <= capSquare * variance * (1 + PIECE_SLACK) && smallestCapped >= capSquare * variance * (1 - PIECE_SLACK)) {
      return Math.sqrt(variance);
    }
  }
  return 0;
}
