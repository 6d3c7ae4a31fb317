/**
 * fitHuber: the IRLS result against direct minimisation of the Huber loss by scipy (an
 * independent route), its covariance formula against numpy, and its documented edges.
 */
import { describe, expect, it } from 'vitest';
import { fitHuber, HUBER_TUNING, huberCovarianceFactor, huberWeight, MAD_TO_SD } from '../../lib/branches/huber.js';
import { fitLeastSquares } from '../../lib/branches/least-squares.js';
import { fitTheilSen } from '../../lib/branches/theil-sen.js';
import type { FitOutcome, LineFit } from '../../lib/branches/types.js';
import { seededNormal, seededRandom } from '../../lib/random.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';
import { runPythonJson } from '../helpers/python.js';

/**
 * scipy.optimize.least_squares stops at its own tolerances (1e-15 asked); IRLS stops at a 1e-12
 * relative change. Measured agreement ~1e-11; 1e-8 leaves room for the optimiser's stopping rule.
 */
const MINIMISER_AGREEMENT = 1e-8;
/** Same closed formula evaluated twice in double precision. */
const FORMULA_AGREEMENT = 1e-10;

function fitted(outcome: FitOutcome): LineFit {
  if (!outcome.ok) throw new Error(outcome.message);
  return outcome.fit;
}

const normal = seededNormal(9001);
const uniform = seededRandom(9002);
const OFFSETS = Array.from({ length: 40 }, (_, index) => 30 + 3 * index);
const TIMES = OFFSETS.map((offset) => 0.025 + offset / 2400 + 0.3e-3 * normal() + (uniform() < 0.15 ? 0.004 + 0.01 * uniform() : 0));

function scaleOf(offsets: number[], times: number[], throughOrigin: boolean): number {
  const start = fitted(fitTheilSen(offsets, times, { throughOrigin }));
  const sorted = [...start.residuals].sort((left, right) => left - right);
  const middle = (values: number[]): number => {
    const half = values.length >> 1;
    return values.length % 2 ? (values[half] as number) : ((values[half - 1] as number) + (values[half] as number)) / 2;
  };
  const centre = middle(sorted);
  return MAD_TO_SD * middle(start.residuals.map((residual) => Math.abs(residual - centre)).sort((left, right) => left - right));
}

describe('fitHuber against direct minimisation of the Huber loss (scipy.optimize.least_squares, loss="huber")', () => {
  for (const throughOrigin of [false, true]) {
    it(`${throughOrigin ? 'through the origin' : 'free intercept'}: IRLS reaches the loss minimum`, () => {
      const fit = fitted(fitHuber(OFFSETS, TIMES, { throughOrigin }));
      const scale = scaleOf(OFFSETS, TIMES, throughOrigin);
      // least_squares' 'huber' loss with f_scale = k·σ̂ is σ̂²·ρ_k(r/σ̂) exactly (Huber's ρ).
      const reference = runPythonJson<{ slope: number; intercept: number }>(
        `
import json, sys
import numpy as np
from scipy.optimize import least_squares
d = json.load(sys.stdin)
x = np.array(d['x']); t = np.array(d['t'])
if d['origin']:
    res = least_squares(lambda p: t - p[0] * x, [d['start'][0]], loss='huber', f_scale=d['c'], ftol=1e-15, xtol=1e-15, gtol=1e-15, x_scale=[1e-4])
    print(json.dumps({'slope': float(res.x[0]), 'intercept': 0.0}))
else:
    res = least_squares(lambda p: t - p[1] - p[0] * x, d['start'], loss='huber', f_scale=d['c'], ftol=1e-15, xtol=1e-15, gtol=1e-15, x_scale=[1e-4, 1e-2])
    print(json.dumps({'slope': float(res.x[0]), 'intercept': float(res.x[1])}))
`,
        { x: OFFSETS, t: TIMES, origin: throughOrigin, c: HUBER_TUNING * scale, start: [1 / 2000, 0.02] },
      );
      expectRelative(fit.slope, reference.slope, MINIMISER_AGREEMENT, 'scipy.optimize.least_squares Huber minimum, slope');
      if (!throughOrigin) expectRelative(fit.intercept, reference.intercept, MINIMISER_AGREEMENT, 'scipy Huber minimum, intercept');
    });
  }

  it('the covariance is σ̂²·[Σψ²/(n−p)]/[Σψ′/n]²·(XᵀX)⁻¹ (numpy, from the reported residuals)', () => {
    const fit = fitted(fitHuber(OFFSETS, TIMES));
    const scale = scaleOf(OFFSETS, TIMES, false);
    const reference = runPythonJson<{ slopeVariance: number; interceptVariance: number; covariance: number }>(
      `
import json, sys
import numpy as np
d = json.load(sys.stdin)
x = np.array(d['x']); u = np.array(d['r']) / d['scale']; k = d['k']; n = len(x)
psi = np.clip(u, -k, k); dpsi = (np.abs(u) <= k).astype(float)
X = np.column_stack([np.ones(n), x])
C = d['scale']**2 * (np.sum(psi**2) / (n - 2)) / (np.sum(dpsi) / n)**2 * np.linalg.inv(X.T @ X)
print(json.dumps({'slopeVariance': C[1, 1], 'interceptVariance': C[0, 0], 'covariance': C[0, 1]}))
`,
      { x: OFFSETS, r: fit.residuals, scale, k: HUBER_TUNING },
    );
    expectRelative(fit.slopeSE ** 2, reference.slopeVariance, FORMULA_AGREEMENT, 'numpy: Huber 1981 covariance, Var b');
    expectRelative(fit.interceptSE ** 2, reference.interceptVariance, FORMULA_AGREEMENT, 'numpy: Var a');
    expectRelative(fit.covariance, reference.covariance, FORMULA_AGREEMENT, 'numpy: Cov(a, b)');
  });

  it('reports robust weights min(1, k/|u|) at the final line, and down-weights the wild picks', () => {
    const fit = fitted(fitHuber(OFFSETS, TIMES));
    const scale = scaleOf(OFFSETS, TIMES, false);
    fit.residuals.forEach((residual, position) => {
      expectWithin(fit.robustWeights?.[position] ?? Number.NaN, Math.min(1, HUBER_TUNING / Math.abs(residual / scale)), 1e-15, 'Huber weight by hand');
    });
    expect(fit.robustWeights?.some((weight) => weight < 0.3)).toBe(true);
  });
});

