import { describe, expect, it } from 'vitest';
import { bandPassCentre, bandPassGain, butterworthBandPass, sosFilter, sosFiltFilt, steadyStateStates } from '../../lib/picking/index.js';
import { seededNormal } from '../../lib/random.js';
import { runPythonJson } from '../helpers/python.js';

/**
 * Our cascade and scipy's are the same transfer function with poles paired into sections
 * differently, so they agree only to rounding: the cascade's rounding grows with the poles'
 * closeness to the unit circle (narrow bands at fine sampling). 1e-9 of the output's peak is far
 * above double rounding (observed at most 3e-14 on these cases) and far below any design error
 * (a wrong pole moves the output by percent).
 */
const FILTER_RELATIVE = 1e-9;

const SCIPY_FILTER = `
import json, sys
import numpy as np
from scipy.signal import butter, sosfilt, sosfiltfilt
cases = json.load(sys.stdin)
out = []
for case in cases:
    sos = butter(case['order'], [case['low'], case['high']], btype='bandpass', fs=1.0 / case['dt'], output='sos')
    x = np.array(case['samples'], float)
    out.append({'causal': sosfilt(sos, x).tolist(), 'zeroPhase': sosfiltfilt(sos, x).tolist()})
print(json.dumps(out))
`;

interface FilterCase {
  readonly order: number;
  readonly low: number;
  readonly high: number;
  readonly dt: number;
  readonly samples: number[];
}

/** A test trace: seeded white noise, a step (exposes DC handling) and a damped 100 Hz burst. */
function testTrace(count: number, dt: number, seed: number): number[] {
  const normal = seededNormal(seed);
  return Array.from({ length: count }, (_, k) => {
    const t = k * dt;
    const burst = t > 0.05 ? Math.sin(2 * Math.PI * 100 * (t - 0.05)) * Math.exp(-(t - 0.05) / 0.02) : 0;
    return 0.3 * normal() + (k > count / 3 ? 1.5 : 0) + 4 * burst + 2;
  });
}

function maxRelativeDifference(actual: ArrayLike<number>, expected: readonly number[]): number {
  let peak = 0;
  let difference = 0;
  for (let k = 0; k < expected.length; k += 1) {
    peak = Math.max(peak, Math.abs(expected[k] as number));
    difference = Math.max(difference, Math.abs((actual[k] as number) - (expected[k] as number)));
  }
  return difference / peak;
}

describe('butterworthBandPass with sosFilter and sosFiltFilt against scipy.signal', () => {
  const cases: FilterCase[] = [
    { order: 1, low: 20, high: 1000, dt: 0.000125, samples: testTrace(4000, 0.000125, 1) },
    { order: 2, low: 20, high: 400, dt: 0.00025, samples: testTrace(3000, 0.00025, 2) },
    { order: 3, low: 10, high: 250, dt: 0.0005, samples: testTrace(2000, 0.0005, 3) },
    { order: 4, low: 30, high: 120, dt: 0.001, samples: testTrace(1500, 0.001, 4) },
    // odd order with a band wider than twice its centre: the real prototype pole gives two real poles
    { order: 5, low: 5, high: 450, dt: 0.001, samples: testTrace(1500, 0.001, 5) },
    { order: 6, low: 40, high: 300, dt: 0.00025, samples: testTrace(3000, 0.00025, 6) },
  ];
  const scipy = runPythonJson<{ causal: number[]; zeroPhase: number[] }[]>(SCIPY_FILTER, cases);

  cases.forEach((filterCase, index) => {
    const label = `order ${filterCase.order}, ${filterCase.low}–${filterCase.high} Hz, ${filterCase.dt * 1000} ms`;
    const sections = butterworthBandPass(filterCase.order, filterCase.low, filterCase.high, filterCase.dt);
    const reference = scipy[index] as { causal: number[]; zeroPhase: number[] };

    it(`sosFilter (causal) matches scipy sosfilt(butter(..., output='sos')), ${label}`, () => {
      const error = maxRelativeDifference(sosFilter(sections, filterCase.samples), reference.causal);
      expect(error, `scipy.signal.sosfilt: max |difference| / peak = ${error}`).toBeLessThan(FILTER_RELATIVE);
    });

    it(`sosFiltFilt (zero phase) matches scipy sosfiltfilt (odd padding, steady-state start), ${label}`, () => {
      const error = maxRelativeDifference(sosFiltFilt(sections, filterCase.samples), reference.zeroPhase);
      expect(error, `scipy.signal.sosfiltfilt: max |difference| / peak = ${error}`).toBeLessThan(FILTER_RELATIVE);
    });
  });
});

