import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { interceptTimeDepths } from '../../lib/depth/intercept-time.js';
import type { BranchParameters } from '../../lib/depth/types.js';
import { interceptByRays } from '../oracles/ray-geometry.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';
import { CASE_3_1, CASE_3_3 } from './check-cases.js';
import { case21, exactBranches, expectJacobianMatchesDifferences, increasingStack } from './depth-test-data.js';
import { numpyLineFits } from './numpy-fits.js';

/** METHODS.md 2.1: "the standard two-layer relations hold to 1e-9 relative" on exact data. */
const EXACT_RELATIVE = 1e-9;
/** Half a unit in the last printed digit of the check-case values. */
const HALF_4DP = 0.5e-4;
const HALF_3DP = 0.5e-3;
const HALF_2DP = 0.5e-2;
const SEED = 918273;

function withVariances(branch: BranchParameters, slownessSE: number, interceptSE: number, correlation: number): BranchParameters {
  return {
    ...branch,
    slownessVariance: slownessSE ** 2,
    interceptVariance: interceptSE ** 2,
    covariance: correlation * slownessSE * interceptSE,
  };
}

describe('interceptTimeDepths: METHODS.md check cases', () => {
  it('interceptTimeDepths recovers h = 4 m and 10 m from numpy fits of the noise-free case 2.1 picks (1e-9 relative)', () => {
    const { picks, fits } = case21();
    expect(picks.map((branch) => branch.offsets.length), 'METHODS.md check case 2.1: branches hold 2, 4, 18 picks').toEqual([2, 4, 18]);
    expectWithin(fits[1]?.intercept ?? Number.NaN, 19.36492e-3, 0.5e-8, 'METHODS.md check case 2.1 (computed from the stated model): τ_2');
    expectWithin(fits[2]?.intercept ?? Number.NaN, 30.98637e-3, 0.5e-8, 'METHODS.md check case 2.1 (computed from the stated model): τ_3');
    const result = interceptTimeDepths(fits);
    expectRelative(result.thicknesses[0] ?? Number.NaN, 4, EXACT_RELATIVE, 'METHODS.md check case 2.1 (computed from the stated model): h_1');
    expectRelative(result.thicknesses[1] ?? Number.NaN, 10, EXACT_RELATIVE, 'METHODS.md check case 2.1 (computed from the stated model): h_2');
    expect(result.depths).toHaveLength(2);
    expectRelative(result.depths[1] ?? Number.NaN, 14, EXACT_RELATIVE, 'METHODS.md check case 2.1: z_2 = h_1 + h_2');
  });

  it('interceptTimeDepths matches the two-layer closed form h = τ·V1·V2/(2√(V2²−V1²)) on case 2.2 (1e-9 relative)', () => {
    const velocities = [500, 2000];
    const intercept = interceptByRays(velocities, [8], 2) ?? Number.NaN;
    expectWithin(intercept, 30.9839e-3, HALF_4DP * 1e-3, 'METHODS.md check case 2.2 (computed from the stated model): τ_2');
    const closedForm = (intercept * 500 * 2000) / (2 * Math.sqrt(2000 ** 2 - 500 ** 2));
    const result = interceptTimeDepths(exactBranches(velocities, [8]));
    expectRelative(result.thicknesses[0] ?? Number.NaN, closedForm, EXACT_RELATIVE, 'METHODS.md §2 two-layer intercept-time closed form');
    expectRelative(result.thicknesses[0] ?? Number.NaN, 8, EXACT_RELATIVE, 'METHODS.md check case 2.2 (computed from the stated model): h = 8 m');
  });

  it('interceptTimeDepths gives h, its Jacobian and SE(h) of case 3.1 from numpy fits of the stated picks', () => {
    const [direct, refracted] = numpyLineFits([
      { offsets: CASE_3_1.direct.offsets, times: CASE_3_1.direct.timesMs.map((ms) => ms / 1000), throughOrigin: true },
      { offsets: CASE_3_1.refracted.offsets, times: CASE_3_1.refracted.timesMs.map((ms) => ms / 1000), throughOrigin: false },
    ]);
    if (direct === undefined || refracted === undefined) throw new Error('numpy returned too few fits');
    // The copy of the picks is right: the fits are those of METHODS 3.1.
    expectWithin(1 / direct.slowness, CASE_3_1.directVelocity, HALF_3DP, `${CASE_3_1.source}: V_1`);
    expectWithin(1 / refracted.slowness, CASE_3_1.refractorVelocity, HALF_3DP, `${CASE_3_1.source}: V_2`);
    expectWithin(refracted.intercept * 1000, CASE_3_1.interceptMs, HALF_4DP, `${CASE_3_1.source}: τ (ms)`);

    const result = interceptTimeDepths([direct, refracted]);
    expectWithin(result.thicknesses[0] ?? Number.NaN, CASE_3_1.thickness, HALF_4DP, `${CASE_3_1.source}: h`);
    const row = result.jacobian[0] ?? [];
    expect(row).toHaveLength(4); // θ = (s_1, τ_1, s_2, τ_2)
    expectWithin(row[0] ?? Number.NaN, CASE_3_1.jacobian.directSlowness, HALF_2DP, `${CASE_3_1.source}: ∂h/∂s_1`);
    expect(row[1], 'the recursion does not use τ_1').toBe(0);
    expectWithin(row[2] ?? Number.NaN, CASE_3_1.jacobian.refractorSlowness, HALF_2DP, `${CASE_3_1.source}: ∂h/∂s_2`);
    expectWithin(row[3] ?? Number.NaN, CASE_3_1.jacobian.intercept, HALF_3DP, `${CASE_3_1.source}: ∂h/∂τ`);
    expectWithin(result.thicknessSE[0] ?? Number.NaN, CASE_3_1.thicknessSE, HALF_4DP, `${CASE_3_1.source}: SE(h) with the covariance`);
    expectWithin(result.depthSE[0] ?? Number.NaN, CASE_3_1.thicknessSE, HALF_4DP, `${CASE_3_1.source}: SE(z_1) = SE(h_1)`);

    const dropped = interceptTimeDepths([direct, { ...refracted, covariance: 0 }]);
    expectWithin(dropped.thicknessSE[0] ?? Number.NaN, CASE_3_1.thicknessSEWithoutCovariance, HALF_4DP, `${CASE_3_1.source}: SE(h), covariance wrongly dropped`);
    // Dropping the slope–intercept covariance overstates SE(h) by about 8 %: it matters.
    expect((dropped.thicknessSE[0] ?? 0) / (result.thicknessSE[0] ?? 1)).toBeGreaterThan(1.05);
  });

  it('interceptTimeDepths gives SE(h_1), SE(h_2), their correlation and SE(z_2) of case 3.3', () => {
    const exact = exactBranches([400, 1600, 3500], [4, 10]);
    const branches = exact.map((branch, index) =>
      withVariances(branch, CASE_3_3.relativeSlownessSE * branch.slowness, index === 0 ? 0 : CASE_3_3.interceptSE, index === 0 ? 0 : CASE_3_3.correlation),
    );
    const result = interceptTimeDepths(branches);
    expectWithin(result.thicknessSE[0] ?? Number.NaN, CASE_3_3.thicknessSE[0], HALF_4DP, `${CASE_3_3.source}: SE(h_1)`);
    expectWithin(result.thicknessSE[1] ?? Number.NaN, CASE_3_3.thicknessSE[1], HALF_4DP, `${CASE_3_3.source}: SE(h_2)`);
    const covariance = result.thicknessCovariance[0]?.[1] ?? Number.NaN;
    const correlation = covariance / ((result.thicknessSE[0] ?? Number.NaN) * (result.thicknessSE[1] ?? Number.NaN));
    expectWithin(correlation, CASE_3_3.thicknessCorrelation, HALF_3DP, `${CASE_3_3.source}: corr(h_1, h_2)`);
    expectWithin(result.depthSE[1] ?? Number.NaN, CASE_3_3.depthSE2, HALF_3DP, `${CASE_3_3.source}: SE(z_2) from the full covariance`);
    expect(result.thicknessCovariance[1]?.[0]).toBe(covariance);
    expectWithin(result.depthCovariance[0]?.[0] ?? Number.NaN, (result.thicknessSE[0] ?? Number.NaN) ** 2, 1e-18, 'C_z[1,1] = C_h[1,1]');
  });

  it('interceptTimeDepths reads the 9.3 velocity inversion as two layers and overestimates the depth by 38.2 %', () => {
    // 800 m/s (4 m) over 500 m/s (6 m) over 3000 m/s: the 500 m/s layer gives no branch.
    const intercept = interceptByRays([800, 500, 3000], [4, 6], 3) ?? Number.NaN;
    expectWithin(intercept, 33.30221e-3, 0.5e-8, 'METHODS.md check case 9.3 (computed from the stated model): intercept');
    const read = interceptTimeDepths([
      { slowness: 1 / 800, intercept: 0, slownessVariance: 0, interceptVariance: 0, covariance: 0 },
      { slowness: 1 / 3000, intercept, slownessVariance: 0, interceptVariance: 0, covariance: 0 },
    ]);
    expectWithin(read.depths[0] ?? Number.NaN, 13.821, HALF_3DP, 'METHODS.md check case 9.3 (computed from the stated model): two-layer depth');
    expectWithin(((read.depths[0] ?? Number.NaN) - 10) / 10, 0.382, 0.5e-3, 'METHODS.md check case 9.3: +38.2 % against the true 10 m');
  });
});

