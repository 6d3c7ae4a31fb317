import { describe, expect, it } from 'vitest';
import { branchParameterCovariance, chainJacobians, cumulativeRows, layerDepthsFromThicknesses } from '../../lib/depth/propagate.js';
import { interceptTimeRecursion } from '../../lib/depth/intercept-time.js';
import { crossoverDistanceDepths } from '../../lib/depth/crossover-distance.js';

describe('propagate: J·Σ·Jᵀ helpers shared by the depth methods', () => {
  it('branchParameterCovariance lays out one 2×2 block per branch in the order (s_1, τ_1, s_2, τ_2)', () => {
    const covariance = branchParameterCovariance([
      { slowness: 1, intercept: 0, slownessVariance: 1, interceptVariance: 2, covariance: 3 },
      { slowness: 1, intercept: 0, slownessVariance: 4, interceptVariance: 5, covariance: 6 },
    ]);
    expect(covariance).toEqual([
      [1, 3, 0, 0],
      [3, 2, 0, 0],
      [0, 0, 4, 6],
      [0, 0, 6, 5],
    ]);
  });

  it('cumulativeRows sums rows 1…k into row k (depths from thicknesses)', () => {
    expect(cumulativeRows([[1, 2], [3, 4], [5, 6]])).toEqual([[1, 2], [4, 6], [9, 12]]);
    expect(cumulativeRows([])).toEqual([]);
  });

  it('layerDepthsFromThicknesses gives C_z = L·C_h·Lᵀ and SE = √diag', () => {
    // Two thicknesses driven by two independent inputs of variance 4 and 9: C_h = diag(4, 9).
    const result = layerDepthsFromThicknesses('intercept-time', [3, 5], [[1, 0], [0, 1]], [[4, 0], [0, 9]], []);
    expect(result.depths).toEqual([3, 8]);
    expect(result.thicknessSE).toEqual([2, 3]);
    expect(result.depthCovariance).toEqual([[4, 4], [4, 13]]);
    expect(result.depthSE[1]).toBe(Math.sqrt(13));
  });

  it('layerDepthsFromThicknesses turns a diagonal rounded below zero into SE 0, not NaN', () => {
    const result = layerDepthsFromThicknesses('intercept-time', [3], [[1]], [[-1e-30]], []);
    expect(result.thicknessSE).toEqual([0]);
    expect(result.depthSE).toEqual([0]);
  });

  it('layerDepthsFromThicknesses throws when the shapes do not match', () => {
    expect(() => layerDepthsFromThicknesses('intercept-time', [3, 4], [[1]], [[1]], [])).toThrow(/2 thicknesses but 1 Jacobian rows/);
    expect(() => layerDepthsFromThicknesses('intercept-time', [3], [[1, 0]], [[1]], [])).toThrow(/row 1 has 2 columns for 1 inputs/);
  });

  it('chainJacobians multiplies ∂h/∂θ by ∂θ/∂u and gives [] for no rows', () => {
    expect(chainJacobians([[1, 2]], [[3, 0], [0, 4]])).toEqual([[3, 8]]);
    expect(chainJacobians([], [[1]])).toEqual([]);
  });

  it('crossoverDistanceDepths with the direct wave alone gives empty arrays', () => {
    expect(crossoverDistanceDepths([{ slowness: 1 / 400, variance: 0 }], [])).toMatchObject({ thicknesses: [], depths: [], jacobian: [], notes: [] });
  });

  it('interceptTimeRecursion throws when the vectors differ in length or are empty', () => {
    expect(() => interceptTimeRecursion([1 / 400, 1 / 1600], [0], [0, 0])).toThrow(/2 slownesses, 1 intercepts and 2 variances/);
    expect(() => interceptTimeRecursion([], [], [])).toThrow(/no branches given/);
  });
});
