/**
 * Neighbour-trace consistency: a first break far from what its neighbours predict is rejected.
 * First-arrival times change smoothly from trace to trace along a spread (piecewise linear in
 * offset for layered ground), so a pick that breaks the local trend by several times the local
 * scatter is more likely a noise burst, a later phase or a cycle skip than a real step.
 *
 * Traces are ordered by `position` (the signed offset, or the trace number when offsets are not
 * known). For each candidate i, its nearest `neighbours` accepted picks on each side give up to
 * three straight-line predictions at x_i — from the left side, from the right side, and from
 * both — each by the median-slope (Theil–Sen) line through those neighbours (Theil1950; Sen1968):
 *
 * ```
 * b = median over pairs of (t_j − t_l)/(x_j − x_l),   a = median(t_j − b·x_j),   t̂_i = a + b·x_i
 * local scatter s = 1.4826·median|t_j − (a + b·x_j)|   (0 for two neighbours)
 * tolerance  τ_i = k·√(σ_i² + max(s, median σ_j)²),   misfit u_i = |t_i − t̂_i| / τ_i
 * ```
 *
 * and the pick is judged by the prediction it fits best (smallest u_i). Taking the best of the
 * one-sided predictions keeps a pick that sits just past a change of slope (a crossover, the shot
 * point of a split spread): one side is then on its own branch and predicts it well. k is
 * `threshold` (default 3 standard deviations, METHODS §11).
 *
 * Rejection is one pick at a time. Each round first marks the suspects, the picks with u_i > 1
 * against all their neighbours; then every pick is judged again by neighbours that are not
 * suspects (by all of them when that leaves no prediction), and the pick with the largest u_i > 1
 * is rejected. The second look keeps a wild pick from making the pick beside it look worse than
 * itself — at the end of a line, where a pick has one side only, a three-point median-slope line
 * with one wild point follows the wild point. Rounds repeat until no u_i exceeds 1.
 *
 * `anchor` marks the picks trusted to predict (the picker passes those that are not
 * low-confidence): neighbours are the nearest `neighbours` anchors among the nearest
 * 2·`neighbours` usable picks on a side, or those picks themselves when they hold fewer than two
 * anchors (a far anchor would extrapolate across a change of slope); with fewer than
 * `MIN_ANCHORS` anchors in all, every usable pick is one. A pick that is not an anchor is held to
 * the local spread alone (σ_i left out of τ_i), so a doubtful pick off a clear trend is caught.
 *
 * Edges: a pick is judged only when its neighbours give a prediction — two usable neighbours on
 * one side, or one on each side and three in all; otherwise it is kept with `prediction` null.
 * Equal positions: pairs with x_j = x_l give no slope; when no pair has one the line is flat
 * (b = 0). Inputs whose `time` is null or that are not `usable` are never neighbours and are not
 * judged. The input is not modified.
 *
 * @example
 * // positions 0, 2, 4, 6, 8 m; times 2, 4, 14, 8, 10 ms (σ 0.25 ms): the 14 ms pick is rejected,
 * // 8 ms later than its neighbours predict
 * neighbourConsistency(items, { neighbours: 3, threshold: 3 })[2]; // { prediction: 0.006, misfit: 0.008, rejected: true, … }
 */
import { median } from '../branches/median.js';

export interface ConsistencyItem {
  /** Order along the spread: signed offset (m) or trace number. */
  readonly position: number;
  /** s; null: no pick. */
  readonly time: number | null;
  /** s, the pick's one-SD uncertainty. */
  readonly sigma: number;
  /** False: already out of the pick set (never a neighbour, not judged). */
  readonly usable: boolean;
  /**
   * True for a pick trusted enough to predict its neighbours (the picker passes the picks that
   * are not low-confidence). A pick that is not an anchor is judged by its anchors' scatter alone,
   * without its own (large) sigma, so that a doubtful pick far from a clear trend is re-picked.
   */
  readonly anchor: boolean;
}

export interface ConsistencyVerdict {
  /** The best-fitting neighbour prediction, s; null when the pick was not judged. */
  readonly prediction: number | null;
  /** time − prediction, s (positive: later than predicted); null when not judged. */
  readonly misfit: number | null;
  /** The tolerance τ the misfit was held to, s; null when not judged. */
  readonly tolerance: number | null;
  readonly rejected: boolean;
}

export interface ConsistencyOptions {
  /** Accepted neighbours used on each side. */
  readonly neighbours: number;
  /** k, in standard deviations. */
  readonly threshold: number;
}

/** With fewer anchors than this among the usable picks, every usable pick is an anchor. */
export const MIN_ANCHORS = 4;

/** Robust SD from the median absolute deviation of normal errors (common practice). */
const MAD_TO_SD = 1.4826;

interface LocalPrediction {
  readonly prediction: number;
  readonly scatter: number;
  readonly neighbourSigma: number;
}

