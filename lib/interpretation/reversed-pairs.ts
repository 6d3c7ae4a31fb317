/**
 * Reversed pairs: which forward and reverse head-wave branches of different shots belong to the
 * same refractor, and their reciprocal time.
 *
 * A pair is shot A's forward side and shot B's reverse side, x_A < x_B, both with a branch of
 * refractor n (branches are numbered by the survey's layers: `branch-identity.ts` for off-end
 * shots, `refractor-identity.ts` for splits that reversed data show to be one refractor), with at
 * least `MIN_COMMON_RECEIVERS` receivers between the shots on both branches and a reciprocal time.
 * Automatic pairing takes, for each side, its `PARTNERS_PER_SIDE` nearest partners that form a
 * pair (forward sides looking ahead, reverse sides looking back, the union kept); the user may name the pairs instead (`PairChoice`),
 * and a named pair that cannot be formed is refused with the reason.
 *
 * Reciprocal time (common practice; Telford1990 ch. 4; Palmer1980): t_AB, shot A's time at B, must
 * equal t_BA, shot B's time at A. Each is read from the pick at the other shot's position when there
 * is one (within a quarter of the receiver spacing), else from a line through the `LOCAL_PICKS`
 * picks of the branch nearest that position, if it lies within two receiver spacings of the branch
 * (a short extrapolation: the branch is not straight over an undulating refractor). When both are
 * read they are averaged (inverse-variance weights) and checked with `reciprocalTimeCheck`
 * (√2·σ_pick + tolerance, σ_pick² the mean of the two readings' variances), with a tolerance of one
 * more √2·σ_pick plus the time resolution: a misfit beyond two standard errors of the difference,
 * so that about one pair in twenty of good data is flagged rather than one in three (our choice;
 * a 3 ms time-zero error on picks of 0.3 ms is still flagged several times over). When only one is
 * read the pair uses it unchecked.
 */
import { formatQuantity } from '../checks/wording.js';
import type { Estimate } from '../depth/dipping-layer.js';
import { reciprocalTimeCheck, type ReciprocalTimeCheck } from '../depth/dipping-layer.js';
import { linearLeastSquares } from '../stats/linear-least-squares.js';
import type { SideRefractorArrivals } from './refractor-arrivals.js';

export const MIN_COMMON_RECEIVERS = 3;
export const LOCAL_PICKS = 5;
/** Automatic pairing: partners kept per side, nearest first. */
export const PARTNERS_PER_SIDE = 4;

/** A pair named by the user: shot A's forward side with shot B's reverse side (every refractor both show). */
export interface PairChoice {
  readonly forwardShot: string;
  readonly reverseShot: string;
}

export interface ReciprocalReading {
  /** s */
  readonly value: number;
  readonly variance: number;
  readonly from: 'pick' | 'nearby picks';
}

export interface ReversedPair {
  readonly refractor: number;
  readonly forward: SideRefractorArrivals;
  readonly reverse: SideRefractorArrivals;
  readonly chosenBy: 'automatic' | 'user';
  /** x_B − x_A, m. */
  readonly spreadLength: number;
  readonly commonReceivers: number;
  /** Receivers recorded on both branches between the shots: first and last x, m. */
  readonly overlap: readonly [number, number];
  /** t_AB: shot A's time at B; t_BA: shot B's time at A. */
  readonly forwardAtReverseShot: ReciprocalReading | null;
  readonly reverseAtForwardShot: ReciprocalReading | null;
  readonly reciprocalTime: Estimate;
  readonly check: ReciprocalTimeCheck | null;
}

export interface RefusedPair {
  readonly choice: PairChoice;
  readonly reason: string;
}

/** The time of `arrivals` at position x, from a pick there or a line through the nearest picks; null when x is too far from the branch. */
export function timeAtPosition(arrivals: SideRefractorArrivals, x: number): ReciprocalReading | null {
  const { receiverX, times, sigmas, receiverSpacing } = arrivals;
  const count = receiverX.length;
  if (count === 0) return null;
  const spacing = receiverSpacing > 0 ? receiverSpacing : 1;
  let nearest = 0;
  receiverX.forEach((position, k) => {
    if (Math.abs(position - x) < Math.abs((receiverX[nearest] as number) - x)) nearest = k;
  });
  if (Math.abs((receiverX[nearest] as number) - x) <= spacing / 4) {
    return { value: times[nearest] as number, variance: (sigmas[nearest] as number) ** 2, from: 'pick' };
  }
  if (x < (receiverX[0] as number) - 2 * spacing || x > (receiverX[count - 1] as number) + 2 * spacing) return null;
  const order = receiverX.map((position, k) => ({ k, distance: Math.abs(position - x) })).sort((left, right) => left.distance - right.distance);
  const chosen = order.slice(0, Math.min(LOCAL_PICKS, count)).map((entry) => entry.k);
  if (chosen.length < 3) return null;
  const fit = linearLeastSquares(
    chosen.map((k) => [1, (receiverX[k] as number) - x]),
    chosen.map((k) => times[k] as number),
    chosen.map((k) => 1 / (sigmas[k] as number) ** 2),
  );
  if (!fit) return null;
  return { value: fit.coefficients[0] as number, variance: (fit.unscaledCovariance[0] as number[])[0] as number, from: 'nearby picks' };
}

