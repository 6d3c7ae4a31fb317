/**
 * Shortest-path first-arrival times on a regular 2-D grid (Moser1991; Dijkstra1959): the forward
 * check of METHODS §12 for depth sections whose refractors vary along the line (dipping or
 * undulating interfaces), where the plane-layer formulas of `layered-model.ts` do not apply.
 *
 * Grid: nodes at x = originX + column·h, z = row·h (row 0 is the surface z = 0, z down), h the node
 * spacing. Slowness s = 1/V is constant in each cell between four nodes; cell (column, row) spans
 * [x_column, x_column+1] × [z_row, z_row+1]. The first-arrival time field is approximated by the
 * shortest path through a graph whose vertices are the nodes and whose edges join each node to its
 * forward star: the offsets (i, j) with |i| ≤ r, |j| ≤ r, (i, j) ≠ (0, 0) and gcd(|i|, |j|) = 1
 * (8 edges for r = 1, 16 for r = 2, 80 for r = 5). The weight of an edge is its travel time
 *
 * ```
 * w(a → b) = ∫ s dl = |b − a| · Σ_c f_c · s_c      (exact line integral of the cell-constant slowness)
 * ```
 *
 * with f_c the fraction of the edge's length inside cell c. An edge with gcd = 1 meets no node
 * between its ends, so it crosses |i| + |j| − 1 cells; an edge along a grid line ((±1, 0), (0, ±1))
 * lies on the boundary of two cells and takes the smaller slowness of the two (a ray on an interface
 * travels at the faster velocity; on the border of the grid, the one cell there). The fractions
 * depend on the offset only and are tabulated once per call, so no edge allocates.
 *
 * Accuracy: the path is restricted to the star's directions, so times are never earlier than the
 * exact times of the cell model and err by the angular gaps of the star (largest next to the axes,
 * atan(1/r): 45° for r = 1, 11.3° for r = 5); raise r to close them. The larger error at a sharp
 * contrast is the cell model itself: an interface is represented by the cells' slownesses (see
 * `slownessGridFromSection` for the sampling convention), so a refractor between node rows is
 * smeared over one cell and the head-wave time may err by up to about h·√(s₁² − s₂²). Times are exact
 * for the graph; the graph is the approximation.
 *
 * Source: anywhere inside the grid (edges included), interpolated, not snapped: a source exactly on
 * a node starts that node at time 0; any other source starts the four corner nodes of the cell that
 * holds it (the cell of floor((x − originX)/h), floor(z/h), clamped to the last cell at the far
 * edges) at straight-line distance × that cell's slowness, and the search continues from them.
 *
 * Uniform neighbourhoods: most nodes lie far from any interface, where every cell an edge from the
 * node can cross has one slowness s; there the weight is simply h·|b − a|·s (the sum Σ_c f_c = 1),
 * found without a cell look-up. A map of those nodes is built at the start of each call in O(N)
 * (`uniformNeighbourhoodSlowness`); every other node sums its edges cell by cell. The two weights
 * differ only by floating-point rounding (relative ~1e-16 per edge, so node times agree to ~1e-15
 * relative); `uniformShortcut: false` turns the shortcut off. The map is not cached between calls:
 * it costs about 3 % of a solve, so a cache would buy little and would have to guard against a caller
 * changing `cellSlowness` between calls.
 *
 * Complexity: with N nodes and M = star size, time O(N·M·(r + log N)) — each settled node relaxes M
 * edges, each weight costs at most 2r − 1 cell look-ups (none in a uniform neighbourhood), each
 * improvement a heap sift of O(log N) — and memory O(N) (times, the uniform map, an indexed binary
 * heap with its keys and positions, all typed arrays).
 *
 * Misuse throws a RangeError with a message (the project treats a malformed grid as a programming
 * error, not a user-input problem): fewer than 2 node columns or rows, spacing not positive and
 * finite, a slowness array of the wrong length, a cell slowness not positive and finite (a zero or
 * negative velocity), a radius that is not an integer ≥ 1, a source outside the grid or not finite,
 * a surface receiver outside the grid.
 *
 * @example
 * // METHODS 12.1: 500 m/s over 2000 m/s, interface at 10 m, 0.5 m grid, r = 5.
 * const grid = slownessGridFromSection(
 *   { velocities: [500, 2000], interfaces: [() => 10] },
 *   { originX: 0, spacing: 0.5, columns: 201, rows: 31 },
 * );
 * const field = shortestPathTimes(grid, { x: 0, z: 0 }, { radius: 5 });
 * field.timeAtSurface(60); // 0.0687310 s: analytic 68.7298 ms, the r = 5 star 0.0012 ms late
 */
