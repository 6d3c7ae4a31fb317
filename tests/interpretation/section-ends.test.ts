/**
 * carryToShots, heldDepthAt and MIN_ANCHOR_PICKS (lib/interpretation/section-ends.ts): a delay-time
 * section carried to the shots beyond its ends by each shot's own delay time.
 *
 * References for the expected values:
 * - two horizontal layers: head-wave time t = |x − x_S|/V_2 + 2h·cos θ_c/V_1 with sin θ_c = V_1/V_2
 *   (Telford, Geldart & Sheriff 1990, "Applied Geophysics" 2nd ed., ch. 4; METHODS §1), so the delay
 *   of either end is half the intercept, δ = h·cos θ_c/V_1 = h·√(s_1² − s_2²) (METHODS §0, §6);
 * - N horizontal layers: τ_n = 2·Σ_{i<n} h_i·√(s_i² − s_n²) (same sources, METHODS §1) and the
 *   METHODS 1.1 check case (400/1600/3500 m/s over 4 and 10 m: τ_3 = 30.9864 ms, computed there by
 *   ray geometry);
 * - a plane dipping refractor: times from the Fermat-path oracle (tests/oracles/dipping-refractor.ts),
 *   independent of every delay-time formula, checked against METHODS 5.1 (600/2400 m/s, 8 m under
 *   x = 0, 6° down towards x = 120 m: τ_A = 25.67844 ms, τ_B = 66.16214 ms, perpendicular depths
 *   h_A = 7.95618 m, h_B = 20.49959 m; computed there by Fermat minimisation). On a plane the exact
 *   time is t = |Δx|·cos α/V_2 + (h_S + h_R)·cos θ_c/V_1 (Telford et al. 1990 ch. 4; METHODS §5), so
 *   the plus-minus method sees V_n′ = V_2/cos α and gives the depth T+/(2·q′) = h·q/q′ with
 *   q = √(s_1² − s_2²), q′ = √(s_1² − s_n′²) (Hagedoorn 1959; METHODS §6): the section in these tests
 *   is built that way, as the pipeline hands it over;
 * - the delay-time (time-term) model t = |Δx|·s_n + δ_S + δ_R with δ = Σ h_k·q_{k,n} (Gardner 1939;
 *   Barry 1967; Scheidegger & Willmore 1957; METHODS §6–7): used as the definition of synthetic
 *   times only where a case needs layers whose thickness differs between shot and receivers;
 * - linear interpolation held constant beyond the ends: the module's stated rule, checked against a
 *   plain scan over the segments written here;
 * - which shots get an anchor, the order and merging of the points: the module's stated rules
 *   (MIN_ANCHOR_PICKS, "one anchor per position"), worked by hand for each case.
 * Bibliographic details are those of METHODS, which gives them from memory.
 */
import { describe, expect, it } from 'vitest';
import { carryToShots, heldDepthAt, MIN_ANCHOR_PICKS, type ReferenceInterface } from '../../lib/interpretation/section-ends.js';
import type { SideRefractorArrivals } from '../../lib/interpretation/refractor-arrivals.js';
import { dippingHeadWaveTime, type DippingModel } from '../oracles/dipping-refractor.js';
import { range } from '../helpers/synthetic-survey.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';

const DEGREE = Math.PI / 180;
/** √(s_i² − s_n²), s/m (METHODS §0). */
const vertical = (upper: number, lower: number) => Math.sqrt(1 / upper ** 2 - 1 / lower ** 2);
/**
 * Closed-form times fit the delay-time form exactly, so only floating-point rounding separates the
 * anchor from the truth: residuals carry ~1e-17 s, i.e. ~1e-14 m of depth; 1e-9 m leaves room.
 */
const ROUNDING_DEPTH = 1e-9;
const ROUNDING_TIME = 1e-12;
/**
 * The Fermat oracle's golden-section searches end far below 1e-12 s; 1e-6 m (about 1.6e-9 s of delay
 * at q = 1.6e-3 s/m) is a generous bound on what its times can move an anchor.
 */
