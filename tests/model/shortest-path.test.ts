import { describe, expect, it } from 'vitest';
import {
  forwardStar,
  shortestPathTimes,
  slownessGridFromSection,
  type GridGeometry,
  type GridSource,
  type LayeredSection,
  type SlownessGrid,
} from '../../lib/model/shortest-path.js';
import { seededRandom } from '../../lib/random.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';
import { runPythonJson } from '../helpers/python.js';
import { GRID_GRAPH_PYTHON } from '../oracles/scipy-grid-graph.js';

const DEGREE = Math.PI / 180;

/** METHODS 12.1 suggests 0.1 % for the shortest path with r ≥ 5 at 0.5 m (the star's angular gap at r = 5). */
const CASE_12_1_TOLERANCE = 0.001;
/** The brief for this solver: closed-form head-wave times within 0.5 % (interface smearing plus the star's gaps). */
const HEAD_WAVE_TOLERANCE = 0.005;
/** The same graph solved by two Dijkstra codes: only the order of floating-point sums differs. */
const SAME_GRAPH_TOLERANCE = 1e-9;
/** METHODS 12.1 prints its grid errors to 2 significant digits (0.99 ms, 0.0012 ms): half a unit in the last. */
const CASE_12_1_R2_ROUNDING = 0.005e-3;
const CASE_12_1_R5_ROUNDING = 0.00005e-3;

function geometry(length: number, depth: number, spacing: number): GridGeometry {
  return { originX: 0, spacing, columns: Math.round(length / spacing) + 1, rows: Math.round(depth / spacing) + 1 };
}

/**
 * METHODS §1 for two horizontal layers: t(x) = min(s₁x, s₂x + 2h·√(s₁² − s₂²)); the head wave only
 * from the critical distance 2h·s₂/√(s₁² − s₂²) on (it is never first before it there).
 */
function twoLayerTime(upperVelocity: number, lowerVelocity: number, thickness: number, offset: number): number {
  const upper = 1 / upperVelocity;
  const lower = 1 / lowerVelocity;
  const vertical = Math.sqrt(upper * upper - lower * lower);
  const direct = upper * offset;
  return offset >= (2 * thickness * lower) / vertical ? Math.min(direct, lower * offset + 2 * thickness * vertical) : direct;
}

/**
 * Head wave over one plane refractor of dip α, computed here by the image construction (METHODS §5
 * relations): the perpendicular depths under source and receiver are h_S and h_R = h_S ± x·sin α;
 * mirroring the receiver in the refractor, the ray is a straight slant leg at θ_c to the normal, a
 * leg x·cos α along the refractor at V₂ and a slant leg up, so t = x·cos α/V₂ + (h_S + h_R)·cos θ_c/V₁.
 * `verticalDepthAtSource` is the vertical depth z under the source; `downDip` is +1 when the
 * receiver is down-dip of the source, −1 up-dip. The first arrival is the minimum with the direct
 * wave (the head wave is first only well beyond its critical distance in these tests).
 */
function dippingTime(upperVelocity: number, lowerVelocity: number, verticalDepthAtSource: number, dip: number, offset: number, downDip: 1 | -1): number {
  const critical = Math.asin(upperVelocity / lowerVelocity);
  const sourceDepth = verticalDepthAtSource * Math.cos(dip);
  const receiverDepth = sourceDepth + downDip * offset * Math.sin(dip);
  const head = (offset * Math.cos(dip)) / lowerVelocity + ((sourceDepth + receiverDepth) * Math.cos(critical)) / upperVelocity;
  return Math.min(offset / upperVelocity, head);
}

/** METHODS check case 5.1: 600/2400 m/s, refractor 8 m below A (x = 0), dipping 6° towards B (x = 120 m). */
const CASE_5_1 = { upper: 600, lower: 2400, depthA: 8, dip: 6 * DEGREE, length: 120 };
const case51Section: LayeredSection = {
  velocities: [CASE_5_1.upper, CASE_5_1.lower],
  interfaces: [(x) => CASE_5_1.depthA + x * Math.tan(CASE_5_1.dip)],
};

