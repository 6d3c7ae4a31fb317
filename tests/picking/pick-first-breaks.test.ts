import { describe, expect, it } from 'vitest';
import {
  DEFAULT_PICKING_OPTIONS,
  MIN_SNR,
  pickableTrace,
  pickFirstBreaks,
  pickQuality,
  resolvePickingOptions,
  traceOnset,
  type PickableTrace,
  type TracePick,
} from '../../lib/picking/index.js';
import { syntheticGather, twoLayerFirstArrival } from '../tools/synthetic-gather.js';
import { METHODS_DT, METHODS_ONSET, methodsTrace } from './methods-trace.js';

/** One sample + 1 ms: the acceptance tolerance (tests/picking/acceptance.test.ts). */
const tolerance = (sampleInterval: number): number => sampleInterval + 0.001;

function gather(overrides: Partial<Parameters<typeof syntheticGather>[0]> = {}) {
  return syntheticGather({
    sourceX: 0,
    receiverXs: Array.from({ length: 48 }, (_, index) => 2 + 2 * index),
    arrivalTimes: (offset) => twoLayerFirstArrival(offset, 500, 2000, 6),
    sampleInterval: 0.00025,
    sampleCount: 1200,
    snr: 12,
    seed: 7,
    ...overrides,
  });
}

function asPickable(synthetic: ReturnType<typeof gather>): PickableTrace[] {
  return synthetic.traces.map(pickableTrace);
}

describe('pickFirstBreaks on a clean gather', () => {
  const synthetic = gather();
  const picks = pickFirstBreaks(asPickable(synthetic));

  it('returns one pick per trace in input order, every one within one sample + 1 ms', () => {
    expect(picks.map((pick) => pick.traceIndex)).toEqual(synthetic.traces.map((_, index) => index));
    picks.forEach((pick, index) => {
      expect(pick.rejected).toBe(false);
      expect(Math.abs((pick.time as number) - (synthetic.trueTimes[index] as number))).toBeLessThanOrEqual(tolerance(0.00025));
    });
  });

  it('gives every pick a sigma of at least half a sample and a confidence in [0, 1]', () => {
    for (const pick of picks) {
      expect(pick.sigma).not.toBeNull();
      expect(pick.sigma as number).toBeGreaterThanOrEqual(0.00025 / 2);
      expect(pick.confidence).toBeGreaterThanOrEqual(0);
      expect(pick.confidence).toBeLessThanOrEqual(1);
    }
  });

  it('reads Float32Array samples (as a 32-bit file gives them) to the same picks', () => {
    const float32 = pickFirstBreaks(asPickable(gather({ float32: true })));
    float32.forEach((pick, index) => expect(Math.abs((pick.time as number) - (picks[index]?.time as number))).toBeLessThanOrEqual(0.00025));
  });

  it('does not modify its input', () => {
    const traces = asPickable(gather());
    const copy = traces.map((trace) => Float64Array.from(trace.samples));
    pickFirstBreaks(traces);
    traces.forEach((trace, index) => expect(Array.from(trace.samples)).toEqual(Array.from(copy[index] as Float64Array)));
  });
});

