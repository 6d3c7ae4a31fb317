/**
 * Intercept-time method for plane horizontal layers: layer thicknesses from the slownesses and
 * intercept times of the direct wave and the head-wave branches of one shot side, recursively from
 * the top (Telford1990 ch. 4; Kearey2002 ch. 5; Palmer1986), with their full covariance by the
 * delta method (JCGM2008 §5.2).
 *
 * Assumes plane horizontal homogeneous isotropic layers, a surface shot, and that branch n is the
 * head wave along the top of layer n, every layer having its own branch (a hidden layer or a
 * velocity inversion makes depths wrong without a sign: see lib/checks).
 *
 * ```
 * h_{n−1} = [ τ_n − 2·Σ_{i≤n−2} h_i·q_{i,n} ] / (2·q_{n−1,n}),   q_{i,n} = √(s_i² − s_n²),  n = 2…N
 * two layers:  h_1 = τ_2 / (2·q_{1,2}) = τ_2·V_1·V_2 / (2·√(V_2² − V_1²))
 * C_h = J·Σ_θ·Jᵀ,   J = ∂h/∂θ,   θ = (s_1, τ_1, s_2, τ_2, …, s_N, τ_N)
 * ```
 *
 * J is exact: the recursion is differentiated in forward mode alongside its values (each
 * quantity carries its gradient over θ). The column of τ_1 (the direct wave's intercept) is zero:
 * the recursion does not use it. Σ_θ is block-diagonal, one 2×2 block per branch, with the
 * slope–intercept covariance kept — dropping it misstates SE(h) (METHODS check case 3.1: 0.0842 m
 * with it, 0.0912 m without).
 *
 * Edges (each is a `DepthNote`, never a silent NaN or a throw):
 * - `velocity-not-increasing` (layer n): branch n is not faster than branch n − 1, so q_{n−1,n} is
 *   undefined; the stack stops there: the thicknesses returned are h_1…h_{n−2} (layers above layer
 *   n − 1), and branches n…N are not used.
 * - `intercept-not-positive` (layer n − 1): τ_n ≤ 0 for n ≥ 2; the thickness is still computed.
 * - `thickness-not-positive` (layer k): h_k ≤ 0; the value is kept and the recursion goes on (the
 *   deeper thicknesses inherit the error).
 * - `depth-ill-conditioned` (layer n − 1): s_{n−1} − s_n < 3·√(Var s_{n−1} + Var s_n); the depth
 *   and its linearised SE are unreliable (use the bootstrap interval).
 * A single branch (direct wave only) gives empty arrays and no notes.
 *
 * Misuse throws with a message: no branches; a slowness not positive; a value or variance not
 * finite; a negative variance.
 *
 * @example
 * // METHODS.md check case 2.2: V = 500/2000 m/s, τ_2 = 30.9839 ms → h_1 = 8.0000 m.
 * interceptTimeDepths([
 *   { slowness: 1 / 500, intercept: 0, slownessVariance: 0, interceptVariance: 0, covariance: 0 },
 *   { slowness: 1 / 2000, intercept: 0.0309839, slownessVariance: 0, interceptVariance: 0, covariance: 0 },
 * ]).thicknesses; // [8.0000]
 */
import type { BranchParameters, DepthNote, LayerDepths } from './types.js';
import { branchParameterCovariance, layerDepthsFromThicknesses } from './propagate.js';
import { formatQuantity } from '../checks/wording.js';

/**
 * A depth is ill-conditioned when consecutive slownesses differ by less than this many standard
 * errors of their difference (METHODS §2 and §3: the linearisation fails as q → 0).
 */
export const ILL_CONDITIONED_SEPARATION = 3;

/** Thicknesses of the recursion with their exact Jacobian over θ and the notes met. */
export interface InterceptTimeRecursion {
  readonly thicknesses: readonly number[];
  /** ∂h_k/∂θ_j, θ = (s_1, τ_1, …, s_N, τ_N); one row per thickness returned. */
  readonly jacobian: readonly (readonly number[])[];
  readonly notes: readonly DepthNote[];
}

/** A value with its gradient over θ (forward-mode differentiation). */
interface Differentiated {
  readonly value: number;
  readonly gradient: readonly number[];
}

const slownessColumn = (branch: number): number => 2 * (branch - 1);
const interceptColumn = (branch: number): number => 2 * (branch - 1) + 1;

function verticalSlowness(slownesses: readonly number[], layer: number, branch: number, width: number): Differentiated {
  const layerSlowness = slownesses[layer - 1] ?? Number.NaN;
  const refractorSlowness = slownesses[branch - 1] ?? Number.NaN;
  const value = Math.sqrt(layerSlowness * layerSlowness - refractorSlowness * refractorSlowness);
  const gradient = new Array<number>(width).fill(0);
  gradient[slownessColumn(layer)] = layerSlowness / value;
  gradient[slownessColumn(branch)] = -refractorSlowness / value;
  return { value, gradient };
}

function formatVelocity(slowness: number): string {
  return formatQuantity(1 / slowness, 'm/s');
}

/**
 * The intercept-time recursion on bare vectors, shared by both depth methods (the crossover method
 * turns its crossovers into intercepts and calls this). Inputs are aligned by branch: index 0 is
 * branch 1. `slownessVariances` serve only the ill-conditioning test. Edges as `interceptTimeDepths`.
 */