/** Median-slope line through the points, evaluated at `at`, with its robust scatter. */
export function medianSlopePrediction(positions: readonly number[], times: readonly number[], sigmas: readonly number[], at: number): LocalPrediction {
  const slopes: number[] = [];
  for (let first = 0; first < positions.length; first += 1) {
    for (let second = first + 1; second < positions.length; second += 1) {
      const run = (positions[second] as number) - (positions[first] as number);
      if (run !== 0) slopes.push(((times[second] as number) - (times[first] as number)) / run);
    }
  }
  const slope = slopes.length === 0 ? 0 : median(slopes);
  const intercept = median(times.map((time, index) => time - slope * (positions[index] as number)));
  const scatter = positions.length <= 2 ? 0 : MAD_TO_SD * median(times.map((time, index) => Math.abs(time - intercept - slope * (positions[index] as number))));
  return { prediction: intercept + slope * at, scatter, neighbourSigma: median(sigmas) };
}

/** Verdicts for every item, in input order (module comment). */
export function neighbourConsistency(items: readonly ConsistencyItem[], options: ConsistencyOptions): ConsistencyVerdict[] {
  const order = items.map((_, index) => index).sort((left, right) => (items[left] as ConsistencyItem).position - (items[right] as ConsistencyItem).position || left - right);
  const active = order.map((index) => {
    const item = items[index] as ConsistencyItem;
    return item.usable && item.time !== null;
  });
  // Too few anchors to carry a trend: every usable pick predicts its neighbours.
  const anchorCount = order.filter((index, slot) => active[slot] && (items[index] as ConsistencyItem).anchor).length;
  const everyPickAnchors = anchorCount < MIN_ANCHORS;
  const anchor = order.map((index) => everyPickAnchors || (items[index] as ConsistencyItem).anchor);
  const verdicts: ConsistencyVerdict[] = items.map(() => ({ prediction: null, misfit: null, tolerance: null, rejected: false }));

  // The nearest `neighbours` anchors among the nearest 2·`neighbours` active picks on one side; when
  // those hold fewer than two anchors, the nearest `neighbours` active picks (a far anchor would
  // extrapolate across changes of slope).
  const sideNeighbours = (slot: number, step: -1 | 1, suspect: readonly boolean[]): number[] => {
    const nearest: number[] = [];
    for (let other = slot + step; other >= 0 && other < order.length && nearest.length < 2 * options.neighbours; other += step) {
      if (active[other] && !suspect[other]) nearest.push(other);
    }
    const anchors = nearest.filter((other) => anchor[other]).slice(0, options.neighbours);
    const chosen = anchors.length >= 2 ? anchors : nearest.slice(0, options.neighbours);
    return chosen.map((other) => order[other] as number);
  };

  const judge = (slot: number, suspect: readonly boolean[]): ConsistencyVerdict | null => {
    const item = items[order[slot] as number] as ConsistencyItem;
    const time = item.time as number;
    const left = sideNeighbours(slot, -1, suspect);
    const right = sideNeighbours(slot, 1, suspect);
    const ownSigma = anchor[slot] ? item.sigma : 0;
    const groups: number[][] = [];
    if (left.length >= 2) groups.push(left);
    if (right.length >= 2) groups.push(right);
    if (left.length >= 1 && right.length >= 1 && left.length + right.length >= 3) groups.push([...left, ...right]);
    let best: ConsistencyVerdict | null = null;
    let bestScore = Number.POSITIVE_INFINITY;
    for (const group of groups) {
      const neighbours = group.map((index) => items[index] as ConsistencyItem);
      const local = medianSlopePrediction(
        neighbours.map((neighbour) => neighbour.position),
        neighbours.map((neighbour) => neighbour.time as number),
        neighbours.map((neighbour) => neighbour.sigma),
        item.position,
      );
      const spread = Math.max(local.scatter, local.neighbourSigma);
      const tolerance = options.threshold * Math.sqrt(ownSigma * ownSigma + spread * spread);
      const misfit = time - local.prediction;
      const normalised = Math.abs(misfit) / tolerance;
      if (normalised < bestScore) {
        bestScore = normalised;
        best = { prediction: local.prediction, misfit, tolerance, rejected: normalised > 1 };
      }
    }
    return best;
  };

  const score = (verdict: ConsistencyVerdict | null): number =>
    verdict === null || verdict.misfit === null || verdict.tolerance === null ? 0 : Math.abs(verdict.misfit) / verdict.tolerance;
  const none = order.map(() => false);
  for (;;) {
    // Pass 1 marks the suspects (beyond tolerance against all active neighbours); pass 2 judges
    // every pick by neighbours that are not suspects, so a wild pick cannot make the pick beside
    // it look worse than itself (at the end of a line, one side is all a pick has).
    const suspect = order.map((_, slot) => active[slot] === true && score(judge(slot, none)) > 1);
    let worstSlot = -1;
    let worstScore = 1;
    for (let slot = 0; slot < order.length; slot += 1) {
      if (!active[slot]) continue;
      const verdict = judge(slot, suspect) ?? judge(slot, none);
      verdicts[order[slot] as number] = verdict ?? { prediction: null, misfit: null, tolerance: null, rejected: false };
      if (score(verdict) > worstScore) {
        worstScore = score(verdict);
        worstSlot = slot;
      }
    }
    if (worstSlot < 0) break;
    active[worstSlot] = false;
    const index = order[worstSlot] as number;
    verdicts[index] = { ...(verdicts[index] as ConsistencyVerdict), rejected: true };
  }
  return verdicts;
}
