import { describe, expect, it } from 'vitest';
import { combineSideLayers, combineSlownesses, thicknessesFromDepths } from '../../lib/interpretation/survey-layers.js';
import { runPythonJson } from '../helpers/python.js';
import { expectRelative } from '../helpers/expect-within.js';

/** Generalised least squares is a few small solves: numpy and we should agree to ~1e-12. */
const NUMPY_TOLERANCE = 1e-9;

describe('combineSideLayers', () => {
  const sides = [
    { slownesses: [{ slowness: 1 / 400, variance: 1e-11 }, { slowness: 1 / 1600, variance: 4e-12 }], depths: [4.1, 13.9], depthCovariance: [[0.04, -0.02], [-0.02, 0.3]] },
    { slownesses: [{ slowness: 1 / 410, variance: 2e-11 }, { slowness: 1 / 1580, variance: 5e-12 }], depths: [3.9, 14.4], depthCovariance: [[0.05, -0.01], [-0.01, 0.25]] },
    { slownesses: [{ slowness: 1 / 395, variance: 1.5e-11 }, null], depths: [4.3], depthCovariance: [[0.09]] },
  ];

  it('equals the generalised-least-squares mean computed by numpy (sides with fewer interfaces add their sub-block)', () => {
    const expected = runPythonJson<{ mean: number[]; cov: number[][]; chi2: number }>(
      `import sys, json, numpy as np
sides = json.load(sys.stdin)
K = max(len(s['depths']) for s in sides)
info = np.zeros((K, K)); rhs = np.zeros(K)
for s in sides:
    k = len(s['depths']); inv = np.linalg.inv(np.array(s['depthCovariance']))
    info[:k, :k] += inv; rhs[:k] += inv @ np.array(s['depths'])
cov = np.linalg.inv(info); mean = cov @ rhs
chi2 = sum(float((np.array(s['depths']) - mean[:len(s['depths'])]) @ np.linalg.inv(np.array(s['depthCovariance'])) @ (np.array(s['depths']) - mean[:len(s['depths'])])) for s in sides)
print(json.dumps({'mean': mean.tolist(), 'cov': cov.tolist(), 'chi2': chi2}))`,
      sides,
      ['numpy'],
    );
    const combined = combineSideLayers(sides);
    expected.mean.forEach((value, k) => expectRelative(combined.depths[k]!, value, NUMPY_TOLERANCE, `numpy GLS mean z${k + 1}`));
    expectRelative(combined.depthChiSquare, expected.chi2, NUMPY_TOLERANCE, 'numpy GLS χ²');
    const birge = Math.max(1, Math.sqrt(expected.chi2 / combined.depthDegreesOfFreedom));
    expected.cov.forEach((row, i) =>
      row.forEach((value, j) => expectRelative(combined.depthCovariance[i]![j]!, value * birge * birge, NUMPY_TOLERANCE, `numpy GLS covariance [${i}][${j}] × Birge²`)),
    );
    expect(combined.depthSides).toEqual([3, 2]);
    expect(combined.slownesses[1]?.contributors).toBe(2);
  });

  it('returns the single side unchanged with no degrees of freedom', () => {
    const combined = combineSideLayers([sides[0]!]);
    expect(combined.depths[0]).toBeCloseTo(4.1, 12);
    expect(combined.depths[1]).toBeCloseTo(13.9, 12);
    expect(combined.depthDegreesOfFreedom).toBe(0);
    expect(combined.depthConsistencyProbability).toBe(1);
  });

  it('keeps weights finite for exact data whose covariance is zero (ridge), giving the plain mean', () => {
    const exact = [
      { slownesses: [{ slowness: 0.0025, variance: 0 }], depths: [8], depthCovariance: [[0]] },
      { slownesses: [{ slowness: 0.0025, variance: 0 }], depths: [8.2], depthCovariance: [[0]] },
    ];
    const combined = combineSideLayers(exact);
    expect(combined.depths[0]).toBeCloseTo(8.1, 9);
    expect(combined.slownesses[0]?.value).toBeCloseTo(0.0025, 15);
  });

  it('flags inconsistent sides through a small consistency probability', () => {
    const inconsistent = [
      { slownesses: [], depths: [5], depthCovariance: [[0.01]] },
      { slownesses: [], depths: [9], depthCovariance: [[0.01]] },
    ];
    expect(combineSideLayers(inconsistent).depthConsistencyProbability).toBeLessThan(1e-6);
  });
});

describe('combineSlownesses', () => {
  it('is the inverse-variance weighted mean (Bevington & Robinson 2003, ch. 4), worked by hand', () => {
    const combined = combineSlownesses([
      { slowness: 1, variance: 1 },
      { slowness: 2, variance: 4 },
    ])!;
    // weights 1 and 1/4: mean = (1 + 0.5)/1.25 = 1.2; χ² = 0.04 + 0.16 = 0.2 < ν = 1, so no inflation.
    expect(combined.value).toBeCloseTo(1.2, 14);
    expect(combined.standardError).toBeCloseTo(Math.sqrt(1 / 1.25), 14);
    expect(combined.chiSquare).toBeCloseTo(0.2, 14);
    expect(combineSlownesses([])).toBeNull();
  });
});

describe('thicknessesFromDepths', () => {
  it('differences consecutive depths and carries the covariance: Var h2 = Var z1 + Var z2 − 2 Cov', () => {
    const { thicknesses, covariance } = thicknessesFromDepths([4, 14], [[0.04, 0.01], [0.01, 0.25]]);
    expect(thicknesses).toEqual([4, 10]);
    expect(covariance[1]![1]).toBeCloseTo(0.04 + 0.25 - 0.02, 14);
    expect(covariance[0]![1]).toBeCloseTo(0.01 - 0.04, 14);
  });
});