describe('pickFirstBreaks: a dead trace and a noise burst before the arrival', () => {
  const synthetic = gather({ deadTraces: [10], bursts: [{ traceIndex: 20, start: 0.008, duration: 0.008, amplitude: 3 }], snr: 10 });
  let picks: TracePick[] = [];
  it('runs without throwing', () => {
    picks = pickFirstBreaks(asPickable(synthetic));
    expect(picks).toHaveLength(48);
  });
  it('flags the dead trace: no time, no sigma, rejected, with the reason', () => {
    expect(picks[10]).toMatchObject({ time: null, sigma: null, rejected: true, lowConfidence: true, confidence: 0 });
    expect(picks[10]?.note).toMatch(/dead trace/);
  });
  it('the burst trace is caught by its neighbours: re-picked at the arrival (or rejected), with a note saying how far off the first pick was', () => {
    const burst = picks[20] as TracePick;
    expect(burst.note).toMatch(/ms earlier than its neighbours predict/);
    if (!burst.rejected) expect(Math.abs((burst.time as number) - (synthetic.trueTimes[20] as number))).toBeLessThanOrEqual(tolerance(0.00025));
  });
  it('without the neighbour check, the burst trace is picked on the burst', () => {
    const alone = pickFirstBreaks(asPickable(synthetic), { consistency: false });
    expect((alone[20]?.time as number) < (synthetic.trueTimes[20] as number) - 0.005).toBe(true);
  });
  it('with the neighbour check but no re-pick, the burst pick is rejected and keeps its time as the candidate', () => {
    const noRepick = pickFirstBreaks(asPickable(synthetic), { repick: false });
    expect(noRepick[20]?.rejected).toBe(true);
    expect(noRepick[20]?.time).not.toBeNull();
    expect(noRepick[20]?.note).toMatch(/earlier than its neighbours predict \(tolerance/);
  });
});

describe('pickFirstBreaks notes', () => {
  it('every low-confidence or rejected pick says why in words; a weak onset gives its amplitude ratio', () => {
    const picks = pickFirstBreaks(asPickable(gather({ snr: (index) => (index % 2 === 0 ? 3 : 15), seed: 11 })));
    const flagged = picks.filter((pick) => pick.lowConfidence || pick.rejected);
    expect(flagged.length).toBeGreaterThan(0);
    for (const pick of flagged) expect(pick.note, `trace ${pick.traceIndex}`).not.toBeNull();
    expect(picks.some((pick) => /^weak onset: amplitude ratio -?[\d.]+\u00a0dB across it \(confidence 0\.\d\d\)$/.test(pick.note ?? ''))).toBe(true);
  });
});

describe('pickFirstBreaks neighbour check: anchors', () => {
  it('holds a low-confidence pick to its neighbours\' scatter, not to its own large sigma', () => {
    // trace 20: a weak arrival 3 ms after the trend of its clear neighbours
    const times = Array.from({ length: 48 }, (_, index) => twoLayerFirstArrival(2 + 2 * index, 500, 2000, 6) + (index === 20 ? 0.003 : 0));
    const snr = Array.from({ length: 48 }, (_, index) => (index === 20 ? 2.5 : 15));
    const picks = pickFirstBreaks(asPickable(gather({ arrivalTimes: times, snr, seed: 21 })), { repick: false });
    const alone = pickFirstBreaks(asPickable(gather({ arrivalTimes: times, snr, seed: 21 })), { consistency: false });
    expect(alone[20]?.lowConfidence).toBe(true);
    expect(3 * (alone[20]?.sigma as number)).toBeGreaterThan(0.003); // its own sigma alone would excuse the misfit
    expect(picks[20]?.rejected).toBe(true);
    expect(picks[20]?.note).toMatch(/later than its neighbours predict/);
  });
});

describe('pickFirstBreaks re-picking', () => {
  it('keeps a trace rejected when the window around the prediction shows no onset of its own', () => {
    // trace 20 holds noise and a burst but (practically) no arrival
    const snr = Array.from({ length: 48 }, (_, index) => (index === 20 ? 0.01 : 12));
    const synthetic = gather({ snr, bursts: [{ traceIndex: 20, start: 0.01, duration: 0.008, amplitude: 300 }] });
    const picks = pickFirstBreaks(asPickable(synthetic));
    expect(picks[20]?.rejected).toBe(true);
    expect(picks[20]?.note).toMatch(/than its neighbours predict/);
    expect(picks[20]?.note).not.toMatch(/re-picked/);
  });
  it('does not take back the same onset found again outside the tolerance (a 4 ms static on one trace stays rejected)', () => {
    const times = Array.from({ length: 48 }, (_, index) => twoLayerFirstArrival(2 + 2 * index, 500, 2000, 6) + (index === 20 ? 0.004 : 0));
    const synthetic = gather({ arrivalTimes: times, snr: 20 });
    // a 12 ms energy window makes the re-pick window ± 6 ms, wide enough to find the shifted onset again
    const picks = pickFirstBreaks(asPickable(synthetic), { energyWindow: 0.012 });
    expect(picks[20]?.rejected).toBe(true);
    expect(picks[20]?.note).toMatch(/ms later than its neighbours predict/);
    expect(Math.abs((picks[20]?.time as number) - (times[20] as number))).toBeLessThanOrEqual(tolerance(0.00025));
  });
});

describe('pickableTrace', () => {
  it('gives the signed offset receiver x − source x, or null when either position is missing', () => {
    const [trace] = gather({ sourceX: 30 }).traces;
    expect(pickableTrace(trace as NonNullable<typeof trace>).offset).toBe(2 - 30);
    expect(pickableTrace({ ...(trace as NonNullable<typeof trace>), source: null }).offset).toBeNull();
    expect(pickableTrace({ ...(trace as NonNullable<typeof trace>), receiver: null }).offset).toBeNull();
  });
});

describe('pickFirstBreaks edges', () => {
  const base = asPickable(gather());
  it('a trace with non-finite samples is not picked, and says so', () => {
    const samples = Float64Array.from(base[5]?.samples ?? []);
    samples[100] = Number.NaN;
    const picks = pickFirstBreaks(base.map((trace, index) => (index === 5 ? { ...trace, samples } : trace)));
    expect(picks[5]).toMatchObject({ time: null, rejected: true });
    expect(picks[5]?.note).toMatch(/1 non-finite samples/);
  });
  it('no traces give no picks', () => {
    expect(pickFirstBreaks([])).toEqual([]);
  });
  it('a trace too short to pick is refused with its length', () => {
    const picks = pickFirstBreaks([{ samples: [1, 2, 3], sampleInterval: 0.001, delay: 0, offset: 1 }], { bandPass: null });
    expect(picks[0]?.note).toMatch(/3 samples, too few/);
  });
  it('without offsets the neighbour check uses trace order and says so', () => {
    const traces = base.map((trace) => ({ ...trace, offset: null }));
    const samples = Float64Array.from(traces[30]?.samples ?? []);
    // plant a strong early arrival 15 ms before the true one
    for (let k = 100; k < 140; k += 1) samples[k] = (samples[k] as number) + 3 * Math.sin(0.6 * (k - 100)) * Math.exp(-(k - 100) / 20);
    const picks = pickFirstBreaks(traces.map((trace, index) => (index === 30 ? { ...trace, samples } : trace)), { repick: false });
    expect(picks[30]?.rejected).toBe(true);
    expect(picks[30]?.note).toMatch(/in trace order .*offsets unknown/);
  });
  // A positive delay: the neighbour check's earliest times refer to the shot instant (t ≥ 0 and
  // chords through the shot point), so a negative delay that puts these arrivals before the shot
  // is a different, unphysical gather, not a shift (common practice: no arrival before the shot).
  it('a delay shifts every pick by the delay (sample 0 is at the delay), and nothing else', () => {
    const undelayed = pickFirstBreaks(base);
    const delayed = pickFirstBreaks(base.map((trace) => ({ ...trace, delay: 0.005 })));
    delayed.forEach((pick, index) => expect((pick.time as number) - (undelayed[index]?.time as number)).toBeCloseTo(0.005, 12));
  });
  it('picks with STA/LTA as the first estimate too (at SNR 12, at least 45 of 48 within one sample + 1 ms)', () => {
    const picks = pickFirstBreaks(base, { estimator: 'sta-lta' });
    const synthetic = gather();
    const within = picks.filter((pick, index) => !pick.rejected && Math.abs((pick.time as number) - (synthetic.trueTimes[index] as number)) <= tolerance(0.00025));
    expect(within.length).toBeGreaterThanOrEqual(45);
  });
});

describe('pickFirstBreaks misuse (a RangeError naming the option or trace)', () => {
  const traces = asPickable(gather()).slice(0, 3);
  it.each([
    [{ bandPass: { low: 100, high: 50 } }, /bandPass/],
    [{ bandPass: { low: 0, high: 50 } }, /bandPass/],
    [{ bandPassOrder: 0 }, /bandPassOrder/],
    [{ gain: { window: -1 } }, /gain/],
    [{ energyWindow: 0 }, /energyWindow/],
    [{ aicBefore: -0.01 }, /aicBefore/],
    [{ triggerRatio: 1 }, /triggerRatio/],
    [{ onsetRatio: Number.NaN }, /onsetRatio/],
    [{ lowConfidenceBelow: 2 }, /lowConfidenceBelow/],
    [{ neighbours: 1 }, /neighbours/],
    [{ consistencyThreshold: 0 }, /consistencyThreshold/],
    [{ estimator: 'other' as 'sta-lta' }, /estimator/],
  ] as const)('option %j', (options, message) => {
    expect(() => pickFirstBreaks(traces, options)).toThrow(RangeError);
    expect(() => pickFirstBreaks(traces, options)).toThrow(message);
  });
  it('a band-pass above a trace Nyquist frequency names the trace', () => {
    const coarse = traces.map((trace, index) => (index === 2 ? { ...trace, sampleInterval: 0.002 } : trace));
    expect(() => pickFirstBreaks(coarse, { bandPass: { low: 10, high: 300 } })).toThrow(/trace 2: .*Nyquist frequency 250 Hz/);
  });
  it('a bad sample interval, delay or offset names the trace', () => {
    expect(() => pickFirstBreaks([{ ...(traces[0] as PickableTrace), sampleInterval: 0 }])).toThrow(/trace 0: sampleInterval/);
    expect(() => pickFirstBreaks([{ ...(traces[0] as PickableTrace), delay: Number.NaN }])).toThrow(/trace 0: delay/);
    expect(() => pickFirstBreaks([{ ...(traces[0] as PickableTrace), offset: Number.POSITIVE_INFINITY }])).toThrow(/trace 0: offset/);
  });
  it('resolvePickingOptions fills the defaults', () => {
    expect(resolvePickingOptions({})).toEqual(DEFAULT_PICKING_OPTIONS);
    expect(resolvePickingOptions({ estimator: 'sta-lta' }).estimator).toBe('sta-lta');
  });
});

describe('traceOnset on the METHODS §11 trace (check case 11.1, computed from the stated trace)', () => {
  it('finds the model onset within 2 samples with the energy ratio and with STA/LTA', () => {
    const samples = Float64Array.from(methodsTrace(0.05));
    const options = resolvePickingOptions({ energyWindow: 20 * METHODS_DT, aicBefore: 60 * METHODS_DT, aicAfter: 40 * METHODS_DT, shortWindow: 8 * METHODS_DT, longWindow: 64 * METHODS_DT });
    for (const estimator of ['energy-ratio', 'sta-lta'] as const) {
      const outcome = traceOnset(samples, METHODS_DT, { ...options, estimator });
      expect(outcome.ok).toBe(true);
      if (outcome.ok) expect(Math.abs(outcome.onset.index - METHODS_ONSET)).toBeLessThanOrEqual(2);
    }
  });
});

describe('pickQuality', () => {
  it('the doc example: a 20 dB onset with a 2.5 ms rise at 0.25 ms', () => {
    const quality = pickQuality({ amplitudeRatio: 10, riseSamples: 10, triggered: true }, 0.00025);
    expect(quality.amplitudeRatioDb).toBeCloseTo(20, 12);
    expect(quality.confidence).toBeCloseTo(1 / (1 + Math.exp(-8 / 2.5)), 12);
    // √(T²/12 + (1.2·r/√99)² + (0.2·r)²), r = 2.5 ms
    const rise = 0.0025;
    expect(quality.sigma).toBeCloseTo(Math.sqrt(0.00025 ** 2 / 12 + ((1.2 * rise) / Math.sqrt(99)) ** 2 + (0.2 * rise) ** 2), 15);
  });
  it('confidence falls and sigma grows as the amplitude ratio falls; a failed onset test halves the confidence', () => {
    const strong = pickQuality({ amplitudeRatio: 20, riseSamples: 8, triggered: true }, 0.0005);
    const weak = pickQuality({ amplitudeRatio: 2, riseSamples: 8, triggered: true }, 0.0005);
    expect(weak.confidence).toBeLessThan(strong.confidence);
    expect(weak.sigma).toBeGreaterThan(strong.sigma);
    const untriggered = pickQuality({ amplitudeRatio: 20, riseSamples: 8, triggered: false }, 0.0005);
    expect(untriggered.confidence).toBeCloseTo(strong.confidence / 2, 12);
  });
  it('never gives a sigma below half a sample; an infinite ratio counts as 60 dB, a ratio ≤ 1 takes the SNR floor', () => {
    expect(pickQuality({ amplitudeRatio: 1e6, riseSamples: 0.5, triggered: true }, 0.001).sigma).toBe(0.0005);
    expect(pickQuality({ amplitudeRatio: Number.POSITIVE_INFINITY, riseSamples: 1, triggered: true }, 0.001).amplitudeRatioDb).toBe(60);
    const flat = pickQuality({ amplitudeRatio: 0.5, riseSamples: 4, triggered: true }, 0.001);
    expect(flat.sigma).toBeCloseTo(Math.sqrt(0.001 ** 2 / 12 + ((1.2 * 0.004) / MIN_SNR) ** 2 + (0.2 * 0.004) ** 2), 15);
  });
});