import type { ReferenceKey } from '../references.js';

/** Cited methods of this module (keys of `lib/references.ts`). */
export const SHORTEST_PATH_REFERENCES: readonly ReferenceKey[] = ['Moser1991', 'Dijkstra1959'];

/** Where the grid's nodes are: x = originX + column·spacing, z = row·spacing (row 0 = surface). */
export interface GridGeometry {
  /** x of node column 0, m. */
  readonly originX: number;
  /** Node spacing h, m (the same along x and z). */
  readonly spacing: number;
  /** Number of node columns n_x ≥ 2. */
  readonly columns: number;
  /** Number of node rows n_z ≥ 2; row 0 is the surface. */
  readonly rows: number;
}

/** Slowness per cell, s/m: cell (column, row) at index row·(columns − 1) + column. */
export interface SlownessGrid extends GridGeometry {
  readonly cellSlowness: Float64Array;
}

/** A source position in the section, m (z down from the surface). */
export interface GridSource {
  readonly x: number;
  readonly z: number;
}

export interface ShortestPathOptions {
  /** Forward-star radius r: offsets with |i|, |j| ≤ r and gcd(|i|, |j|) = 1. Integer ≥ 1. */
  readonly radius: number;
  /**
   * Take the uniform-neighbourhood shortcut for edge weights (default true): from a node whose
   * every reachable cell has the same slowness s, an edge weighs h·|b − a|·s instead of the sum over
   * its cells, equal to it up to floating-point rounding (relative ~1e-16 per edge). false computes
   * every weight cell by cell (about 2× slower on a two-layer section); the node times then differ
   * only by that rounding. Meant for tests and checks of the shortcut.
   */
  readonly uniformShortcut?: boolean;
}

/** First-arrival times of one source at every node, and the surface interpolation. */
export interface TravelTimeField extends GridGeometry {
  /** Time at node (column, row) at index row·columns + column, s. */
  readonly nodeTimes: Float64Array;
  /** Time at a surface receiver at x, s: linear between the two surface nodes around x. Throws outside the grid. */
  timeAtSurface(x: number): number;
}

/** An interpreted depth section: V_1…V_N (m/s) and the depth functions z_1(x)…z_{N−1}(x) (m). */
export interface LayeredSection {
  readonly velocities: readonly number[];
  /** z_k(x): depth of the top of layer k + 1 below the surface at x, m, with z_1 ≤ z_2 ≤ … at every x. */
  readonly interfaces: readonly ((x: number) => number)[];
}

/** One forward-star offset (column step, row step). */
export interface StarOffset {
  readonly column: number;
  readonly row: number;
}

function greatestCommonDivisor(first: number, second: number): number {
  let a = Math.abs(first);
  let b = Math.abs(second);
  while (b !== 0) [a, b] = [b, a % b];
  return a;
}

function assertRadius(radius: number, caller: string): void {
  if (!Number.isInteger(radius) || radius < 1) {
    throw new RangeError(`${caller}: forward-star radius must be an integer ≥ 1 (1 joins the 8 neighbours), got ${radius}`);
  }
}

