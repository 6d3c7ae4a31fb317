import { describe, expect, it } from 'vitest';
import {
  automaticGainControl,
  butterworthBandPass,
  conditionTrace,
  DEFAULT_PICKING_OPTIONS,
  highCutFor,
  normaliseTrace,
  resolvePickingOptions,
  sosFilter,
  sosFiltFilt,
  type PickingOptions,
} from '../../lib/picking/index.js';
import { seededNormal } from '../../lib/random.js';
import { runPythonJson } from '../helpers/python.js';

/** Running sums against numpy slices: rounding only (see characteristic-functions.test.ts). */
const AGC_RELATIVE = 1e-9;

const NUMPY_AGC = `
import json, sys
import numpy as np
cases = json.load(sys.stdin)
out = []
for case in cases:
    x = np.array(case['samples'], float)
    h = int(np.floor(case['window'] / (2 * case['dt'])))
    y = np.zeros(len(x))
    for k in range(len(x)):
        part = x[max(0, k - h):min(len(x), k + h + 1)]
        rms = np.sqrt((part ** 2).mean())
        y[k] = 0 if rms == 0 else x[k] / rms
    out.append(y.tolist())
print(json.dumps(out))
`;

function decayingTrace(count: number, seed: number): number[] {
  const normal = seededNormal(seed);
  return Array.from({ length: count }, (_, k) => normal() * Math.exp(-k / 300) + 0.01 * normal());
}

describe('automaticGainControl (sliding-window RMS) against numpy', () => {
  const cases = [
    { samples: decayingTrace(1000, 1), window: 0.05, dt: 0.0005 },
    { samples: decayingTrace(500, 2), window: 0.0031, dt: 0.001 },
    { samples: decayingTrace(300, 3), window: 1, dt: 0.001 }, // window longer than the trace
  ];
  const numpy = runPythonJson<number[][]>(NUMPY_AGC, cases, ['numpy']);
  cases.forEach((agcCase, index) => {
    it(`window ${agcCase.window * 1000} ms at ${agcCase.dt * 1000} ms: every sample agrees`, () => {
      const output = automaticGainControl(agcCase.samples, agcCase.window, agcCase.dt);
      const reference = numpy[index] as number[];
      reference.forEach((value, k) => {
        const error = Math.abs((output[k] as number) - value) / Math.max(Math.abs(value), 1e-300);
        if (!(error <= AGC_RELATIVE)) expect.fail(`numpy AGC sample ${k}: got ${output[k]}, expected ${value}`);
      });
    });
  });
  it('a dead stretch stays 0, the doc example holds, and bad windows are refused', () => {
    const output = automaticGainControl([0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 1, -1], 0.003, 0.001);
    for (let k = 0; k < 9; k += 1) expect(output[k]).toBe(0);
    const example = automaticGainControl([0, 2, 0, -2, 0], 0.003, 0.001);
    expect(example[1]).toBeCloseTo(Math.sqrt(3), 12);
    expect(() => automaticGainControl([1], 0, 0.001)).toThrow(/window/);
    expect(() => automaticGainControl([1], 0.01, -1)).toThrow(/sampleInterval/);
  });
});

describe('normaliseTrace', () => {
  it('max-abs spans [−1, 1]; rms gives unit RMS; a dead trace stays zeros', () => {
    expect(Array.from(normaliseTrace([1, -4, 2], 'max-abs'))).toEqual([0.25, -1, 0.5]);
    const rms = normaliseTrace([3, -4, 0, 5], 'rms');
    expect(Math.sqrt(rms.reduce((sum, value) => sum + value * value, 0) / 4)).toBeCloseTo(1, 14);
    expect(Array.from(normaliseTrace([0, 0, 0], 'rms'))).toEqual([0, 0, 0]);
    expect(normaliseTrace([], 'max-abs')).toHaveLength(0);
  });
});

/** One arrival at 40 ms on 0.25 ms samples, no noise: a damped 100 Hz sine that starts at zero. */
function cleanArrival(): number[] {
  return Array.from({ length: 800 }, (_, k) => {
    const tau = k * 0.00025 - 0.04;
    return tau < 0 ? 0 : Math.sin(2 * Math.PI * 100 * tau) * Math.exp(-tau / 0.01);
  });
}

