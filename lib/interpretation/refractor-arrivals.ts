/**
 * The picks of one shot side on one refractor's head-wave branch, as the reversed-profile methods
 * take them: receiver positions along the line, times corrected to the reference surface, sigmas,
 * and a straight line through them for the reciprocal time.
 *
 * Corrections (METHODS §8; Telford1990 ch. 4; Sheriff1995 ch. 4), with V_1 the near-surface velocity
 * and V_n the refractor's velocity (both the survey's):
 * - a buried shot (depth d) is brought up to its ground surface: its head-wave times are d·q_{1,n}
 *   early, so t_uh·cos θ (`upholeCorrection`, V_1 = d/t_uh) is added when the uphole time is known,
 *   else d·cos θ/V_1 from the survey's V_1 (`headWaveDatumCorrection` with the end raised by d);
 * - with a datum elevation E_d, every end is lowered from its elevation to the datum
 *   (`headWaveDatumCorrection`): the shot from its ground elevation minus its depth, the receiver
 *   from its ground elevation. Delays, depths and the reciprocal time then refer to the datum.
 * Without a datum, times refer to the ground at each receiver, which the delay-time methods handle
 * as they are (the delay at a receiver is the delay below its own ground).
 *
 * The sigma of a pick is its own when the table gives one, else the scatter of the branch's picks
 * about the chords of their neighbours (`secondDifferenceScatter`: a smooth refractor's curvature
 * barely enters, unlike the residuals about one straight line; a missing receiver does not either),
 * floored at the picks' rounding (resolution/√12).
 *
 * A correction that cannot be made (an uphole velocity not below the refractor's) is left out and
 * named in `correctionRefusals`. With a datum, a pick whose receiver has no ground elevation is left
 * out, and a side whose shot has none gives no arrivals (an end cannot be lowered by an unknown
 * height; `checks/datum-checks.ts` names them).
 */
import type { Pick, PickSet } from '../picks/types.js';
import type { SideSegmentation } from '../branches/types.js';
import type { BranchParameters } from '../depth/types.js';
import { headWaveDatumCorrection, upholeCorrection } from '../depth/near-surface-corrections.js';
import { weightedLine } from '../depth/delay-depth.js';
import { median } from '../branches/median.js';
import { maximum } from '../stats/extent.js';

export interface RefractorArrivalsContext {
  readonly pickSet: PickSet;
  /** V_1 and V_n of the survey, m/s. */
  readonly nearSurfaceVelocity: number;
  readonly refractorVelocity: number;
  /** Datum elevation E_d, m, or null to refer times to the ground. */
  readonly datumElevation: number | null;
  readonly timeResolution: number;
}

export interface SideRefractorArrivals {
  readonly shot: string;
  readonly side: 'forward' | 'reverse';
  readonly sourceX: number;
  readonly refractor: number;
  /** Ascending receiver positions, m, and the corrected times, s, and sigmas, s, aligned with them. */
  readonly receiverX: readonly number[];
  readonly times: readonly number[];
  readonly sigmas: readonly number[];
  /** Ground elevation at each receiver, m, when given. */
  readonly receiverElevations: readonly (number | null)[];
  /** Index of each pick in the pick set, aligned with `receiverX`. */
  readonly pickIndices: readonly number[];
  /** The corrected times' line against offset from the shot (slowness, intercept, covariance). */
  readonly line: BranchParameters;
  readonly lineResidualSD: number;
  /** Correction added at the shot end, s (0 for a surface shot without a datum). */
  readonly sourceCorrection: number;
  /** Largest correction removed at a receiver end, s (0 without a datum). */
  readonly largestReceiverCorrection: number;
  /** Median receiver spacing along the branch, m. */
  readonly receiverSpacing: number;
  /** Corrections that could not be made, in words (empty when every one was). */
  readonly correctionRefusals: readonly string[];
}


/**
 * The scatter σ̂ of picks about the chords of their neighbours (positions ascending, times aligned):
 * e_k = t_k − (a·t_{k−1} + b·t_{k+1}) with a = (x_{k+1} − x_k)/(x_{k+1} − x_{k−1}), b = 1 − a, the
 * chord's value at x_k; for independent picks of variance σ², Var e_k = σ²(1 + a² + b²), so
 * σ̂² = mean(e_k²/(1 + a² + b²)). For equal spacing e_k = −Δ²t/2 and this is mean((Δ²t)²)/6. A
 * straight branch gives 0 whatever the gaps; 0 for fewer than 3 picks (or coincident positions).
 */
export function secondDifferenceScatter(positions: readonly number[], times: readonly number[]): number {
  if (positions.length !== times.length) throw new RangeError(`secondDifferenceScatter: ${positions.length} positions for ${times.length} times`);
  let sum = 0;
  let count = 0;
  for (let k = 1; k < times.length - 1; k += 1) {
    const span = (positions[k + 1] as number) - (positions[k - 1] as number);
    if (!(span > 0)) continue;
    const a = ((positions[k + 1] as number) - (positions[k] as number)) / span;
    const b = 1 - a;
    const residual = (times[k] as number) - a * (times[k - 1] as number) - b * (times[k + 1] as number);
    sum += residual ** 2 / (1 + a * a + b * b);
    count += 1;
  }
  return count === 0 ? 0 : Math.sqrt(sum / count);
}

