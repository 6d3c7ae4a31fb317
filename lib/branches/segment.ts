/**
 * Automatic branch segmentation of one shot side: split the picks, in offset order, into the
 * direct branch and head-wave branches — contiguous straight segments — and fit each one
 * (METHODS §4).
 *
 * 1. Costs and partitions: C(i, j) for every segment (`segmentCostTable`), then the optimal
 *    partition for each branch count K = 1…`maxBranches` by dynamic programming over all splits
 *    (`optimalPartitions`; Bellman 1961, `Bellman1961`; Jackson et al. 2005, `Jackson2005`), at
 *    least `minPicksPerBranch` picks per branch.
 * 2. Model selection by BIC (Schwarz 1978, `Schwarz1978`) with p = 2K + c·(K − 1) parameters (two
 *    per line, c = `breakpointParameters` per breakpoint; one fewer when the first line goes
 *    through the origin). METHODS check case 4.1 counts c = 1 (common practice); the default is
 *    c = 3, the cost per knot that regression-spline work recommends (Friedman 1991, recalled from
 *    memory), because an optimally placed break fits noise better than a fixed one and c = 1
 *    splits noisy branches in two (seen on ray-geometry picks with 0.25 ms noise):
 *      no sigmas:   BIC = n·ln(max(RSS, n·σ_min²)/n) + p·ln n,  σ_min² = timeResolution²/12
 *                   (the floor keeps noise-free picks finite);
 *      with sigmas: BIC = χ² + p·ln n  (χ² is already in units of the picks' variance; no floor).
 * 3. Physical constraints (`failedPhysicalConstraint`, on the least-squares lines of each
 *    segment), tested for the candidates in BIC order; the best that passes is accepted. The
 *    first three (positive slopes, velocity increasing, intercepts increasing) are hard: a split
 *    that fails them is impossible for plane layers. The last two (crossovers in the gaps,
 *    distinct slopes) are soft: a split failing only them is still taken when its BIC beats every
 *    split that passes by more than `DECISIVE_BIC` ("very strong" evidence, Kass & Raftery 1995),
 *    since one mispick at a crossover must not cost a whole branch. When no split passes, the best
 *    that fails only a soft constraint is used, or the BIC-best when every split fails a hard one.
 *    When the BIC-best failed, a `segmentation-constraint-failed` note says so and says what the
 *    split used is — one that passes every constraint, one that fails only a soft one (and why it
 *    still won), or the BIC-best as it is — naming the constraints in plain words ("apparent
 *    velocity falling with offset", `PHYSICAL_CONSTRAINT_WORDS`) and each split by its branch count
 *    and the offsets it breaks between. The crossover tolerance is the median spacing between
 *    consecutive picks on the side (one receiver interval), widened by the crossover's own
 *    uncertainty.
 * 4. Reported fits (`branchFromMembers`): method `fitMethod`, branch 1 of a surface shot through
 *    the origin, weighted least squares when the side has sigmas. Branch indices run 1…K, or
 *    from `firstBranchIndex` up when the caller knows the nearest branch is a head wave.
 *
 * User override: when any pick of the side carries a user branch, the side is user-assigned and
 * `segmentByUserBranches` decides instead (no candidates are tried).
 *
 * The DP's first segment has a free intercept by default, as METHODS check case 4.1 does;
 * `firstSegmentThroughOrigin: true` makes it go through the origin for a surface shot (its cost row
 * C₀). Every candidate tried is reported, with the RSS (χ² when the side has sigmas) as
 * `residualSumOfSquares`. Excluded picks never reach a side (`splitShotSides`), so `excluded` is
 * always empty here.
 *
 * Edges: a side with fewer picks than one branch needs gives no branches, no candidates and a
 * `fit-refused` note; a reported fit that is refused (e.g. a 2-pick branch without sigmas) is left
 * out of `branches` with a `fit-refused` note. Options out of range throw: `minPicksPerBranch` an
 * integer ≥ 2, `maxBranches` an integer ≥ 1, `timeResolution` a positive finite number.
 *
 * Performance: n = 500 picks, K ≤ 5 segments in a few milliseconds (typed arrays throughout).
 *
 * @example
 * // METHODS check case 4.1: 48 picks of the 400/1600/3500 m/s model with 0.4 ms of ripple
 * segmentSide(side, { minPicksPerBranch: 3, maxBranches: 5 })
 * // → 3 branches over 2.5–10, 12.5–35 and 37.5–120 m; BIC −521.0, −622.5, −754.2, −745.5, −736.2
 */