function largestDippingError(spacing: number, radius: number): number {
  const grid = slownessGridFromSection(case51Section, geometry(CASE_5_1.length, 30, spacing));
  const fromA = shortestPathTimes(grid, { x: 0, z: 0 }, { radius });
  const fromB = shortestPathTimes(grid, { x: CASE_5_1.length, z: 0 }, { radius });
  let largest = 0;
  for (let offset = 10; offset <= CASE_5_1.length; offset += 10) {
    const forward = dippingTime(CASE_5_1.upper, CASE_5_1.lower, CASE_5_1.depthA, CASE_5_1.dip, offset, 1);
    const reverse = dippingTime(CASE_5_1.upper, CASE_5_1.lower, CASE_5_1.depthA + CASE_5_1.length * Math.tan(CASE_5_1.dip), CASE_5_1.dip, offset, -1);
    largest = Math.max(largest, Math.abs(fromA.timeAtSurface(offset) - forward) / forward);
    largest = Math.max(largest, Math.abs(fromB.timeAtSurface(CASE_5_1.length - offset) - reverse) / reverse);
  }
  return largest;
}

describe('shortestPathTimes: METHODS check case 12.1 (500/2000 m/s, interface at 10 m)', () => {
  const section: LayeredSection = { velocities: [500, 2000], interfaces: [() => 10] };
  const offsets = [10, 20, 30, 40, 60, 80, 100];
  const printed = [20.0, 40.0, 53.7298, 58.7298, 68.7298, 78.7298, 88.7298].map((milliseconds) => milliseconds * 1e-3);
  const grid = slownessGridFromSection(section, geometry(100, 15, 0.5));

  it('the METHODS §1 formula used as the oracle reproduces the analytic times printed in case 12.1', () => {
    offsets.forEach((offset, index) => {
      expectWithin(twoLayerTime(500, 2000, 10, offset), printed[index] as number, 0.5e-7, `METHODS 12.1 analytic t(${offset} m)`);
    });
  });

  it('shortestPathTimes with r = 5 on the 0.5 m grid is within 0.1 % of the analytic times (METHODS 12.1)', () => {
    const field = shortestPathTimes(grid, { x: 0, z: 0 }, { radius: 5 });
    offsets.forEach((offset) => {
      expectRelative(field.timeAtSurface(offset), twoLayerTime(500, 2000, 10, offset), CASE_12_1_TOLERANCE, `METHODS 12.1 / §1 analytic, r = 5, t(${offset} m)`);
    });
  });

  it('shortestPathTimes reproduces the grid errors METHODS 12.1 reports: 0.99 ms for r = 2 and 0.0012 ms for r = 5', () => {
    for (const [radius, reported, rounding] of [
      [2, 0.99e-3, CASE_12_1_R2_ROUNDING],
      [5, 0.0012e-3, CASE_12_1_R5_ROUNDING],
    ] as const) {
      const field = shortestPathTimes(grid, { x: 0, z: 0 }, { radius });
      const largest = Math.max(...offsets.map((offset) => field.timeAtSurface(offset) - twoLayerTime(500, 2000, 10, offset)));
      expectWithin(largest, reported, rounding, `METHODS 12.1 (computed with scipy): largest error of the r = ${radius} shortest path at 0.5 m`);
    }
  });
});

