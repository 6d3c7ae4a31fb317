/**
 * Crossover-distance method for plane horizontal layers: layer thicknesses from the branch
 * slownesses and the offsets at which consecutive branches cross (Telford1990 ch. 4;
 * Kearey2002 ch. 5; Palmer1986), with their covariance by the delta method (JCGM2008 §5.2).
 *
 * The crossovers are turned into intercept times and the intercept-time recursion is used
 * unchanged (lib/depth/intercept-time.ts; one recursion serves both methods):
 *
 * ```
 * τ_1 = direct-wave intercept (default 0),   τ_{n+1} = τ_n + x_{c,n}·(s_n − s_{n+1}),   n = 1…N−1
 * two layers:  h_1 = (x_c/2)·√((V_2 − V_1)/(V_2 + V_1))
 * ```
 *
 * Inputs u = (s_1…s_N, x_{c,1}…x_{c,N−1}, τ_1) are taken as independent (diagonal covariance):
 * right for crossovers read from the picks (`observedCrossover`), which is where this method adds
 * information. With crossovers taken from the fitted lines (`fittedCrossovers`) the depths equal
 * the intercept-time depths exactly, but the SEs here would ignore the correlation of those
 * crossovers with the slownesses: use the intercept-time SEs then. The Jacobian has 2N columns in
 * the order of u (the τ_1 column is there even when no direct intercept is given; its variance
 * is then 0).
 *
 * Edges: as the intercept-time method (its notes: velocity not increasing stops the stack,
 * non-positive intercept or thickness, ill-conditioned depth), with the intercepts derived from
 * the crossovers. Misuse throws: no slownesses, a crossover count other than N − 1, a value not
 * finite, a negative variance, a slowness not positive.
 *
 * @example
 * // METHODS.md check case 2.2: V = 500/2000 m/s, x_c = 20.6559 m → h_1 = 8.0000 m.
 * crossoverDistanceDepths([{ slowness: 1 / 500, variance: 0 }, { slowness: 1 / 2000, variance: 0 }],
 *   [{ distance: 20.6559, variance: 0 }]).thicknesses; // [8.0000]
 */
import type { BranchParameters, LayerDepths } from './types.js';
import { interceptTimeRecursion } from './intercept-time.js';
import { branchParameterCovariance, chainJacobians, layerDepthsFromThicknesses } from './propagate.js';
import { sandwich, zeros } from '../stats/small-matrix.js';

export interface SlownessReading {
  readonly slowness: number;
  readonly variance: number;
}

/** A crossover distance (m) with its variance (m²). */
export interface CrossoverReading {
  readonly distance: number;
  readonly variance: number;
}

export interface InterceptReading {
  readonly value: number;
  readonly variance: number;
}

function assertReading(value: number, variance: number, label: string): void {
  if (!Number.isFinite(value) || !Number.isFinite(variance)) {
    throw new RangeError(`crossoverDistanceDepths: ${label} must be finite, got ${value} with variance ${variance}`);
  }
  if (variance < 0) throw new RangeError(`crossoverDistanceDepths: ${label} has a negative variance ${variance}`);
}

/**
 * Thicknesses and depths of N layers by the crossover-distance method. `slownesses` are s_1…s_N
 * (branch 1 = direct wave), `crossovers` x_{c,1}…x_{c,N−1} (x_{c,n} between branches n and n+1),
 * `directIntercept` the direct wave's τ_1 (default 0 with variance 0). Jacobian columns:
 * (s_1…s_N, x_{c,1}…x_{c,N−1}, τ_1).
 */