import { branchFromMembers, sideName } from './branch-fit.js';
import { describePhysicalConstraint, failedPhysicalConstraint, type SegmentLine } from './branch-constraints.js';
import { formatQuantity } from '../checks/wording.js';
import { leastSquaresLine } from './least-squares.js';
import { median } from './median.js';
import { definedOnly } from '../defined-only.js';
import { optimalPartitions, type Partition } from './optimal-partition.js';
import { segmentCostTable } from './segment-cost.js';
import type { Branch, SegmentationCandidate, SegmentationNote, SegmentOptions, SideSegmentation, SidePicks } from './types.js';
import { segmentByUserBranches } from './user-branches.js';

/** `SegmentOptions` plus the choice of an origin-constrained first segment in the DP. */
export interface SegmentSideOptions extends SegmentOptions {
  /** For a surface shot, fit the DP's first segment through the origin. Default false. */
  readonly firstSegmentThroughOrigin?: boolean;
  /**
   * Index of the nearest branch found. Default 1 (the direct wave). An off-end shot whose nearest
   * receiver is beyond the direct wave's crossover starts on a head-wave branch: the caller that
   * knows the survey's layers says which (see `lib/interpretation/branch-identity.ts`); the first
   * segment then has a free intercept and the indices run from this one up.
   */
  readonly firstBranchIndex?: number;
  /** Parameters each breakpoint counts for in the BIC. Default 3 (see above); METHODS 4.1 uses 1. */
  readonly breakpointParameters?: number;
}

/** BIC margin by which a split failing only a soft constraint still wins (Kass & Raftery 1995: > 10 is very strong). */
export const DECISIVE_BIC = 10;
const SOFT_CONSTRAINTS: readonly string[] = ['crossovers-in-gaps', 'slopes-distinct'];

export const DEFAULT_SEGMENT_OPTIONS = {
  minPicksPerBranch: 3,
  maxBranches: 5,
  fitMethod: 'least-squares',
  timeResolution: 1e-4,
  firstSegmentThroughOrigin: false,
  firstBranchIndex: 1,
  breakpointParameters: 3,
} as const satisfies Required<SegmentSideOptions>;

export function segmentSide(side: SidePicks, options: SegmentSideOptions = {}): SideSegmentation {
  const settings = { ...DEFAULT_SEGMENT_OPTIONS, ...definedOnly(options) };
  checkSettings(settings);
  if (side.userBranches.some((branch) => branch !== null)) return segmentByUserBranches(side, settings.fitMethod);

  const count = side.offsets.length;
  const notes: SegmentationNote[] = [];
  const originFirst = settings.firstSegmentThroughOrigin && side.surfaceShot && settings.firstBranchIndex === 1;
  const table = segmentCostTable(side.offsets, side.times, side.sigmas, settings.minPicksPerBranch);
  const partitions = optimalPartitions(table, settings.maxBranches, originFirst);
  if (partitions.length === 0) {
    notes.push({
      code: 'fit-refused',
      message:
        `${sideName(side)}: ${count} pick${count === 1 ? '' : 's'}, fewer than the ${settings.minPicksPerBranch} one branch needs, ` +
        'so no branch was fitted; add picks or lower the minimum picks per branch',
    });
    return { sidePicks: side, branches: [], excluded: [], assignedBy: 'automatic', candidates: [], notes };
  }

  const tolerance = crossoverTolerance(side.offsets);
  const weights = side.sigmas === null ? null : side.sigmas.map((sigma) => 1 / (sigma * sigma));
  const candidates: SegmentationCandidate[] = partitions.map((partition) => ({
    branchCount: partition.branchCount,
    starts: partition.starts,
    residualSumOfSquares: partition.cost,
    bic: segmentationBic(partition, count, originFirst, table.weighted, settings.timeResolution, settings.breakpointParameters),
    failedConstraint: failedPhysicalConstraint(segmentLines(side, partition, weights, originFirst), tolerance),
  }));

  const ranked = [...candidates].sort((left, right) => left.bic - right.bic || left.branchCount - right.branchCount);
  const best = ranked[0] as SegmentationCandidate;
  const passing = ranked.find((candidate) => candidate.failedConstraint === null);
  const decisive = ranked.find(
    (candidate) =>
      candidate.failedConstraint !== null &&
      SOFT_CONSTRAINTS.includes(candidate.failedConstraint) &&
      (passing === undefined || candidate.bic < passing.bic - DECISIVE_BIC),
  );
  const accepted = decisive !== undefined && (passing === undefined || decisive.bic < passing.bic) ? decisive : passing;
  const chosen = accepted ?? best;
  const note = constraintNote(side, best, accepted, passing);
  if (note !== null) notes.push(note);

  const branches: Branch[] = [];
  segmentRanges(chosen.starts, count).forEach(([first, last], position) => {
    const members = Array.from({ length: last - first + 1 }, (_, offset) => first + offset);
    const outcome = branchFromMembers(side, settings.firstBranchIndex + position, members, settings.fitMethod, 'automatic');
    if (outcome.ok) branches.push(outcome.branch);
    else notes.push(outcome.note);
  });
  return { sidePicks: side, branches, excluded: [], assignedBy: 'automatic', candidates, notes };
}