describe('shortestPathTimes: closed-form head waves', () => {
  it('shortestPathTimes matches the METHODS §1 two-layer times within 0.5 % for an interface between node rows (800/3000 m/s, 7.3 m)', () => {
    const grid = slownessGridFromSection({ velocities: [800, 3000], interfaces: [() => 7.3] }, geometry(80, 12, 0.5));
    const field = shortestPathTimes(grid, { x: 0, z: 0 }, { radius: 5 });
    for (let offset = 5; offset <= 80; offset += 5) {
      expectRelative(field.timeAtSurface(offset), twoLayerTime(800, 3000, 7.3, offset), HEAD_WAVE_TOLERANCE, `METHODS §1 two-layer formula, t(${offset} m)`);
    }
  });

  it('the image-construction oracle reproduces METHODS check case 5.1 (τ_A, τ_B, t_AB)', () => {
    const { upper, lower, depthA, dip, length } = CASE_5_1;
    const depthB = depthA + length * Math.tan(dip);
    const forwardIntercept = dippingTime(upper, lower, depthA, dip, length, 1) - length * Math.sin(Math.asin(upper / lower) + dip) / upper;
    const reverseIntercept = dippingTime(upper, lower, depthB, dip, length, -1) - length * Math.sin(Math.asin(upper / lower) - dip) / upper;
    expectWithin(forwardIntercept, 25.67844e-3, 0.5e-8, 'METHODS 5.1 τ_A');
    expectWithin(reverseIntercept, 66.16214e-3, 0.5e-8, 'METHODS 5.1 τ_B');
    expectWithin(dippingTime(upper, lower, depthA, dip, length, 1), 95.64639e-3, 0.5e-8, 'METHODS 5.1 t_AB (forward)');
    expectWithin(dippingTime(upper, lower, depthB, dip, length, -1), 95.64639e-3, 0.5e-8, 'METHODS 5.1 t_AB (reverse, reciprocity)');
  });

  it('shortestPathTimes matches the dipping-refractor times of case 5.1 within 0.5 %, shooting down-dip and up-dip (h = 0.5 m, r = 8)', () => {
    const largest = largestDippingError(0.5, 8);
    expect(largest, `image construction (METHODS §5 relations), 6° dip: largest relative error ${largest}`).toBeLessThan(HEAD_WAVE_TOLERANCE);
  });

  it('shortestPathTimes converges: halving h and raising r lowers the largest dipping-refractor error', () => {
    const coarse = largestDippingError(1, 4);
    const fine = largestDippingError(0.5, 8);
    // Common practice (METHODS §12): refinement must reduce a grid error; here by at least a third.
    expect(fine, `coarse (1 m, r = 4) ${coarse}, fine (0.5 m, r = 8) ${fine}`).toBeLessThan((2 / 3) * coarse);
  });
});

/**
 * The same graph built independently in numpy (tests/oracles/scipy-grid-graph.ts), the source
 * start, then scipy.sparse.csgraph.dijkstra from a super-source joined to the start nodes.
 */
const SCIPY_SCRIPT = `${GRID_GRAPH_PYTHON}
d = json.load(sys.stdin)
nx, nz, h, x0, cells, us, vs, ws = grid_edges(d)
n = nx * nz
sc, sr = (d['sourceX'] - x0) / h, d['sourceZ'] / h
if float(sc).is_integer() and float(sr).is_integer():
    start = [(int(sr) * nx + int(sc), 0.0)]
else:
    cc, cr = min(int(math.floor(sc)), nx - 2), min(int(math.floor(sr)), nz - 2)
    start = [((cr + j) * nx + cc + i, h * math.hypot(cc + i - sc, cr + j - sr) * cells[cr, cc]) for j in (0, 1) for i in (0, 1)]
us.append(np.full(len(start), n)); vs.append(np.array([s[0] for s in start])); ws.append(np.array([s[1] for s in start]))
u = np.concatenate(us); v = np.concatenate(vs); w = np.concatenate(ws)
assert np.all(np.isfinite(w))
if start[0][1] == 0.0:
    graph = csr_matrix((w[:-1], (u[:-1], v[:-1])), shape=(n, n))
    times = dijkstra(graph, directed=True, indices=start[0][0])
else:
    graph = csr_matrix((w, (u, v)), shape=(n + 1, n + 1))
    times = dijkstra(graph, directed=True, indices=n)[:n]
print(json.dumps({'times': times.tolist(), 'edges': int(len(u) - len(start))}))
`;