export function crossoverDistanceDepths(
  slownesses: readonly SlownessReading[],
  crossovers: readonly CrossoverReading[],
  directIntercept?: InterceptReading,
): LayerDepths {
  const branchCount = slownesses.length;
  if (branchCount < 1) throw new RangeError('crossoverDistanceDepths: no slownesses given; give at least the direct wave');
  if (crossovers.length !== branchCount - 1) {
    throw new RangeError(
      `crossoverDistanceDepths: ${branchCount} branches need ${branchCount - 1} crossover distances (one between each consecutive pair), got ${crossovers.length}`,
    );
  }
  slownesses.forEach((reading, index) => {
    assertReading(reading.slowness, reading.variance, `slowness of branch ${index + 1}`);
    if (!(reading.slowness > 0)) throw new RangeError(`crossoverDistanceDepths: slowness of branch ${index + 1} must be positive, got ${reading.slowness}`);
  });
  crossovers.forEach((reading, index) => assertReading(reading.distance, reading.variance, `crossover ${index + 1}`));
  const direct = directIntercept ?? { value: 0, variance: 0 };
  assertReading(direct.value, direct.variance, 'direct-wave intercept');

  // Inputs u: s_1…s_N at 0…N−1, x_c at N…2N−2, τ_1 at 2N−1. θ = (s_1, τ_1, …, s_N, τ_N).
  const width = 2 * branchCount;
  const directColumn = width - 1;
  const crossoverColumn = (crossover: number): number => branchCount + crossover - 1;
  const intercepts: number[] = [direct.value];
  const parameterJacobian = zeros(width, width); // ∂θ/∂u
  parameterJacobian[0]![0] = 1;
  parameterJacobian[1]![directColumn] = 1;
  for (let branch = 2; branch <= branchCount; branch += 1) {
    const upperSlowness = slownesses[branch - 2]!.slowness;
    const lowerSlowness = slownesses[branch - 1]!.slowness;
    const crossover = crossovers[branch - 2]!.distance;
    const previousIntercept = intercepts[branch - 2]!;
    intercepts.push(previousIntercept + crossover * (upperSlowness - lowerSlowness));
    parameterJacobian[2 * (branch - 1)]![branch - 1] = 1;
    const previousRow = parameterJacobian[2 * (branch - 2) + 1]!;
    const row = parameterJacobian[2 * (branch - 1) + 1]!;
    previousRow.forEach((value, column) => {
      row[column] = value;
    });
    row[branch - 2] = (row[branch - 2] ?? 0) + crossover;
    row[branch - 1] = (row[branch - 1] ?? 0) - crossover;
    row[crossoverColumn(branch - 1)] = (row[crossoverColumn(branch - 1)] ?? 0) + (upperSlowness - lowerSlowness);
  }

  const recursion = interceptTimeRecursion(
    slownesses.map((reading) => reading.slowness),
    intercepts,
    slownesses.map((reading) => reading.variance),
  );
  const inputCovariance = zeros(width, width);
  slownesses.forEach((reading, index) => {
    inputCovariance[index]![index] = reading.variance;
  });
  crossovers.forEach((reading, index) => {
    inputCovariance[crossoverColumn(index + 1)]![crossoverColumn(index + 1)] = reading.variance;
  });
  inputCovariance[directColumn]![directColumn] = direct.variance;
  return layerDepthsFromThicknesses(
    'crossover-distance',
    recursion.thicknesses,
    chainJacobians(recursion.jacobian, parameterJacobian),
    inputCovariance,
    recursion.notes,
  );
}

/**
 * Crossover distances of consecutive fitted branch lines, x_{c,n} = (τ_{n+1} − τ_n)/(s_n − s_{n+1}),
 * with their variances by the delta method over (s_n, τ_n, s_{n+1}, τ_{n+1}) using each branch's
 * full 2×2 covariance (Telford1990 ch. 4; JCGM2008 §5.2). One entry per consecutive pair, aligned
 * with the pair's upper branch n.
 *
 * Edges: `null` for a pair of parallel lines (s_n = s_{n+1}: no crossover). A later branch slower
 * than the earlier one still gives the lines' intersection (possibly at a negative offset); the
 * depth methods note the velocity that does not increase. Fewer than two branches give an empty
 * list.
 *
 * @example
 * // METHODS.md check case 1.1 lines: 400 m/s through the origin, 1600 m/s with τ_2 = 19.3649 ms.
 * fittedCrossovers([
 *   { slowness: 1 / 400, intercept: 0, slownessVariance: 0, interceptVariance: 0, covariance: 0 },
 *   { slowness: 1 / 1600, intercept: 0.0193649, slownessVariance: 0, interceptVariance: 0, covariance: 0 },
 * ]); // [{ distance: 10.3280, variance: 0 }]
 */
