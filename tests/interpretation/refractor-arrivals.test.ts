/**
 * refractorArrivals and secondDifferenceScatter (lib/interpretation/refractor-arrivals.ts).
 *
 * References:
 * - the plane-layer head-wave time t = x/V_2 + (h_s + h_r)·cos θ/V_1 for ends h_s, h_r above a
 *   horizontal refractor (METHODS §1; Telford et al. 1990 ch. 4), which for a buried shot at depth d
 *   is x/V_2 + (2h − d)·cos θ/V_1, so the surface-equivalent time is the pick plus d·cos θ/V_1;
 * - METHODS check cases 8.1 (a 2 m shot at 600 m/s, V_n 2000 m/s: t_uh·cos θ = 3.17980 ms) and 8.2
 *   (an end 3 m above the datum, 600/2000 m/s: Δe·cos θ/V_w = 4.76970 ms), computed from the stated
 *   model by ray geometry;
 * - white noise of variance σ² gives second differences a − 2b + c of variance 6σ² (a property of
 *   independent variables), and a parabola a·k² has the constant second difference 2a.
 * Side segmentations come from the pipeline's own pieces: readPickTable → splitShotSides →
 * segmentSide, with the branch column fixing which picks are the head wave.
 */
import { describe, expect, it } from 'vitest';
import { readPickTable, type PickSet } from '../../lib/picks/index.js';
import { splitShotSides } from '../../lib/branches/sides.js';
import { segmentSide } from '../../lib/branches/segment.js';
import type { SideSegmentation } from '../../lib/branches/types.js';
import { refractorArrivals, secondDifferenceScatter, type RefractorArrivalsContext } from '../../lib/interpretation/refractor-arrivals.js';
import { seededNormal } from '../../lib/random.js';
import { range } from '../helpers/synthetic-survey.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';

const V1 = 600;
const V2 = 2000;
const H = 10;
/** cos θ / V_1 = √(1/V_1² − 1/V_2²), s/m (METHODS §0). */
const Q = Math.sqrt(1 / V1 ** 2 - 1 / V2 ** 2);
/** The table writes times to 1e-4 ms = 1e-7 s; half of that, with room for the sums. */
const TABLE_ROUNDING = 1e-7;
/** METHODS 8.1/8.2 print 1e-5 ms; half a unit of the last digit. */
const CHECK_CASE_TOLERANCE = 0.5e-8;
/** The engineering time resolution the pipeline uses (lib/interpret.ts TIME_RESOLUTION). */
const TIME_RESOLUTION = 1e-4;

interface Row {
  readonly shot: string;
  readonly sourceX: number;
  readonly receiverX: number;
  readonly time: number;
  readonly branch: number;
  readonly sigma?: number;
  readonly sourceElevation?: number;
  readonly receiverElevation?: number;
  readonly sourceDepth?: number;
  readonly uphole?: number | null;
}

function pickSetOf(rows: readonly Row[]): PickSet {
  const has = (key: keyof Row) => rows.some((row) => row[key] !== undefined);
  const columns: [string, (row: Row) => string][] = [
    ['shot', (row) => row.shot],
    ['source_x_m', (row) => String(row.sourceX)],
    ['receiver_x_m', (row) => String(row.receiverX)],
    ['time_ms', (row) => (row.time * 1000).toFixed(4)],
    ['branch', (row) => String(row.branch)],
  ];
  if (has('sigma')) columns.push(['sigma_ms', (row) => (row.sigma === undefined ? '' : String(row.sigma * 1000))]);
  if (has('sourceElevation')) columns.push(['source_elev_m', (row) => String(row.sourceElevation ?? '')], ['receiver_elev_m', (row) => String(row.receiverElevation ?? '')]);
  if (has('sourceDepth')) columns.push(['source_depth_m', (row) => String(row.sourceDepth ?? 0)], ['uphole_ms', (row) => (row.uphole == null ? '' : (row.uphole * 1000).toFixed(6))]);
  const text = [columns.map(([name]) => name).join(','), ...rows.map((row) => columns.map(([, cell]) => cell(row)).join(','))].join('\n');
  const outcome = readPickTable(text);
  if (!outcome.ok) throw new Error(outcome.problems.map((problem) => problem.message).join('; '));
  return outcome.value;
}

