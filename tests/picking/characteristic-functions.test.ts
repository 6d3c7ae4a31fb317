import { describe, expect, it } from 'vitest';
import { energyRatio, modifiedEnergyRatio, shortestEnergyWindow, staLtaCharacteristic, staLtaRatio, staLtaTrigger } from '../../lib/picking/index.js';
import { seededNormal } from '../../lib/random.js';
import { runPythonJson } from '../helpers/python.js';
import { METHODS_ONSET, methodsTrace } from './methods-trace.js';

/**
 * Both sides sum the same squares, ours by running (prefix) sums and numpy by slicing: they differ
 * by the prefix sums' rounding, about 1e-16 × (sum over the trace / sum over a window) — below 1e-12
 * for these traces, whose quietest window holds more than 1e-3 of the total energy.
 */
const RATIO_RELATIVE = 1e-9;

/**
 * numpy twins of the published formulas, written from the doc comments' formulas with slices
 * (no running sums): STA/LTA (Allen 1978, boxcar form with the long window before the short one,
 * clipped at sample 0, defined from k = 2·n_s − 1) and the energy ratio (Han, Wong & Bancroft 2009,
 * clipped windows as ratio of means, at least max(2, ceil(L/4)) samples each).
 */
const NUMPY_RATIOS = `
import json, sys, math
import numpy as np
cases = json.load(sys.stdin)
out = []
for case in cases:
    y = np.array(case['samples'], float)
    n = len(y)
    C = case['derivativeWeight']
    previous = np.concatenate([[y[0]], y[:-1]])
    cf = y ** 2 + C * (y - previous) ** 2
    ns, nl = case['shortWindow'], case['longWindow']
    sta_lta = np.zeros(n)
    floor = 1e-10 * cf.mean()
    for k in range(2 * ns - 1, n):
        sta = cf[k - ns + 1:k + 1].mean()
        lta = cf[max(0, k - ns - nl + 1):k - ns + 1].mean()
        sta_lta[k] = sta / max(lta, floor)
    L = case['energyWindow']
    shortest = max(2, math.ceil(L / 4))
    er = np.zeros(n)
    efloor = 1e-10 * (y ** 2).mean()
    for k in range(shortest, n - shortest + 1):
        before = (y[max(0, k - L):k] ** 2).mean()
        after = (y[k:min(n, k + L)] ** 2).mean()
        er[k] = after / max(before, efloor)
    mer = (er * np.abs(y)) ** 3
    out.append({'cf': cf.tolist(), 'staLta': sta_lta.tolist(), 'er': er.tolist(), 'mer': mer.tolist()})
print(json.dumps(out))
`;

interface RatioCase {
  readonly samples: number[];
  readonly derivativeWeight: number;
  readonly shortWindow: number;
  readonly longWindow: number;
  readonly energyWindow: number;
}

function noisyOnset(count: number, onset: number, seed: number): number[] {
  const normal = seededNormal(seed);
  return Array.from({ length: count }, (_, k) => 0.2 * normal() + (k >= onset ? 3 * Math.sin(0.3 * (k - onset)) * Math.exp(-(k - onset) / 40) : 0));
}

function expectSeriesClose(actual: ArrayLike<number>, expected: readonly number[], source: string): void {
  expect(actual.length).toBe(expected.length);
  for (let k = 0; k < expected.length; k += 1) {
    const want = expected[k] as number;
    const got = actual[k] as number;
    const error = want === 0 ? Math.abs(got) : Math.abs(got - want) / Math.abs(want);
    if (!(error <= RATIO_RELATIVE)) expect.fail(`${source}: sample ${k}: got ${got}, expected ${want} (relative error ${error})`);
  }
}

describe('staLtaRatio and energyRatio against numpy twins of the published formulas', () => {
  const cases: RatioCase[] = [
    { samples: noisyOnset(1200, 500, 1), derivativeWeight: 0, shortWindow: 8, longWindow: 64, energyWindow: 20 },
    { samples: noisyOnset(900, 37, 2), derivativeWeight: 0.5, shortWindow: 5, longWindow: 40, energyWindow: 13 },
    { samples: methodsTrace(0.05), derivativeWeight: 0, shortWindow: 8, longWindow: 64, energyWindow: 20 },
  ];
  const numpy = runPythonJson<{ cf: number[]; staLta: number[]; er: number[]; mer: number[] }[]>(NUMPY_RATIOS, cases, ['numpy']);

  cases.forEach((ratioCase, index) => {
    const reference = numpy[index] as { cf: number[]; staLta: number[]; er: number[]; mer: number[] };
    const label = `case ${index + 1} (n_s ${ratioCase.shortWindow}, n_l ${ratioCase.longWindow}, C ${ratioCase.derivativeWeight}, L ${ratioCase.energyWindow})`;
    it(`staLtaCharacteristic (Allen1978 CF) matches numpy, ${label}`, () => {
      expectSeriesClose(staLtaCharacteristic(ratioCase.samples, ratioCase.derivativeWeight), reference.cf, 'numpy CF = y² + C·Δy²');
    });
    it(`staLtaRatio matches numpy STA/LTA, ${label}`, () => {
      expectSeriesClose(staLtaRatio(ratioCase.samples, ratioCase.shortWindow, ratioCase.longWindow, ratioCase.derivativeWeight), reference.staLta, 'numpy STA/LTA');
    });
    it(`energyRatio and modifiedEnergyRatio (HanWongBancroft2009) match numpy, ${label}`, () => {
      expectSeriesClose(energyRatio(ratioCase.samples, ratioCase.energyWindow), reference.er, 'numpy ER');
      expectSeriesClose(modifiedEnergyRatio(ratioCase.samples, ratioCase.energyWindow), reference.mer, 'numpy MER = (ER·|y|)³');
    });
  });
});