export function fittedCrossovers(branches: readonly BranchParameters[]): (CrossoverReading | null)[] {
  const covariance = branchParameterCovariance(branches);
  const readings: (CrossoverReading | null)[] = [];
  for (let upper = 1; upper < branches.length; upper += 1) {
    const above = branches[upper - 1]!;
    const below = branches[upper]!;
    const slownessDifference = above.slowness - below.slowness;
    if (slownessDifference === 0) {
      readings.push(null);
      continue;
    }
    const distance = (below.intercept - above.intercept) / slownessDifference;
    const gradient = new Array<number>(2 * branches.length).fill(0);
    gradient[2 * (upper - 1)] = -distance / slownessDifference;
    gradient[2 * (upper - 1) + 1] = -1 / slownessDifference;
    gradient[2 * upper] = distance / slownessDifference;
    gradient[2 * upper + 1] = 1 / slownessDifference;
    const variance = sandwich([gradient], covariance)[0]?.[0] ?? Number.NaN;
    readings.push({ distance, variance: Math.max(0, variance) });
  }
  return readings;
}

/**
 * The crossover read from the picks themselves: it lies somewhere between the last pick of the
 * earlier branch and the first pick of the later one. Distance = midpoint of that bracket,
 * variance = width²/12 (a rectangular distribution over the bracket, JCGM2008 §4.3.7 — the
 * section number recalled from memory), m and m².
 *
 * Edges: a bracket of zero width gives variance 0. Throws when an offset is negative or not finite,
 * or when the later branch starts before the earlier one ends (the branches overlap: the split is
 * wrong).
 *
 * @example
 * observedCrossover(10, 15); // { distance: 12.5, variance: 2.0833 }
 */
export function observedCrossover(lastOffsetOfLowerBranch: number, firstOffsetOfUpperBranch: number): CrossoverReading {
  for (const offset of [lastOffsetOfLowerBranch, firstOffsetOfUpperBranch]) {
    if (!(offset >= 0) || !Number.isFinite(offset)) {
      throw new RangeError(`observedCrossover: offsets must be zero or positive and finite, got ${offset}`);
    }
  }
  const width = firstOffsetOfUpperBranch - lastOffsetOfLowerBranch;
  if (width < 0) {
    throw new RangeError(
      `observedCrossover: the later branch starts at ${firstOffsetOfUpperBranch} m, before the earlier one ends at ${lastOffsetOfLowerBranch} m; the branches overlap, so fix the branch split first`,
    );
  }
  return { distance: (lastOffsetOfLowerBranch + firstOffsetOfUpperBranch) / 2, variance: (width * width) / 12 };
}

/** The intercept-time depth of one interface against the depth range the crossover bracket allows. */
export interface DepthComparison {
  /** Interface k is the top of layer k + 1 (depth z_k). */
  readonly interface: number;
  /** Intercept-time depth and its standard error, m. */
  readonly interceptTimeDepth: number;
  readonly interceptTimeSE: number;
  /** Depths from the two ends of the crossover bracket, m (low ≤ high). */
  readonly bracketLow: number;
  readonly bracketHigh: number;
  /** True when [z − SE, z + SE] does not meet [bracketLow, bracketHigh]. */
  readonly disagree: boolean;
}

/**
 * METHODS §2 "Agreement": with the crossover read from the picks as a bracket — between the last
 * pick of branch n and the first of branch n+1 — the crossover-distance method gives a depth
 * bracket (the depths from the bracket's two ends, `low` and `high`); the intercept-time depth,
 * ± one standard error, must meet it, else the two methods disagree (mis-segmentation, lateral
 * change or a hidden layer).
 *
 * Edges: compares up to the shortest of the three depth lists; a bracket given high-to-low is
 * reordered; an SE of 0 flags any depth outside the bracket.
 *
 * @example
 * depthOutsideBracket(interceptTimeDepths(branches), depthsAtLowEnds, depthsAtHighEnds); // [{ interface: 1, disagree: false, … }]
 */
export function depthOutsideBracket(interceptTime: LayerDepths, low: LayerDepths, high: LayerDepths): DepthComparison[] {
  const count = Math.min(interceptTime.depths.length, low.depths.length, high.depths.length);
  const comparisons: DepthComparison[] = [];
  for (let index = 0; index < count; index += 1) {
    const depth = interceptTime.depths[index] ?? Number.NaN;
    const standardError = interceptTime.depthSE[index] ?? Number.NaN;
    const ends = [low.depths[index] ?? Number.NaN, high.depths[index] ?? Number.NaN];
    const bracketLow = Math.min(...ends);
    const bracketHigh = Math.max(...ends);
    const disagree = depth + standardError < bracketLow || depth - standardError > bracketHigh;
    comparisons.push({ interface: index + 1, interceptTimeDepth: depth, interceptTimeSE: standardError, bracketLow, bracketHigh, disagree });
  }
  return comparisons;
}
