/**
 * Residual bootstrap of depths (Efron 1979; Efron & Tibshirani 1993) on METHODS.md check case 3.1
 * (stated data; its bootstrap figures were computed from that data with numpy, not published):
 * SE(h) ≈ 0.084 ± 0.004 m and a 95 % interval ≈ [7.845, 8.170] m, against the propagated 0.0842 m.
 */
import { describe, expect, it } from 'vitest';
import { bootstrapInterceptTimeDepths } from '../../lib/depth/bootstrap.js';
import { fitLine } from '../../lib/branches/line-fit.js';
import { interceptTimeDepths } from '../../lib/depth/intercept-time.js';
import { branchParameters } from '../../lib/interpretation/branch-parameters.js';
import { DIRECT_OFFSETS, DIRECT_TIMES, REFRACTED_OFFSETS, REFRACTED_TIMES } from '../branches/check-case-data.js';
import { expectWithin } from '../helpers/expect-within.js';

const CASE_3_1 = 'METHODS.md check case 3.1 (bootstrap computed from the stated data, not published)';
/** The check case quotes the bootstrap SE as 0.084 ± 0.004 (its own Monte-Carlo spread). */
const SE_TOLERANCE = 0.004;
/** Percentile ends of 2000 replicates move by ~0.01 m between seeds. */
const INTERVAL_TOLERANCE = 0.02;

function fitted(offsets: readonly number[], times: readonly number[], throughOrigin: boolean) {
  const outcome = fitLine(offsets, times, null, { throughOrigin });
  if (!outcome.ok) throw new Error(outcome.message);
  return { offsets, times, sigmas: null, fit: outcome.fit };
}

describe('bootstrapInterceptTimeDepths', () => {
  const branches = [fitted(DIRECT_OFFSETS, DIRECT_TIMES, true), fitted(REFRACTED_OFFSETS, REFRACTED_TIMES, false)];

  it('gives SE(h) ≈ 0.084 m and a 95 % interval ≈ [7.845, 8.170] m on check case 3.1', () => {
    const result = bootstrapInterceptTimeDepths(branches, { replicates: 2000, seed: 31 });
    expect(result.replicates).toBe(2000);
    expect(result.droppedReplicates).toBe(0);
    const depth = result.interfaces[0]!;
    expectWithin(depth.depthSE, 0.084, SE_TOLERANCE, CASE_3_1);
    expectWithin(depth.low95, 7.845, INTERVAL_TOLERANCE, CASE_3_1);
    expectWithin(depth.high95, 8.17, INTERVAL_TOLERANCE, CASE_3_1);
    // The oracle twin: the propagated SE of the same depth (full covariance) is 0.0842 m.
    const propagated = interceptTimeDepths(branches.map((branch) => branchParameters(branch.fit)));
    expectWithin(depth.depthSE, propagated.depthSE[0]!, SE_TOLERANCE, `${CASE_3_1}: bootstrap against propagation`);
  });

  it('is reproducible from its seed and changes with it', () => {
    const first = bootstrapInterceptTimeDepths(branches, { replicates: 300, seed: 4 });
    const again = bootstrapInterceptTimeDepths(branches, { replicates: 300, seed: 4 });
    const other = bootstrapInterceptTimeDepths(branches, { replicates: 300, seed: 5 });
    expect(again).toEqual(first);
    expect(other.interfaces[0]!.depthSE).not.toBe(first.interfaces[0]!.depthSE);
  });

  it('adds no spread from branches with no residual freedom (n − p = 0): every replicate is the data', () => {
    // With sigmas, a one-pick direct wave through the origin and a two-pick head wave are exact fits.
    const weighted = (offsets: number[], times: number[], throughOrigin: boolean) => {
      const sigmas = offsets.map(() => 0.3e-3);
      const outcome = fitLine(offsets, times, sigmas, { throughOrigin });
      if (!outcome.ok) throw new Error(outcome.message);
      return { offsets, times, sigmas, fit: outcome.fit };
    };
    const exact = [weighted([10], [0.02], true), weighted([40, 60], [0.051, 0.061], false)];
    const result = bootstrapInterceptTimeDepths(exact, { replicates: 50, seed: 2 });
    const depth = interceptTimeDepths(exact.map((branch) => branchParameters(branch.fit))).depths[0]!;
    expect(result.replicates).toBe(50);
    expect(result.interfaces[0]!.depthSE).toBe(0);
    expect(result.interfaces[0]!.low95).toBeCloseTo(depth, 12);
    expect(result.interfaces[0]!.high95).toBeCloseTo(depth, 12);
  });

  it('returns no interfaces for a single branch, and refuses a non-positive replicate count', () => {
    expect(bootstrapInterceptTimeDepths([branches[0]!], { replicates: 10, seed: 1 }).interfaces).toEqual([]);
    expect(() => bootstrapInterceptTimeDepths(branches, { replicates: 0, seed: 1 })).toThrow(/replicates/);
  });

  it('drops and counts replicates whose refit makes the velocities stop increasing', () => {
    // Two nearly equal velocities: resampled slopes cross often, and those replicates are dropped.
    const slow = fitted([2, 4, 6, 8, 10, 12], [0.0041, 0.0079, 0.0122, 0.0159, 0.0201, 0.0238], true);
    const close = fitted([14, 16, 18, 20, 22, 24], [0.0279, 0.0322, 0.0358, 0.0401, 0.0442, 0.0478], false);
    const result = bootstrapInterceptTimeDepths([slow, close], { replicates: 400, seed: 9 });
    expect(result.droppedReplicates).toBeGreaterThan(0);
    expect(result.replicates + result.droppedReplicates).toBe(400);
  });
});
