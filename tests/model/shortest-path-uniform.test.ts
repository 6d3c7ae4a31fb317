/**
 * The uniform-neighbourhood shortcut of `shortestPathTimes` (lib/model/shortest-path.ts): from a
 * node whose every reachable cell has one slowness s, an edge weighs h·|b − a|·s instead of the sum
 * of its cell fractions × slownesses. Checked here against the solver's own exact path
 * (`uniformShortcut: false`, every weight cell by cell), and the map of uniform nodes against a
 * brute-force scan of each node's window. Seeds are fixed (lib/random.ts) so failures reproduce.
 */
import { describe, expect, it } from 'vitest';
import {
  shortestPathTimes,
  slownessGridFromSection,
  uniformNeighbourhoodSlowness,
  type GridSource,
  type LayeredSection,
  type SlownessGrid,
} from '../../lib/model/shortest-path.js';
import { seededRandom, type RandomSource } from '../../lib/random.js';

/**
 * The shortcut replaces Σ f_c·s by s, where Σ f_c = 1 up to rounding: a few units in the last place
 * (~1e-16) per edge, so node times can differ by about that relative amount. 1e-12 is the contract
 * stated for `uniformShortcut`; a wrong window (a cell of another slowness priced as s) errs by far
 * more (the anomalies below change times by more than 1e-4 relative).
 */
const SHORTCUT_TOLERANCE = 1e-12;
/** The single-cell anomaly must change some node time by at least this much, or the test could not see a misplaced shortcut. */
const ANOMALY_VISIBLE = 1e-4;

interface Difference {
  readonly relative: number;
  readonly node: number;
}

/** Largest relative difference between two node-time fields (never 0/0: every time but the source's is positive). */
function largestRelativeDifference(actual: Float64Array, expected: Float64Array): Difference {
  let largest: Difference = { relative: 0, node: -1 };
  expected.forEach((time, node) => {
    const other = actual[node] as number;
    const relative = time === 0 ? Math.abs(other) : Math.abs(other - time) / time;
    if (!(relative <= largest.relative)) largest = { relative, node };
  });
  return largest;
}

function expectShortcutMatchesExact(grid: SlownessGrid, source: GridSource, radius: number, label: string): void {
  const fast = shortestPathTimes(grid, source, { radius }).nodeTimes;
  const exact = shortestPathTimes(grid, source, { radius, uniformShortcut: false }).nodeTimes;
  const { relative, node } = largestRelativeDifference(fast, exact);
  expect(
    relative <= SHORTCUT_TOLERANCE,
    `${label}: shortcut vs exact weights differ by ${relative.toExponential(2)} relative at node (column ${node % grid.columns}, row ${Math.floor(node / grid.columns)}), tolerance ${SHORTCUT_TOLERANCE}`,
  ).toBe(true);
}

/** The map's definition written out: scan every cell of the node's clipped window. */
function bruteForceUniform(grid: SlownessGrid, radius: number): Float64Array {
  const { columns, rows, cellSlowness } = grid;
  const cellColumns = columns - 1;
  const cellRows = rows - 1;
  const uniform = new Float64Array(columns * rows);
  for (let row = 0; row < rows; row += 1) {
    for (let column = 0; column < columns; column += 1) {
      let value: number | null = null;
      let same = true;
      for (let cellRow = Math.max(0, row - radius); cellRow <= Math.min(cellRows - 1, row + radius - 1); cellRow += 1) {
        for (let cellColumn = Math.max(0, column - radius); cellColumn <= Math.min(cellColumns - 1, column + radius - 1); cellColumn += 1) {
          const slowness = cellSlowness[cellRow * cellColumns + cellColumn] as number;
          if (value === null) value = slowness;
          else if (slowness !== value) same = false;
        }
      }
      uniform[row * columns + column] = same && value !== null ? value : Number.NaN;
    }
  }
  return uniform;
}

function integerBetween(random: RandomSource, low: number, high: number): number {
  return low + Math.floor(random() * (high - low + 1));
}