/**
 * BIC of a partition (Schwarz 1978) as `segmentSide` uses it: p = 2K + c·(K − 1) with c
 * `breakpointParameters`, less one when the first line goes through the origin; χ² + p·ln n when
 * the costs are χ², else n·ln(max(RSS, n·dt²/12)/n) + p·ln n. c defaults to 3, the same default as
 * `segmentSide` (`DEFAULT_SEGMENT_OPTIONS.breakpointParameters`); pass 1 for the count of METHODS
 * check case 4.1.
 */
export function segmentationBic(
  partition: Partition,
  pickCount: number,
  originFirst: boolean,
  weighted: boolean,
  timeResolution: number,
  breakpointParameters: number = DEFAULT_SEGMENT_OPTIONS.breakpointParameters,
): number {
  const parameterCount = 2 * partition.branchCount + breakpointParameters * (partition.branchCount - 1) - (originFirst ? 1 : 0);
  const penalty = parameterCount * Math.log(pickCount);
  if (weighted) return partition.cost + penalty;
  const floor = (pickCount * timeResolution * timeResolution) / 12;
  return pickCount * Math.log(Math.max(partition.cost, floor) / pickCount) + penalty;
}

/**
 * The `segmentation-constraint-failed` note, or null when the BIC-best split passes every
 * constraint. Which note is decided by what the split used failed (`accepted.failedConstraint`),
 * not by whether it is the BIC-best: it passes every constraint, fails only a soft one, or there is
 * none (`accepted` undefined: every split fails a hard constraint and the BIC-best is used).
 * Constraints are named in plain words (`describePhysicalConstraint`) and splits by their branch
 * count and break offsets (`describeSplit`).
 */
function constraintNote(
  side: SidePicks,
  best: SegmentationCandidate,
  accepted: SegmentationCandidate | undefined,
  passing: SegmentationCandidate | undefined,
): SegmentationNote | null {
  if (best.failedConstraint === null) return null;
  const place = sideName(side);
  const split = (candidate: SegmentationCandidate): string => describeSplit(candidate, side.offsets);
  const failure = (candidate: SegmentationCandidate): string => describePhysicalConstraint(candidate.failedConstraint ?? '');
  let message: string;
  if (accepted === undefined) {
    message =
      `${place}: no split passes the physical constraints; the statistically best (${split(best)}) has ${failure(best)} ` +
      'and is used as it is; check for dip, lateral change or mispicks, or assign branches by hand';
  } else if (accepted.failedConstraint === null) {
    message =
      `${place}: the statistically best split (${split(best)}) has ${failure(best)}, so the best split that passes every ` +
      `constraint (${split(accepted)}) is used; check the picks near the breaks, or assign branches by hand`;
  } else {
    const reason =
      passing === undefined
        ? 'no split passes every constraint'
        : `it fits so much better (BIC lower by more than ${DECISIVE_BIC}) than the best split that passes every constraint (${split(passing)})`;
    const opening =
      accepted === best
        ? `${place}: the statistically best split (${split(best)}) fails only a soft constraint — it has ${failure(best)} — ` +
          `but it is used because ${reason}`
        : `${place}: the statistically best split (${split(best)}) has ${failure(best)}; the split used (${split(accepted)}) ` +
          `fails only a soft constraint — it has ${failure(accepted)} — and is used because ${reason}`;
    message = `${opening}; a mispick near a crossover is the usual cause — check the picks near the breaks, or assign branches by hand`;
  }
  return { code: 'segmentation-constraint-failed', message };
}

