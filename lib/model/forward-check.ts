/**
 * Forward check of an interpreted depth section on a grid (METHODS §12): every pick is compared
 * with the first-arrival time that the section predicts, computed by the shortest-path solver of
 * `shortest-path.ts` (Moser1991; Dijkstra1959), and the residuals t_obs − t_calc are summed up per
 * shot, per receiver and overall. It is the check for sections whose refractors vary along the
 * line (the plane-layer formulas of `layered-model.ts` need flat layers).
 *
 * ```
 * residual_i  = t_obs,i − t_calc,i                          (s; positive = the pick is later than the model)
 * RMS         = √(Σ residual_i² / n),  mean = Σ residual_i / n    over the picks that are not excluded
 * ```
 *
 * A per-shot mean away from zero points at the shot (a wrong shot time, position or depth); a
 * per-receiver mean away from zero in every shot points at the receiver (a wrong position or a
 * near-surface anomaly under it); a trend with offset points at a wrong velocity or depth.
 *
 * Section: velocities V_1…V_N and N − 1 interfaces, each a piecewise-linear depth below ground
 * z_k(x) through its points (x ascending), held constant beyond its first and last point. The
 * interfaces are made non-crossing by clipping from the top down, z'_k(x) = max(0, z_1(x), …, z_k(x)):
 * a deeper interface that rises above a shallower one is held at it (the layer between pinches out,
 * the shallower interface being the better constrained), and an interface above the ground is held at
 * the surface; each clipping is reported in a note.
 *
 * Grid (nodes every h in x and z, row 0 the surface): x from min(shots, receivers) − m to
 * max(shots, receivers) + m, depth from 0 to max(deepest clipped interface in that x range, deepest
 * shot) + m, with the margin m = (r + 1)·h. Below the deepest refractor the head wave needs the
 * cells under its interface cell (an interface between node rows is smeared over one cell, so the
 * wave runs along the first node row wholly under it) and room for the star's flattest edges
 * (±r, ±1) leaving that row; at the ends the same margin keeps every shot and receiver r + 1 cells
 * inside, so the ends of the line see the same star as its middle. Receivers therefore lie on the
 * grid by construction. Spacing h: the caller's, or by default min(receiver spacing / 2, shallowest
 * mean interface depth / 8), the receiver spacing being the median gap between distinct receiver
 * positions and the mean depth that of the clipped interface over the line. Either term is left out
 * when it does not exist (fewer than two receiver positions; no interface, or one at the surface all
 * along); with neither, h = 1/100 of the larger of the line length and the deepest shot (1 m when
 * both are zero), with a note. Whatever h is, it is enlarged until columns·rows ≤ maxNodes (default
 * 250 000), with a note: a crustal line of 600 km is checked on a grid of a few hundred metres.
 * Forward-star radius r, default 5.
 *
 * Accuracy (see `shortest-path.ts`): times are never earlier than those of the cell model. In a
 * uniform layer the star's angular gaps make a straight leg late by at most 1/cos(atan(1/r)/2) − 1
 * (0.49 % for r = 5). For head waves, METHODS 12.1 (500/2000 m/s, 10 m of overburden, interface on a
 * node row) gives an error of 0.0012 ms with r = 5 at h = 0.5 m; an interface between node rows adds
 * up to about h·√(s₁² − s₂²) per refractor (the smearing). The default h = depth/8 is therefore a
 * screening grid for dipping or undulating refractors: the 6° refractor of METHODS 5.1 (8 m under
 * x = 0, shots at 0, 60 and 120 m, receivers every 5 m) comes out late by up to 1.4 % on its default 1.79 m grid,
 * 0.96 % at 1 m, 0.53 % at 0.5 m and 0.28 % at 0.25 m (r = 5), 0.42 % at 0.5 m with r = 8; the flat
 * 10 m interface of METHODS 12.1 lies on a node row of its default 1.25 m grid and errs by 0.002 %;
 * Pn at 300 km under a 35 km Moho, on the 302 m grid a 600 km line is coarsened to, by 0.06 %.
 * Before reading a residual pattern smaller than about 1 % of the times, halve h (option `spacing`)
 * or raise r and see whether it stays.
 *
 * Shots: one solver run per shot that has picks, the source at (x, depth) — on the surface for
 * depth 0, buried otherwise — and the times read at the receivers on the surface by linear
 * interpolation between surface nodes. A shot without picks is not run and gets pickCount 0.
 *
 * Edges: excluded picks get calculated times and residuals like the others but are left out of every
 * RMS, mean and pickCount (their count is reported as `excludedCount`); an RMS or mean over no picks
 * is `null`, never 0 or NaN. A receiver is one x: picks whose receiverX are equal are grouped,
 * listed by x ascending. No picks give empty residuals, no receivers and an overall RMS of null.
 * A section of one velocity has no interface and its times are those of the direct (straight) ray.
 *
 * Misuse throws a RangeError with a message (programming errors: the pick table reader already
 * refused bad numbers): a pick whose shot is not among `shots` (the message names the shot and the
 * fix), two shots with one id, a non-finite position, time or depth, a negative shot depth, an
 * interface count other than N − 1, an interface with no points, points of unequal count, x not
 * ascending, a velocity not positive and finite, a spacing not positive and finite, a radius not an
 * integer ≥ 1, a maxNodes too small for a grid with its margins.
 *
 * @example
 * // METHODS 12.1: 500 m/s over 2000 m/s, interface at 10 m, shot at x = 0, receivers at 60 m and 100 m.
 * const check = forwardCheck(
 *   { velocities: [500, 2000], interfaces: [{ x: [0], depth: [10] }] },
 *   [{ id: 'A', x: 0, depth: 0 }],
 *   [{ shot: 'A', receiverX: 60, time: 0.0688 }, { shot: 'A', receiverX: 100, time: 0.0887 }],
 * );
 * check.grid.spacing; // 1.25 m (the 10 m interface / 8; receiver spacing 40 m / 2 is larger)
 * check.calculated[0]; // 0.0687311 s (analytic 68.7298 ms: the grid is 0.0013 ms late)
 * check.residuals[0]; // 0.0000689 s
 */
