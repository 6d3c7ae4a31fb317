/**
 * First-order propagation of uncertainty from branch parameters to layer thicknesses and depths
 * (the delta method with correlated inputs, JCGM2008 §5.2): C_out = J·Σ_in·Jᵀ.
 *
 * Used by both horizontal-layer depth methods, so that their covariances are formed one way:
 * the intercept-time method (inputs θ = (s_1, τ_1, …, s_N, τ_N), Σ_θ block-diagonal with one 2×2
 * block per independently fitted branch, the slope–intercept covariance kept) and the
 * crossover-distance method (its own inputs, documented there).
 *
 * Depths are cumulative thicknesses, z_k = h_1 + … + h_k, so C_z = L·C_h·Lᵀ with L the lower
 * triangle of ones, and ∂z/∂θ = L·∂h/∂θ.
 *
 * Edges: standard errors are √max(0, C_kk), so a diagonal that rounding leaves at −1e−30 gives 0,
 * not NaN; an empty thickness list gives empty arrays. Shapes that do not match throw.
 */
import type { BranchParameters, DepthMethod, DepthNote, LayerDepths } from './types.js';
import { multiply, sandwich, zeros, type Matrix } from '../stats/small-matrix.js';

/**
 * Σ_θ for θ = (s_1, τ_1, s_2, τ_2, …, s_N, τ_N): block-diagonal, block n = [[Var s_n, Cov],
 * [Cov, Var τ_n]] (independent branch fits, the within-branch covariance never dropped).
 *
 * @example
 * branchParameterCovariance([{ slowness: 2e-3, intercept: 0, slownessVariance: 4.7e-11, interceptVariance: 0, covariance: 0 }]);
 * // [[4.7e-11, 0], [0, 0]]
 */
export function branchParameterCovariance(branches: readonly BranchParameters[]): number[][] {
  const covariance = zeros(2 * branches.length, 2 * branches.length);
  branches.forEach((branch, index) => {
    const slownessRow = covariance[2 * index];
    const interceptRow = covariance[2 * index + 1];
    if (slownessRow === undefined || interceptRow === undefined) return;
    slownessRow[2 * index] = branch.slownessVariance;
    slownessRow[2 * index + 1] = branch.covariance;
    interceptRow[2 * index] = branch.covariance;
    interceptRow[2 * index + 1] = branch.interceptVariance;
  });
  return covariance;
}

/** L·M with L the lower triangle of ones: row k becomes the sum of rows 1…k (cumulative rows). */
export function cumulativeRows(matrix: Matrix): number[][] {
  const running = new Array<number>(matrix[0]?.length ?? 0).fill(0);
  return matrix.map((row) => {
    row.forEach((value, column) => {
      running[column] = (running[column] ?? 0) + value;
    });
    return [...running];
  });
}

function standardErrors(covariance: Matrix): number[] {
  return covariance.map((row, index) => Math.sqrt(Math.max(0, row[index] ?? Number.NaN)));
}

/**
 * Assemble a `LayerDepths` from thicknesses h_1…h_K, their Jacobian ∂h/∂(inputs) (K rows, one
 * column per input) and the inputs' covariance: C_h = J·Σ·Jᵀ, z_k = Σ_{i≤k} h_i, C_z = L·C_h·Lᵀ.
 */
export function layerDepthsFromThicknesses(
  method: DepthMethod,
  thicknesses: readonly number[],
  jacobian: Matrix,
  inputCovariance: Matrix,
  notes: readonly DepthNote[],
): LayerDepths {
  if (jacobian.length !== thicknesses.length) {
    throw new RangeError(`layerDepthsFromThicknesses: ${thicknesses.length} thicknesses but ${jacobian.length} Jacobian rows`);
  }
  const inputCount = inputCovariance.length;
  jacobian.forEach((row, index) => {
    if (row.length !== inputCount) {
      throw new RangeError(`layerDepthsFromThicknesses: Jacobian row ${index + 1} has ${row.length} columns for ${inputCount} inputs`);
    }
  });
  const thicknessCovariance = thicknesses.length === 0 ? [] : sandwich(jacobian, inputCovariance);
  const depthJacobian = cumulativeRows(jacobian);
  const depthCovariance = thicknesses.length === 0 ? [] : sandwich(depthJacobian, inputCovariance);
  const depths = cumulativeRows(thicknesses.map((thickness) => [thickness])).map((row) => row[0] ?? Number.NaN);
  return {
    method,
    thicknesses: [...thicknesses],
    thicknessSE: standardErrors(thicknessCovariance),
    depths,
    depthSE: standardErrors(depthCovariance),
    thicknessCovariance,
    depthCovariance,
    jacobian: jacobian.map((row) => [...row]),
    notes: [...notes],
  };
}

/** Chain rule for Jacobians: ∂h/∂u = ∂h/∂θ · ∂θ/∂u (shapes K×M and M×P give K×P). */
export function chainJacobians(outer: Matrix, inner: Matrix): number[][] {
  if (outer.length === 0) return [];
  return multiply(outer, inner);
}