function sideOf(pickSet: PickSet, shot: string, side: 'forward' | 'reverse'): SideSegmentation {
  const found = splitShotSides(pickSet).find((entry) => entry.shot === shot && entry.side === side);
  if (!found) throw new Error(`no ${side} side of shot ${shot}`);
  return segmentSide(found, { timeResolution: TIME_RESOLUTION });
}

const context = (pickSet: PickSet, datumElevation: number | null = null): RefractorArrivalsContext => ({
  pickSet,
  nearSurfaceVelocity: V1,
  refractorVelocity: V2,
  datumElevation,
  timeResolution: TIME_RESOLUTION,
});

/**
 * One shot's picks over a horizontal refractor at elevation `refractorElevation` under ground
 * `ground(x)`, source `depth` m below its ground: the first of the direct wave and the head wave
 * (closed forms), labelled 1 and 2.
 */
function shotRows(shot: string, sourceX: number, receivers: readonly number[], options: { depth?: number; uphole?: number | null; ground?: (x: number) => number; elevations?: boolean } = {}): Row[] {
  const ground = options.ground ?? (() => 100);
  const depth = options.depth ?? 0;
  const refractorElevation = ground(sourceX) - H;
  const sourceTop = ground(sourceX) - depth;
  return receivers
    .filter((x) => x !== sourceX)
    .map((receiverX) => {
      const direct = Math.hypot(receiverX - sourceX, ground(receiverX) - sourceTop) / V1;
      const head = Math.abs(receiverX - sourceX) / V2 + (sourceTop - refractorElevation) * Q + (ground(receiverX) - refractorElevation) * Q;
      return {
        shot,
        sourceX,
        receiverX,
        time: Math.min(direct, head),
        branch: head < direct ? 2 : 1,
        ...(options.elevations ? { sourceElevation: ground(sourceX), receiverElevation: ground(receiverX) } : {}),
        ...(options.depth !== undefined ? { sourceDepth: depth, uphole: options.uphole ?? null } : {}),
      };
    });
}

const RECEIVERS = range(48, 2.5, 2.5);