import { maximum, minimum } from '../stats/extent.js';
import type { ReferenceKey } from '../references.js';
import { shortestPathTimes, slownessGridFromSection, type LayeredSection } from './shortest-path.js';

/** Cited methods of this module (keys of `lib/references.ts`). */
export const FORWARD_CHECK_REFERENCES: readonly ReferenceKey[] = ['Moser1991', 'Dijkstra1959'];

/** Default forward-star radius (80 edges; angular gap next to the axes atan(1/5) = 11.3°). */
export const DEFAULT_FORWARD_CHECK_RADIUS = 5;
/** Default limit on columns·rows: 250 000 nodes take about 0.3 s per shot with r = 5 (Node 20). */
export const DEFAULT_FORWARD_CHECK_MAX_NODES = 250_000;

/** One interface: depth below ground (m) at the points x (m, ascending); constant beyond its ends. */
export interface SectionInterface {
  readonly x: readonly number[];
  readonly depth: readonly number[];
}

/** An interpreted depth section: V_1…V_N (m/s) and the N − 1 interfaces between them, top first. */
export interface DepthSection {
  readonly velocities: readonly number[];
  readonly interfaces: readonly SectionInterface[];
}

/** A shot: its id (as the picks name it), x (m) and source depth below ground (m; 0 on the surface). */
export interface ForwardCheckShot {
  readonly id: string;
  readonly x: number;
  readonly depth: number;
}

/** An observed first arrival at a surface receiver, s; `excluded` picks are computed but not summed. */
export interface ForwardCheckPick {
  readonly shot: string;
  readonly receiverX: number;
  readonly time: number;
  readonly excluded?: boolean;
}

export interface ForwardCheckOptions {
  /** Node spacing h, m (default: see the module comment); enlarged if the grid would exceed maxNodes. */
  readonly spacing?: number;
  /** Forward-star radius r, an integer ≥ 1 (default 5). */
  readonly radius?: number;
  /** Largest number of grid nodes columns·rows (default 250 000). */
  readonly maxNodes?: number;
  /**
   * Without `spacing`: the default spacing is divided by this (≥ 1, default 1) as far as maxNodes
   * allows; coarsening back towards the default spacing is silent, beyond it noted.
   */
  readonly fineness?: number;
}

