/**
 * reversedPairs and timeAtPosition (lib/interpretation/reversed-pairs.ts): which forward and reverse
 * head-wave branches pair up, and their reciprocal times.
 *
 * Data: a two-layer plane model (500/2000 m/s over 6 m), picks the first of the direct wave x/V_1 and
 * the head wave t = x/V_2 + 2h·cos θ/V_1 (METHODS §1; Telford et al. 1990 ch. 4), whose branch is a
 * straight line, so a reciprocal time read from nearby picks is the closed form at the other shot.
 * Side segmentations come from the pipeline's pieces (readPickTable → splitShotSides → segmentSide),
 * arrivals from refractorArrivals.
 */
import { describe, expect, it } from 'vitest';
import { readPickTable, type PickSet } from '../../lib/picks/index.js';
import { splitShotSides } from '../../lib/branches/sides.js';
import { segmentSide } from '../../lib/branches/segment.js';
import { refractorArrivals, type SideRefractorArrivals } from '../../lib/interpretation/refractor-arrivals.js';
import { LOCAL_PICKS, PARTNERS_PER_SIDE, reversedPairs, timeAtPosition } from '../../lib/interpretation/reversed-pairs.js';
import { range } from '../helpers/synthetic-survey.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';

const V1 = 500;
const V2 = 2000;
const H = 6;
/** Intercept time 2h·cos θ/V_1, s (METHODS §1). */
const TAU = 2 * H * Math.sqrt(1 / V1 ** 2 - 1 / V2 ** 2);
/** Head-wave time at offset x, s (METHODS §1). */
const headWave = (offset: number) => offset / V2 + TAU;
/** The engineering time resolution the pipeline uses (lib/interpret.ts TIME_RESOLUTION). */
const TIME_RESOLUTION = 1e-4;
/** The table writes times to 1e-4 ms = 1e-7 s; a line through five such picks carried 1 m: a few 1e-8 s. */
const TABLE_ROUNDING = 2e-7;

interface Shot {
  readonly id: string;
  readonly x: number;
  readonly receivers: readonly number[];
  /** Time-zero error, s. */
  readonly late?: number;
}

function pickSetOf(shots: readonly Shot[]): PickSet {
  const lines = shots.flatMap((shot) =>
    shot.receivers
      .filter((receiverX) => receiverX !== shot.x)
      .map((receiverX) => {
        const offset = Math.abs(receiverX - shot.x);
        return [shot.id, shot.x, receiverX, ((Math.min(offset / V1, headWave(offset)) + (shot.late ?? 0)) * 1000).toFixed(4)].join(',');
      }),
  );
  const outcome = readPickTable(['shot,source_x_m,receiver_x_m,time_ms', ...lines].join('\n'));
  if (!outcome.ok) throw new Error(outcome.problems.map((problem) => problem.message).join('; '));
  return outcome.value;
}

/** Refractor-2 arrivals of every side that has them. */
function arrivalsOf(pickSet: PickSet): SideRefractorArrivals[] {
  return splitShotSides(pickSet)
    .map((side) => segmentSide(side, { timeResolution: TIME_RESOLUTION }))
    .map((segmentation) => refractorArrivals(segmentation, 2, { pickSet, nearSurfaceVelocity: V1, refractorVelocity: V2, datumElevation: null, timeResolution: TIME_RESOLUTION }))
    .filter((entry): entry is SideRefractorArrivals => entry !== null);
}

const arrivalOf = (arrivals: readonly SideRefractorArrivals[], shot: string, side: 'forward' | 'reverse') => {
  const found = arrivals.find((entry) => entry.shot === shot && entry.side === side);
  if (!found) throw new Error(`no refractor-2 arrivals on the ${side} side of shot ${shot}`);
  return found;
};

const pairIds = (pairs: readonly { forward: { shot: string }; reverse: { shot: string } }[]) => pairs.map((pair) => `${pair.forward.shot}→${pair.reverse.shot}`);