describe('butterworthBandPass magnitude response (Butterworth1930: maximally flat, −3 dB at the edges)', () => {
  /** The bilinear transform maps the pre-warped edges exactly; only rounding remains. */
  const RESPONSE_TOLERANCE = 1e-9;
  for (const [order, low, high, dt] of [
    [1, 20, 1000, 0.000125],
    [2, 20, 400, 0.00025],
    [4, 30, 120, 0.001],
    [5, 5, 450, 0.001],
  ] as const) {
    it(`gain is 1/√2 at ${low} and ${high} Hz and 1 at the centre (order ${order}, ${dt * 1000} ms)`, () => {
      const sections = butterworthBandPass(order, low, high, dt);
      expect(sections).toHaveLength(order);
      expect(Math.abs(bandPassGain(sections, low, dt) - Math.SQRT1_2)).toBeLessThan(RESPONSE_TOLERANCE);
      expect(Math.abs(bandPassGain(sections, high, dt) - Math.SQRT1_2)).toBeLessThan(RESPONSE_TOLERANCE);
      expect(Math.abs(bandPassGain(sections, bandPassCentre(low, high, dt), dt) - 1)).toBeLessThan(RESPONSE_TOLERANCE);
      // off-centre the gain is below 1 on both sides (maximally flat, no ripple)
      expect(bandPassGain(sections, bandPassCentre(low, high, dt) * 1.1, dt)).toBeLessThan(1);
      expect(bandPassGain(sections, bandPassCentre(low, high, dt) / 1.1, dt)).toBeLessThan(1);
      // |H|² = 1/(1 + ε^(2N)) one octave outside the band falls by about 6·N dB per octave (from memory).
      expect(bandPassGain(sections, low / 4, dt)).toBeLessThan(bandPassGain(sections, low / 2, dt));
    });
  }
});

describe('steadyStateStates', () => {
  it('starts a cascade settled: a constant input gives a constant output from the first sample', () => {
    const sections = butterworthBandPass(3, 10, 200, 0.0005);
    const states = steadyStateStates(sections).map((state) => state * 2.5);
    const output = sosFilter(sections, new Array(200).fill(2.5), states);
    // A band-pass passes no DC: the settled output is 0 (to rounding).
    for (const value of output) expect(Math.abs(value)).toBeLessThan(1e-12);
  });

  it('from rest, the same constant input rings (the states matter)', () => {
    const sections = butterworthBandPass(3, 10, 200, 0.0005);
    const output = sosFilter(sections, new Array(200).fill(2.5));
    expect(Math.max(...Array.from(output, Math.abs))).toBeGreaterThan(0.1);
  });
});

describe('butterworthBandPass misuse', () => {
  it('refuses a high edge at or above Nyquist, naming both frequencies', () => {
    expect(() => butterworthBandPass(2, 20, 500, 0.001)).toThrow(/500 Hz is at or above the Nyquist frequency 500 Hz/);
  });
  it('refuses low ≥ high, a non-positive low edge, a bad order and a bad sample interval', () => {
    expect(() => butterworthBandPass(2, 200, 100, 0.001)).toThrow(RangeError);
    expect(() => butterworthBandPass(2, 0, 100, 0.001)).toThrow(RangeError);
    expect(() => butterworthBandPass(0, 10, 100, 0.001)).toThrow(/order/);
    expect(() => butterworthBandPass(2.5, 10, 100, 0.001)).toThrow(/order/);
    expect(() => butterworthBandPass(2, 10, 100, 0)).toThrow(/sampleInterval/);
  });
  it('sosFilter refuses initial states of the wrong length', () => {
    expect(() => sosFilter(butterworthBandPass(2, 10, 100, 0.001), [1, 2], new Float64Array(3))).toThrow(/2 values per section/);
  });
  it('sosFiltFilt of a trace shorter than the pad length pads by n − 1 and stays finite; an empty trace gives an empty output', () => {
    const sections = butterworthBandPass(2, 10, 100, 0.001);
    const output = sosFiltFilt(sections, [1, -2, 3, 0.5]);
    expect(output).toHaveLength(4);
    for (const value of output) expect(Number.isFinite(value)).toBe(true);
    expect(sosFiltFilt(sections, [])).toHaveLength(0);
  });
});