describe('conditionTrace', () => {
  const trace = { samples: cleanArrival().map((value) => value + 0.5), sampleInterval: 0.00025, delay: 0, offset: 10 };
  const raw = (overrides: Partial<PickingOptions>): PickingOptions => resolvePickingOptions({ bandPass: null, normalise: false, ...overrides });

  it('subtracts the mean, then band-passes, then gains, then normalises, in that order', () => {
    const options = resolvePickingOptions({ bandPass: { low: 20, high: 500 }, bandPassOrder: 2, gain: { window: 0.02 }, normalise: true, normalisation: 'max-abs' });
    const mean = trace.samples.reduce((sum, value) => sum + value, 0) / trace.samples.length;
    const expected = normaliseTrace(
      automaticGainControl(sosFilter(butterworthBandPass(2, 20, 500, 0.00025), trace.samples.map((value) => value - mean)), 0.02, 0.00025),
      'max-abs',
    );
    const output = conditionTrace(trace, options);
    expected.forEach((value, k) => expect(output[k]).toBeCloseTo(value, 12));
  });

  it('causal filtering leaves nothing before the onset; zero-phase filtering puts a precursor there', () => {
    const clean = { ...trace, samples: cleanArrival() };
    const causal = conditionTrace(clean, raw({ bandPass: { low: 20, high: 300 }, bandPassOrder: 2 }));
    const zeroPhase = conditionTrace(clean, raw({ bandPass: { low: 20, high: 300 }, bandPassOrder: 2, bandPassPhase: 'zero-phase' }));
    const onset = 160;
    const peak = Math.max(...Array.from(causal, Math.abs));
    // The mean of the trace is subtracted first, so "nothing" is the small DC step the filter rings from.
    const causalBefore = Math.max(...Array.from(causal.subarray(onset - 40, onset), Math.abs));
    const zeroBefore = Math.max(...Array.from(zeroPhase.subarray(onset - 40, onset), Math.abs));
    expect(causalBefore / peak).toBeLessThan(0.01);
    expect(zeroBefore / peak).toBeGreaterThan(0.05);
    expect(Array.from(sosFiltFilt(butterworthBandPass(2, 20, 300, 0.00025), clean.samples)).some((value, k) => k < onset && Math.abs(value) > 0.05)).toBe(true);
  });

  it('sets non-finite samples to 0 so that display stays whole', () => {
    const output = conditionTrace({ ...trace, samples: [1, Number.NaN, 3, Number.POSITIVE_INFINITY, 5, 6, 7, 8] }, raw({}));
    for (const value of output) expect(Number.isFinite(value)).toBe(true);
  });

  it('refuses a band-pass at or above the trace Nyquist frequency, naming it and the fix', () => {
    expect(() => conditionTrace({ ...trace, sampleInterval: 0.001 }, raw({ bandPass: { low: 10, high: 600 } }))).toThrow(
      /high edge 600 Hz is at or above the Nyquist frequency 500 Hz .*choose a high edge below 500 Hz/,
    );
  });

  it('lowers only the default band to 0.8 × Nyquist, recognised by its values (as after a JSON round trip)', () => {
    const fromJson = JSON.parse(JSON.stringify(DEFAULT_PICKING_OPTIONS)) as PickingOptions;
    expect(highCutFor(fromJson, 0.000125)).toBe(1000);
    expect(highCutFor(fromJson, 0.001)).toBe(400);
    expect(highCutFor(fromJson, 0.002)).toBe(200);
    // sampling so coarse that less than an octave is left above 20 Hz: the default band is skipped
    expect(highCutFor(fromJson, 0.025)).toBeNull();
    expect(() => conditionTrace({ ...trace, sampleInterval: 0.002 }, fromJson)).not.toThrow();
    expect(highCutFor({ ...fromJson, bandPass: { low: 20, high: 999 } }, 0.001)).toBe(999);
  });
});