describe('reversedPairs: reciprocal time from a pick at the far shot and from nearby picks', () => {
  it('reversedPairs reads t_AB and t_BA from the picks at the shot positions: the closed form L/V_2 + 2h·cos θ/V_1, and the check passes', () => {
    const receivers = range(61, 0, 2);
    const arrivals = arrivalsOf(pickSetOf([{ id: 'W', x: 0, receivers }, { id: 'E', x: 120, receivers }]));
    const { pairs, refused } = reversedPairs(arrivals, null, TIME_RESOLUTION);
    expect(refused).toEqual([]);
    expect(pairIds(pairs)).toEqual(['W→E']);
    const pair = pairs[0]!;
    expect(pair.forwardAtReverseShot?.from).toBe('pick');
    expect(pair.reverseAtForwardShot?.from).toBe('pick');
    expectWithin(pair.forwardAtReverseShot?.value, headWave(120), TABLE_ROUNDING, 'METHODS §1: t_AB = L/V_2 + τ');
    expectWithin(pair.reverseAtForwardShot?.value, headWave(120), TABLE_ROUNDING, 'METHODS §1: t_BA = t_AB (reciprocity)');
    expectWithin(pair.reciprocalTime.value, headWave(120), TABLE_ROUNDING, 'METHODS §1');
    expect(pair.check?.exceeds).toBe(false);
    // A pick's variance, and the limit of two SEs of the difference plus the resolution,
    // 2·√(var t_AB + var t_BA) + resolution (the module comment: √2·σ_pick + a tolerance of √2·σ_pick + resolution).
    expect(pair.forwardAtReverseShot?.variance).toBeCloseTo(pair.forward.sigmas[pair.forward.sigmas.length - 1]! ** 2, 20);
    const differenceSE = Math.sqrt(pair.forwardAtReverseShot!.variance + pair.reverseAtForwardShot!.variance);
    expectRelative(pair.check?.limit, 2 * differenceSE + TIME_RESOLUTION, 1e-12, 'the module comment: two SEs of t_AB − t_BA plus the resolution');
    expect(pair.spreadLength).toBe(120);
    // Receivers on both head waves: beyond the crossover x_c = τ/(1/V_1 − 1/V_2) = 15.5 m from each shot (METHODS §1).
    const crossover = TAU / (1 / V1 - 1 / V2);
    expect(pair.overlap).toEqual([2 * Math.ceil(crossover / 2), 2 * Math.floor((120 - crossover) / 2)]);
    expect(pair.commonReceivers).toBe((pair.overlap[1] - pair.overlap[0]) / 2 + 1);
  });

  it('reversedPairs reads the reciprocal times from a line through the nearest picks when no receiver stands at the other shot (receivers 1 m off the shots)', () => {
    const receivers = range(60, 1, 2);
    const arrivals = arrivalsOf(pickSetOf([{ id: 'W', x: 0, receivers }, { id: 'E', x: 120, receivers }]));
    const pair = reversedPairs(arrivals, null, TIME_RESOLUTION).pairs[0]!;
    expect(pair.forwardAtReverseShot?.from).toBe('nearby picks');
    expect(pair.reverseAtForwardShot?.from).toBe('nearby picks');
    // The head-wave branch is straight: the short extrapolation gives the closed form at the shot.
    expectWithin(pair.forwardAtReverseShot?.value, headWave(120), TABLE_ROUNDING, 'METHODS §1 at B, from picks at 111…119 m');
    expectWithin(pair.reverseAtForwardShot?.value, headWave(120), TABLE_ROUNDING, 'METHODS §1 at A, from picks at 1…9 m');
    // Least squares with equal sigmas σ through x = 111, 113, …, 119, read at 120: σ²(1/n + (120 − x̄)²/Σ(x − x̄)²) = σ²(1/5 + 25/40).
    const sigma = pair.forward.sigmas[0]!;
    expectRelative(pair.forwardAtReverseShot?.variance, sigma ** 2 * (1 / LOCAL_PICKS + 25 / 40), 1e-9, 'least squares: the variance of a line read at x');
    expect(pair.check?.exceeds).toBe(false);
  });

  it('reversedPairs averages t_AB and t_BA with inverse-variance weights when both are read (Bevington & Robinson 2003 ch. 4)', () => {
    // Receiver at E (120 m) but not at W: t_AB from a pick, t_BA from nearby picks; E 0.1 ms late so that the two differ.
    const receivers = [...range(60, 1, 2), 120];
    const arrivals = arrivalsOf(pickSetOf([{ id: 'W', x: 0, receivers }, { id: 'E', x: 120, receivers, late: 1e-4 }]));
    const pair = reversedPairs(arrivals, null, TIME_RESOLUTION).pairs[0]!;
    const forward = pair.forwardAtReverseShot!;
    const reverse = pair.reverseAtForwardShot!;
    expect([forward.from, reverse.from]).toEqual(['pick', 'nearby picks']);
    expectWithin(reverse.value - forward.value, 1e-4, TABLE_ROUNDING, 'the 0.1 ms time-zero error of E');
    const weights = [1 / forward.variance, 1 / reverse.variance] as const;
    expect(weights[1] / weights[0]).toBeCloseTo(1 / (1 / LOCAL_PICKS + 25 / 40), 9);
    expectRelative(pair.reciprocalTime.value, (weights[0] * forward.value + weights[1] * reverse.value) / (weights[0] + weights[1]), 1e-12, 'inverse-variance mean');
    expectRelative(pair.reciprocalTime.standardError, Math.sqrt(1 / (weights[0] + weights[1])), 1e-12, 'SE of the inverse-variance mean');
  });

  it('reversedPairs uses the one reading unchecked when only one shot’s branch reaches the other shot', () => {
    // E is recorded only on 40…120 m: its branch ends 40 m from W, beyond two receiver spacings.
    const all = range(61, 0, 2);
    const arrivals = arrivalsOf(pickSetOf([{ id: 'W', x: 0, receivers: all }, { id: 'E', x: 120, receivers: all.filter((x) => x >= 40) }]));
    const pair = reversedPairs(arrivals, null, TIME_RESOLUTION).pairs[0]!;
    expect(pair.reverseAtForwardShot).toBeNull();
    expect(pair.check).toBeNull();
    expect(pair.reciprocalTime.value).toBe(pair.forwardAtReverseShot!.value);
    expect(pair.reciprocalTime.standardError).toBeCloseTo(Math.sqrt(pair.forwardAtReverseShot!.variance), 15);
  });
});