describe('refractorArrivals: corrections of a buried shot and to a datum', () => {
  it('refractorArrivals adds t_uh·cos θ to a buried shot with its uphole time: METHODS 8.1 and the surface-shot head-wave times', () => {
    const depth = 2;
    const pickSet = pickSetOf(shotRows('A', 0, RECEIVERS, { depth, uphole: depth / V1 }));
    const arrivals = refractorArrivals(sideOf(pickSet, 'A', 'forward'), 2, context(pickSet))!;
    expectWithin(arrivals.sourceCorrection, 3.1798e-3, CHECK_CASE_TOLERANCE, 'METHODS 8.1: t_uh·cos θ = 3.17980 ms');
    arrivals.receiverX.forEach((x, k) =>
      expectWithin(arrivals.times[k], x / V2 + 2 * H * Q, TABLE_ROUNDING, `METHODS §1: surface-shot head wave x/V_2 + 2h·cos θ/V_1 at ${x} m`),
    );
    expect(arrivals.largestReceiverCorrection).toBe(0);
  });

  it('refractorArrivals takes cos θ from the uphole velocity d/t_uh when it differs from the survey V_1 (√(t_uh² − d²/V_n²), METHODS §8)', () => {
    const depth = 2;
    const uphole = 0.004; // 500 m/s between the shot and the collar, against the survey's 600 m/s
    const pickSet = pickSetOf(shotRows('A', 0, RECEIVERS, { depth, uphole }));
    const arrivals = refractorArrivals(sideOf(pickSet, 'A', 'forward'), 2, context(pickSet))!;
    expectWithin(arrivals.sourceCorrection, Math.sqrt(uphole ** 2 - depth ** 2 / V2 ** 2), 1e-15, 'METHODS §8: t_uh·cos θ with sin θ = (d/t_uh)/V_n');
  });

  it('refractorArrivals brings a buried shot without an uphole time up by d·cos θ/V_1 from the survey V_1', () => {
    const depth = 2;
    const pickSet = pickSetOf([...shotRows('A', 0, RECEIVERS, { depth, uphole: null }), ...shotRows('B', 120, RECEIVERS, { depth: 0 })]);
    const arrivals = refractorArrivals(sideOf(pickSet, 'A', 'forward'), 2, context(pickSet))!;
    expectWithin(arrivals.sourceCorrection, depth * Q, 1e-15, 'METHODS §8: d·cos θ/V_1 (8.1 without the uphole time: the same 3.17980 ms)');
    expectWithin(arrivals.sourceCorrection, 3.1798e-3, CHECK_CASE_TOLERANCE, 'METHODS 8.1');
    const surface = refractorArrivals(sideOf(pickSet, 'B', 'reverse'), 2, context(pickSet))!;
    expect(surface.sourceCorrection, 'a surface shot without a datum is not corrected').toBe(0);
  });

  it('refractorArrivals lowers every end to the datum by Δe·cos θ/V_w: METHODS 8.2 on flat ground 3 m above it, and the head-wave times of the lowered ends', () => {
    const pickSet = pickSetOf(shotRows('A', 0, RECEIVERS, { elevations: true }));
    const arrivals = refractorArrivals(sideOf(pickSet, 'A', 'forward'), 2, context(pickSet, 97))!;
    expectWithin(arrivals.sourceCorrection, -4.7697e-3, CHECK_CASE_TOLERANCE, 'METHODS 8.2: the shot end lowered 3 m, 4.76970 ms removed');
    expectWithin(arrivals.largestReceiverCorrection, 4.7697e-3, CHECK_CASE_TOLERANCE, 'METHODS 8.2: each receiver end lowered 3 m');
    // Both ends 3 m lower: the refractor is h − 3 = 7 m below each (METHODS §1 with h_s = h_r = 7 m).
    arrivals.receiverX.forEach((x, k) => expectWithin(arrivals.times[k], x / V2 + 2 * (H - 3) * Q, TABLE_ROUNDING, `METHODS §1 at the datum, ${x} m`));
  });

  it('refractorArrivals over sloping ground corrects each receiver by its own height above the datum (the refractor then lies flat at 5 m below the datum)', () => {
    const ground = (x: number) => 100 + (4 * x) / 120;
    const pickSet = pickSetOf(shotRows('A', 0, RECEIVERS, { elevations: true, ground }));
    const arrivals = refractorArrivals(sideOf(pickSet, 'A', 'forward'), 2, context(pickSet, 95))!;
    // Refractor at elevation 90 m (10 m under the shot): every end 5 m above it after the correction.
    arrivals.receiverX.forEach((x, k) => expectWithin(arrivals.times[k], x / V2 + 2 * 5 * Q, TABLE_ROUNDING, `Telford 1990: plane refractor 5 m under both datum ends, ${x} m`));
    const highest = ground(RECEIVERS[RECEIVERS.length - 1]!) - 95;
    expectWithin(arrivals.largestReceiverCorrection, highest * Q, 1e-12, 'METHODS §8: the highest receiver, (e − E_d)·cos θ/V_w');
    expect(arrivals.receiverElevations[0]).toBeCloseTo(ground(arrivals.receiverX[0]!), 9);
  });

  it('refractorArrivals combines a buried shot with a datum: brought up by d·q, then lowered from its ground elevation (net: from ground − d)', () => {
    const depth = 2;
    const pickSet = pickSetOf(shotRows('A', 0, RECEIVERS, { depth, uphole: depth / V1, elevations: true }));
    const arrivals = refractorArrivals(sideOf(pickSet, 'A', 'forward'), 2, context(pickSet, 97))!;
    expectWithin(arrivals.sourceCorrection, 3.1798e-3 - 4.7697e-3, 2 * CHECK_CASE_TOLERANCE, 'METHODS 8.1 − 8.2');
    arrivals.receiverX.forEach((x, k) => expectWithin(arrivals.times[k], x / V2 + 2 * (H - 3) * Q, TABLE_ROUNDING, `METHODS §1 at the datum, ${x} m`));
  });
});

