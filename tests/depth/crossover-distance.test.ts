import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  crossoverDistanceDepths,
  depthOutsideBracket,
  fittedCrossovers,
  observedCrossover,
  type CrossoverReading,
} from '../../lib/depth/crossover-distance.js';
import { interceptTimeDepths } from '../../lib/depth/intercept-time.js';
import type { BranchParameters } from '../../lib/depth/types.js';
import { crossoverByRays, interceptByRays } from '../oracles/ray-geometry.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';
import { runPythonJson } from '../helpers/python.js';
import { case21, exactBranches, expectJacobianMatchesDifferences, increasingStack, layerDepthsOf } from './depth-test-data.js';

/** METHODS.md 2.1: the two methods agree on exact data to 1e-9 relative. */
const EXACT_RELATIVE = 1e-9;
/** Half a unit in the 5th decimal (METHODS 2.1 prints crossovers to 5 decimals). */
const HALF_5DP = 0.5e-5;
const HALF_4DP = 0.5e-4;
/**
 * Monte Carlo with 200 000 draws: the sample variance has a relative SE of √(2/n) ≈ 0.3 %; the
 * delta method's own error is far smaller at these SEs (0.4 % and 0.1 % on the slownesses). 2 % is > 6 SE.
 */
const MONTE_CARLO_RELATIVE = 0.02;
const SEED = 55_2_1;

function reading(distance: CrossoverReading | null): CrossoverReading {
  if (distance === null) throw new Error('expected a crossover, got parallel lines');
  return distance;
}

describe('crossoverDistanceDepths: METHODS.md check cases', () => {
  it('fittedCrossovers gives x_c1 and x_c2 of case 2.1 and crossoverDistanceDepths then equals the intercept-time depths (1e-9)', () => {
    const { fits } = case21();
    const crossovers = fittedCrossovers(fits).map(reading);
    expectWithin(crossovers[0]?.distance ?? Number.NaN, 10.32796, HALF_5DP, 'METHODS.md check case 2.1 (computed from the stated model): x_c1');
    expectWithin(crossovers[1]?.distance ?? Number.NaN, 34.25272, HALF_5DP, 'METHODS.md check case 2.1 (computed from the stated model): x_c2');
    const byCrossover = crossoverDistanceDepths(
      fits.map((fit) => ({ slowness: fit.slowness, variance: fit.slownessVariance })),
      crossovers,
    );
    const byIntercept = interceptTimeDepths(fits);
    expect(byCrossover.method).toBe('crossover-distance');
    byIntercept.thicknesses.forEach((thickness, index) =>
      expectRelative(byCrossover.thicknesses[index] ?? Number.NaN, thickness, EXACT_RELATIVE, `METHODS.md check case 2.1: h_${index + 1} by both methods`),
    );
    expectRelative(byCrossover.thicknesses[0] ?? Number.NaN, 4, EXACT_RELATIVE, 'METHODS.md check case 2.1: h_1 = 4 m');
    expectRelative(byCrossover.thicknesses[1] ?? Number.NaN, 10, EXACT_RELATIVE, 'METHODS.md check case 2.1: h_2 = 10 m');
  });

  it('crossoverDistanceDepths matches the closed form h = (x_c/2)√((V2−V1)/(V2+V1)) on case 2.2 with x_c found by ray bisection', () => {
    const crossover = crossoverByRays([500, 2000], [8], 1, 2, 5, 60);
    expectWithin(crossover, 20.6559, HALF_4DP, 'METHODS.md check case 2.2 (computed from the stated model): x_c');
    const closedForm = (crossover / 2) * Math.sqrt((2000 - 500) / (2000 + 500));
    const result = crossoverDistanceDepths([{ slowness: 1 / 500, variance: 0 }, { slowness: 1 / 2000, variance: 0 }], [{ distance: crossover, variance: 0 }]);
    expectRelative(result.thicknesses[0] ?? Number.NaN, closedForm, EXACT_RELATIVE, 'METHODS.md §2 two-layer crossover closed form');
    expectRelative(result.thicknesses[0] ?? Number.NaN, 8, EXACT_RELATIVE, 'METHODS.md check case 2.2: h = 8 m');
  });

  it('crossoverDistanceDepths gives the exact three-layer coefficient on z_1 of case 2.3 (0.8867, 0.8403, 0.7137)', () => {
    const cases = [
      { velocities: [400, 1600, 3500], coefficient: 0.8867 },
      { velocities: [500, 1500, 4000], coefficient: 0.8403 },
      { velocities: [1500, 2500, 4500], coefficient: 0.7137 },
    ];
    for (const { velocities, coefficient } of cases) {
      const slownesses = velocities.map((velocity) => ({ slowness: 1 / velocity, variance: 0 }));
      // z_2 is linear in x_c1 at fixed x_c2: the ratio of the changes of z_2 and z_1 is the coefficient.
      const depthsAt = (firstCrossover: number): readonly number[] =>
        crossoverDistanceDepths(slownesses, [{ distance: firstCrossover, variance: 0 }, { distance: 60, variance: 0 }]).depths;
      const near = depthsAt(10);
      const far = depthsAt(20);
      const ratio = ((far[1] ?? Number.NaN) - (near[1] ?? Number.NaN)) / ((far[0] ?? Number.NaN) - (near[0] ?? Number.NaN));
      expectWithin(ratio, coefficient, HALF_4DP, `METHODS.md check case 2.3 (computed from the stated model): ${velocities.join('/')} m/s`);
      const result = crossoverDistanceDepths(slownesses, [{ distance: 10, variance: 0 }, { distance: 60, variance: 0 }]);
      const jacobianRatio = 1 + (result.jacobian[1]?.[3] ?? Number.NaN) / (result.jacobian[0]?.[3] ?? Number.NaN);
      expectWithin(jacobianRatio, coefficient, HALF_4DP, `METHODS.md check case 2.3 via ∂z/∂x_c1: ${velocities.join('/')} m/s`);
    }
  });
});