/** The grid the check ran on: nodes at x = originX + column·spacing, z = row·spacing. */
export interface ForwardCheckGrid {
  readonly originX: number;
  readonly spacing: number;
  readonly columns: number;
  readonly rows: number;
  readonly radius: number;
}

/** Residual statistics of one group of picks (excluded picks left out). */
export interface ResidualSummary {
  /** Picks summed (not excluded). */
  readonly pickCount: number;
  /** Excluded picks of the group (computed, not summed). */
  readonly excludedCount: number;
  /** √(Σ r²/n), s; null when pickCount is 0. */
  readonly rms: number | null;
  /** Σ r/n, s; null when pickCount is 0. */
  readonly mean: number | null;
}

export interface ShotResiduals extends ResidualSummary {
  readonly shot: string;
}

export interface ReceiverResiduals extends ResidualSummary {
  readonly receiverX: number;
}

export interface ForwardCheckNote {
  readonly code: 'interfaces-clipped' | 'interface-above-surface' | 'spacing-coarsened' | 'spacing-fallback';
  readonly message: string;
}

export interface ForwardCheck {
  readonly grid: ForwardCheckGrid;
  /** t_obs − t_calc per pick, s, aligned with the picks (excluded ones too). */
  readonly residuals: Float64Array;
  /** t_calc per pick, s, aligned with the picks. */
  readonly calculated: Float64Array;
  /** One entry per shot, in the order of `shots`. */
  readonly perShot: readonly ShotResiduals[];
  /** One entry per distinct receiver x, x ascending. */
  readonly perReceiver: readonly ReceiverResiduals[];
  /** RMS over every pick that is not excluded, s; null when there is none. */
  readonly overallRms: number | null;
  readonly notes: readonly ForwardCheckNote[];
}

const CALLER = 'forwardCheck';

function assertFinite(value: number, what: string): void {
  if (!Number.isFinite(value)) throw new RangeError(`${CALLER}: ${what} must be finite, got ${value}`);
}

function assertSection(section: DepthSection): void {
  const { velocities, interfaces } = section;
  if (velocities.length < 1) throw new RangeError(`${CALLER}: a depth section needs at least one velocity`);
  velocities.forEach((velocity, index) => {
    if (!(velocity > 0) || !Number.isFinite(velocity)) {
      throw new RangeError(`${CALLER}: velocity of layer ${index + 1} must be positive and finite, got ${velocity}; fix the velocity model`);
    }
  });
  if (interfaces.length !== velocities.length - 1) {
    throw new RangeError(
      `${CALLER}: ${velocities.length} velocities need ${velocities.length - 1} interfaces (the last layer is the half-space), got ${interfaces.length}`,
    );
  }
  interfaces.forEach((surface, index) => {
    const name = `interface ${index + 1}`;
    if (surface.x.length === 0 || surface.x.length !== surface.depth.length) {
      throw new RangeError(`${CALLER}: ${name} needs at least one point and as many depths as x values, got ${surface.x.length} x and ${surface.depth.length} depths`);
    }
    surface.x.forEach((x, point) => {
      assertFinite(x, `${name}, x of point ${point + 1}`);
      assertFinite(surface.depth[point] as number, `${name}, depth of point ${point + 1}`);
      if (point > 0 && !(x > (surface.x[point - 1] as number))) {
        throw new RangeError(`${CALLER}: ${name}: x must be strictly ascending, point ${point + 1} (x = ${x} m) follows x = ${surface.x[point - 1]} m; sort the points`);
      }
    });
  });
}

/** z_k(x): linear between the points, constant beyond the first and last. */
function depthAt(surface: SectionInterface, x: number): number {
  const { x: xs, depth } = surface;
  const last = xs.length - 1;
  if (x <= (xs[0] as number)) return depth[0] as number;
  if (x >= (xs[last] as number)) return depth[last] as number;
  let low = 0;
  let high = last;
  while (high - low > 1) {
    const middle = (low + high) >> 1;
    if ((xs[middle] as number) <= x) low = middle;
    else high = middle;
  }
  const x0 = xs[low] as number;
  const x1 = xs[high] as number;
  const weight = (x - x0) / (x1 - x0);
  return (1 - weight) * (depth[low] as number) + weight * (depth[high] as number);
}

