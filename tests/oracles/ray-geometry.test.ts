import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  branchTimeByRays,
  criticalDistanceByRays,
  crossoverByRays,
  firstArrivalByRays,
  interceptByRays,
  scanFirstArrivals,
} from './ray-geometry.js';
import { branchTime, criticalDistance, firstArrival, headWaveIntercept } from '../../lib/model/layered-model.js';
import { expectWithin } from '../helpers/expect-within.js';
import { CASE_1_1, ROUNDING_DISTANCE, ROUNDING_TIME } from '../model/check-case-1-1.js';

/** Oracle twin tolerance: the two forward models must agree to 1e-12 s (the project requirement); double rounding of sub-second times is ~1e-16 s, so this leaves room for cancellation near critical angles. */
const TWIN_TIME_TOLERANCE = 1e-12;
/** Same, for distances of at most a few hundred metres. */
const TWIN_DISTANCE_TOLERANCE = 1e-10;
const SEED = 20240611;

const { velocities, thicknesses } = CASE_1_1;

describe('ray-geometry oracle: METHODS.md check case 1.1', () => {
  it('interceptByRays gives τ_2 and τ_3 of case 1.1', () => {
    expectWithin(interceptByRays(velocities, thicknesses, 2) ?? Number.NaN, CASE_1_1.intercepts[2], ROUNDING_TIME, `${CASE_1_1.source}: τ_2`);
    expectWithin(interceptByRays(velocities, thicknesses, 3) ?? Number.NaN, CASE_1_1.intercepts[3], ROUNDING_TIME, `${CASE_1_1.source}: τ_3`);
  });

  it('criticalDistanceByRays gives x*_2 and x*_3 of case 1.1', () => {
    expectWithin(criticalDistanceByRays(velocities, thicknesses, 2) ?? Number.NaN, CASE_1_1.criticalDistances[2], ROUNDING_DISTANCE, `${CASE_1_1.source}: x*_2`);
    expectWithin(criticalDistanceByRays(velocities, thicknesses, 3) ?? Number.NaN, CASE_1_1.criticalDistances[3], ROUNDING_DISTANCE, `${CASE_1_1.source}: x*_3`);
  });

  it('crossoverByRays finds x_c1 and x_c2 of case 1.1 by bisection on ray times', () => {
    expectWithin(crossoverByRays(velocities, thicknesses, 1, 2, 3, 30), CASE_1_1.crossovers[1], ROUNDING_DISTANCE, `${CASE_1_1.source}: x_c1`);
    expectWithin(crossoverByRays(velocities, thicknesses, 2, 3, 12, 80), CASE_1_1.crossovers[2], ROUNDING_DISTANCE, `${CASE_1_1.source}: x_c2`);
  });

  it('firstArrivalByRays gives the times and branches of case 1.1 at 10, 30, 60 and 100 m', () => {
    for (const expected of CASE_1_1.firstArrivals) {
      const arrival = firstArrivalByRays(velocities, thicknesses, expected.offset);
      expectWithin(arrival.time, expected.time, ROUNDING_TIME, `${CASE_1_1.source}: t(${expected.offset} m)`);
      expect(arrival.branch).toBe(expected.branch);
    }
    expect(branchTimeByRays(velocities, thicknesses, 3, 10)).toBeNull();
  });

  it('scanFirstArrivals on case 1.1 shows direct, branch 2, branch 3 with changes at the crossovers', () => {
    const runs = scanFirstArrivals(velocities, thicknesses, 120, 0.001);
    expect(runs.map((run) => run.branch)).toEqual([1, 2, 3]);
    expectWithin(runs[1]?.from ?? Number.NaN, CASE_1_1.crossovers[1], 0.001, `${CASE_1_1.source}: x_c1 on a 1 mm scan`);
    expectWithin(runs[2]?.from ?? Number.NaN, CASE_1_1.crossovers[2], 0.001, `${CASE_1_1.source}: x_c2 on a 1 mm scan`);
  });
});