const ORACLE_DEPTH = 1e-6;
/** METHODS 5.1 prints 1e-5 ms and 1e-5 m: half a unit of the last digit, with a little room. */
const CASE_5_1_TIME = 1e-8;
const CASE_5_1_DEPTH = 1e-5;

/**
 * One shot side's head-wave picks as `refractor-arrivals.ts` hands them over. carryToShots reads only
 * shot, sourceX, receiverX and times; the line is the two-point line through the end picks and the
 * rest is filled plainly.
 */
function sideArrivals(shot: string, sourceX: number, receivers: readonly number[], timeAt: (receiverX: number) => number, refractor = 2): SideRefractorArrivals {
  const receiverX = [...receivers].sort((a, b) => a - b);
  const times = receiverX.map(timeAt);
  const offsets = receiverX.map((x) => Math.abs(x - sourceX));
  const n = receiverX.length - 1;
  const slowness = n > 0 ? (times[n]! - times[0]!) / (offsets[n]! - offsets[0]!) : 0;
  return {
    shot,
    side: receiverX[0]! > sourceX ? 'forward' : 'reverse',
    sourceX,
    refractor,
    receiverX,
    times,
    sigmas: receiverX.map(() => 1e-4),
    receiverElevations: receiverX.map(() => null),
    pickIndices: receiverX.map((_, k) => k),
    line: { slowness, intercept: times[0]! - slowness * offsets[0]!, slownessVariance: 0, interceptVariance: 0, covariance: 0 },
    lineResidualSD: 0,
    sourceCorrection: 0,
    largestReceiverCorrection: 0,
    receiverSpacing: receiverX.length > 1 ? receiverX[1]! - receiverX[0]! : 0,
    correctionRefusals: [],
  };
}

const anchorOf = (result: ReturnType<typeof carryToShots>, shot: string) => result.anchors.find((anchor) => anchor.shot === shot);

describe('heldDepthAt', () => {
  const surface: ReferenceInterface = { x: [0, 10, 30, 35, 60], depth: [5, 7, 3, 3, 9] };
  // Plain scan over the segments: the interpolation rule written out independently.
  const byScan = (x: number): number => {
    const { x: xs, depth } = surface;
    if (x <= xs[0]!) return depth[0]!;
    for (let k = 0; k + 1 < xs.length; k += 1) {
      if (x >= xs[k]! && x <= xs[k + 1]!) return depth[k]! + ((depth[k + 1]! - depth[k]!) * (x - xs[k]!)) / (xs[k + 1]! - xs[k]!);
    }
    return depth[depth.length - 1]!;
  };

  it('is linear between the points (hand values: 6 m at 5 m, 5 m at 20 m, 6 m at 47.5 m) and equal to each point', () => {
    // By hand: halfway between (0, 5) and (10, 7); halfway between (10, 7) and (30, 3); halfway between (35, 3) and (60, 9).
    expectWithin(heldDepthAt(surface, 5), 6, 1e-12, 'linear interpolation (hand value)');
    expectWithin(heldDepthAt(surface, 20), 5, 1e-12, 'linear interpolation (hand value)');
    expectWithin(heldDepthAt(surface, 47.5), 6, 1e-12, 'linear interpolation (hand value)');
    surface.x.forEach((x, k) => expectWithin(heldDepthAt(surface, x), surface.depth[k]!, 1e-12, `the point at ${x} m`));
    for (let x = 0; x <= 60; x += 0.7) expectWithin(heldDepthAt(surface, x), byScan(x), 1e-12, `segment scan at ${x} m`);
  });

  it('holds the end depths beyond the ends, and a single point everywhere', () => {
    expect(heldDepthAt(surface, -100)).toBe(5);
    expect(heldDepthAt(surface, -1e-9)).toBe(5);
    expect(heldDepthAt(surface, 60.5)).toBe(9);
    expect(heldDepthAt(surface, 1e6)).toBe(9);
    const single: ReferenceInterface = { x: [12], depth: [4] };
    for (const x of [-50, 12, 80]) expect(heldDepthAt(single, x)).toBe(4);
  });

  it('finds the right segment on a long irregular interface (200 points)', () => {
    const xs = range(200, 0, 1).map((k) => k * 2 + Math.sin(k) * 0.5);
    const long: ReferenceInterface = { x: xs, depth: xs.map((x, k) => 10 + 3 * Math.sin(x / 17) + (k % 3)) };
    const scan = (x: number) => {
      for (let k = 0; k + 1 < xs.length; k += 1) {
        if (x >= xs[k]! && x <= xs[k + 1]!) return long.depth[k]! + ((long.depth[k + 1]! - long.depth[k]!) * (x - xs[k]!)) / (xs[k + 1]! - xs[k]!);
      }
      return Number.NaN;
    };
    for (let x = 0.3; x < xs[xs.length - 1]!; x += 1.37) expectWithin(heldDepthAt(long, x), scan(x), 1e-9, `segment scan at ${x.toFixed(2)} m`);
  });
});