function assertGeometry(geometry: GridGeometry, caller: string): void {
  const { originX, spacing, columns, rows } = geometry;
  if (!Number.isFinite(originX)) throw new RangeError(`${caller}: grid originX must be finite, got ${originX}`);
  if (!(spacing > 0) || !Number.isFinite(spacing)) throw new RangeError(`${caller}: grid spacing must be positive and finite, got ${spacing}`);
  if (!Number.isInteger(columns) || columns < 2 || !Number.isInteger(rows) || rows < 2) {
    throw new RangeError(`${caller}: a grid needs at least 2 node columns and 2 node rows (one cell), got ${columns} × ${rows}; enlarge the grid`);
  }
}

function assertSlownessGrid(grid: SlownessGrid, caller: string): void {
  assertGeometry(grid, caller);
  const cellColumns = grid.columns - 1;
  const expected = cellColumns * (grid.rows - 1);
  if (grid.cellSlowness.length !== expected) {
    throw new RangeError(`${caller}: ${grid.columns} × ${grid.rows} nodes need ${expected} cell slownesses, got ${grid.cellSlowness.length}`);
  }
  for (let index = 0; index < expected; index += 1) {
    const slowness = grid.cellSlowness[index] as number;
    if (!(slowness > 0) || !Number.isFinite(slowness)) {
      throw new RangeError(
        `${caller}: slowness of cell (column ${index % cellColumns}, row ${Math.floor(index / cellColumns)}) must be positive and finite, got ${slowness} (a velocity of zero, a negative velocity or a NaN); fix the velocity model`,
      );
    }
  }
}

/**
 * The forward star of radius r (Moser1991): every offset (i, j) with |i| ≤ r, |j| ≤ r, not both
 * zero and gcd(|i|, |j|) = 1, in a fixed order (row step, then column step, ascending). Throws
 * unless r is an integer ≥ 1.
 *
 * @example
 * forwardStar(1).length; // 8
 * forwardStar(5).length; // 80
 */
export function forwardStar(radius: number): StarOffset[] {
  assertRadius(radius, 'forwardStar');
  const offsets: StarOffset[] = [];
  for (let row = -radius; row <= radius; row += 1) {
    for (let column = -radius; column <= radius; column += 1) {
      if ((column !== 0 || row !== 0) && greatestCommonDivisor(column, row) === 1) offsets.push({ column, row });
    }
  }
  return offsets;
}

/** Star offsets with their crossed cells, flattened into typed arrays (built once per call). */
interface StarTable {
  readonly size: number;
  readonly stepColumn: Int32Array;
  readonly stepRow: Int32Array;
  /** Edge length in units of h. */
  readonly length: Float64Array;
  /** 1 for an edge along a grid line (weight = min of the two cells), 0 otherwise (weighted sum). */
  readonly alongGridLine: Uint8Array;
  readonly cellStart: Int32Array;
  readonly cellCount: Int32Array;
  readonly cellColumn: Int32Array;
  readonly cellRow: Int32Array;
  readonly cellFraction: Float64Array;
}