function scipyTimes(grid: SlownessGrid, source: GridSource, radius: number): { times: number[]; edges: number } {
  return runPythonJson(SCIPY_SCRIPT, {
    columns: grid.columns,
    rows: grid.rows,
    spacing: grid.spacing,
    originX: grid.originX,
    cellSlowness: Array.from(grid.cellSlowness),
    radius,
    sourceX: source.x,
    sourceZ: source.z,
  });
}

function expectSameAsScipy(grid: SlownessGrid, source: GridSource, radius: number): void {
  const ours = shortestPathTimes(grid, source, { radius }).nodeTimes;
  const reference = scipyTimes(grid, source, radius);
  expect(reference.times.length).toBe(ours.length);
  let worst = 0;
  reference.times.forEach((time, node) => {
    const error = time === 0 ? Math.abs(ours[node] as number) : Math.abs((ours[node] as number) - time) / time;
    worst = Math.max(worst, error);
  });
  expect(worst, `scipy.sparse.csgraph.dijkstra on the same graph (${reference.edges} edges): worst relative difference ${worst}`).toBeLessThanOrEqual(SAME_GRAPH_TOLERANCE);
}

describe('shortestPathTimes: the same graph solved by scipy.sparse.csgraph.dijkstra', () => {
  it('shortestPathTimes agrees with scipy to 1e-9 on an undulating three-layer section, surface source on a node, r = 5', () => {
    const section: LayeredSection = {
      velocities: [450, 1500, 3200],
      interfaces: [(x) => 3 + 1.2 * Math.sin(x / 4), (x) => 8 + 0.15 * x + 1.5 * Math.cos(x / 6)],
    };
    expectSameAsScipy(slownessGridFromSection(section, geometry(40, 14, 0.5)), { x: 12, z: 0 }, 5);
  });

  it('shortestPathTimes agrees with scipy to 1e-9 on seeded random cell slownesses, source inside a cell, r = 3', () => {
    const random = seededRandom(12_021);
    const shape = { originX: -3, spacing: 0.7, columns: 31, rows: 17 };
    const cellSlowness = Float64Array.from({ length: 30 * 16 }, () => 1 / (300 + 4000 * random()));
    expectSameAsScipy({ ...shape, cellSlowness }, { x: 4.37, z: 2.9 }, 3);
  });
});