/** Forward receivers between the shots with a reverse receiver within a quarter spacing (both lists ascending: one merge pass). */
function commonReceivers(forward: SideRefractorArrivals, reverse: SideRefractorArrivals): number[] {
  const tolerance = Math.max(1e-6, Math.min(forward.receiverSpacing, reverse.receiverSpacing) / 4);
  const common: number[] = [];
  let cursor = 0;
  for (const x of forward.receiverX) {
    if (!(x > forward.sourceX && x < reverse.sourceX)) continue;
    while (cursor < reverse.receiverX.length && (reverse.receiverX[cursor] as number) < x - tolerance) cursor += 1;
    const other = reverse.receiverX[cursor];
    if (other !== undefined && Math.abs(other - x) <= tolerance) common.push(x);
  }
  return common;
}

function formPair(forward: SideRefractorArrivals, reverse: SideRefractorArrivals, chosenBy: ReversedPair['chosenBy'], timeResolution: number): ReversedPair | string {
  if (!(forward.sourceX < reverse.sourceX)) return `shot ${forward.shot} is not before shot ${reverse.shot} along the line`;
  const common = commonReceivers(forward, reverse);
  if (common.length < MIN_COMMON_RECEIVERS) {
    return `only ${common.length} receivers between the shots have refractor ${forward.refractor} picks from both (at least ${MIN_COMMON_RECEIVERS} needed)`;
  }
  const forwardAtReverseShot = timeAtPosition(forward, reverse.sourceX);
  const reverseAtForwardShot = timeAtPosition(reverse, forward.sourceX);
  if (!forwardAtReverseShot && !reverseAtForwardShot) {
    return `neither shot's refractor ${forward.refractor} branch reaches the other shot, so there is no reciprocal time (record each shot at the other's position, or add an end shot)`;
  }
  let reciprocalTime: Estimate;
  let check: ReciprocalTimeCheck | null = null;
  if (forwardAtReverseShot && reverseAtForwardShot) {
    const wAB = 1 / Math.max(forwardAtReverseShot.variance, 1e-30);
    const wBA = 1 / Math.max(reverseAtForwardShot.variance, 1e-30);
    reciprocalTime = { value: (wAB * forwardAtReverseShot.value + wBA * reverseAtForwardShot.value) / (wAB + wBA), standardError: Math.sqrt(1 / (wAB + wBA)) };
    // √2·σ_pick with σ_pick² the mean variance is √(var_AB + var_BA).
    const pickSE = Math.sqrt((forwardAtReverseShot.variance + reverseAtForwardShot.variance) / 2);
    check = reciprocalTimeCheck(forwardAtReverseShot.value, reverseAtForwardShot.value, pickSE, Math.SQRT2 * pickSE + timeResolution);
  } else {
    const only = (forwardAtReverseShot ?? reverseAtForwardShot)!;
    reciprocalTime = { value: only.value, standardError: Math.sqrt(only.variance) };
  }
  return {
    refractor: forward.refractor,
    forward,
    reverse,
    chosenBy,
    spreadLength: reverse.sourceX - forward.sourceX,
    commonReceivers: common.length,
    overlap: [common[0] as number, common[common.length - 1] as number],
    forwardAtReverseShot,
    reverseAtForwardShot,
    reciprocalTime,
    check,
  };
}

/**
 * Every reversed pair of the refractor arrivals (automatic), or only the pairs the user named.
 * `arrivals` holds the sides' arrivals of every refractor.
 */