describe('fitHuber edges', () => {
  const cleanOffsets = [10, 20, 30, 40, 50, 60, 70, 80, 90];
  const clean = cleanOffsets.map((offset) => 0.02 + offset / 2000);

  it('falls back to the Theil–Sen residual SD as scale when the MAD is zero (noise-free picks, one outlier)', () => {
    const times = clean.map((time, index) => (index === 4 ? time + 0.006 : time));
    const fit = fitted(fitHuber(cleanOffsets, times));
    // Theil–Sen recovers the clean line, so its residuals are 0 except 6 ms: scale = 6 ms/√(n − 2).
    const scale = 0.006 / Math.sqrt(cleanOffsets.length - 2);
    const outlierResidual = fit.residuals[4] as number;
    expectWithin(fit.robustWeights?.[4] ?? Number.NaN, HUBER_TUNING / Math.abs(outlierResidual / scale), 1e-12, 'fallback scale by hand');
    expect(fit.robustWeights?.[4]).toBeLessThan(1);
    expect(fit.robustWeights?.filter((weight) => weight === 1)).toHaveLength(cleanOffsets.length - 1);
  });

  it('counts a scale below 1e-9·max|t| as zero: picks on one line to rounding give all weights 1 and the least-squares fit', () => {
    // 0.02 + x/2000 in floating point: on the line to rounding error (MAD ~1e-18 s, not 0).
    const fit = fitted(fitHuber(cleanOffsets, clean));
    expectRelative(fit.slope, 1 / 2000, 1e-12, 'the stated line');
    expectRelative(fit.intercept, 0.02, 1e-12, 'the stated line');
    expect(fit.method).toBe('huber');
    expect(fit.robustWeights).toEqual(cleanOffsets.map(() => 1));
    const leastSquares = fitted(fitLeastSquares(cleanOffsets, clean, null));
    expect(fit.slopeSE).toBe(leastSquares.slopeSE);
    expect(fit.interceptSE).toBe(leastSquares.interceptSE);
  });

  it('huberCovarianceFactor floors the count of |u| ≤ k at one pick, so it never divides by zero', () => {
    // All |u| > k: Σψ² = n·k², Σψ′ = 0 → floored to 1: factor = n·k²/(n − p)/(1/n)².
    const factor = huberCovarianceFactor([2, -3, 4, -5], 2);
    expectRelative(factor, (4 * HUBER_TUNING ** 2) / 2 / (1 / 4) ** 2, 1e-15, 'the floored formula by hand');
  });

  it('huberWeight is 1 inside ±k and k/|u| outside', () => {
    expect(huberWeight(0)).toBe(1);
    expect(huberWeight(-HUBER_TUNING)).toBe(1);
    expect(huberWeight(2 * HUBER_TUNING)).toBe(0.5);
  });

  it('refuses like an unweighted fit: 2 picks free, 1 through the origin, equal offsets, NaN', () => {
    expect(fitHuber([1, 2], [1, 2]).ok).toBe(false);
    expect(fitHuber([1], [1], { throughOrigin: true }).ok).toBe(false);
    expect(fitHuber([3, 3, 3], [1, 2, 3]).ok).toBe(false);
    expect(fitHuber([1, 2, 3], [1, Number.NaN, 3]).ok).toBe(false);
  });
});