describe('crossoverDistanceDepths: Jacobian and propagation', () => {
  it('crossoverDistanceDepths Jacobian over (s, x_c, τ_1) equals central differences on random N = 2…5 stacks (seeded)', () => {
    fc.assert(
      fc.property(increasingStack, ({ velocities, thicknesses }) => {
        const exact = exactBranches(velocities, thicknesses);
        const crossovers = fittedCrossovers(exact).map(reading);
        const count = velocities.length;
        const point = [...exact.map((branch) => branch.slowness), ...crossovers.map((crossover) => crossover.distance), 0];
        const evaluate = (inputs: readonly number[]): number[] =>
          crossoverDistanceDepths(
            inputs.slice(0, count).map((slowness) => ({ slowness, variance: 0 })),
            inputs.slice(count, 2 * count - 1).map((distance) => ({ distance, variance: 0 })),
            { value: inputs[2 * count - 1] ?? Number.NaN, variance: 0 },
          ).thicknesses.map(Number);
        const interceptScale = Math.max(...exact.map((branch) => branch.intercept));
        const fallback = point.map(() => interceptScale);
        const analytic = crossoverDistanceDepths(
          point.slice(0, count).map((slowness) => ({ slowness, variance: 0 })),
          crossovers,
          { value: 0, variance: 0 },
        ).jacobian;
        expectJacobianMatchesDifferences(analytic, evaluate, point, fallback, Math.max(...thicknesses));
      }),
      { seed: SEED, numRuns: 60 },
    );
  });

  it('crossoverDistanceDepths SE is the diagonal propagation: two layers, SE(h) = √((∂h/∂x_c)²Var x_c + …) with ∂h/∂x_c = ½√((V2−V1)/(V2+V1))', () => {
    const variance = 0.3 ** 2;
    const result = crossoverDistanceDepths([{ slowness: 1 / 500, variance: 0 }, { slowness: 1 / 2000, variance: 0 }], [{ distance: 20, variance }]);
    const expected = 0.5 * Math.sqrt(1500 / 2500) * 0.3; // METHODS §2 closed form differentiated by hand
    expectRelative(result.thicknessSE[0] ?? Number.NaN, expected, 1e-12, 'derivative of the METHODS.md §2 two-layer crossover closed form');
  });

  it('crossoverDistanceDepths: a direct-wave intercept shifts every intercept and enters through the last Jacobian column', () => {
    const slownesses = [{ slowness: 1 / 400, variance: 0 }, { slowness: 1 / 1600, variance: 0 }];
    const withoutDirect = crossoverDistanceDepths(slownesses, [{ distance: 10, variance: 0 }]);
    const withDirect = crossoverDistanceDepths(slownesses, [{ distance: 10, variance: 0 }], { value: 0.001, variance: (0.0002) ** 2 });
    const sensitivity = withDirect.jacobian[0]?.[3] ?? Number.NaN;
    expectRelative((withDirect.thicknesses[0] ?? 0) - (withoutDirect.thicknesses[0] ?? 0), 0.001 * sensitivity, 1e-9, 'h is linear in τ_1');
    expectRelative(withDirect.thicknessSE[0] ?? Number.NaN, 0.0002 * Math.abs(sensitivity), 1e-12, 'SE from the τ_1 variance alone');
    expect(withoutDirect.thicknessSE[0]).toBe(0);
  });

  it('fittedCrossovers variance agrees with a numpy Monte Carlo of the crossover of two correlated line fits', () => {
    const branches: BranchParameters[] = [
      { slowness: 1 / 400, intercept: 0, slownessVariance: (1e-5) ** 2, interceptVariance: 0, covariance: 0 },
      { slowness: 1 / 1600, intercept: interceptByRays([400, 1600], [4], 2) ?? Number.NaN, slownessVariance: (6e-7) ** 2, interceptVariance: (2e-4) ** 2, covariance: -0.95 * 6e-7 * 2e-4 },
    ];
    const propagated = reading(fittedCrossovers(branches)[0] ?? null);
    const monteCarlo = runPythonJson<{ variance: number }>(
      `
import json, sys
import numpy as np
b = json.load(sys.stdin)
rng = np.random.default_rng(20240611)
n = 200000
def draw(p):
    cov = [[p['slownessVariance'], p['covariance']], [p['covariance'], p['interceptVariance']]]
    return rng.multivariate_normal([p['slowness'], p['intercept']], cov, size=n)
one, two = draw(b[0]), draw(b[1])
x = (two[:, 1] - one[:, 1]) / (one[:, 0] - two[:, 0])
print(json.dumps(dict(variance=float(np.var(x, ddof=1)))))
`,
      branches,
      ['numpy'],
    );
    expectRelative(propagated.variance, monteCarlo.variance, MONTE_CARLO_RELATIVE, 'numpy Monte Carlo (200 000 draws, seed 20240611)');
    expectWithin(propagated.distance, 10.328, HALF_4DP, 'METHODS.md check case 1.1 (computed from the stated model): x_c1');
  });
});