describe('timeAtPosition: the quarter-spacing rule and the extrapolation limit', () => {
  const arrivals = arrivalOf(arrivalsOf(pickSetOf([{ id: 'W', x: 0, receivers: range(61, 0, 2) }])), 'W', 'forward');
  const spacing = arrivals.receiverSpacing;
  const first = arrivals.receiverX[0]!;
  const last = arrivals.receiverX[arrivals.receiverX.length - 1]!;

  it('timeAtPosition takes the pick itself within a quarter of the receiver spacing, and nearby picks beyond it', () => {
    expect(spacing).toBe(2);
    const receiver = arrivals.receiverX[10]!;
    const atQuarter = timeAtPosition(arrivals, receiver + spacing / 4);
    expect(atQuarter?.from).toBe('pick');
    expect(atQuarter?.value).toBe(arrivals.times[10]);
    const beyond = timeAtPosition(arrivals, receiver + 0.26 * spacing);
    expect(beyond?.from).toBe('nearby picks');
    expectWithin(beyond?.value, headWave(receiver + 0.26 * spacing), TABLE_ROUNDING, 'METHODS §1: the straight branch between receivers');
  });

  it('timeAtPosition extrapolates up to two receiver spacings beyond the branch, and gives null farther', () => {
    expect(timeAtPosition(arrivals, last + 1.9 * spacing)?.from).toBe('nearby picks');
    expectWithin(timeAtPosition(arrivals, last + 1.9 * spacing)?.value, headWave(last + 1.9 * spacing), TABLE_ROUNDING, 'METHODS §1');
    expect(timeAtPosition(arrivals, last + 2.1 * spacing)).toBeNull();
    expect(timeAtPosition(arrivals, first - 1.9 * spacing)?.from).toBe('nearby picks');
    expect(timeAtPosition(arrivals, first - 2.1 * spacing)).toBeNull();
    expect(timeAtPosition({ ...arrivals, receiverX: [], times: [], sigmas: [] }, 10)).toBeNull();
  });
});