describe('shortestPathTimes and forwardStar: edges stated in the doc comments', () => {
  const uniform = (columns: number, rows: number, velocity: number): SlownessGrid => ({
    originX: 0,
    spacing: 1,
    columns,
    rows,
    cellSlowness: new Float64Array((columns - 1) * (rows - 1)).fill(1 / velocity),
  });

  it('forwardStar has 8, 16 and 80 offsets for r = 1, 2, 5, each with gcd(|i|, |j|) = 1 (Moser1991)', () => {
    expect(forwardStar(1)).toHaveLength(8);
    expect(forwardStar(2)).toHaveLength(16);
    const star = forwardStar(5);
    expect(star).toHaveLength(80);
    // Counted by hand (common practice: the primitive lattice vectors in the square |i|, |j| ≤ 5).
    expect(star).toContainEqual({ column: 5, row: 4 });
    expect(star).not.toContainEqual({ column: 4, row: 2 });
  });

  it('shortestPathTimes and forwardStar throw for a radius that is not an integer ≥ 1', () => {
    expect(() => forwardStar(0)).toThrow(/radius must be an integer ≥ 1/);
    expect(() => shortestPathTimes(uniform(3, 3, 1000), { x: 0, z: 0 }, { radius: 1.5 })).toThrow(/radius must be an integer ≥ 1/);
  });

  it('shortestPathTimes gives the straight-line time along star directions in a uniform medium', () => {
    const field = shortestPathTimes(uniform(21, 11, 1000), { x: 0, z: 0 }, { radius: 3 });
    // (6, 9) = 3·(2, 3) lies along a star direction: exact distance/velocity (straight ray).
    expect(field.nodeTimes[9 * 21 + 6]).toBeCloseTo(Math.hypot(6, 9) / 1000, 15);
    expect(field.nodeTimes.every((time) => Number.isFinite(time))).toBe(true);
  });

  it('shortestPathTimes starts an off-node source at the four corners of its cell at distance × slowness', () => {
    const field = shortestPathTimes(uniform(5, 5, 500), { x: 1.25, z: 2.5 }, { radius: 2 });
    expect(field.nodeTimes[2 * 5 + 1]).toBeCloseTo(Math.hypot(0.25, 0.5) / 500, 15);
    expect(field.nodeTimes[3 * 5 + 2]).toBeCloseTo(Math.hypot(0.75, 0.5) / 500, 15);
  });

  it('shortestPathTimes accepts a source on the far corner and throws for one outside the grid', () => {
    const grid = uniform(4, 3, 1000);
    expect(shortestPathTimes(grid, { x: 3, z: 2 }, { radius: 1 }).nodeTimes[11]).toBe(0);
    expect(() => shortestPathTimes(grid, { x: 3.01, z: 0 }, { radius: 1 })).toThrow(/lies outside the grid/);
    expect(() => shortestPathTimes(grid, { x: 1, z: -0.1 }, { radius: 1 })).toThrow(/lies outside the grid/);
    expect(() => shortestPathTimes(grid, { x: 1, z: 2.5 }, { radius: 1 })).toThrow(/lies outside the grid/);
    expect(() => shortestPathTimes(grid, { x: Number.NaN, z: 0 }, { radius: 1 })).toThrow(/lies outside the grid/);
  });

  it('shortestPathTimes throws for a zero or negative velocity, a wrong slowness count and a grid smaller than one cell', () => {
    const grid = uniform(3, 3, 1000);
    expect(() => shortestPathTimes({ ...grid, cellSlowness: Float64Array.from([1e-3, Infinity, 1e-3, 1e-3]) }, { x: 0, z: 0 }, { radius: 1 })).toThrow(/cell \(column 1, row 0\) must be positive and finite/);
    expect(() => shortestPathTimes({ ...grid, cellSlowness: Float64Array.from([1e-3, -1e-3, 1e-3, 1e-3]) }, { x: 0, z: 0 }, { radius: 1 })).toThrow(/must be positive and finite/);
    expect(() => shortestPathTimes({ ...grid, cellSlowness: new Float64Array(3).fill(1e-3) }, { x: 0, z: 0 }, { radius: 1 })).toThrow(/need 4 cell slownesses, got 3/);
    expect(() => shortestPathTimes({ ...grid, columns: 1, cellSlowness: new Float64Array(0) }, { x: 0, z: 0 }, { radius: 1 })).toThrow(/at least 2 node columns and 2 node rows/);
    expect(() => slownessGridFromSection({ velocities: [500, 0], interfaces: [() => 1] }, geometry(4, 4, 1))).toThrow(/velocity of layer 2 must be positive and finite/);
    expect(() => slownessGridFromSection({ velocities: [-500], interfaces: [] }, geometry(4, 4, 1))).toThrow(/velocity of layer 1 must be positive/);
    expect(() => slownessGridFromSection({ velocities: [500], interfaces: [] }, { ...geometry(4, 4, 1), spacing: 0 })).toThrow(/spacing must be positive/);
  });

  it('shortestPathTimes allows a radius larger than the grid and never mutates the slowness grid', () => {
    const grid = uniform(4, 3, 1000);
    const before = Array.from(grid.cellSlowness);
    const field = shortestPathTimes(grid, { x: 0, z: 0 }, { radius: 9 });
    expect(field.nodeTimes[2 * 4 + 3]).toBeCloseTo(Math.hypot(3, 2) / 1000, 15);
    expect(Array.from(grid.cellSlowness)).toEqual(before);
  });

  it('shortestPathTimes runs an edge along a grid line at the faster of its two cells', () => {
    // Row 0 of cells slow, row 1 fast: the edges along node row 1 travel at the fast velocity.
    const grid: SlownessGrid = { originX: 0, spacing: 1, columns: 6, rows: 3, cellSlowness: Float64Array.from([...Array(5).fill(1 / 500), ...Array(5).fill(1 / 2000)]) };
    const field = shortestPathTimes(grid, { x: 0, z: 1 }, { radius: 1 });
    expect(field.nodeTimes[1 * 6 + 5]).toBeCloseTo(5 / 2000, 15);
  });

  it('timeAtSurface equals the node time at a node, interpolates linearly between nodes and throws outside the grid', () => {
    const field = shortestPathTimes(uniform(6, 3, 1000), { x: 0, z: 0 }, { radius: 2 });
    expect(field.timeAtSurface(5)).toBe(field.nodeTimes[5]);
    expect(field.timeAtSurface(2.25)).toBeCloseTo(0.75 * (field.nodeTimes[2] as number) + 0.25 * (field.nodeTimes[3] as number), 15);
    expect(() => field.timeAtSurface(5.5)).toThrow(/outside the grid/);
    expect(() => field.timeAtSurface(-1)).toThrow(/outside the grid/);
  });
});