export function reversedPairs(
  arrivals: readonly SideRefractorArrivals[],
  choices: readonly PairChoice[] | null,
  timeResolution: number,
  /** Every shot of the survey and its source x, m: names a user's pair of an unknown shot or in the wrong order. */
  shotPositions: ReadonlyMap<string, number> = new Map(),
): { readonly pairs: readonly ReversedPair[]; readonly refused: readonly RefusedPair[] } {
  const pairs: ReversedPair[] = [];
  const refused: RefusedPair[] = [];
  const forwards = arrivals.filter((entry) => entry.side === 'forward');
  const reverses = arrivals.filter((entry) => entry.side === 'reverse');
  if (choices === null) {
    // Each side pairs with its nearest partners only — each forward side with the nearest reverse
    // sides beyond it that form a pair, each reverse side with the nearest forward sides before it —
    // and the union is kept: the section takes the least-span pair at each receiver, and a long line
    // of many shots would otherwise form a pair of every two of them.
    const formed = new Map<string, ReversedPair | null>();
    const attempt = (forward: SideRefractorArrivals, reverse: SideRefractorArrivals): ReversedPair | null => {
      const key = `${forward.shot}\u0000${reverse.shot}\u0000${forward.refractor}`;
      if (!formed.has(key)) {
        const pair = formPair(forward, reverse, 'automatic', timeResolution);
        formed.set(key, typeof pair === 'string' ? null : pair);
      }
      return formed.get(key) ?? null;
    };
    const kept = new Set<ReversedPair>();
    // The first PARTNERS_PER_SIDE partners, in order of nearness, that form a pair.
    const keepNearest = (partners: readonly SideRefractorArrivals[], pairWith: (partner: SideRefractorArrivals) => ReversedPair | null) => {
      let count = 0;
      for (const partner of partners) {
        if (count >= PARTNERS_PER_SIDE) break;
        const pair = pairWith(partner);
        if (!pair) continue;
        kept.add(pair);
        count += 1;
      }
    };
    for (const forward of forwards) {
      const partners = reverses.filter((reverse) => reverse.refractor === forward.refractor && forward.sourceX < reverse.sourceX).sort((left, right) => left.sourceX - right.sourceX);
      keepNearest(partners, (reverse) => attempt(forward, reverse));
    }
    for (const reverse of reverses) {
      const partners = forwards.filter((forward) => forward.refractor === reverse.refractor && forward.sourceX < reverse.sourceX).sort((left, right) => right.sourceX - left.sourceX);
      keepNearest(partners, (forward) => attempt(forward, reverse));
    }
    pairs.push(...kept);
  } else {
    for (const choice of choices) {
      const candidates = forwards.filter((forward) => forward.shot === choice.forwardShot);
      const partners = reverses.filter((reverse) => reverse.shot === choice.reverseShot);
      const reasons: string[] = [];
      const unknown = [choice.forwardShot, choice.reverseShot].filter((shot) => shotPositions.size > 0 && !shotPositions.has(shot));
      if (unknown.length > 0) {
        const known = [...shotPositions.keys()];
        refused.push({
          choice,
          reason: `there is no shot ${unknown.map((shot) => `"${shot}"`).join(' or ')} in the pick table (its shots: ${known.slice(0, 8).join(', ')}${known.length > 8 ? ', …' : ''}); check the spelling`,
        });
        continue;
      }
      const forwardX = shotPositions.get(choice.forwardShot);
      const reverseX = shotPositions.get(choice.reverseShot);
      if (forwardX !== undefined && reverseX !== undefined && !(forwardX < reverseX)) {
        refused.push({
          choice,
          reason:
            forwardX === reverseX
              ? `both shots are at x = ${forwardX} m; a reversed pair needs shots at the two ends of the common receivers`
              : `the order is wrong: the first shot of a pair is the one at the smaller x (${choice.forwardShot} is at ${formatQuantity(forwardX, 'm', 6)}, ${choice.reverseShot} at ${formatQuantity(reverseX, 'm', 6)}) — name it ${choice.reverseShot}:${choice.forwardShot} (forward shot ${choice.reverseShot}, reverse shot ${choice.forwardShot})`,
        });
        continue;
      }
      if (candidates.length === 0) reasons.push(`shot ${choice.forwardShot} has no forward head-wave branch`);
      if (partners.length === 0) reasons.push(`shot ${choice.reverseShot} has no reverse head-wave branch`);
      let formed = 0;
      for (const forward of candidates) {
        const reverse = partners.find((entry) => entry.refractor === forward.refractor);
        if (!reverse) continue;
        const pair = formPair(forward, reverse, 'user', timeResolution);
        if (typeof pair === 'string') reasons.push(`refractor ${forward.refractor}: ${pair}`);
        else {
          pairs.push(pair);
          formed += 1;
        }
      }
      if (formed === 0) refused.push({ choice, reason: reasons.length > 0 ? reasons.join('; ') : 'the two shots share no refractor branch' });
    }
  }
  pairs.sort((left, right) => left.refractor - right.refractor || left.forward.sourceX - right.forward.sourceX || left.reverse.sourceX - right.reverse.sourceX);
  return { pairs, refused };
}