describe('refractorArrivals: positions, sigmas and the line', () => {
  it('refractorArrivals on a reverse side lists receivers ascending along the line with the pick indices, median spacing and the line against offset (slowness 1/V_2, intercept 2h·cos θ/V_1)', () => {
    const pickSet = pickSetOf(shotRows('B', 120, RECEIVERS, {}));
    const arrivals = refractorArrivals(sideOf(pickSet, 'B', 'reverse'), 2, context(pickSet))!;
    expect(arrivals.side).toBe('reverse');
    expect(arrivals.sourceX).toBe(120);
    const sorted = [...arrivals.receiverX].sort((left, right) => left - right);
    expect(arrivals.receiverX).toEqual(sorted);
    arrivals.pickIndices.forEach((index, k) => expect(pickSet.picks[index]!.receiverX).toBe(arrivals.receiverX[k]));
    expect(arrivals.receiverSpacing).toBeCloseTo(2.5, 12);
    expectRelative(arrivals.line.slowness, 1 / V2, 1e-7, 'METHODS §1: the head-wave slope 1/V_2');
    expectWithin(arrivals.line.intercept, 2 * H * Q, 1e-6, 'METHODS §1: intercept time 2h·cos θ/V_1 = 31.7980 ms');
    expect(arrivals.lineResidualSD).toBeLessThan(TABLE_ROUNDING);
  });

  it('refractorArrivals floors the sigma of exact picks at the resolution/√12, and its line variance is then σ²/Σ(o − ō)² (least squares, common practice)', () => {
    const pickSet = pickSetOf(shotRows('A', 0, RECEIVERS, {}));
    const arrivals = refractorArrivals(sideOf(pickSet, 'A', 'forward'), 2, context(pickSet))!;
    const floor = TIME_RESOLUTION / Math.sqrt(12);
    for (const sigma of arrivals.sigmas) expect(sigma).toBeCloseTo(floor, 15);
    const offsets = arrivals.receiverX.map((x) => x - arrivals.sourceX);
    const mean = offsets.reduce((sum, value) => sum + value, 0) / offsets.length;
    const spread = offsets.reduce((sum, value) => sum + (value - mean) ** 2, 0);
    expectRelative(arrivals.line.slownessVariance, floor ** 2 / spread, 1e-9, 'least squares: Var b = σ²/Σ(x − x̄)²');
  });

  it("refractorArrivals takes the scatter of noisy picks from their second differences, and a pick's own sigma when the table gives one", () => {
    const normal = seededNormal(81);
    const noisy = shotRows('A', 0, RECEIVERS, {}).map((row) => ({ ...row, time: row.time + 5e-4 * normal() }));
    const pickSet = pickSetOf(noisy);
    const segmentation = sideOf(pickSet, 'A', 'forward');
    const arrivals = refractorArrivals(segmentation, 2, context(pickSet))!;
    const members = segmentation.branches.find((branch) => branch.index === 2)!.members;
    const branchOffsets = members.map((position) => segmentation.sidePicks.offsets[position]!);
    const branchTimes = members.map((position) => segmentation.sidePicks.times[position]!);
    for (const sigma of arrivals.sigmas) expect(sigma).toBe(secondDifferenceScatter(branchOffsets, branchTimes));
    // About the 0.5 ms put in (white noise: Var Δ²t = 6σ²); 30 picks give a rough estimate.
    expect(arrivals.sigmas[0]!).toBeGreaterThan(3e-4);
    expect(arrivals.sigmas[0]!).toBeLessThan(7e-4);

    const withSigma = pickSetOf(shotRows('A', 0, RECEIVERS, {}).map((row, k) => ({ ...row, sigma: 1e-4 * (1 + (k % 3)) })));
    const own = refractorArrivals(sideOf(withSigma, 'A', 'forward'), 2, context(withSigma))!;
    own.pickIndices.forEach((index, k) => expect(own.sigmas[k]).toBeCloseTo(withSigma.picks[index]!.sigma!, 15));
  });

  it('refractorArrivals returns null for a refractor the side has no branch of, and for a branch of fewer than 3 picks', () => {
    const pickSet = pickSetOf(shotRows('A', 0, RECEIVERS, {}));
    expect(refractorArrivals(sideOf(pickSet, 'A', 'forward'), 3, context(pickSet))).toBeNull();
    // A branch 2 cut down to two picks (as an edit could leave it; segmentSide itself refuses such a branch).
    const segmentation = sideOf(pickSet, 'A', 'forward');
    const cut = { ...segmentation, branches: segmentation.branches.map((branch) => (branch.index === 2 ? { ...branch, members: branch.members.slice(0, 2) } : branch)) };
    expect(refractorArrivals(cut, 2, context(pickSet))).toBeNull();
    const three = { ...segmentation, branches: segmentation.branches.map((branch) => (branch.index === 2 ? { ...branch, members: branch.members.slice(0, 3) } : branch)) };
    expect(refractorArrivals(three, 2, context(pickSet))?.receiverX).toHaveLength(3);
  });
});