describe('slownessGridFromSection: the interface-sampling convention', () => {
  it('slownessGridFromSection puts an interface on a node row exactly and time-averages a cell cut by one', () => {
    const onRow = slownessGridFromSection({ velocities: [500, 2000], interfaces: [() => 2] }, geometry(2, 4, 1));
    expect(Array.from(onRow.cellSlowness)).toEqual([1 / 500, 1 / 500, 1 / 500, 1 / 500, 1 / 2000, 1 / 2000, 1 / 2000, 1 / 2000]);
    const between = slownessGridFromSection({ velocities: [500, 2000], interfaces: [() => 1.25] }, geometry(1, 2, 1));
    expect(between.cellSlowness[1]).toBeCloseTo((0.25 / 500 + 0.75 / 2000) / 1, 15);
  });

  it('slownessGridFromSection evaluates each interface at the cell centre x', () => {
    const seen: number[] = [];
    slownessGridFromSection({ velocities: [500, 2000], interfaces: [(x) => (seen.push(x), 1)] }, { originX: 10, spacing: 2, columns: 3, rows: 2 });
    expect(seen).toEqual([11, 13]);
  });

  it('slownessGridFromSection allows interfaces above the surface, below the grid and pinched-out layers', () => {
    const grid = slownessGridFromSection({ velocities: [300, 800, 1500, 4000], interfaces: [() => -2, () => 1, () => 1] }, geometry(1, 3, 1));
    // Layer 1 lies above the surface; layer 3 is pinched out at 1 m, so no cell takes 1500 m/s.
    expect(Array.from(grid.cellSlowness)).toEqual([1 / 800, 1 / 4000, 1 / 4000]);
    const deep = slownessGridFromSection({ velocities: [300, 800], interfaces: [() => 50] }, geometry(1, 2, 1));
    expect(Array.from(deep.cellSlowness)).toEqual([1 / 300, 1 / 300]);
  });

  it('slownessGridFromSection throws for crossing interfaces, a non-finite depth and a wrong interface count', () => {
    expect(() => slownessGridFromSection({ velocities: [300, 800, 1500], interfaces: [(x) => 1 + x, () => 2] }, geometry(4, 3, 1))).toThrow(
      /interface 2 \(2 m\) lies above interface 1 \(2.5 m\) at x = 1.5 m/,
    );
    expect(() => slownessGridFromSection({ velocities: [300, 800], interfaces: [() => Number.NaN] }, geometry(2, 2, 1))).toThrow(/non-finite depth/);
    expect(() => slownessGridFromSection({ velocities: [300, 800], interfaces: [] }, geometry(2, 2, 1))).toThrow(/need 1 interface depth functions/);
  });
});