describe('carryToShots: two horizontal layers (600/2400 m/s, refractor at 10 m), section over 40–160 m only', () => {
  const V1 = 600;
  const V2 = 2400;
  const H = 10;
  const Q = vertical(V1, V2);
  // Telford et al. 1990 ch. 4: t = |Δx|/V_2 + 2h·cos θ_c/V_1, cos θ_c/V_1 = Q.
  const headWave = (sourceX: number) => (receiverX: number) => Math.abs(receiverX - sourceX) / V2 + 2 * H * Q;
  const section: ReferenceInterface = { x: range(25, 40, 5), depth: range(25, 40, 5).map(() => H) };
  const line = range(81, 0, 2.5); // receivers 0 … 200 m
  const receiversOf = (sourceX: number) => line.filter((x) => x !== sourceX && Math.abs(x - sourceX) > 10); // past the 5.2 m critical distance
  const shots = [
    { shot: 'W2', x: -40 },
    { shot: 'W1', x: 0 },
    { shot: 'M', x: 100 }, // inside the section: no anchor
    { shot: 'END', x: 160 }, // on the section's last point: not beyond it, no anchor
    { shot: 'E1', x: 200 },
    { shot: 'E2', x: 240 },
  ];
  const arrivals = shots.flatMap(({ shot, x }) => {
    const receivers = receiversOf(x);
    const sides = [receivers.filter((r) => r > x), receivers.filter((r) => r < x)].filter((list) => list.length > 0);
    return sides.map((list) => sideArrivals(shot, x, list, headWave(x)));
  });
  const result = carryToShots(section, [], [V1, V2], arrivals);

  it('anchors each off-end shot at the true depth, 10 m, with the delay δ_S = h·√(s_1² − s_2²) = 16.1374 ms', () => {
    // Hand value: √(1/600² − 1/2400²) = 1.6137431e-3 s/m; × 10 m = 16.137431 ms.
    expectWithin(Q * H, 0.016137431, 1e-9, 'h·√(s_1² − s_2²) by hand');
    // Off-end shots only (the module's rule: M at 100 m and END on the last point, 160 m, lie within the section).
    expect(result.anchors.map((anchor) => anchor.shot)).toEqual(['W2', 'W1', 'E1', 'E2']);
    for (const anchor of result.anchors) {
      expectWithin(anchor.depth, H, ROUNDING_DEPTH, `depth under ${anchor.shot} (the stated model)`);
      expectWithin(anchor.delay, H * Q, ROUNDING_TIME, `δ_S of ${anchor.shot}: half the intercept 2h·cos θ_c/V_1 (Telford et al. 1990)`);
      expect(anchor.x).toBe(shots.find((shot) => shot.shot === anchor.shot)!.x);
      // Every pick on the 49 covered receivers (40 … 160 m every 2.5 m) counts, not only those on the section's points (every 5 m).
      expect(anchor.picks).toBe(line.filter((x) => x >= 40 && x <= 160).length);
    }
  });

  it('returns the section\'s points with the anchors outside them, x ascending', () => {
    // The module's rule: [anchors left of the section, the section's own points unchanged, anchors right of it].
    expect(result.interface.x).toEqual([-40, 0, ...section.x, 200, 240]);
    expect(result.interface.depth).toHaveLength(result.interface.x.length);
    result.interface.depth.forEach((depth) => expectWithin(depth, H, ROUNDING_DEPTH, 'the stated model'));
    expect(result.interface.depth.slice(2, 2 + section.x.length)).toEqual(section.depth);
  });

  it('orders anchors and interface points by x whatever the order of the arrivals', () => {
    const scrambled = [...arrivals].reverse();
    const carried = carryToShots(section, [], [V1, V2], [scrambled[0]!, ...scrambled.slice(1).sort((a, b) => (a.shot < b.shot ? -1 : 1))]);
    expect(carried.anchors.map((anchor) => anchor.x)).toEqual([-40, 0, 200, 240]);
    expect(carried.interface.x).toEqual([-40, 0, ...section.x, 200, 240]);
  });

  it('gives a shot with fewer than MIN_ANCHOR_PICKS (3, more than a pair) picks on covered receivers no anchor, one with 3 an anchor', () => {
    // The module's rule (common practice: more than a pair).
    expect(MIN_ANCHOR_PICKS).toBe(3);
    const uncovered = range(12, 2.5, 2.5); // 2.5 … 30 m, all west of the section
    const withCovered = (count: number) => [...uncovered, ...range(count, 40, 2.5)];
    const two = carryToShots(section, [], [V1, V2], [sideArrivals('F2', -20, withCovered(2), headWave(-20))]);
    expect(two.anchors).toEqual([]);
    expect(two.interface).toEqual({ x: section.x, depth: section.depth });
    const three = carryToShots(section, [], [V1, V2], [sideArrivals('F3', -20, withCovered(3), headWave(-20))]);
    expect(three.anchors.map((anchor) => [anchor.shot, anchor.picks])).toEqual([['F3', 3]]);
    expectWithin(three.anchors[0]!.depth, H, ROUNDING_DEPTH, 'the stated model');
  });

  it('keeps the anchor where it is when one of 49 covered picks is 20 ms late (the median of the shot\'s delays)', () => {
    const receivers = receiversOf(0);
    const wild = (x: number) => headWave(0)(x) + (x === 100 ? 0.02 : 0);
    const carried = carryToShots(section, [], [V1, V2], [sideArrivals('W1', 0, receivers, wild)]);
    // A mean of the 49 residuals would move δ_S by 20/49 = 0.41 ms, the anchor by 0.25 m.
    expectWithin(anchorOf(carried, 'W1')?.depth, H, ROUNDING_DEPTH, 'the stated model, one wild pick');
    expectWithin(anchorOf(carried, 'W1')?.delay, H * Q, ROUNDING_TIME, 'δ_S, one wild pick');
  });

  it('gives no anchor when the delay leaves no positive thickness (picks too early for any overburden)', () => {
    // Picks 2·δ early: δ_S = −h·q, a thickness of −10 m.
    const early = (x: number) => headWave(240)(x) - 2 * H * Q;
    const carried = carryToShots(section, [], [V1, V2], [sideArrivals('E2', 240, receiversOf(240), early)]);
    expect(carried.anchors).toEqual([]);
    expect(carried.interface).toEqual({ x: section.x, depth: section.depth });
  });

  it('averages the anchors of two shots at one x into one interface point, and keeps both anchors', () => {
    // The second shot's picks 1 ms late: its δ_S is 1 ms larger, its anchor 1 ms / q = 0.6197 m deeper.
    const late = (x: number) => headWave(200)(x) + 0.001;
    const carried = carryToShots(section, [], [V1, V2], [
      sideArrivals('E1', 200, receiversOf(200).filter((x) => x < 200), headWave(200)),
      sideArrivals('E1b', 200, receiversOf(200).filter((x) => x < 200), late),
    ]);
    expect(carried.anchors.map((anchor) => anchor.shot).sort()).toEqual(['E1', 'E1b']);
    expectWithin(anchorOf(carried, 'E1b')?.depth, H + 0.001 / Q, ROUNDING_DEPTH, 'h + 1 ms/q (delay-time depth, METHODS §7)');
    expect(carried.interface.x).toEqual([...section.x, 200]);
    expectWithin(carried.interface.depth[carried.interface.depth.length - 1], H + 0.0005 / Q, ROUNDING_DEPTH, 'the mean of the two anchors');
  });
});