function starTable(radius: number): StarTable {
  const offsets = forwardStar(radius);
  const size = offsets.length;
  const stepColumn = new Int32Array(size);
  const stepRow = new Int32Array(size);
  const length = new Float64Array(size);
  const alongGridLine = new Uint8Array(size);
  const cellStart = new Int32Array(size);
  const cellCount = new Int32Array(size);
  const columns: number[] = [];
  const rows: number[] = [];
  const fractions: number[] = [];
  offsets.forEach(({ column, row }, index) => {
    stepColumn[index] = column;
    stepRow[index] = row;
    length[index] = Math.hypot(column, row);
    cellStart[index] = fractions.length;
    if (row === 0 || column === 0) {
      // Along a grid line: the two cells on either side (either may lie outside the grid).
      alongGridLine[index] = 1;
      const lowColumn = Math.min(0, column);
      const lowRow = Math.min(0, row);
      if (row === 0) {
        columns.push(lowColumn, lowColumn);
        rows.push(0, -1);
      } else {
        columns.push(0, -1);
        rows.push(lowRow, lowRow);
      }
      fractions.push(1, 1);
    } else {
      // Parameter values where the edge crosses a vertical or horizontal grid line; with gcd = 1 no
      // two coincide inside the edge, so consecutive values bound the piece in one cell.
      const breaks: number[] = [0, 1];
      for (let k = 1; k < Math.abs(column); k += 1) breaks.push(k / Math.abs(column));
      for (let k = 1; k < Math.abs(row); k += 1) breaks.push(k / Math.abs(row));
      breaks.sort((a, b) => a - b);
      for (let piece = 0; piece + 1 < breaks.length; piece += 1) {
        const start = breaks[piece] as number;
        const end = breaks[piece + 1] as number;
        const middle = (start + end) / 2;
        columns.push(Math.floor(column * middle));
        rows.push(Math.floor(row * middle));
        fractions.push(end - start);
      }
    }
    cellCount[index] = fractions.length - (cellStart[index] as number);
  });
  return {
    size,
    stepColumn,
    stepRow,
    length,
    alongGridLine,
    cellStart,
    cellCount,
    cellColumn: Int32Array.from(columns),
    cellRow: Int32Array.from(rows),
    cellFraction: Float64Array.from(fractions),
  };
}

/**
 * Uniform neighbourhoods of a slowness grid for the radius-r star: for each node (index
 * row·columns + column), the slowness s when every cell that an edge of the star from that node can
 * cross has slowness s, NaN otherwise. Used by `shortestPathTimes`; exported for its tests.
 *
 * An edge (i, j) from node (column, row) crosses cells with column in
 * [column + min(0, i), column + max(0, i) − 1] and row in [row + min(0, j), row + max(0, j) − 1]
 * (a grid-line edge: the two cells on either side), so all of them lie in the window of cell
 * columns [column − r, column + r − 1] and cell rows [row − r, row + r − 1], clipped to the grid
 * (an edge that leaves the grid is skipped; a grid-line edge on the border uses only its cell
 * inside). The window is a little larger than the star's reach at its corners, never smaller.
 *
 * Separable and exact (slownesses compared with ===): first, along each cell row, whether the
 * window's cell columns hold one value (the run of equal cells ending at the window's last column
 * starts at or before its first); then, down each node column, whether the window's cell rows all
 * gave the same value by the same run test (a NaN breaks every run). Both windows only move forward,
 * so each run start is advanced one cell at a time: O(N) time whatever r, and the first pass is
 * stored in the output array itself (cell row k in node row k, read before that row is written).
 *
 * Edges: a radius larger than the grid makes every window the whole grid. Does not check `grid` or
 * `radius` (`shortestPathTimes` has).
 *
 * @example
 * // 4 × 3 nodes, cells [1, 1, 1] over [1, 1, 0.5] s/m, r = 1.
 * const uniform = uniformNeighbourhoodSlowness(
 *   { originX: 0, spacing: 1, columns: 4, rows: 3, cellSlowness: Float64Array.from([1, 1, 1, 1, 1, 0.5]) },
 *   1,
 * );
 * uniform[0]; // 1: node (0, 0) touches only cell (0, 0)
 * uniform[1 * 4 + 2]; // NaN: node (2, 1) touches cells of 1 and 0.5 s/m
 * uniform[2 * 4 + 3]; // 0.5: the corner node (3, 2) touches only the last cell
 */