describe('reversedPairs: pairs the user names', () => {
  const all = range(61, 0, 2);
  const arrivals = arrivalsOf(
    pickSetOf([
      { id: 'W', x: 0, receivers: all },
      { id: 'E', x: 120, receivers: all },
      // F and G overlap over 40…80 m, but neither reaches the other shot.
      { id: 'F', x: 0, receivers: all.filter((x) => x <= 80) },
      { id: 'G', x: 120, receivers: all.filter((x) => x >= 40) },
      // K's head wave starts 15.5 m from it (the crossover, METHODS §1), on 90…104 m: no receiver in common with F.
      { id: 'K', x: 120, receivers: all.filter((x) => x >= 90) },
    ]),
  );
  const choices = [
    { forwardShot: 'W', reverseShot: 'E' },
    { forwardShot: 'E', reverseShot: 'W' },
    { forwardShot: 'F', reverseShot: 'G' },
    { forwardShot: 'F', reverseShot: 'K' },
    { forwardShot: 'Z', reverseShot: 'E' },
  ];
  const { pairs, refused } = reversedPairs(arrivals, choices, TIME_RESOLUTION);

  it('reversedPairs forms only the named pairs that can be formed, marked as the user’s', () => {
    expect(pairIds(pairs)).toEqual(['W→E']);
    expect(pairs[0]!.chosenBy).toBe('user');
  });

  it('reversedPairs refuses each pair that cannot be formed, saying why: wrong direction, no overlap, no reciprocal time, unknown shot', () => {
    expect(refused.map((entry) => `${entry.choice.forwardShot}→${entry.choice.reverseShot}`)).toEqual(['E→W', 'F→G', 'F→K', 'Z→E']);
    const reasons = new Map(refused.map((entry) => [`${entry.choice.forwardShot}→${entry.choice.reverseShot}`, entry.reason]));
    expect(reasons.get('E→W')).toBe('shot E has no forward head-wave branch; shot W has no reverse head-wave branch');
    expect(reasons.get('F→G')).toContain("refractor 2: neither shot's refractor 2 branch reaches the other shot, so there is no reciprocal time");
    expect(reasons.get('F→K')).toBe('refractor 2: only 0 receivers between the shots have refractor 2 picks from both (at least 3 needed)');
    expect(reasons.get('Z→E')).toBe('shot Z has no forward head-wave branch');
  });

  it('reversedPairs refuses a named pair whose forward shot does not lie before its reverse shot along the line, saying so', () => {
    const reversedLine = arrivals.map((entry) => (entry.shot === 'E' ? { ...entry, sourceX: -10 } : entry));
    const outcome = reversedPairs(reversedLine, [{ forwardShot: 'W', reverseShot: 'E' }], TIME_RESOLUTION);
    expect(outcome.pairs).toEqual([]);
    expect(outcome.refused[0]?.reason).toContain('shot W is not before shot E along the line');
  });
});