describe('carryToShots: plane dipping refractor (METHODS 5.1: 600/2400 m/s, 8 m under x = 0, 6° down to +x), Fermat-oracle times', () => {
  const V1 = 600;
  const V2 = 2400;
  const ALPHA = 6 * DEGREE;
  const model: DippingModel = { velocities: [V1, V2], interfaces: [{ depthAtOrigin: 8, dip: ALPHA }] };
  /** Perpendicular depth below x (METHODS §5: z·cos α). */
  const perpendicular = (x: number) => (8 + x * Math.tan(ALPHA)) * Math.cos(ALPHA);
  const Q = vertical(V1, V2);
  // The plus-minus view of a plane (METHODS §6): V_n′ = V_2/cos α, depth h·q/q′.
  const apparent = V2 / Math.cos(ALPHA);
  const QPrime = vertical(V1, apparent);
  const sectionDepth = (x: number) => (perpendicular(x) * Q) / QPrime;
  const section: ReferenceInterface = { x: range(25, 30, 2.5), depth: range(25, 30, 2.5).map(sectionDepth) };
  const receivers = range(49, 0, 2.5).filter((x) => x > 0 && x < 120); // 2.5 … 117.5 m
  const oracle = (sourceX: number) => (receiverX: number) => {
    const time = dippingHeadWaveTime(model, 1, sourceX, receiverX);
    if (time === null) throw new Error(`oracle: no head wave from ${sourceX} to ${receiverX}`);
    return time;
  };
  const shots = [
    { shot: 'WW', x: -30 },
    { shot: 'A', x: 0 },
    { shot: 'MID', x: 60 },
    { shot: 'B', x: 120 },
    { shot: 'EE', x: 150 },
  ];
  const arrivals = shots.flatMap(({ shot, x }) => {
    const far = receivers.filter((r) => Math.abs(r - x) >= 15); // past the critical distance, 2h·tan θ_c ≤ 11 m here
    return [far.filter((r) => r > x), far.filter((r) => r < x)].filter((list) => list.length > 0).map((list) => sideArrivals(shot, x, list, oracle(x)));
  });
  const result = carryToShots(section, [], [V1, apparent], arrivals);

  it('the oracle reproduces METHODS 5.1 (τ_A, τ_B) and the plane-dipping time formula', () => {
    // Checks the test's own data source before it is used: METHODS 5.1, τ_A = 25.67844 ms, τ_B = 66.16214 ms.
    for (const x of [30, 60, 90]) {
      const fromA = oracle(0)(x);
      const fromB = oracle(120)(x);
      // Telford et al. 1990 ch. 4 / METHODS §5: t = |Δx|·cos α/V_2 + (h_S + h_R)·cos θ_c/V_1.
      expectWithin(fromA, x * Math.cos(ALPHA) / V2 + (perpendicular(0) + perpendicular(x)) * Q, 1e-10, `formula, A → ${x} m`);
      expectWithin(fromB, (120 - x) * Math.cos(ALPHA) / V2 + (perpendicular(120) + perpendicular(x)) * Q, 1e-10, `formula, B → ${x} m`);
    }
    expectWithin(2 * perpendicular(0) * Q, 0.02567844, CASE_5_1_TIME, 'τ_A (METHODS 5.1)');
    expectWithin(2 * perpendicular(120) * Q, 0.06616214, CASE_5_1_TIME, 'τ_B (METHODS 5.1)');
  });

  it('gives each shot beyond the section the delay δ_S = h_S·√(s_1² − s_2²): half of METHODS 5.1\'s τ_A and τ_B under A and B', () => {
    expect(result.anchors.map((anchor) => anchor.shot)).toEqual(['WW', 'A', 'B', 'EE']);
    for (const anchor of result.anchors) expectWithin(anchor.delay, perpendicular(anchor.x) * Q, ORACLE_DEPTH * Q, `δ_S of ${anchor.shot} (Telford et al. 1990 ch. 4)`);
    expectWithin(anchorOf(result, 'A')?.delay, 0.02567844 / 2, CASE_5_1_TIME, 'τ_A/2 (METHODS 5.1)');
    expectWithin(anchorOf(result, 'B')?.delay, 0.06616214 / 2, CASE_5_1_TIME, 'τ_B/2 (METHODS 5.1)');
  });

  it('puts each anchor on the section\'s plane carried on, within 0.04 % of the perpendicular depth and 0.6 % of the vertical one', () => {
    for (const anchor of result.anchors) {
      expectWithin(anchor.depth, sectionDepth(anchor.x), ORACLE_DEPTH, `depth under ${anchor.shot}: h·q/q′ (METHODS §6)`);
      // q/q′ = 0.99964 here: the delay-time depth is the perpendicular depth to 0.04 % (METHODS 5.1's h_A, h_B below)...
      expectRelative(anchor.depth, perpendicular(anchor.x), 4e-4, `perpendicular depth under ${anchor.shot} (stated model)`);
      // ...and short of the vertical depth by about 1 − cos 6° = 0.55 % (METHODS §6: h_G is roughly normal to the refractor).
      expectRelative(anchor.depth, 8 + anchor.x * Math.tan(ALPHA), 0.006, `vertical depth under ${anchor.shot} (stated model)`);
    }
    expectWithin(perpendicular(0), 7.95618, CASE_5_1_DEPTH, 'h_A (METHODS 5.1)');
    expectWithin(perpendicular(120), 20.49959, CASE_5_1_DEPTH, 'h_B (METHODS 5.1)');
    // The carried interface is one straight line from −30 m to 150 m: collinear with the section's ends.
    expect(result.interface.x).toEqual([-30, 0, ...section.x, 120, 150]);
    result.interface.x.forEach((x, k) => expectWithin(result.interface.depth[k], sectionDepth(x), ORACLE_DEPTH, `carried plane at ${x} m`));
  });

  it('a level hold from the section\'s end would be metres off under the outer shots (why the anchors exist)', () => {
    // Not a check of the code: the stated model's depths against the section's end depths, for scale.
    expect(sectionDepth(-30) - section.depth[0]!).toBeLessThan(-5);
    expect(sectionDepth(150) - section.depth[section.depth.length - 1]!).toBeGreaterThan(5);
  });
});