/** "1 branch" or "3 branches, breaking between 10 m and 12.5 m and between 35 m and 37.5 m". */
function describeSplit(candidate: SegmentationCandidate, offsets: readonly number[]): string {
  const count = candidate.branchCount === 1 ? '1 branch' : `${candidate.branchCount} branches`;
  if (candidate.starts.length === 0) return count;
  const breaks = candidate.starts.map(
    (start) => `between ${formatQuantity(offsets[start - 1] as number, 'm')} and ${formatQuantity(offsets[start] as number, 'm')}`,
  );
  return `${count}, breaking ${breaks.join(' and ')}`;
}

/** [first, last] positions of each segment, from the starts of segments 2…K. */
function segmentRanges(starts: readonly number[], count: number): [number, number][] {
  const bounds = [0, ...starts, count];
  return bounds.slice(0, -1).map((first, position) => [first, (bounds[position + 1] as number) - 1]);
}

/** The least-squares line of each segment, for the constraint tests. */
function segmentLines(
  side: SidePicks,
  partition: Partition,
  weights: readonly number[] | null,
  originFirst: boolean,
): SegmentLine[] {
  return segmentRanges(partition.starts, side.offsets.length).map(([first, last], position) => {
    const offsets = side.offsets.slice(first, last + 1);
    const times = side.times.slice(first, last + 1);
    const throughOrigin = originFirst && position === 0;
    const line = leastSquaresLine(offsets, times, weights?.slice(first, last + 1) ?? null, throughOrigin);
    // With sigmas the unscaled covariance is absolute; without, scale it by the residual variance.
    const freedom = offsets.length - (throughOrigin ? 1 : 2);
    const squares = offsets.reduce((sum, offset, k) => sum + ((times[k] as number) - line.intercept - line.slope * offset) ** 2, 0);
    const residualVariance = freedom > 0 ? squares / freedom : 0;
    const scale = weights === null ? residualVariance : 1;
    return {
      slope: line.slope,
      intercept: line.intercept,
      firstOffset: offsets[0] as number,
      lastOffset: offsets[offsets.length - 1] as number,
      slopeVariance: line.unscaledSlopeVariance * scale,
      interceptVariance: line.unscaledInterceptVariance * scale,
      covariance: line.unscaledCovariance * scale,
      residualSD: Math.sqrt(residualVariance),
    };
  });
}

/** Median spacing of consecutive picks (positive differences only; 0 when there are none). */
function crossoverTolerance(offsets: readonly number[]): number {
  const spacings = offsets.slice(1).map((offset, position) => offset - (offsets[position] as number)).filter((spacing) => spacing > 0);
  return spacings.length === 0 ? 0 : median(spacings);
}

function checkSettings(settings: Required<SegmentSideOptions>): void {
  if (!Number.isInteger(settings.minPicksPerBranch) || settings.minPicksPerBranch < 2) {
    throw new RangeError(`segmentSide: minPicksPerBranch must be an integer of at least 2, got ${settings.minPicksPerBranch}`);
  }
  if (!Number.isInteger(settings.maxBranches) || settings.maxBranches < 1) {
    throw new RangeError(`segmentSide: maxBranches must be a positive integer, got ${settings.maxBranches}`);
  }
  if (!(settings.breakpointParameters >= 0) || !Number.isFinite(settings.breakpointParameters)) {
    throw new RangeError(`segmentSide: breakpointParameters must be zero or positive, got ${settings.breakpointParameters}`);
  }
  if (!Number.isInteger(settings.firstBranchIndex) || settings.firstBranchIndex < 1) {
    throw new RangeError(`segmentSide: firstBranchIndex must be a positive integer, got ${settings.firstBranchIndex}`);
  }
  if (!(settings.timeResolution > 0) || !Number.isFinite(settings.timeResolution)) {
    throw new RangeError(`segmentSide: timeResolution must be a positive number of seconds, got ${settings.timeResolution}`);
  }
}
