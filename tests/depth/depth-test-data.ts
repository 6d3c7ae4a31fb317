/**
 * Test data shared by the depth tests, all made from stated models by the ray-geometry oracle
 * (not by the intercept formula under test).
 */
import fc from 'fast-check';
import { expect } from 'vitest';
import { firstArrivalByRays, interceptByRays } from '../oracles/ray-geometry.js';
import type { BranchParameters, LayerDepths } from '../../lib/depth/types.js';
import { numpyLineFits, type PickBranch } from './numpy-fits.js';

/** Noise-free first arrivals at `offsets`, grouped by the branch the ray oracle says arrives first. */
export function picksByBranch(velocities: readonly number[], thicknesses: readonly number[], offsets: readonly number[]): PickBranch[] {
  const groups = new Map<number, { offsets: number[]; times: number[] }>();
  for (const offset of offsets) {
    const { time, branch } = firstArrivalByRays(velocities, thicknesses, offset);
    const group = groups.get(branch) ?? { offsets: [], times: [] };
    group.offsets.push(offset);
    group.times.push(time);
    groups.set(branch, group);
  }
  return [...groups.entries()]
    .sort(([a], [b]) => a - b)
    .map(([branch, group]) => ({ ...group, throughOrigin: branch === 1 }));
}

/**
 * METHODS.md check case 2.1: model 1.1 (400/1600/3500 m/s, 4 m, 10 m), receivers 5, 10, …, 120 m,
 * noise-free; the direct wave fitted through the origin, the head waves free (numpy fits).
 */
export function case21(): { picks: PickBranch[]; fits: BranchParameters[] } {
  const offsets = Array.from({ length: 24 }, (_, index) => 5 * (index + 1));
  const picks = picksByBranch([400, 1600, 3500], [4, 10], offsets);
  return { picks, fits: numpyLineFits(picks) };
}

/** Exact branch parameters (zero variances) of a stack, intercepts from the ray oracle. */
export function exactBranches(velocities: readonly number[], thicknesses: readonly number[]): BranchParameters[] {
  return velocities.map((velocity, index) => ({
    slowness: 1 / velocity,
    intercept: interceptByRays(velocities, thicknesses, index + 1) ?? Number.NaN,
    slownessVariance: 0,
    interceptVariance: 0,
    covariance: 0,
  }));
}

/** Random stacks of 2–5 layers with velocities increasing downwards by 10 % to 3×. */
export const increasingStack = fc
  .record({
    top: fc.double({ min: 200, max: 2000, noNaN: true }),
    factors: fc.array(fc.double({ min: 1.1, max: 3, noNaN: true }), { minLength: 1, maxLength: 4 }),
    thicknesses: fc.array(fc.double({ min: 1, max: 40, noNaN: true }), { minLength: 4, maxLength: 4 }),
  })
  .map(({ top, factors, thicknesses }) => {
    const velocities = [top];
    for (const factor of factors) velocities.push((velocities[velocities.length - 1] ?? top) * factor);
    return { velocities, thicknesses: thicknesses.slice(0, velocities.length - 1) };
  });

/** Relative step of the central differences (METHODS §3: test the Jacobian with relative step 1e-6). */
export const FINITE_DIFFERENCE_STEP = 1e-6;
/**
 * Central differences with relative step 1e-6 err by ~1e-12 (truncation, step²) plus
 * ~1e-16/1e-6 = 1e-10 (rounding) of the thicknesses; 1e-7 of the largest thickness leaves margin.
 */
export const FINITE_DIFFERENCE_TOLERANCE = 1e-7;

/**
 * Central-difference Jacobian of `evaluate` at `point`: column j from steps ±step_j, step_j =
 * relativeStep·|point_j| (or relativeStep·fallbackScale_j when point_j = 0).
 */
export function centralDifferences(
  evaluate: (point: readonly number[]) => readonly number[],
  point: readonly number[],
  relativeStep: number,
  fallbackScale: readonly number[],
): number[][] {
  const columns = point.map((value, column) => {
    const step = relativeStep * (value !== 0 ? Math.abs(value) : (fallbackScale[column] ?? 1));
    const plus = [...point];
    const minus = [...point];
    plus[column] = value + step;
    minus[column] = value - step;
    const above = evaluate(plus);
    const below = evaluate(minus);
    return above.map((entry, row) => (entry - (below[row] ?? Number.NaN)) / (2 * step));
  });
  const rows = columns[0]?.length ?? 0;
  return Array.from({ length: rows }, (_, row) => columns.map((column) => column[row] ?? Number.NaN));
}

/**
 * Assert that an analytic Jacobian equals central differences of `evaluate` at `point`: the
 * sensitivities to a relative change of each input (metres) agree to 1e-7 of `scale`.
 */
export function expectJacobianMatchesDifferences(
  analytic: readonly (readonly number[])[],
  evaluate: (point: readonly number[]) => readonly number[],
  point: readonly number[],
  fallbackScale: readonly number[],
  scale: number,
): void {
  const numeric = centralDifferences(evaluate, point, FINITE_DIFFERENCE_STEP, fallbackScale);
  expect(analytic).toHaveLength(numeric.length);
  analytic.forEach((row, rowIndex) => {
    expect(row).toHaveLength(point.length);
    row.forEach((value, column) => {
      const magnitude = Math.abs(point[column] ?? 0) || (fallbackScale[column] ?? 1);
      const difference = Math.abs(value - (numeric[rowIndex]?.[column] ?? Number.NaN)) * magnitude;
      expect(difference, `row ${rowIndex + 1}, column ${column + 1}`).toBeLessThanOrEqual(FINITE_DIFFERENCE_TOLERANCE * scale);
    });
  });
}

/** A bare `LayerDepths` holding only depths and their SEs, for the comparison tests. */
export function layerDepthsOf(depths: number[], depthSE: number[]): LayerDepths {
  return {
    method: 'intercept-time',
    thicknesses: depths,
    thicknessSE: depthSE,
    depths,
    depthSE,
    thicknessCovariance: [],
    depthCovariance: [],
    jacobian: [],
    notes: [],
  };
}