describe('METHODS check cases 11.1 and 11.2 (computed from the stated trace, not published values)', () => {
  const argmax = (values: ArrayLike<number>): number => {
    let best = 0;
    for (let k = 1; k < values.length; k += 1) if ((values[k] as number) > (values[best] as number)) best = k;
    return best;
  };
  it('11.1 (A = 0.05): STA/LTA n_s 8, n_l 64, threshold 4 triggers at 162; MER argmax (L = 20) is 162 (±3)', () => {
    const trace = methodsTrace(0.05);
    expect(staLtaTrigger(staLtaRatio(trace, 8, 64), 4)).toBe(162);
    expect(Math.abs(argmax(modifiedEnergyRatio(trace, 20)) - 162)).toBeLessThanOrEqual(3);
  });
  it('11.2 (A = 0.25): the trigger moves late to 165; MER argmax is 160 (±3)', () => {
    const trace = methodsTrace(0.25);
    expect(staLtaTrigger(staLtaRatio(trace, 8, 64), 4)).toBe(165);
    expect(Math.abs(argmax(modifiedEnergyRatio(trace, 20)) - METHODS_ONSET)).toBeLessThanOrEqual(3);
  });
});

describe('characteristic functions at the edges', () => {
  it('an all-zero trace gives ratios of 0 everywhere, never NaN', () => {
    const zeros = new Array(300).fill(0);
    for (const value of staLtaRatio(zeros, 8, 64)) expect(value).toBe(0);
    for (const value of energyRatio(zeros, 20)) expect(value).toBe(0);
  });
  it('a zero-padded start gives a large, finite ratio at the first signal (floored denominator)', () => {
    const trace = [...new Array(200).fill(0), ...noisyOnset(300, 0, 3)];
    const ratio = energyRatio(trace, 20);
    const largest = Math.max(...ratio);
    expect(Number.isFinite(largest)).toBe(true);
    expect(largest).toBeGreaterThan(1e6);
    const staLta = staLtaRatio(trace, 8, 64);
    expect(Number.isFinite(Math.max(...staLta))).toBe(true);
    expect(staLtaTrigger(staLta, 4)).toBeGreaterThanOrEqual(200);
  });
  it('STA/LTA is 0 before k = 2·n_s − 1 and the energy ratio outside its shortest clipped windows', () => {
    const trace = noisyOnset(200, 100, 4);
    const staLta = staLtaRatio(trace, 8, 64);
    for (let k = 0; k < 15; k += 1) expect(staLta[k]).toBe(0);
    expect(staLta[15]).toBeGreaterThan(0);
    const shortest = shortestEnergyWindow(20);
    expect(shortest).toBe(5);
    const ratio = energyRatio(trace, 20);
    for (let k = 0; k < shortest; k += 1) expect(ratio[k]).toBe(0);
    expect(ratio[shortest]).toBeGreaterThan(0);
    expect(ratio[200 - shortest]).toBeGreaterThan(0);
    expect(ratio[200 - shortest + 1]).toBe(0);
  });
  it('a trace shorter than 2·n_s gives STA/LTA ≡ 0; a trace that never reaches the level gives no trigger', () => {
    for (const value of staLtaRatio([1, 2, 3], 8, 64)) expect(value).toBe(0);
    expect(staLtaTrigger(staLtaRatio(noisyOnset(500, 1000, 5), 8, 64), 50)).toBeNull();
  });
  it('refuses windows that are not positive whole numbers of samples and a negative C', () => {
    expect(() => staLtaRatio([1, 2, 3], 0, 10)).toThrow(/shortWindow/);
    expect(() => staLtaRatio([1, 2, 3], 3, 2.5)).toThrow(/longWindow/);
    expect(() => staLtaCharacteristic([1, 2], -1)).toThrow(/derivativeWeight/);
    expect(() => energyRatio([1, 2, 3], 0)).toThrow(/window/);
  });
});
