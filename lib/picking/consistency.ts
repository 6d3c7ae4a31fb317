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
 * **Neighbours.** `anchor` marks the picks trusted to predict (the picker passes those that are
 * not low-confidence): neighbours are the nearest `neighbours` anchors among the nearest
 * 2·`neighbours` usable picks on a side, else among the nearest 4·`neighbours` (a run of
 * low-confidence picks is skipped, not trusted). When even those hold fewer than two anchors, an
 * anchor falls back to the nearest `neighbours` usable picks (a far anchor would extrapolate
 * across a change of slope), while a pick that is not an anchor keeps the anchors found, and is
 * judged by every usable neighbour only when the anchors give no prediction at all: low-confidence
 * picks never vouch for each other. With fewer than `MIN_ANCHORS` anchors in all, every usable
 * pick is one. A pick that is not an anchor is held to the local spread alone (σ_i left out of
 * τ_i), so a doubtful pick off a clear trend is caught.
 *
 * **Offsets** (option `offsets`: positions are signed offsets from the shot). Neighbours come from
 * the pick's own side of the shot only, and lines are fitted in |x|. Over layered ground whose
 * velocity rises with depth the first-arrival curve t(|x|) is concave (its slope, the slowness,
 * never increases with distance), so a line extrapolated from one side lies on or above the curve
 * and a chord lies on or below it. For an anchor earlier than a prediction, the prediction is
 * therefore replaced by the earliest time the curve allows, and the pick is held to that:
 * - a pick that ends its run on its side (one-sided predictions only): from neighbours farther
 *   out, the chord through the shot point, t ≥ t_j·|x|/|x_j| (t(0) ≥ 0; `earliestTowardsShot`);
 *   from neighbours nearer the shot, t ≥ t_j + (|x| − |x_j|)·s/2 with s the smallest positive
 *   slowness among their pairs (the trend's fastest apparent velocity doubled;
 *   `earliestAwayFromShot`);
 * - a pick between neighbours: the two-sided prediction or, if earlier, the median chord across
 *   it (`earliestBetween`); its one-sided predictions stay two-sided tests, as before.
 * So the steep direct wave nearest the shot is kept; later than a prediction beyond τ is still
 * rejected, and so is any time before the shot (t < 0). A low-confidence pick is held to the
 * prediction both ways. Without offsets the check cannot know the shot and uses none of this.
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
  /**
   * With offsets, for a pick earlier than a one-sided (extrapolated) prediction: the earliest
   * time its neighbours allow, s, which it was held to instead of the prediction; else null.
   */
  readonly earliest: number | null;
  readonly rejected: boolean;
}

export interface ConsistencyOptions {
  /** Accepted neighbours used on each side. */
  readonly neighbours: number;
  /** k, in standard deviations. */
  readonly threshold: number;
  /**
   * True when `position` is the signed offset from the shot (m): neighbours are then taken on the
   * pick's own side of the shot, and a pick at the end of its run is not rejected for being
   * earlier than the extrapolation (module comment). Default false (positions in spread order only).
   */
  readonly offsets?: boolean;
}

/** With fewer anchors than this among the usable picks, every usable pick is an anchor. */
export const MIN_ANCHORS = 4;