describe('secondDifferenceScatter', () => {
  /** 10 000 values: the relative SE of σ̂ is about √(2(1 + 2ρ₁² + 2ρ₂²)/n)/2 ≈ 1 % (ρ₁ = −2/3, ρ₂ = 1/6); 3 SE. */
  const WHITE_NOISE_RELATIVE = 0.03;
  const COUNT = 10_000;
  const SIGMA = 5e-4;

  it('secondDifferenceScatter recovers σ of 10 000 seeded Gaussian values within 3 % (Var(a − 2b + c) = 6σ² for independent values)', () => {
    for (const seed of [1, 2, 3]) {
      const normal = seededNormal(seed);
      const values = Array.from({ length: COUNT }, () => SIGMA * normal());
      expectRelative(secondDifferenceScatter(values.map((_, k) => k), values), SIGMA, WHITE_NOISE_RELATIVE, `white noise σ = 0.5 ms, seed ${seed}`);
    }
  });

  it('secondDifferenceScatter of a parabola a·k² is |2a|/√6 exactly, and added to noise it barely moves σ̂, unlike residuals about a line', () => {
    const curvature = 2e-10; // s per index²: a bend of 5 ms from the middle to either end of 10 000 values
    const parabola = Array.from({ length: COUNT }, (_, k) => curvature * (k - COUNT / 2) ** 2);
    expectRelative(secondDifferenceScatter(parabola.map((_, k) => k), parabola), (2 * curvature) / Math.sqrt(6), 1e-6, 'the second difference of a·k² is 2a');

    const normal = seededNormal(4);
    const noise = Array.from({ length: COUNT }, () => SIGMA * normal());
    const bent = noise.map((value, k) => value + parabola[k]!);
    const plain = secondDifferenceScatter(noise.map((_, k) => k), noise);
    // σ̂² gains (2a)²/6 = (4e-10 s)²/6 and a cross term that telescopes to the end values: nothing at this σ.
    expectRelative(secondDifferenceScatter(bent.map((_, k) => k), bent), Math.sqrt(plain ** 2 + (2 * curvature) ** 2 / 6), 1e-6, 'σ̂² + (2a)²/6');
    // The same bend seen by a straight line: residual SD of a parabola about its chord, far above σ.
    const times = bent;
    const meanIndex = (COUNT - 1) / 2;
    const meanTime = times.reduce((sum, value) => sum + value, 0) / COUNT;
    let sxy = 0;
    let sxx = 0;
    times.forEach((value, k) => {
      sxy += (k - meanIndex) * (value - meanTime);
      sxx += (k - meanIndex) ** 2;
    });
    const slope = sxy / sxx;
    const lineSD = Math.sqrt(times.reduce((sum, value, k) => sum + (value - meanTime - slope * (k - meanIndex)) ** 2, 0) / (COUNT - 2));
    expect(lineSD).toBeGreaterThan(2 * SIGMA);
  });

  it('secondDifferenceScatter is 0 for fewer than 3 values and for a straight line', () => {
    expect(secondDifferenceScatter([], [])).toBe(0);
    expect(secondDifferenceScatter([0, 1], [1, 5])).toBe(0);
    expect(secondDifferenceScatter([0, 1, 2, 3, 4], [1, 2, 3, 4, 5])).toBe(0);
    expectWithin(secondDifferenceScatter([0, 1, 2], [0, 1, 0]), 2 / Math.sqrt(6), 1e-15, 'one second difference of −2: √(4/6)');
    // A straight branch with a receiver missing (2.5 m spacing, 60 m left out) scatters by nothing.
    const positions = Array.from({ length: 48 }, (_, k) => 2.5 * (k + 1)).filter((x) => x !== 60);
    expect(secondDifferenceScatter(positions, positions.map((x) => 0.01 + x / 2000))).toBeLessThan(1e-15);
    // Unequal spacing, white noise: Var e_k = σ²(1 + a² + b²) for the chord weights a, b (independent picks).
    const normal = seededNormal(9);
    const uneven = Array.from({ length: 9000 }, (_, k) => k + (k % 3 === 0 ? 0.7 : 0));
    expectRelative(secondDifferenceScatter(uneven, uneven.map(() => SIGMA * normal())), SIGMA, WHITE_NOISE_RELATIVE, 'white noise on uneven positions');
  });
});