/** z'_k(x) = max(0, z_1(x), …, z_k(x)): the clipped, non-crossing interfaces. */
function clippedDepthFunctions(interfaces: readonly SectionInterface[]): ((x: number) => number)[] {
  return interfaces.map((_, index) => (x: number) => {
    let depth = 0;
    for (let upper = 0; upper <= index; upper += 1) depth = Math.max(depth, depthAt(interfaces[upper] as SectionInterface, x));
    return depth;
  });
}

/**
 * Notes for the clipping. The difference of two piecewise-linear functions held constant beyond
 * their ends is piecewise linear on the union of their points, so checking at those points finds
 * every crossing.
 */
function clippingNotes(interfaces: readonly SectionInterface[]): ForwardCheckNote[] {
  const notes: ForwardCheckNote[] = [];
  interfaces.forEach((surface, index) => {
    const highest = minimum(surface.depth);
    if (highest < 0) {
      notes.push({
        code: 'interface-above-surface',
        message: `interface ${index + 1} rises to ${highest} m, above the ground; it was held at the surface (depth 0) there. Check the sign of its depths (depth is below ground, positive down)`,
      });
    }
    for (let upper = 0; upper < index; upper += 1) {
      const above = interfaces[upper] as SectionInterface;
      const points = [...above.x, ...surface.x];
      let worst = 0;
      let worstX = Number.NaN;
      for (const x of points) {
        const overlap = depthAt(above, x) - depthAt(surface, x);
        if (overlap > worst) {
          worst = overlap;
          worstX = x;
        }
      }
      if (worst > 0) {
        notes.push({
          code: 'interfaces-clipped',
          message: `interface ${index + 1} crosses above interface ${upper + 1} (by up to ${worst.toPrecision(3)} m, at x = ${worstX} m); it was held at interface ${upper + 1} there, so layer ${upper + 2} pinches out. Correct the interpretation if the crossing is not meant`,
        });
      }
    }
  });
  return notes;
}

/** Largest of z over [low, high] of a piecewise-linear function: at the ends or at a point inside. */
function deepestOver(surface: SectionInterface, low: number, high: number): number {
  let deepest = Math.max(depthAt(surface, low), depthAt(surface, high));
  surface.x.forEach((x, point) => {
    if (x > low && x < high) deepest = Math.max(deepest, surface.depth[point] as number);
  });
  return deepest;
}

/** Mean of f over [low, high] by the trapezoid rule on 1024 intervals (only to choose a spacing). */
function meanOver(depth: (x: number) => number, low: number, high: number): number {
  if (!(high > low)) return depth(low);
  const intervals = 1024;
  let sum = (depth(low) + depth(high)) / 2;
  for (let step = 1; step < intervals; step += 1) sum += depth(low + ((high - low) * step) / intervals);
  return sum / intervals;
}

function median(values: readonly number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const middle = sorted.length >> 1;
  return sorted.length % 2 === 1 ? (sorted[middle] as number) : ((sorted[middle - 1] as number) + (sorted[middle] as number)) / 2;
}

/** The default spacing of the module comment, and whether the fallback was needed. */
function defaultSpacing(
  receiverXs: readonly number[],
  clipped: readonly ((x: number) => number)[],
  low: number,
  high: number,
  deepestShot: number,
): { spacing: number; fallback: boolean } {
  const candidates: number[] = [];
  const distinct = [...new Set(receiverXs)].sort((a, b) => a - b);
  if (distinct.length >= 2) candidates.push(median(distinct.slice(1).map((x, index) => x - (distinct[index] as number))) / 2);
  const meanDepths = clipped.map((depth) => meanOver(depth, low, high)).filter((depth) => depth > 0);
  if (meanDepths.length > 0) candidates.push(Math.min(...meanDepths) / 8);
  if (candidates.length > 0) return { spacing: Math.min(...candidates), fallback: false };
  const scale = Math.max(high - low, deepestShot);
  return { spacing: scale > 0 ? scale / 100 : 1, fallback: true };
}