describe('interceptTimeDepths: Jacobian against central differences', () => {
  it('interceptTimeDepths Jacobian equals central differences (relative step 1e-6) on random N = 2…5 stacks (seeded)', () => {
    fc.assert(
      fc.property(increasingStack, ({ velocities, thicknesses }) => {
        const exact = exactBranches(velocities, thicknesses);
        const theta = exact.flatMap((branch) => [branch.slowness, branch.intercept]);
        const evaluate = (point: readonly number[]): number[] =>
          interceptTimeDepths(
            exact.map((_, index) => ({
              slowness: point[2 * index] ?? Number.NaN,
              intercept: point[2 * index + 1] ?? Number.NaN,
              slownessVariance: 0,
              interceptVariance: 0,
              covariance: 0,
            })),
          ).thicknesses.map(Number);
        const fallback = theta.map(() => Math.max(...theta.filter((_, column) => column % 2 === 1)));
        expectJacobianMatchesDifferences(interceptTimeDepths(exact).jacobian, evaluate, theta, fallback, Math.max(...thicknesses));
      }),
      { seed: SEED, numRuns: 60 },
    );
  });
});

describe('interceptTimeDepths: edges stated in the doc comment', () => {
  const layer = (velocity: number, intercept: number, slownessVariance = 0): BranchParameters => ({
    slowness: 1 / velocity,
    intercept,
    slownessVariance,
    interceptVariance: 0,
    covariance: 0,
  });

  it('interceptTimeDepths stops the stack at a branch not faster than the one above and notes velocity-not-increasing', () => {
    const result = interceptTimeDepths([layer(400, 0), layer(1600, 0.02), layer(1200, 0.03), layer(3000, 0.04)]);
    expect(result.thicknesses).toHaveLength(1);
    expect(result.jacobian).toHaveLength(1);
    expect(result.depthCovariance).toHaveLength(1);
    expect(result.notes.map((note) => [note.code, note.layer])).toEqual([['velocity-not-increasing', 3]]);
    expect(result.notes[0]?.message).toMatch(/branch 3 .* is not faster than branch 2/);
    expect(result.thicknesses.every(Number.isFinite)).toBe(true);
  });

  it('interceptTimeDepths notes a non-positive intercept and a non-positive thickness but keeps the value', () => {
    const result = interceptTimeDepths([layer(400, 0), layer(1600, -0.001)]);
    expect(result.thicknesses[0]).toBeLessThan(0);
    expect(result.notes.map((note) => [note.code, note.layer])).toEqual([
      ['intercept-not-positive', 1],
      ['thickness-not-positive', 1],
    ]);
  });

  it('interceptTimeDepths keeps recursing below a non-positive thickness', () => {
    // τ_3 far too small for the 4 m above it: h_2 < 0, and the stack goes on to h_3.
    const exact = exactBranches([400, 1600, 3500, 6000], [4, 10, 20]);
    const branches = exact.map((branch, index) => (index === 2 ? { ...branch, intercept: 0.002 } : branch));
    const result = interceptTimeDepths(branches);
    expect(result.thicknesses).toHaveLength(3);
    expect(result.thicknesses[1]).toBeLessThan(0);
    expect(result.notes.map((note) => [note.code, note.layer])).toEqual([['thickness-not-positive', 2]]);
  });

  it('interceptTimeDepths notes depth-ill-conditioned when s_{n−1} − s_n < 3 SE', () => {
    const separation = 1 / 1000 - 1 / 1100;
    const seDifferenceBelowThree = separation / 2.9 / Math.SQRT2; // each branch's SE, so the difference has SE = separation/2.9
    const seDifferenceAboveThree = separation / 3.1 / Math.SQRT2;
    const ill = interceptTimeDepths([layer(1000, 0, seDifferenceBelowThree ** 2), layer(1100, 0.01, seDifferenceBelowThree ** 2)]);
    expect(ill.notes.map((note) => note.code)).toEqual(['depth-ill-conditioned']);
    const fine = interceptTimeDepths([layer(1000, 0, seDifferenceAboveThree ** 2), layer(1100, 0.01, seDifferenceAboveThree ** 2)]);
    expect(fine.notes).toEqual([]);
  });

  it('interceptTimeDepths gives empty arrays for the direct wave alone', () => {
    const result = interceptTimeDepths([layer(400, 0)]);
    expect(result).toMatchObject({ method: 'intercept-time', thicknesses: [], depths: [], jacobian: [], notes: [] });
  });

  it('interceptTimeDepths throws with a message on misuse', () => {
    expect(() => interceptTimeDepths([])).toThrow(/no branches given/);
    expect(() => interceptTimeDepths([layer(400, 0), { ...layer(1600, 0.02), slowness: -1 }])).toThrow(/branch 2: slowness must be positive/);
    expect(() => interceptTimeDepths([layer(400, 0), { ...layer(1600, 0.02), intercept: Number.NaN }])).toThrow(/branch 2: intercept must be a finite number/);
    expect(() => interceptTimeDepths([layer(400, 0), { ...layer(1600, 0.02), interceptVariance: -1 }])).toThrow(/variances must not be negative/);
  });

  it('interceptTimeDepths does not change its input', () => {
    const branches = Object.freeze([Object.freeze(layer(400, 0)), Object.freeze(layer(1600, 0.02))]);
    expect(() => interceptTimeDepths(branches)).not.toThrow();
  });
});