describe('reversedPairs: nearest partners only on a long line of many shots', () => {
  const SHOT_COUNT = 12;
  const SHOT_SPACING = 30;
  const RECEIVER_SPACING = 5;
  const shots = range(SHOT_COUNT, 0, SHOT_SPACING).map((x, k) => ({ id: `S${String(k + 1).padStart(2, '0')}`, x, receivers: range(67, 0, RECEIVER_SPACING) }));
  const arrivals = arrivalsOf(pickSetOf(shots));
  const { pairs } = reversedPairs(arrivals, null, TIME_RESOLUTION);

  /**
   * The brute-force view of the rule from the closed form: a pair can be formed when at least 3
   * receivers between the shots lie beyond the crossover distance x_c = τ/(1/V_1 − 1/V_2) of both
   * (METHODS §1: 15.5 m here, so shots 30 m apart share none); each forward side keeps its
   * PARTNERS_PER_SIDE nearest formable partners, then each reverse side its PARTNERS_PER_SIDE nearest.
   */
  function expectedPairs(): string[] {
    const crossover = TAU / (1 / V1 - 1 / V2);
    const formable = (a: number, b: number) => shots[0]!.receivers.filter((x) => x > a && x < b && x - a > crossover && b - x > crossover).length >= 3;
    const first = shots.flatMap((forward, i) =>
      shots
        .filter((reverse, j) => j > i && formable(forward.x, reverse.x))
        .slice(0, PARTNERS_PER_SIDE)
        .map((reverse) => ({ forward, reverse })),
    );
    return shots.flatMap((reverse) =>
      first
        .filter((pair) => pair.reverse === reverse)
        .sort((left, right) => right.forward.x - left.forward.x)
        .slice(0, PARTNERS_PER_SIDE)
        .map((pair) => `${pair.forward.id}→${pair.reverse.id}`),
    );
  }

  it(`reversedPairs keeps, on a line of ${SHOT_COUNT} shots ${SHOT_SPACING} m apart, each side's ${PARTNERS_PER_SIDE} nearest partners that share receivers (34 of the 66 shot pairs)`, () => {
    // Precondition: every shot but the last has a forward refractor-2 branch, every shot but the first a reverse one.
    expect(arrivals.filter((entry) => entry.side === 'forward')).toHaveLength(SHOT_COUNT - 1);
    expect(arrivals.filter((entry) => entry.side === 'reverse')).toHaveLength(SHOT_COUNT - 1);
    const expected = expectedPairs();
    // Neighbours share no head-wave receivers; the next four along do.
    expect(expected).toHaveLength(34);
    expect(expected).not.toContain('S01→S02');
    expect(expected).toContain('S01→S06');
    expect(pairIds(pairs).sort()).toEqual(expected.sort());
    for (const shot of shots) {
      expect(pairs.filter((pair) => pair.forward.shot === shot.id).length).toBeLessThanOrEqual(PARTNERS_PER_SIDE);
      expect(pairs.filter((pair) => pair.reverse.shot === shot.id).length).toBeLessThanOrEqual(PARTNERS_PER_SIDE);
    }
    expect(pairs.every((pair) => pair.chosenBy === 'automatic')).toBe(true);
  });

  it(`reversedPairs keeps each side's ${PARTNERS_PER_SIDE} nearest partners, the union over both directions, so a forward side whose only partner is shared keeps its pair`, () => {
    // Six shots on the west half whose only reverse partner is R at the east end: R's own nearest four
    // are F3–F6, but F1 and F2 have no other partner, and without their pairs the receivers from about
    // 16 to 54 m would lose every reversed pair.
    const west = range(6, 0, 20).map((x, k) => ({ id: `F${k + 1}`, x, receivers: range(61, x, 5).filter((receiver) => receiver <= 300) }));
    const line = arrivalsOf(pickSetOf([...west, { id: 'R', x: 300, receivers: range(61, 0, 5) }]));
    const outcome = reversedPairs(line, null, TIME_RESOLUTION);
    expect(pairIds(outcome.pairs).sort()).toEqual(['F1→R', 'F2→R', 'F3→R', 'F4→R', 'F5→R', 'F6→R']);
  });
});