export function uniformNeighbourhoodSlowness(grid: SlownessGrid, radius: number): Float64Array {
  const { columns, rows, cellSlowness } = grid;
  const cellColumns = columns - 1;
  const cellRows = rows - 1;
  const uniform = new Float64Array(columns * rows);
  // Pass 1: uniform[cellRow·columns + column] = the value of cells [column − r, column + r − 1] of the row, or NaN.
  for (let cellRow = 0; cellRow < cellRows; cellRow += 1) {
    const base = cellRow * cellColumns;
    let high = -1;
    let runStart = 0;
    for (let column = 0; column < columns; column += 1) {
      const windowHigh = Math.min(cellColumns - 1, column + radius - 1);
      while (high < windowHigh) {
        high += 1;
        if (high === 0 || cellSlowness[base + high] !== cellSlowness[base + high - 1]) runStart = high;
      }
      uniform[cellRow * columns + column] = runStart <= Math.max(0, column - radius) ? (cellSlowness[base + high] as number) : Number.NaN;
    }
  }
  // Pass 2: per node column, the run of equal pass-1 values ending at the window's last cell row.
  const runValue = new Float64Array(columns);
  const runStart = new Int32Array(columns);
  let high = -1;
  for (let row = 0; row < rows; row += 1) {
    const windowHigh = Math.min(cellRows - 1, row + radius - 1);
    while (high < windowHigh) {
      high += 1;
      for (let column = 0; column < columns; column += 1) {
        const value = uniform[high * columns + column] as number;
        if (high === 0 || value !== runValue[column]) runStart[column] = high;
        runValue[column] = value;
      }
    }
    const windowLow = Math.max(0, row - radius);
    for (let column = 0; column < columns; column += 1) {
      uniform[row * columns + column] = (runStart[column] as number) <= windowLow ? (runValue[column] as number) : Number.NaN;
    }
  }
  return uniform;
}

/**
 * Indexed binary min-heap of node indices with their keys (times) stored beside them in slot order,
 * so a sift compares keys of neighbouring slots without a look-up through the node's time;
 * `position[node]` = slot, −1 when absent.
 */
class NodeHeap {
  private readonly slots: Int32Array;
  private readonly slotKeys: Float64Array;
  private readonly position: Int32Array;
  private count = 0;

  constructor(capacity: number) {
    this.slots = new Int32Array(capacity);
    this.slotKeys = new Float64Array(capacity);
    this.position = new Int32Array(capacity).fill(-1);
  }

  get size(): number {
    return this.count;
  }

  /** Insert `node` with `key`, or move it up after its key decreased to `key`. */
  upsert(node: number, key: number): void {
    let slot = this.position[node] as number;
    if (slot < 0) {
      slot = this.count;
      this.count += 1;
    }
    const { slots, slotKeys, position } = this;
    while (slot > 0) {
      const parentSlot = (slot - 1) >> 1;
      const parentKey = slotKeys[parentSlot] as number;
      if (parentKey <= key) break;
      const parent = slots[parentSlot] as number;
      slots[slot] = parent;
      slotKeys[slot] = parentKey;
      position[parent] = slot;
      slot = parentSlot;
    }
    slots[slot] = node;
    slotKeys[slot] = key;
    position[node] = slot;
  }

  /** Remove and return the node of smallest key (the heap must not be empty). */
  pop(): number {
    const { slots, slotKeys, position } = this;
    const top = slots[0] as number;
    this.count -= 1;
    position[top] = -1;
    const count = this.count;
    if (count === 0) return top;
    const node = slots[count] as number;
    const key = slotKeys[count] as number;
    let slot = 0;
    for (;;) {
      const left = 2 * slot + 1;
      if (left >= count) break;
      let child = left;
      let childKey = slotKeys[left] as number;
      const right = left + 1;
      if (right < count) {
        const rightKey = slotKeys[right] as number;
        if (rightKey < childKey) {
          child = right;
          childKey = rightKey;
        }
      }
      if (childKey >= key) break;
      const childNode = slots[child] as number;
      slots[slot] = childNode;
      slotKeys[slot] = childKey;
      position[childNode] = slot;
      slot = child;
    }
    slots[slot] = node;
    slotKeys[slot] = key;
    position[node] = slot;
    return top;
  }
}