describe('carryToShots: three layers with the shallower interface given (METHODS 1.1: 400/1600/3500 m/s over 4 and 10 m)', () => {
  const V = [400, 1600, 3500];
  const q13 = vertical(V[0]!, V[2]!);
  const q23 = vertical(V[1]!, V[2]!);
  const receivers = range(81, 0, 2.5);
  const sectionX = range(25, 40, 5);
  const section: ReferenceInterface = { x: sectionX, depth: sectionX.map(() => 14) };

  it('anchors the deeper refractor at 14 m with δ_S = τ_3/2 = 15.4932 ms (METHODS 1.1), the upper interface held from its own points', () => {
    // Head wave 3: t = |Δx|/V_3 + τ_3, τ_3 = 2·(h_1·q_{1,3} + h_2·q_{2,3}) (Telford et al. 1990 ch. 4; METHODS §1).
    const tau3 = 2 * (4 * q13 + 10 * q23);
    expectWithin(tau3, 0.0309864, 0.5e-7, 'τ_3 (METHODS 1.1, ray geometry)');
    const upper: ReferenceInterface = { x: [20, 180], depth: [4, 4] };
    const headWave = (sourceX: number) => (receiverX: number) => Math.abs(receiverX - sourceX) / V[2]! + tau3;
    const arrivals = [
      sideArrivals('W', -20, receivers.filter((x) => x > 0), headWave(-20), 3),
      sideArrivals('E', 220, receivers.filter((x) => x < 200), headWave(220), 3),
    ];
    const carried = carryToShots(section, [upper], V, arrivals);
    expect(carried.anchors.map((anchor) => anchor.shot)).toEqual(['W', 'E']);
    for (const anchor of carried.anchors) {
      expectWithin(anchor.depth, 14, ROUNDING_DEPTH, `depth of interface 2 under ${anchor.shot} (stated model: 4 + 10 m)`);
      expectWithin(anchor.delay, 0.0309864 / 2, 0.5e-7, `δ_S of ${anchor.shot}: τ_3/2 (METHODS 1.1)`);
    }
    expect(carried.interface.x).toEqual([-20, ...sectionX, 220]);
  });

  it('takes the upper layer\'s thickness under the shot from the upper interface there (its own anchors), not from the section\'s end', () => {
    // Delay-time form (Gardner 1939; METHODS §6–7) with thicknesses that differ between shot and
    // receivers: under the receivers 4 m + 10 m; under W (x = −20) 3 m + 12 m; under E (x = 220) 5 m + 8 m.
    const upper: ReferenceInterface = { x: [-20, ...sectionX, 220], depth: [3, ...sectionX.map(() => 4), 5] };
    const delayAt = (h1: number, h2: number) => h1 * q13 + h2 * q23;
    const receiverDelay = delayAt(4, 10);
    const times = (sourceX: number, shotDelay: number) => (receiverX: number) => Math.abs(receiverX - sourceX) / V[2]! + shotDelay + receiverDelay;
    const arrivals = [
      sideArrivals('W', -20, receivers.filter((x) => x > 0), times(-20, delayAt(3, 12)), 3),
      sideArrivals('E', 220, receivers.filter((x) => x < 200), times(220, delayAt(5, 8)), 3),
    ];
    const carried = carryToShots(section, [upper], V, arrivals);
    expectWithin(anchorOf(carried, 'W')?.depth, 15, ROUNDING_DEPTH, 'interface 2 under W: 3 + 12 m (stated model)');
    expectWithin(anchorOf(carried, 'E')?.depth, 13, ROUNDING_DEPTH, 'interface 2 under E: 5 + 8 m (stated model)');
    expectWithin(anchorOf(carried, 'W')?.delay, delayAt(3, 12), ROUNDING_TIME, 'δ_W = 3·q_{1,3} + 12·q_{2,3}');
  });

  it('gives no anchor when the delay is smaller than the upper layer\'s share (no room for layer 2)', () => {
    // δ_S = 4·q_{1,3} − 1 m·q_{2,3}: layer 2 would be −1 m thick.
    const upper: ReferenceInterface = { x: [20, 180], depth: [4, 4] };
    const shotDelay = 4 * q13 - 1 * q23;
    expect(shotDelay).toBeGreaterThan(0); // the delay itself is positive: only the thickness is not
    const receiverDelay = 4 * q13 + 10 * q23;
    const time = (receiverX: number) => Math.abs(receiverX + 20) / V[2]! + shotDelay + receiverDelay;
    const carried = carryToShots(section, [upper], V, [sideArrivals('W', -20, receivers.filter((x) => x > 0), time, 3)]);
    expect(carried.anchors).toEqual([]);
    expect(carried.interface).toEqual({ x: sectionX, depth: section.depth });
  });
});