/** Neighbour search: anchors among the nearest REACH_NEAR·n active picks on a side, else among REACH_FAR·n. */
export const REACH_NEAR = 2;
export const REACH_FAR = 4;

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
  const byOffset = options.offsets === true;
  // The side of the shot a slot is on (offsets only): −1 before it, +1 at or after it.
  const side = order.map((index) => (byOffset && (items[index] as ConsistencyItem).position < 0 ? -1 : 1));
  // Too few anchors to carry a trend: every usable pick predicts its neighbours.
  const anchorCount = order.filter((index, slot) => active[slot] && (items[index] as ConsistencyItem).anchor).length;
  const everyPickAnchors = anchorCount < MIN_ANCHORS;
  const anchor = order.map((index) => everyPickAnchors || (items[index] as ConsistencyItem).anchor);
  const verdicts: ConsistencyVerdict[] = items.map(() => ({ prediction: null, misfit: null, tolerance: null, earliest: null, rejected: false }));

  // Neighbours on one side of a slot (module comment, "Neighbours"): the nearest `neighbours`
  // anchors among the nearest 2·`neighbours` active picks, else among the nearest 4·`neighbours`;
  // when those hold fewer than two anchors, an anchor takes the nearest `neighbours` active picks
  // and a pick that is not an anchor takes the anchors found. With offsets, only picks on the
  // same side of the shot.
  const sideNeighbours = (slot: number, step: -1 | 1, suspect: readonly boolean[], anchorsOnly: boolean): number[] => {
    const nearest: number[] = [];
    for (let other = slot + step; other >= 0 && other < order.length && nearest.length < REACH_FAR * options.neighbours; other += step) {
      if (side[other] !== side[slot]) break;
      if (active[other] && !suspect[other]) nearest.push(other);
    }
    const near = nearest.slice(0, REACH_NEAR * options.neighbours);
    let anchors = near.filter((other) => anchor[other]).slice(0, options.neighbours);
    if (anchors.length < 2) anchors = nearest.filter((other) => anchor[other]).slice(0, options.neighbours);
    const chosen = anchors.length >= 2 || anchorsOnly ? anchors : near.slice(0, options.neighbours);
    return chosen.map((other) => order[other] as number);
  };

  interface Judgement {
    readonly verdict: ConsistencyVerdict;
    readonly score: number;
  }

  const judgeWith = (slot: number, suspect: readonly boolean[], anchorsOnly: boolean): Judgement | null => {
    const item = items[order[slot] as number] as ConsistencyItem;
    const time = item.time as number;
    const before = sideNeighbours(slot, -1, suspect, anchorsOnly);
    const after = sideNeighbours(slot, 1, suspect, anchorsOnly);
    const ownSigma = anchor[slot] ? item.sigma : 0;
    // With offsets, "inner" neighbours are nearer the shot than the pick, "outer" ones farther.
    const [inner, outer] = (side[slot] as number) < 0 ? [after, before] : [before, after];
    const groups: { members: number[]; kind: 'inward' | 'outward' | 'both' }[] = [];
    if (inner.length >= 2) groups.push({ members: inner, kind: 'outward' });
    if (outer.length >= 2) groups.push({ members: outer, kind: 'inward' });
    if (inner.length >= 1 && outer.length >= 1 && inner.length + outer.length >= 3) groups.push({ members: [...inner, ...outer], kind: 'both' });
    // One-sided only (offsets known): the pick ends its run on its side of the shot.
    const extrapolated = byOffset && !groups.some((group) => group.kind === 'both');
    const distance = Math.abs(item.position);
    let best: Judgement | null = null;
    for (const group of groups) {
      const neighbours = group.members.map((index) => items[index] as ConsistencyItem);
      const positions = neighbours.map((neighbour) => (byOffset ? Math.abs(neighbour.position) : neighbour.position));
      const times = neighbours.map((neighbour) => neighbour.time as number);
      const local = medianSlopePrediction(positions, times, neighbours.map((neighbour) => neighbour.sigma), byOffset ? distance : item.position);
      const spread = Math.max(local.scatter, local.neighbourSigma);
      const tolerance = options.threshold * Math.sqrt(ownSigma * ownSigma + spread * spread);
      const misfit = time - local.prediction;
      let earliest: number | null = null;
      let normalised = Math.abs(misfit) / tolerance;
      if (byOffset && anchor[slot] && misfit < 0 && (extrapolated || group.kind === 'both')) {
        if (group.kind === 'inward') earliest = earliestTowardsShot(positions, times, distance);
        else if (group.kind === 'outward') earliest = earliestAwayFromShot(positions, times, distance);
        else earliest = Math.min(local.prediction, earliestBetween(positions.slice(0, inner.length), times.slice(0, inner.length), positions.slice(inner.length), times.slice(inner.length), distance));
        normalised = Math.max(0, earliest - time) / tolerance;
      }
      if (time < 0) normalised = Math.max(normalised, Number.MAX_VALUE);
      if (best === null || normalised < best.score) {
        best = { verdict: { prediction: local.prediction, misfit, tolerance, earliest, rejected: normalised > 1 }, score: normalised };
      }
    }
    return best;
  };

  // A pick that is not an anchor is predicted by anchors alone; with no such prediction, by every
  // active neighbour (as an anchor is when it has fewer than two anchors on a side).
  const judge = (slot: number, suspect: readonly boolean[]): Judgement | null =>
    anchor[slot] ? judgeWith(slot, suspect, false) : judgeWith(slot, suspect, true) ?? judgeWith(slot, suspect, false);

  const score = (judgement: Judgement | null): number => (judgement === null ? 0 : judgement.score);
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
      const judgement = judge(slot, suspect) ?? judge(slot, none);
      verdicts[order[slot] as number] = judgement?.verdict ?? { prediction: null, misfit: null, tolerance: null, earliest: null, rejected: false };
      if (score(judgement) > worstScore) {
        worstScore = score(judgement);
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

/**
 * The earliest first break at distance `at` between neighbours nearer the shot (`inner…`) and
 * farther out (`outer…`) on a concave time–distance curve: every chord across `at` lies on or
 * below the curve; the median over the inner × outer pairs.
 */
export function earliestBetween(innerDistances: readonly number[], innerTimes: readonly number[], outerDistances: readonly number[], outerTimes: readonly number[], at: number): number {
  const chords: number[] = [];
  innerDistances.forEach((near, i) => {
    outerDistances.forEach((far, o) => {
      const run = far - near;
      const nearTime = innerTimes[i] as number;
      chords.push(run <= 0 ? nearTime : nearTime + ((outerTimes[o] as number) - nearTime) * ((at - near) / run));
    });
  });
  return chords.length === 0 ? Number.POSITIVE_INFINITY : median(chords);
}

/**
 * The earliest first break at distance `at` from the shot allowed by neighbours farther out on a
 * concave time–distance curve through t(0) ≥ 0: the chord from the shot point to each neighbour
 * lies on or below the curve, t(at) ≥ t_j·at/x_j; the median over the neighbours.
 */
export function earliestTowardsShot(distances: readonly number[], times: readonly number[], at: number): number {
  const bounds: number[] = [];
  distances.forEach((distance, index) => {
    if (distance > 0) bounds.push((times[index] as number) * (at / distance));
  });
  return bounds.length === 0 ? 0 : Math.max(0, median(bounds));
}

/**
 * The earliest first break at distance `at` beyond neighbours nearer the shot: times increase
 * with distance at a slowness of at least half the smallest positive slowness among the
 * neighbours' pairs (the trend's fastest apparent velocity doubled), t(at) ≥ t_j + (at − x_j)·s/2;
 * the median over the neighbours.
 */
export function earliestAwayFromShot(distances: readonly number[], times: readonly number[], at: number): number {
  let slowest = Number.POSITIVE_INFINITY;
  for (let first = 0; first < distances.length; first += 1) {
    for (let second = first + 1; second < distances.length; second += 1) {
      const run = (distances[second] as number) - (distances[first] as number);
      const slope = run === 0 ? 0 : ((times[second] as number) - (times[first] as number)) / run;
      if (slope > 0) slowest = Math.min(slowest, slope);
    }
  }
  const slowness = Number.isFinite(slowest) ? slowest / 2 : 0;
  return Math.max(0, median(times.map((time, index) => time + (at - (distances[index] as number)) * slowness)));
}