/**
 * First-arrival times at every node of `grid` from one source, by Dijkstra1959's algorithm on the
 * forward-star graph of Moser1991 (see the module comment for the edge weights, the uniform-
 * neighbourhood shortcut, the source start and the complexity). Never mutates `grid` and keeps
 * nothing from it between calls, so a caller may change `cellSlowness` between calls.
 *
 * Edges: a source on the border or a corner of the grid is inside; a source beyond the border by
 * any amount, or a non-finite coordinate, throws. Radii larger than the grid are allowed (edges
 * leaving the grid are skipped). Every node is reached (the unit offsets connect the grid), so no
 * time is infinite.
 */
export function shortestPathTimes(grid: SlownessGrid, source: GridSource, options: ShortestPathOptions): TravelTimeField {
  assertSlownessGrid(grid, 'shortestPathTimes');
  assertRadius(options.radius, 'shortestPathTimes');
  const { originX, spacing, columns, rows, cellSlowness } = grid;
  const maxX = originX + (columns - 1) * spacing;
  const maxZ = (rows - 1) * spacing;
  if (!Number.isFinite(source.x) || !Number.isFinite(source.z) || source.x < originX || source.x > maxX || source.z < 0 || source.z > maxZ) {
    throw new RangeError(
      `shortestPathTimes: source at x = ${source.x} m, z = ${source.z} m lies outside the grid (x ${originX}…${maxX} m, z 0…${maxZ} m); enlarge the grid or move the source`,
    );
  }
  const cellColumns = columns - 1;
  const cellRows = rows - 1;
  const nodeCount = columns * rows;
  const times = new Float64Array(nodeCount).fill(Number.POSITIVE_INFINITY);
  const settled = new Uint8Array(nodeCount);
  const heap = new NodeHeap(nodeCount);

  // Start: the source node itself, or the corners of the cell holding the source.
  const sourceColumn = (source.x - originX) / spacing;
  const sourceRow = source.z / spacing;
  if (Number.isInteger(sourceColumn) && Number.isInteger(sourceRow)) {
    const node = sourceRow * columns + sourceColumn;
    times[node] = 0;
    heap.upsert(node, 0);
  } else {
    const cellColumn = Math.min(Math.floor(sourceColumn), cellColumns - 1);
    const cellRow = Math.min(Math.floor(sourceRow), cellRows - 1);
    const slowness = cellSlowness[cellRow * cellColumns + cellColumn] as number;
    for (let corner = 0; corner < 4; corner += 1) {
      const column = cellColumn + (corner & 1);
      const row = cellRow + (corner >> 1);
      const node = row * columns + column;
      const time = spacing * Math.hypot(column - sourceColumn, row - sourceRow) * slowness;
      times[node] = time;
      heap.upsert(node, time);
    }
  }

  const star = starTable(options.radius);
  const { stepColumn, stepRow, length, alongGridLine, cellStart, cellCount, cellColumn, cellRow, cellFraction } = star;
  const { radius } = options;
  const scaledLength = length.map((edgeLength) => spacing * edgeLength);
  const cellIndexStep = cellRow.map((rowStep, piece) => rowStep * cellColumns + (cellColumn[piece] as number));
  const stepIndex = stepRow.map((rowStep, offset) => rowStep * columns + (stepColumn[offset] as number));
  const uniformSlowness = options.uniformShortcut === false ? null : uniformNeighbourhoodSlowness(grid, radius);
  while (heap.size > 0) {
    const node = heap.pop();
    settled[node] = 1;
    const column = node % columns;
    const row = (node - column) / columns;
    const time = times[node] as number;
    const uniform = uniformSlowness === null ? Number.NaN : (uniformSlowness[node] as number);
    if (!Number.isNaN(uniform)) {
      // Every cell within the star's reach has slowness `uniform`: weight = h·|b − a|·s.
      if (column >= radius && column < columns - radius && row >= radius && row < rows - radius) {
        // Every target lies inside the grid.
        for (let offset = 0; offset < star.size; offset += 1) {
          const target = node + (stepIndex[offset] as number);
          if (settled[target] === 1) continue;
          const candidate = time + (scaledLength[offset] as number) * uniform;
          if (candidate < (times[target] as number)) {
            times[target] = candidate;
            heap.upsert(target, candidate);
          }
        }
        continue;
      }
      for (let offset = 0; offset < star.size; offset += 1) {
        const targetColumn = column + (stepColumn[offset] as number);
        const targetRow = row + (stepRow[offset] as number);
        if (targetColumn < 0 || targetColumn >= columns || targetRow < 0 || targetRow >= rows) continue;
        const target = targetRow * columns + targetColumn;
        if (settled[target] === 1) continue;
        const candidate = time + (scaledLength[offset] as number) * uniform;
        if (candidate < (times[target] as number)) {
          times[target] = candidate;
          heap.upsert(target, candidate);
        }
      }
      continue;
    }
    // Cell (column, row) lies below-right of the node; a crossed cell is nodeCell + its index step.
    const nodeCell = row * cellColumns + column;
    for (let offset = 0; offset < star.size; offset += 1) {
      const targetColumn = column + (stepColumn[offset] as number);
      const targetRow = row + (stepRow[offset] as number);
      if (targetColumn < 0 || targetColumn >= columns || targetRow < 0 || targetRow >= rows) continue;
      const target = targetRow * columns + targetColumn;
      if (settled[target] === 1) continue;
      const first = cellStart[offset] as number;
      const last = first + (cellCount[offset] as number);
      let slowness: number;
      if (alongGridLine[offset] === 1) {
        slowness = Number.POSITIVE_INFINITY;
        for (let piece = first; piece < last; piece += 1) {
          const pieceColumn = column + (cellColumn[piece] as number);
          const pieceRow = row + (cellRow[piece] as number);
          if (pieceColumn < 0 || pieceColumn >= cellColumns || pieceRow < 0 || pieceRow >= cellRows) continue;
          slowness = Math.min(slowness, cellSlowness[pieceRow * cellColumns + pieceColumn] as number);
        }
      } else {
        // An edge inside the grid crosses only cells inside it: no bounds to check.
        slowness = 0;
        for (let piece = first; piece < last; piece += 1) {
          slowness += (cellFraction[piece] as number) * (cellSlowness[nodeCell + (cellIndexStep[piece] as number)] as number);
        }
      }
      const candidate = time + (scaledLength[offset] as number) * slowness;
      if (candidate < (times[target] as number)) {
        times[target] = candidate;
        heap.upsert(target, candidate);
      }
    }
  }

  return {
    originX,
    spacing,
    columns,
    rows,
    nodeTimes: times,
    timeAtSurface(x: number): number {
      if (!Number.isFinite(x) || x < originX || x > maxX) {
        throw new RangeError(`timeAtSurface: receiver at x = ${x} m lies outside the grid (${originX}…${maxX} m); enlarge the grid`);
      }
      const position = (x - originX) / spacing;
      const left = Math.min(Math.floor(position), columns - 2);
      const weight = position - left;
      return (1 - weight) * (times[left] as number) + weight * (times[left + 1] as number);
    },
  };
}