export function interceptTimeRecursion(
  slownesses: readonly number[],
  intercepts: readonly number[],
  slownessVariances: readonly number[],
): InterceptTimeRecursion {
  const branchCount = slownesses.length;
  if (branchCount < 1) throw new RangeError('interceptTimeRecursion: no branches given; give at least the direct wave');
  if (intercepts.length !== branchCount || slownessVariances.length !== branchCount) {
    throw new RangeError(
      `interceptTimeRecursion: ${branchCount} slownesses, ${intercepts.length} intercepts and ${slownessVariances.length} variances; give one of each per branch`,
    );
  }
  const width = 2 * branchCount;
  const thicknesses: Differentiated[] = [];
  const notes: DepthNote[] = [];

  for (let branch = 2; branch <= branchCount; branch += 1) {
    const layer = branch - 1;
    const refractorSlowness = slownesses[branch - 1] ?? Number.NaN;
    const aboveSlowness = slownesses[branch - 2] ?? Number.NaN;
    if (!(refractorSlowness < aboveSlowness)) {
      notes.push({
        code: 'velocity-not-increasing',
        layer: branch,
        message: `branch ${branch} (${formatVelocity(refractorSlowness)}) is not faster than branch ${layer} (${formatVelocity(aboveSlowness)}), so no head wave can travel along layer ${branch} and no depth is given from layer ${layer} down; a velocity inversion, dip or a wrongly split branch — check the branch split or shoot the reverse side`,
      });
      break;
    }
    const separationSE = Math.sqrt((slownessVariances[branch - 2] ?? 0) + (slownessVariances[branch - 1] ?? 0));
    if (aboveSlowness - refractorSlowness < ILL_CONDITIONED_SEPARATION * separationSE) {
      notes.push({
        code: 'depth-ill-conditioned',
        layer,
        message: `layer ${layer}: the slownesses of branches ${layer} and ${branch} differ by ${((aboveSlowness - refractorSlowness) / separationSE).toFixed(1)} standard errors, fewer than ${ILL_CONDITIONED_SEPARATION}, so the thickness is unstable and its linearised standard error unreliable; use the bootstrap interval or add picks to both branches`,
      });
    }
    const intercept = intercepts[branch - 1] ?? Number.NaN;
    if (!(intercept > 0)) {
      notes.push({
        code: 'intercept-not-positive',
        layer,
        message: `branch ${branch}: intercept time ${formatQuantity(intercept * 1000, 'ms')} is not positive, so layer ${layer} cannot have a positive thickness; a time-zero error, a trigger delay or a wrongly split branch — check the shot time and the branch split`,
      });
    }

    // Overburden term Σ_{i ≤ n−2} h_i·q_{i,n} with its gradient.
    let overburden = 0;
    const overburdenGradient = new Array<number>(width).fill(0);
    for (let upper = 1; upper < layer; upper += 1) {
      const thickness = thicknesses[upper - 1];
      if (thickness === undefined) break;
      const vertical = verticalSlowness(slownesses, upper, branch, width);
      overburden += thickness.value * vertical.value;
      for (let column = 0; column < width; column += 1) {
        overburdenGradient[column] =
          (overburdenGradient[column] ?? 0) +
          vertical.value * (thickness.gradient[column] ?? 0) +
          thickness.value * (vertical.gradient[column] ?? 0);
      }
    }
    const ownVertical = verticalSlowness(slownesses, layer, branch, width);
    const value = (intercept - 2 * overburden) / (2 * ownVertical.value);
    const gradient = new Array<number>(width).fill(0);
    for (let column = 0; column < width; column += 1) {
      const interceptDerivative = column === interceptColumn(branch) ? 1 : 0;
      gradient[column] =
        (interceptDerivative - 2 * (overburdenGradient[column] ?? 0)) / (2 * ownVertical.value) -
        (value * (ownVertical.gradient[column] ?? 0)) / ownVertical.value;
    }
    thicknesses.push({ value, gradient });
    if (!(value > 0)) {
      notes.push({
        code: 'thickness-not-positive',
        layer,
        message: `layer ${layer} comes out ${formatQuantity(value, 'm')} thick: the intercept of branch ${branch} is smaller than the layers above need — a velocity inversion, a hidden layer or a wrong branch; check the branch split and compare with a borehole`,
      });
    }
  }
  return {
    thicknesses: thicknesses.map((thickness) => thickness.value),
    jacobian: thicknesses.map((thickness) => [...thickness.gradient]),
    notes,
  };
}

function assertBranchParameters(branches: readonly BranchParameters[]): void {
  if (branches.length < 1) throw new RangeError('interceptTimeDepths: no branches given; give at least the direct wave');
  branches.forEach((branch, index) => {
    const label = `interceptTimeDepths: branch ${index + 1}`;
    for (const [name, value] of Object.entries(branch)) {
      if (typeof value !== 'number' || !Number.isFinite(value)) throw new RangeError(`${label}: ${name} must be a finite number, got ${value}`);
    }
    if (!(branch.slowness > 0)) throw new RangeError(`${label}: slowness must be positive, got ${branch.slowness} s/m`);
    if (branch.slownessVariance < 0 || branch.interceptVariance < 0) {
      throw new RangeError(`${label}: variances must not be negative (got ${branch.slownessVariance}, ${branch.interceptVariance})`);
    }
  });
}

/**
 * Layer thicknesses and depths by the intercept-time method, with standard errors and full
 * covariances; Jacobian columns in the order θ = (s_1, τ_1, s_2, τ_2, …, s_N, τ_N) of
 * lib/depth/types.ts. See the module comment for the formula, the notes and the edges.
 */
export function interceptTimeDepths(branches: readonly BranchParameters[]): LayerDepths {
  assertBranchParameters(branches);
  const recursion = interceptTimeRecursion(
    branches.map((branch) => branch.slowness),
    branches.map((branch) => branch.intercept),
    branches.map((branch) => branch.slownessVariance),
  );
  return layerDepthsFromThicknesses(
    'intercept-time',
    recursion.thicknesses,
    recursion.jacobian,
    branchParameterCovariance(branches),
    recursion.notes,
  );
}