/** Random stacks of 1–5 layers; velocities may decrease downwards (impossible branches). */
const stackArbitrary = fc
  .record({
    top: fc.double({ min: 200, max: 2000, noNaN: true }),
    factors: fc.array(fc.oneof(fc.double({ min: 0.4, max: 0.95, noNaN: true }), fc.double({ min: 1.05, max: 3, noNaN: true })), {
      minLength: 0,
      maxLength: 4,
    }),
    thicknesses: fc.array(fc.double({ min: 0.5, max: 50, noNaN: true }), { minLength: 4, maxLength: 4 }),
    offsets: fc.array(fc.double({ min: 0, max: 400, noNaN: true }), { minLength: 10, maxLength: 10 }),
  })
  .map(({ top, factors, thicknesses: allThicknesses, offsets }) => {
    const stack = [top];
    for (const factor of factors) stack.push((stack[stack.length - 1] ?? top) * factor);
    return { velocities: stack, thicknesses: allThicknesses.slice(0, stack.length - 1), offsets };
  });

describe('oracle twin: lib/model against explicit ray geometry on random stacks', () => {
  it('firstArrival and firstArrivalByRays agree to 1e-12 s on random models and offsets (seeded)', () => {
    fc.assert(
      fc.property(stackArbitrary, ({ velocities: stackVelocities, thicknesses: stackThicknesses, offsets }) => {
        const model = { velocities: stackVelocities, thicknesses: stackThicknesses };
        const grid = [...offsets, ...Array.from({ length: 41 }, (_, index) => index * 7.3)];
        for (const offset of grid) {
          const production = firstArrival(model, offset);
          const oracle = firstArrivalByRays(stackVelocities, stackThicknesses, offset);
          expect(Math.abs(production.time - oracle.time)).toBeLessThanOrEqual(TWIN_TIME_TOLERANCE);
          if (production.branch !== oracle.branch) {
            // Only a tie within the tolerance may name different branches.
            const other = branchTime(model, oracle.branch, offset) ?? Number.POSITIVE_INFINITY;
            expect(Math.abs(other - production.time)).toBeLessThanOrEqual(TWIN_TIME_TOLERANCE);
          }
        }
      }),
      { seed: SEED, numRuns: 300 },
    );
  });

  it('headWaveIntercept, criticalDistance and branchTime agree with the ray oracle branch by branch (seeded)', () => {
    fc.assert(
      fc.property(stackArbitrary, ({ velocities: stackVelocities, thicknesses: stackThicknesses, offsets }) => {
        const model = { velocities: stackVelocities, thicknesses: stackThicknesses };
        for (let branch = 1; branch <= stackVelocities.length; branch += 1) {
          const intercept = headWaveIntercept(model, branch);
          const rayIntercept = interceptByRays(stackVelocities, stackThicknesses, branch);
          expect(intercept === null).toBe(rayIntercept === null);
          if (intercept !== null && rayIntercept !== null) {
            expect(Math.abs(intercept - rayIntercept)).toBeLessThanOrEqual(TWIN_TIME_TOLERANCE);
            const critical = criticalDistance(model, branch) ?? Number.NaN;
            const rayCritical = criticalDistanceByRays(stackVelocities, stackThicknesses, branch) ?? Number.NaN;
            expect(Math.abs(critical - rayCritical)).toBeLessThanOrEqual(TWIN_DISTANCE_TOLERANCE * Math.max(1, rayCritical));
          }
          for (const offset of offsets) {
            const time = branchTime(model, branch, offset);
            const rayTime = branchTimeByRays(stackVelocities, stackThicknesses, branch, offset);
            expect(time === null).toBe(rayTime === null);
            if (time !== null && rayTime !== null) expect(Math.abs(time - rayTime)).toBeLessThanOrEqual(TWIN_TIME_TOLERANCE);
          }
        }
      }),
      { seed: SEED + 1, numRuns: 300 },
    );
  });
});