/**
 * Cell slowness of an interpreted depth section on a grid, for `shortestPathTimes`.
 *
 * Sampling convention (METHODS §12: it dominates the grid error at sharp contrasts): every z_k is
 * evaluated at the cell's centre x_c only, and the cell takes the time average of the slowness
 * along its centre vertical, s_cell = Σ_i ℓ_i·s_i / h, with ℓ_i the length of [z_row, z_row+1]
 * inside layer i at x_c; a cell wholly inside layer i takes exactly s_i = 1/V_i, so the cells of one
 * layer are equal to the last bit (which lets `shortestPathTimes` take its uniform-neighbourhood
 * shortcut for every spacing h). So an interface on a node row is represented exactly (each cell
 * lies in one layer); a cell cut by an interface gets the slowness that keeps its vertical travel time, so an
 * interface between rows is not moved to a row, but smeared over one cell (the head wave then runs
 * along the next node row below, under a cell of mixed slowness). The interface's shape within a
 * cell (an undulation shorter than h) is not seen. With this convention the 6° refractor of METHODS
 * 5.1 comes out late by at most 0.53 % at h = 0.5 m, r = 5 (0.39 % at r = 8); sampling each cell at
 * its centre point instead made it early by up to 1 %, and raising r did not help.
 *
 * Edges: an interface may lie above the surface or below the grid (all cells then below or above
 * it) and consecutive interfaces may coincide (a pinched-out layer: no cell takes its velocity).
 * Throws for velocities not positive and finite, an interface count other than N − 1, a depth that
 * is not finite, or z_{k+1}(x_c) < z_k(x_c) at some cell centre (crossing interfaces).
 *
 * @example
 * // A refractor dipping 6° from 8 m under x = 0 (METHODS 5.1).
 * slownessGridFromSection(
 *   { velocities: [600, 2400], interfaces: [(x) => 8 + x * Math.tan((6 * Math.PI) / 180)] },
 *   { originX: 0, spacing: 0.5, columns: 241, rows: 61 },
 * ).cellSlowness[0]; // 1/600 s/m
 */