/** The time added at the shot end (positive for a buried shot brought up), or removed when lowered to the datum (negative). */
function sourceEndCorrection(pick: Pick, context: RefractorArrivalsContext, refusals?: Set<string>): number {
  const depth = pick.sourceDepth ?? 0;
  const velocities = { nearSurfaceVelocity: context.nearSurfaceVelocity, refractorVelocity: context.refractorVelocity };
  let added = 0;
  if (depth > 0) {
    const uphole =
      pick.uphole !== null && pick.uphole > 0
        ? upholeCorrection({ upholeTime: pick.uphole, shotDepth: depth, refractorVelocity: context.refractorVelocity })
        : headWaveDatumCorrection({ lowering: -depth, ...velocities });
    if (uphole.ok) added += pick.uphole !== null && pick.uphole > 0 ? uphole.time : -uphole.time;
    else refusals?.add(`shot ${pick.shot} was not brought up to the ground: ${uphole.message}`);
  }
  if (context.datumElevation !== null && pick.sourceElevation !== null) {
    const lowered = headWaveDatumCorrection({ lowering: pick.sourceElevation - context.datumElevation, ...velocities });
    if (lowered.ok) added -= lowered.time;
    else refusals?.add(`shot ${pick.shot} was not lowered to the datum: ${lowered.message}`);
  }
  return added;
}

function receiverEndCorrection(pick: Pick, context: RefractorArrivalsContext, refusals?: Set<string>): number {
  if (context.datumElevation === null || pick.receiverElevation === null) return 0;
  const lowered = headWaveDatumCorrection({
    lowering: pick.receiverElevation - context.datumElevation,
    nearSurfaceVelocity: context.nearSurfaceVelocity,
    refractorVelocity: context.refractorVelocity,
  });
  if (!lowered.ok) refusals?.add(`the receivers of shot ${pick.shot} were not lowered to the datum: ${lowered.message}`);
  return lowered.ok ? lowered.time : 0;
}

/** Branch n of the side as corrected arrivals, or null when the side has no such branch (or fewer than 3 picks on it). */
export function refractorArrivals(segmentation: SideSegmentation, refractor: number, context: RefractorArrivalsContext): SideRefractorArrivals | null {
  const branch = segmentation.branches.find((entry) => entry.index === refractor);
  if (!branch || branch.members.length < 3) return null;
  const { sidePicks } = segmentation;
  const floor = context.timeResolution / Math.sqrt(12);
  const scatter = Math.max(
    secondDifferenceScatter(
      branch.members.map((position) => sidePicks.offsets[position] as number),
      branch.members.map((position) => sidePicks.times[position] as number),
    ),
    floor,
  );
  const refusals = new Set<string>();
  const datum = context.datumElevation !== null;
  // With a datum, an end without a ground elevation cannot be lowered to it: the side (no source
  // elevation) or the pick (no receiver elevation) is left out, never lowered by 0 m (`datum-checks.ts` warns).
  const members = branch.members.filter((position) => !datum || context.pickSet.picks[sidePicks.pickIndices[position] as number]!.receiverElevation !== null);
  if (members.length < 3) return null;
  if (datum && context.pickSet.picks[sidePicks.pickIndices[members[0]!] as number]!.sourceElevation === null) return null;
  const rows = members.map((position) => {
    const pickIndex = sidePicks.pickIndices[position] as number;
    const pick = context.pickSet.picks[pickIndex] as Pick;
    const receiverCorrection = receiverEndCorrection(pick, context, refusals);
    return {
      x: pick.receiverX,
      offset: sidePicks.offsets[position] as number,
      time: pick.time + sourceEndCorrection(pick, context, refusals) - receiverCorrection,
      sigma: pick.sigma ?? scatter,
      elevation: pick.receiverElevation,
      pickIndex,
      receiverCorrection,
    };
  });
  rows.sort((left, right) => left.x - right.x);
  // The corrected times' line against offset, its covariance scaled by the reduced χ² when the
  // picks scatter more than their sigmas say.
  const fit = weightedLine(
    rows.map((row) => row.offset),
    rows.map((row) => row.time),
    rows.map((row) => row.sigma),
  );
  if (!fit) return null;
  const line: BranchParameters = {
    slowness: fit.slope,
    intercept: fit.intercept,
    slownessVariance: fit.slopeSE ** 2,
    interceptVariance: fit.interceptSE ** 2,
    covariance: fit.covariance,
  };
  const spacings = rows.slice(1).map((row, k) => row.x - (rows[k] as { x: number }).x);
  return {
    shot: sidePicks.shot,
    side: sidePicks.side,
    sourceX: sidePicks.sourceX,
    refractor,
    receiverX: rows.map((row) => row.x),
    times: rows.map((row) => row.time),
    sigmas: rows.map((row) => row.sigma),
    receiverElevations: rows.map((row) => row.elevation),
    pickIndices: rows.map((row) => row.pickIndex),
    line,
    lineResidualSD: fit.residualSD,
    sourceCorrection: rows.length > 0 ? sourceEndCorrection(context.pickSet.picks[rows[0]!.pickIndex] as Pick, context) : 0,
    largestReceiverCorrection: maximum(rows.map((row) => Math.abs(row.receiverCorrection)), 0),
    receiverSpacing: spacings.length > 0 ? median(spacings) : 0,
    correctionRefusals: [...refusals],
  };
}