describe('crossover-distance helpers: edges stated in the doc comments', () => {
  it('fittedCrossovers gives null for parallel lines and an empty list for fewer than two branches', () => {
    const line = { slowness: 1 / 1000, intercept: 0.01, slownessVariance: 0, interceptVariance: 0, covariance: 0 };
    expect(fittedCrossovers([line, { ...line, intercept: 0.02 }])).toEqual([null]);
    expect(fittedCrossovers([line])).toEqual([]);
  });

  it('fittedCrossovers gives the intersection even when the later branch is slower (possibly negative)', () => {
    const fast = { slowness: 1 / 2000, intercept: 0.02, slownessVariance: 0, interceptVariance: 0, covariance: 0 };
    const slow = { slowness: 1 / 1000, intercept: 0.01, slownessVariance: 0, interceptVariance: 0, covariance: 0 };
    const [crossover] = fittedCrossovers([fast, slow]);
    expectRelative(crossover?.distance ?? Number.NaN, -0.01 / (1 / 2000 - 1 / 1000), 1e-12, 'line intersection (τ2 − τ1)/(s1 − s2)');
  });

  it('observedCrossover is the bracket midpoint with variance width²/12, 0 for a zero-width bracket', () => {
    const observed = observedCrossover(10, 15);
    expect(observed.distance).toBe(12.5);
    expectRelative(observed.variance, 25 / 12, 1e-15, 'variance of a uniform distribution of width 5 m');
    expect(observedCrossover(20, 20)).toEqual({ distance: 20, variance: 0 });
  });

  it('observedCrossover throws for overlapping branches or a bad offset', () => {
    expect(() => observedCrossover(15, 10)).toThrow(/the branches overlap/);
    expect(() => observedCrossover(-1, 10)).toThrow(/zero or positive and finite/);
    expect(() => observedCrossover(1, Number.NaN)).toThrow(/zero or positive and finite/);
  });

  it('crossoverDistanceDepths stops at a branch not faster than the one above, like the intercept-time method', () => {
    const result = crossoverDistanceDepths(
      [{ slowness: 1 / 400, variance: 0 }, { slowness: 1 / 1600, variance: 0 }, { slowness: 1 / 1000, variance: 0 }],
      [{ distance: 10, variance: 0 }, { distance: 30, variance: 0 }],
    );
    expect(result.thicknesses).toHaveLength(1);
    expect(result.notes.map((note) => note.code)).toEqual(['velocity-not-increasing']);
  });

  it('crossoverDistanceDepths notes a non-positive derived intercept and thickness for a negative crossover', () => {
    const result = crossoverDistanceDepths([{ slowness: 1 / 400, variance: 0 }, { slowness: 1 / 1600, variance: 0 }], [{ distance: -5, variance: 0 }]);
    expect(result.notes.map((note) => note.code)).toEqual(['intercept-not-positive', 'thickness-not-positive']);
  });

  it('crossoverDistanceDepths throws with a message on misuse', () => {
    const slownesses = [{ slowness: 1 / 400, variance: 0 }, { slowness: 1 / 1600, variance: 0 }];
    expect(() => crossoverDistanceDepths([], [])).toThrow(/no slownesses given/);
    expect(() => crossoverDistanceDepths(slownesses, [])).toThrow(/2 branches need 1 crossover distances/);
    expect(() => crossoverDistanceDepths(slownesses, [{ distance: 10, variance: -1 }])).toThrow(/crossover 1 has a negative variance/);
    expect(() => crossoverDistanceDepths(slownesses, [{ distance: Number.NaN, variance: 0 }])).toThrow(/crossover 1 must be finite/);
    expect(() => crossoverDistanceDepths([{ slowness: 0, variance: 0 }, slownesses[1]!], [{ distance: 10, variance: 0 }])).toThrow(/must be positive/);
    expect(() => crossoverDistanceDepths(slownesses, [{ distance: 10, variance: 0 }], { value: 0, variance: -1 })).toThrow(/direct-wave intercept/);
  });
});