/** A section of 1–4 layers under undulating interfaces built as non-negative thicknesses (so they never cross; a layer may pinch out). */
function randomLayeredSection(random: RandomSource, length: number, depth: number): LayeredSection {
  const layers = integerBetween(random, 1, 4);
  const velocities = Array.from({ length: layers }, () => 300 + 4700 * random());
  const shapes = Array.from({ length: layers - 1 }, () => ({
    mean: (0.8 * depth * random()) / Math.max(1, layers - 1),
    amplitude: 0.15 * depth * random(),
    wavelength: 0.1 * length + length * random(),
    phase: 2 * Math.PI * random(),
  }));
  const interfaces = shapes.map((_, index) => (x: number) => {
    let depthAt = 0;
    for (let layer = 0; layer <= index; layer += 1) {
      const shape = shapes[layer] as (typeof shapes)[number];
      depthAt += Math.max(0, shape.mean + shape.amplitude * Math.sin((2 * Math.PI * x) / shape.wavelength + shape.phase));
    }
    return depthAt;
  });
  return { velocities, interfaces };
}

/** A source on a surface node, inside a cell, or on the far border, in turn. */
function randomSource(random: RandomSource, grid: SlownessGrid, kind: number): GridSource {
  const { originX, spacing, columns, rows } = grid;
  if (kind % 3 === 0) return { x: originX + integerBetween(random, 0, columns - 1) * spacing, z: 0 };
  if (kind % 3 === 1) return { x: originX + (columns - 1) * spacing * random(), z: (rows - 1) * spacing * random() };
  return { x: originX + (columns - 1) * spacing, z: (rows - 1) * spacing * random() };
}

describe('uniformNeighbourhoodSlowness: the map of nodes whose star reaches one slowness', () => {
  it('uniformNeighbourhoodSlowness equals a brute-force scan of every clipped window on seeded random grids, radii 1–7 (some beyond the grid)', () => {
    const random = seededRandom(20_260_401);
    for (let trial = 0; trial < 150; trial += 1) {
      const columns = integerBetween(random, 2, 25);
      const rows = integerBetween(random, 2, 18);
      const radius = integerBetween(random, 1, 7);
      // Mostly one slowness with scattered other cells, so both kinds of window occur.
      const rare = 0.01 + 0.1 * random();
      const cellSlowness = Float64Array.from({ length: (columns - 1) * (rows - 1) }, () => (random() < rare ? 1 / 3000 : 1 / 500));
      const grid: SlownessGrid = { originX: 0, spacing: 1, columns, rows, cellSlowness };
      const got = Array.from(uniformNeighbourhoodSlowness(grid, radius));
      expect(got, `trial ${trial}: ${columns} × ${rows} nodes, r = ${radius}`).toEqual(Array.from(bruteForceUniform(grid, radius)));
    }
  });

  it('uniformNeighbourhoodSlowness gives the values of its doc example', () => {
    const uniform = uniformNeighbourhoodSlowness({ originX: 0, spacing: 1, columns: 4, rows: 3, cellSlowness: Float64Array.from([1, 1, 1, 1, 1, 0.5]) }, 1);
    expect(uniform[0]).toBe(1);
    expect(uniform[1 * 4 + 2]).toBeNaN();
    expect(uniform[2 * 4 + 3]).toBe(0.5);
  });

  it('slownessGridFromSection gives every cell wholly inside a layer exactly 1/V at a spacing that is not a power of two', () => {
    const grid = slownessGridFromSection({ velocities: [600, 2400], interfaces: [(x) => 7 + 3 * Math.sin(x / 5)] }, { originX: 0, spacing: 0.4371, columns: 120, rows: 60 });
    const values = new Set(grid.cellSlowness);
    expect(values.has(1 / 600) && values.has(1 / 2400)).toBe(true);
    // Only cells cut by the interface (about one per column) hold other values.
    expect(values.size).toBeLessThanOrEqual(2 + 119);
  });
});