export function slownessGridFromSection(section: LayeredSection, geometry: GridGeometry): SlownessGrid {
  const caller = 'slownessGridFromSection';
  assertGeometry(geometry, caller);
  const { velocities, interfaces } = section;
  if (velocities.length < 1) throw new RangeError(`${caller}: a section needs at least one velocity`);
  velocities.forEach((velocity, index) => {
    if (!(velocity > 0) || !Number.isFinite(velocity)) {
      throw new RangeError(`${caller}: velocity of layer ${index + 1} must be positive and finite, got ${velocity}; fix the velocity model`);
    }
  });
  if (interfaces.length !== velocities.length - 1) {
    throw new RangeError(
      `${caller}: ${velocities.length} velocities need ${velocities.length - 1} interface depth functions (the last layer is the half-space), got ${interfaces.length}`,
    );
  }
  const { originX, spacing, columns, rows } = geometry;
  const cellColumns = columns - 1;
  const cellRows = rows - 1;
  const cellSlowness = new Float64Array(cellColumns * cellRows);
  const depths = new Float64Array(interfaces.length);
  for (let column = 0; column < cellColumns; column += 1) {
    const centreX = originX + (column + 0.5) * spacing;
    interfaces.forEach((depthAt, index) => {
      const depth = depthAt(centreX);
      if (!Number.isFinite(depth)) throw new RangeError(`${caller}: interface ${index + 1} has a non-finite depth ${depth} at x = ${centreX} m`);
      if (index > 0 && depth < (depths[index - 1] as number)) {
        throw new RangeError(
          `${caller}: interface ${index + 1} (${depth} m) lies above interface ${index} (${depths[index - 1]} m) at x = ${centreX} m; interfaces must not cross (let a layer pinch out to zero thickness instead)`,
        );
      }
      depths[index] = depth;
    });
    for (let row = 0; row < cellRows; row += 1) {
      const top = row * spacing;
      const bottom = top + spacing;
      // Time average along the centre vertical: Σ_layers (length of [top, bottom] in the layer) · s_layer / h.
      // A cell wholly inside one layer takes exactly 1/V of that layer (the average could differ from
      // it in the last bit, as bottom − top need not equal h exactly).
      let sum = 0;
      let upper = top;
      let layersCut = 0;
      let lastLayerCut = 0;
      for (let layer = 0; layer < velocities.length; layer += 1) {
        const lower = layer < depths.length ? Math.min(Math.max(depths[layer] as number, top), bottom) : bottom;
        if (lower > upper) {
          sum += (lower - upper) / (velocities[layer] as number);
          upper = lower;
          layersCut += 1;
          lastLayerCut = layer;
        }
      }
      cellSlowness[row * cellColumns + column] = layersCut === 1 ? 1 / (velocities[lastLayerCut] as number) : sum / spacing;
    }
  }
  return { originX, spacing, columns, rows, cellSlowness };
}