describe('depthOutsideBracket', () => {
  it('depthOutsideBracket flags an interface whose intercept-time depth ± SE misses the bracket', () => {
    // z = 10 ± 0.5 against [10.4, 11] (meets it) and z = 20 ± 0.5 against [20.6, 22] (misses it).
    const comparisons = depthOutsideBracket(layerDepthsOf([10, 20], [0.5, 0.5]), layerDepthsOf([10.4, 20.6], [0, 0]), layerDepthsOf([11, 22], [0, 0]));
    expect(comparisons.map((comparison) => comparison.disagree)).toEqual([false, true]);
    expect(comparisons[1]).toMatchObject({ interface: 2, interceptTimeDepth: 20, interceptTimeSE: 0.5, bracketLow: 20.6, bracketHigh: 22 });
  });

  it('depthOutsideBracket reorders a bracket given high-to-low and flags a depth above it', () => {
    const [above] = depthOutsideBracket(layerDepthsOf([12.6], [0.5]), layerDepthsOf([12], [0]), layerDepthsOf([11], [0]));
    expect(above).toMatchObject({ bracketLow: 11, bracketHigh: 12, disagree: true });
  });

  it('depthOutsideBracket compares up to the shortest list, and with SE 0 flags any depth outside', () => {
    const comparisons = depthOutsideBracket(layerDepthsOf([4, 14], [0, 0]), layerDepthsOf([4.001], [0]), layerDepthsOf([5, 15], [0, 0]));
    expect(comparisons).toHaveLength(1);
    expect(comparisons[0]?.disagree).toBe(true);
    expect(depthOutsideBracket(layerDepthsOf([4.5], [0]), layerDepthsOf([4], [0]), layerDepthsOf([5], [0]))[0]?.disagree).toBe(false);
  });

  it('on case 2.1 the intercept-time depths fall within the depths from the ends of the observed crossover brackets', () => {
    const { picks, fits } = case21();
    const ends = [0, 1].map((index) => [picks[index]?.offsets.at(-1) ?? Number.NaN, picks[index + 1]?.offsets[0] ?? Number.NaN] as const);
    expect(ends.map(([low, high]) => observedCrossover(low, high).distance)).toEqual([12.5, 32.5]);
    const slownesses = fits.map((fit) => ({ slowness: fit.slowness, variance: fit.slownessVariance }));
    const low = crossoverDistanceDepths(slownesses, ends.map(([first]) => ({ distance: first, variance: 0 })));
    const high = crossoverDistanceDepths(slownesses, ends.map(([, last]) => ({ distance: last, variance: 0 })));
    const comparisons = depthOutsideBracket(interceptTimeDepths(fits), low, high);
    expect(comparisons.map((comparison) => comparison.disagree)).toEqual([false, false]);
    // The exact depths 4 and 14 m lie inside the brackets, strictly.
    comparisons.forEach((comparison) => {
      expect(comparison.bracketLow).toBeLessThan(comparison.interceptTimeDepth);
      expect(comparison.bracketHigh).toBeGreaterThan(comparison.interceptTimeDepth);
    });
  });
});
