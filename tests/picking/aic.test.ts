import { describe, expect, it } from 'vitest';
import { aicCurve, aicOnset, staLtaRatio, staLtaTrigger } from '../../lib/picking/index.js';
import { seededNormal } from '../../lib/random.js';
import { expectWithin } from '../helpers/expect-within.js';
import { runPythonJson } from '../helpers/python.js';
import { METHODS_ONSET, methodsTrace } from './methods-trace.js';

/**
 * Ours uses running sums of the centred window, numpy np.var on slices: the two variances differ by
 * rounding, ~1e-14 relative, and AIC values are sums of ~M logarithms of them (|AIC| up to ~1e3).
 * 1e-9 absolute per AIC value is a thousand times that and far below the differences between
 * neighbouring k (≥ 1e-3 here).
 */
const AIC_ABSOLUTE = 1e-9;
/** The Akaike-weight spread is a smooth function of the curve: the same relative rounding. */
const SPREAD_ABSOLUTE = 1e-9;
/** METHODS prints the spreads to two decimals: half a unit in the last place. */
const HALF_2DP = 0.005;

/**
 * A brute-force numpy twin of Maeda's criterion as METHODS §11 writes it (population variance,
 * k = 2 … M − 2, onset = argmin), and the Akaike-weight spread of Burnham & Anderson 2002.
 */
const NUMPY_AIC = `
import json, sys
import numpy as np
windows = json.load(sys.stdin)
out = []
for w in windows:
    w = np.array(w, float)
    M = len(w)
    aic = np.full(M, np.nan)
    for k in range(2, M - 1):
        aic[k] = k * np.log(np.var(w[:k])) + (M - k - 1) * np.log(np.var(w[k:]))
    onset = int(np.nanargmin(aic))
    weights = np.exp(-(aic - np.nanmin(aic)) / 2)
    weights[np.isnan(weights)] = 0
    weights /= weights.sum()
    centre = (weights * np.arange(M)).sum()
    spread = float(np.sqrt((weights * (np.arange(M) - centre) ** 2).sum()))
    out.append({'curve': [None if np.isnan(v) else float(v) for v in aic], 'onset': onset, 'spread': spread})
print(json.dumps(out))
`;

function noisyWindow(count: number, onset: number, seed: number, offset: number): number[] {
  const normal = seededNormal(seed);
  return Array.from({ length: count }, (_, k) => offset + 0.1 * normal() + (k >= onset ? Math.sin(0.4 * (k - onset)) * Math.exp(-(k - onset) / 30) : 0));
}

describe('aicCurve and aicOnset (Maeda1985) against a brute-force numpy twin', () => {
  const windows = [noisyWindow(100, 58, 1, 0), noisyWindow(240, 150, 2, 1000), noisyWindow(37, 11, 3, -3), methodsTrace(0.25).slice(105, 205)];
  const numpy = runPythonJson<{ curve: (number | null)[]; onset: number; spread: number }[]>(NUMPY_AIC, windows, ['numpy']);

  windows.forEach((window, index) => {
    const reference = numpy[index] as { curve: (number | null)[]; onset: number; spread: number };
    it(`window ${index + 1} (${window.length} samples): every AIC(k), the onset and the Akaike-weight spread agree`, () => {
      const curve = aicCurve(window);
      reference.curve.forEach((value, k) => {
        if (value === null) expect(Number.isNaN(curve[k] as number), `k = ${k} is outside 2 … M − 2`).toBe(true);
        else expectWithin(curve[k], value, AIC_ABSOLUTE, `numpy AIC(${k})`);
      });
      const onset = aicOnset(window);
      expect(onset?.index).toBe(reference.onset);
      expectWithin(onset?.spread, reference.spread, SPREAD_ABSOLUTE, 'numpy Akaike-weight spread');
    });
  });
});

describe('METHODS check cases 11.1 and 11.2 (computed from the stated trace, not published values)', () => {
  for (const [amplitude, trigger, onsetSample, spread] of [
    [0.05, 162, METHODS_ONSET, 0.91],
    [0.25, 165, 159, 2.95],
  ] as const) {
    it(`A = ${amplitude}: AIC on [trigger − 60, trigger + 40) picks ${onsetSample} (±2) with σ_pick ${spread} samples`, () => {
      const trace = methodsTrace(amplitude);
      expect(staLtaTrigger(staLtaRatio(trace, 8, 64), 4)).toBe(trigger);
      const onset = aicOnset(trace.slice(trigger - 60, trigger + 40));
      expect(onset).not.toBeNull();
      expect(Math.abs(trigger - 60 + (onset?.index ?? Number.NaN) - onsetSample)).toBeLessThanOrEqual(2);
      expectWithin(onset?.spread, spread, HALF_2DP, `METHODS 11.${amplitude === 0.05 ? 1 : 2} σ_pick`);
    });
  }
  it('the spread grows as the signal-to-noise ratio falls (11.1 against 11.2)', () => {
    const sharp = aicOnset(methodsTrace(0.05).slice(102, 202));
    const blunt = aicOnset(methodsTrace(0.25).slice(105, 205));
    expect((blunt?.spread ?? 0) > 2 * (sharp?.spread ?? Number.POSITIVE_INFINITY)).toBe(true);
  });
});

describe('aicOnset at the edges', () => {
  it('a window of fewer than 4 samples has no onset and an all-NaN curve', () => {
    expect(aicOnset([1, 2, 3])).toBeNull();
    for (const value of aicCurve([1, 2, 3])) expect(Number.isNaN(value)).toBe(true);
  });
  it('a constant window has no onset', () => {
    expect(aicOnset(new Array(50).fill(7))).toBeNull();
  });
  it('a zero-padded start keeps the curve finite (floored variance) and puts the onset at the first non-zero sample', () => {
    const window = [...new Array(40).fill(0), ...noisyWindow(60, 0, 4, 0)];
    const onset = aicOnset(window);
    expect(onset?.index).toBe(40);
    for (let k = 2; k <= window.length - 2; k += 1) expect(Number.isFinite(onset?.curve[k] as number)).toBe(true);
  });
});