describe('shortestPathTimes: the uniform-neighbourhood shortcut against the exact cell-by-cell weights', () => {
  it(`shortestPathTimes with and without the shortcut agree within ${SHORTCUT_TOLERANCE} relative on seeded random layered sections, r = 1–6`, () => {
    const random = seededRandom(4_021_977);
    let uniformNodes = 0;
    let otherNodes = 0;
    for (let trial = 0; trial < 40; trial += 1) {
      const spacing = [0.25, 0.4371, 0.5, 1.3][integerBetween(random, 0, 3)] as number;
      const columns = integerBetween(random, 8, 70);
      const rows = integerBetween(random, 6, 35);
      const radius = integerBetween(random, 1, 6);
      const originX = -20 + 40 * random();
      const section = randomLayeredSection(random, (columns - 1) * spacing, (rows - 1) * spacing);
      const grid = slownessGridFromSection(section, { originX, spacing, columns, rows });
      const source = randomSource(random, grid, trial);
      for (const value of uniformNeighbourhoodSlowness(grid, radius)) {
        if (Number.isNaN(value)) otherNodes += 1;
        else uniformNodes += 1;
      }
      expectShortcutMatchesExact(grid, source, radius, `trial ${trial}: ${section.velocities.length} layers, ${columns} × ${rows} nodes at ${spacing} m, r = ${radius}, source (${source.x}, ${source.z})`);
    }
    // Both paths were exercised, in proportions like a real section's.
    expect(uniformNodes).toBeGreaterThan(otherNodes);
    expect(otherNodes).toBeGreaterThan(0.05 * (uniformNodes + otherNodes));
  });

  it('shortestPathTimes does not take the shortcut near a single-cell anomaly beside the source: for every anomaly position in and around the source window the times change and both paths agree', () => {
    const columns = 23;
    const rows = 21;
    const radius = 3;
    const background = 1 / 800;
    const source = { column: 11, row: 9 };
    const homogeneous: SlownessGrid = { originX: 0, spacing: 1, columns, rows, cellSlowness: new Float64Array((columns - 1) * (rows - 1)).fill(background) };
    const sourceAt = { x: source.column, z: source.row };
    const plain = shortestPathTimes(homogeneous, sourceAt, { radius }).nodeTimes;
    // Anomaly cells from one beyond the window on every side to the window's far corner.
    for (let cellRow = source.row - radius - 1; cellRow <= source.row + radius; cellRow += 1) {
      for (let cellColumn = source.column - radius - 1; cellColumn <= source.column + radius; cellColumn += 1) {
        const cellSlowness = Float64Array.from(homogeneous.cellSlowness);
        cellSlowness[cellRow * (columns - 1) + cellColumn] = background / 6; // a fast block: 4800 m/s
        const grid: SlownessGrid = { ...homogeneous, cellSlowness };
        const label = `anomaly in cell (column ${cellColumn}, row ${cellRow}), source node (${source.column}, ${source.row}), r = ${radius}`;
        const inWindow =
          cellColumn >= source.column - radius && cellColumn <= source.column + radius - 1 && cellRow >= source.row - radius && cellRow <= source.row + radius - 1;
        expect(Number.isNaN(uniformNeighbourhoodSlowness(grid, radius)[source.row * columns + source.column] as number), label).toBe(inWindow);
        expect(largestRelativeDifference(shortestPathTimes(grid, sourceAt, { radius }).nodeTimes, plain).relative, label).toBeGreaterThan(ANOMALY_VISIBLE);
        expectShortcutMatchesExact(grid, sourceAt, radius, label);
      }
    }
  });

  it('shortestPathTimes with the shortcut is exact for grid-line edges in a uniform medium and agrees with the exact path on a grid smaller than the star', () => {
    const uniform: SlownessGrid = { originX: 0, spacing: 0.7, columns: 5, rows: 4, cellSlowness: new Float64Array(4 * 3).fill(1 / 1234) };
    const field = shortestPathTimes(uniform, { x: 0, z: 0 }, { radius: 9 });
    // Along the surface: four unit edges at h·s each, as with the exact path (min of one cell).
    expect(field.nodeTimes[4]).toBe(shortestPathTimes(uniform, { x: 0, z: 0 }, { radius: 9, uniformShortcut: false }).nodeTimes[4]);
    expectShortcutMatchesExact(uniform, { x: 1.9, z: 1.1 }, 9, 'uniform 5 × 4 grid, r = 9');
  });
});