/** Nodes of the grid for spacing h: the margins of the module comment. */
function gridFor(spacing: number, radius: number, low: number, high: number, deepestAt: (low: number, high: number) => number): { originX: number; columns: number; rows: number } {
  const margin = (radius + 1) * spacing;
  const originX = low - margin;
  const width = high + margin - originX;
  const depth = deepestAt(originX, high + margin) + margin;
  // A hair of slack so that an extent that is a whole number of cells is not rounded up by one.
  const columns = Math.ceil(width / spacing - 1e-9) + 1;
  const rows = Math.ceil(depth / spacing - 1e-9) + 1;
  return { originX, columns, rows };
}

function summarise(residuals: Float64Array, members: readonly number[], picks: readonly ForwardCheckPick[]): ResidualSummary {
  let pickCount = 0;
  let sum = 0;
  let sumOfSquares = 0;
  for (const index of members) {
    if (picks[index]?.excluded === true) continue;
    const residual = residuals[index] as number;
    pickCount += 1;
    sum += residual;
    sumOfSquares += residual * residual;
  }
  return {
    pickCount,
    excludedCount: members.length - pickCount,
    rms: pickCount > 0 ? Math.sqrt(sumOfSquares / pickCount) : null,
    mean: pickCount > 0 ? sum / pickCount : null,
  };
}

/**
 * Forward check of `section` against `picks` (see the module comment for the grid, the accuracy,
 * the edges and the errors). Never mutates its inputs.
 */
export function forwardCheck(
  section: DepthSection,
  shots: readonly ForwardCheckShot[],
  picks: readonly ForwardCheckPick[],
  options: ForwardCheckOptions = {},
): ForwardCheck {
  assertSection(section);
  const radius = options.radius ?? DEFAULT_FORWARD_CHECK_RADIUS;
  if (!Number.isInteger(radius) || radius < 1) {
    throw new RangeError(`${CALLER}: forward-star radius must be an integer ≥ 1 (5 is the default), got ${radius}`);
  }
  // The coarsest grid is 2(r + 1) cells wide and r + 1 deep, plus one cell each way for rounding.
  const smallestGrid = (2 * radius + 5) * (radius + 3);
  const maxNodes = options.maxNodes ?? DEFAULT_FORWARD_CHECK_MAX_NODES;
  if (!Number.isInteger(maxNodes) || maxNodes < smallestGrid) {
    throw new RangeError(`${CALLER}: maxNodes must be an integer ≥ ${smallestGrid} (the coarsest grid with its margins for radius ${radius}), got ${maxNodes}`);
  }
  if (options.spacing !== undefined && (!(options.spacing > 0) || !Number.isFinite(options.spacing))) {
    throw new RangeError(`${CALLER}: spacing must be positive and finite (metres), got ${options.spacing}`);
  }
  const fineness = options.fineness ?? 1;
  if (!(fineness >= 1) || !Number.isFinite(fineness)) {
    throw new RangeError(`${CALLER}: fineness must be a finite number ≥ 1 (1 keeps the default spacing), got ${options.fineness}`);
  }

  const shotIndex = new Map<string, number>();
  shots.forEach((shot, index) => {
    if (shotIndex.has(shot.id)) throw new RangeError(`${CALLER}: two shots have the id "${shot.id}"; give every shot its own id`);
    assertFinite(shot.x, `x of shot "${shot.id}"`);
    if (!(shot.depth >= 0) || !Number.isFinite(shot.depth)) {
      throw new RangeError(`${CALLER}: depth of shot "${shot.id}" must be zero (surface) or positive below ground, got ${shot.depth}`);
    }
    shotIndex.set(shot.id, index);
  });
  const picksOfShot: number[][] = shots.map(() => []);
  picks.forEach((pick, index) => {
    const owner = shotIndex.get(pick.shot);
    if (owner === undefined) {
      throw new RangeError(
        `${CALLER}: pick ${index + 1} names shot "${pick.shot}", which is not among the ${shots.length} shots given; add shot "${pick.shot}" (its x and depth) to the shots or drop its picks`,
      );
    }
    assertFinite(pick.receiverX, `receiverX of pick ${index + 1} (shot "${pick.shot}")`);
    assertFinite(pick.time, `time of pick ${index + 1} (shot "${pick.shot}")`);
    picksOfShot[owner]?.push(index);
  });

  const notes = clippingNotes(section.interfaces);
  const clipped = clippedDepthFunctions(section.interfaces);
  const positions = [...shots.map((shot) => shot.x), ...picks.map((pick) => pick.receiverX)];
  const low = positions.length > 0 ? minimum(positions) : 0;
  const high = positions.length > 0 ? maximum(positions) : 0;
  const deepestShot = shots.reduce((deepest, shot) => Math.max(deepest, shot.depth), 0);
  const deepestAt = (from: number, to: number): number =>
    section.interfaces.reduce((deepest, surface) => Math.max(deepest, deepestOver(surface, from, to)), deepestShot);

  let spacing: number;
  if (options.spacing !== undefined) {
    spacing = options.spacing;
  } else {
    const chosen = defaultSpacing(
      picks.map((pick) => pick.receiverX),
      clipped,
      low,
      high,
      deepestShot,
    );
    spacing = chosen.spacing;
    if (chosen.fallback) {
      notes.push({
        code: 'spacing-fallback',
        message: `no receiver spacing and no interface depth to size the grid by; the spacing is ${spacing} m (1/100 of the larger of the line length and the deepest shot, 1 m when both are zero); give the spacing option to choose it`,
      });
    }
  }
  const requested = spacing;
  // A refined default grid, coarsened back (towards the default, silently) to fit maxNodes.
  if (options.spacing === undefined && fineness > 1) spacing /= fineness;
  let nodes = gridFor(spacing, radius, low, high, deepestAt);
  // Nodes fall roughly as 1/h²; a little extra each pass ends the loop in a few passes.
  while (nodes.columns * nodes.rows > maxNodes) {
    spacing *= Math.sqrt((nodes.columns * nodes.rows) / maxNodes) * 1.01;
    nodes = gridFor(spacing, radius, low, high, deepestAt);
  }
  if (spacing > requested * (1 + 1e-9)) {
    notes.push({
      code: 'spacing-coarsened',
      message: `a ${requested.toPrecision(4)} m grid would need more than ${maxNodes} nodes; the spacing was coarsened to ${spacing.toPrecision(4)} m (${nodes.columns} × ${nodes.rows} nodes), so head-wave times may be late by up to about spacing·√(s₁² − s₂²) per refractor; raise maxNodes for a finer check`,
    });
  }
  const grid: ForwardCheckGrid = { originX: nodes.originX, spacing, columns: nodes.columns, rows: nodes.rows, radius };

  const layered: LayeredSection = { velocities: section.velocities, interfaces: clipped };
  const residuals = new Float64Array(picks.length);
  const calculated = new Float64Array(picks.length);
  if (picks.length > 0) {
    const slowness = slownessGridFromSection(layered, grid);
    shots.forEach((shot, index) => {
      const members = picksOfShot[index] ?? [];
      if (members.length === 0) return;
      const field = shortestPathTimes(slowness, { x: shot.x, z: shot.depth }, { radius });
      for (const pickIndex of members) {
        const pick = picks[pickIndex] as ForwardCheckPick;
        const time = field.timeAtSurface(pick.receiverX);
        calculated[pickIndex] = time;
        residuals[pickIndex] = pick.time - time;
      }
    });
  }

  const perShot: ShotResiduals[] = shots.map((shot, index) => ({ shot: shot.id, ...summarise(residuals, picksOfShot[index] ?? [], picks) }));
  const picksOfReceiver = new Map<number, number[]>();
  picks.forEach((pick, index) => {
    const members = picksOfReceiver.get(pick.receiverX);
    if (members === undefined) picksOfReceiver.set(pick.receiverX, [index]);
    else members.push(index);
  });
  const perReceiver: ReceiverResiduals[] = [...picksOfReceiver.entries()]
    .sort(([first], [second]) => first - second)
    .map(([receiverX, members]) => ({ receiverX, ...summarise(residuals, members, picks) }));
  const overall = summarise(
    residuals,
    picks.map((_, index) => index),
    picks,
  );
  return { grid, residuals, calculated, perShot, perReceiver, overallRms: overall.rms, notes };
}
