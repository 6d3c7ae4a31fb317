/**
 * The neighbour check against the shape of a first-arrival curve: near-shot picks on a steep
 * direct wave are kept, and a run of noise-only traces cannot vouch for its own wrong picks.
 */
import { describe, expect, it } from 'vitest';
import { neighbourConsistency, pickableTrace, pickFirstBreaks, pickQuality, type ConsistencyItem } from '../../lib/picking/index.js';
import { syntheticGather, twoLayerFirstArrival } from '../tools/synthetic-gather.js';

const SIGMA = 0.00025;
const OPTIONS = { neighbours: 4, threshold: 3, offsets: true };
/** One sample + 1 ms: the acceptance tolerance (tests/picking/acceptance.test.ts). */
const tolerance = (sampleInterval: number): number => sampleInterval + 0.001;

// A thin slow layer: the direct wave (350 m/s) is first only within about 3.5 m of the shot,
// and its slope is seven times the refracted wave's.
const steep = (offset: number): number => twoLayerFirstArrival(offset, 350, 2500, 1.5);

function items(offsets: readonly number[], times: readonly number[]): ConsistencyItem[] {
  return offsets.map((position, index) => ({ position, time: times[index] ?? null, sigma: SIGMA, usable: true, anchor: true }));
}

describe('neighbourConsistency with offsets: a concave time–distance curve', () => {
  // Source: physics of layered ground with velocity rising with depth — t(|x|) is concave, so a
  // straight line extrapolated from one side lies on or above the curve.
  const offsets = [...Array.from({ length: 12 }, (_, index) => -24 + 2 * index), ...Array.from({ length: 12 }, (_, index) => 2 + 2 * index)];
  const times = offsets.map(steep);

  it('keeps the direct-wave picks nearest the shot, on both sides of a split spread', () => {
    const verdicts = neighbourConsistency(items(offsets, times), OPTIONS);
    expect(verdicts.filter((verdict) => verdict.rejected)).toHaveLength(0);
  });
  it('(the same end-on picks without the offsets rule are rejected: the extrapolation is 3 ms late at 2 m)', () => {
    const verdicts = neighbourConsistency(items(offsets.slice(12), times.slice(12)), { neighbours: 4, threshold: 3 });
    expect(verdicts[0]?.rejected).toBe(true);
  });
  it('still rejects a near-shot pick later than the extrapolation beyond tolerance', () => {
    const late = [...times];
    late[12] = (late[12] as number) + 0.006;
    const verdicts = neighbourConsistency(items(offsets, late), OPTIONS);
    expect(verdicts.map((verdict, index) => (verdict.rejected ? index : -1)).filter((index) => index >= 0)).toEqual([12]);
  });
  it('still rejects a near-shot pick earlier than the chord from the shot point allows, and any pick before the shot', () => {
    // Source: concavity with t(0) ≥ 0 — t(2 m) ≥ t(4 m)·2/4 (chord through the shot point).
    const early = [...times];
    early[12] = 0.1 * (early[13] as number);
    const verdicts = neighbourConsistency(items(offsets, early), OPTIONS);
    expect(verdicts[12]?.rejected).toBe(true);
    expect(verdicts[12]?.earliest as number).toBeGreaterThan(early[12] as number);
    // Source: common practice — no first break before the shot.
    const negative = [...times];
    negative[11] = -0.0005;
    expect(neighbourConsistency(items(offsets, negative), OPTIONS)[11]?.rejected).toBe(true);
  });
  it('still rejects a pick at the far end of the spread that is earlier than any plausible slowness allows', () => {
    // Source: common practice — times rise with offset at no less than the trend's slowness ÷ 2.
    const early = [...times];
    early[23] = (early[22] as number) - 0.002;
    expect(neighbourConsistency(items(offsets, early), OPTIONS)[23]?.rejected).toBe(true);
  });
});

describe('pickFirstBreaks on a steep direct wave near the shot (end shots and off-end shots)', () => {
  const sampleInterval = 0.00025;
  const receiverXs = Array.from({ length: 24 }, (_, index) => 2 * index);
  for (const sourceX of [-2, 48, -10, 58]) {
    it(`shot at ${sourceX} m: the two traces nearest the shot are kept and within one sample + 1 ms`, () => {
      const gather = syntheticGather({ sourceX, receiverXs, arrivalTimes: steep, sampleInterval, sampleCount: 800, snr: 15, seed: 31 });
      const picks = pickFirstBreaks(gather.traces.map(pickableTrace));
      const nearest = gather.offsets.map((offset, index) => ({ offset: Math.abs(offset), index })).sort((a, b) => a.offset - b.offset).slice(0, 2);
      for (const { index } of nearest) {
        const pick = picks[index];
        // Source: the brief's acceptance tolerance (one sample + 1 ms), common practice.
        expect(Math.abs((pick?.time as number) - (gather.trueTimes[index] as number))).toBeLessThanOrEqual(tolerance(sampleInterval));
        expect(pick?.rejected, pick?.note ?? '').toBe(false);
      }
    });
  }
});

describe('pickFirstBreaks with a run of noise-only traces at the far end', () => {
  const sampleInterval = 0.00025;
  const receiverXs = Array.from({ length: 48 }, (_, index) => 3 * index);
  const noisy = (index: number): boolean => index >= 34;
  const cases = [57, 58, 59].flatMap((seed) => [0.05, 1.5].map((snr) => ({ seed, snr })));
  const runs = cases.map(({ seed, snr }) => {
    const gather = syntheticGather({
      sourceX: -4.5,
      receiverXs,
      arrivalTimes: (offset) => twoLayerFirstArrival(offset, 450, 2700, 6),
      sampleInterval,
      sampleCount: 1400,
      snr: (index) => (noisy(index) ? snr : 12),
      seed,
    });
    return { seed, snr, gather, picks: pickFirstBreaks(gather.traces.map(pickableTrace)) };
  });

  it('accepts no pick more than 10 ms from the truth (noise-only SNR 0.05, and noise-dominated SNR 1.5)', () => {
    // Source: common practice — a pick that is not the arrival must not enter the interpretation;
    // the low-confidence picks of the run must not vouch for each other.
    for (const { seed, snr, gather, picks } of runs) {
      picks.forEach((pick, index) => {
        if (pick.rejected) return;
        expect(Math.abs((pick.time as number) - (gather.trueTimes[index] as number)), `seed ${seed}, SNR ${snr}, trace ${index}: ${pick.note}`).toBeLessThanOrEqual(0.01);
      });
    }
  });
  it('keeps the confident picks before the run', () => {
    for (const { seed, picks } of runs) {
      picks.forEach((pick, index) => {
        if (noisy(index) || index === 33) return;
        expect(pick.rejected, `seed ${seed}, trace ${index}: ${pick.note}`).toBe(false);
      });
    }
  });
  it('gives a pick whose onset test failed a sigma that reflects the doubt, growing as the confidence falls', () => {
    // Source: common practice — a wrong pick may fall anywhere in the window searched (uniform, SD W/√12).
    const window = 0.02;
    const doubtful = pickQuality({ amplitudeRatio: 1.5, riseSamples: 4, triggered: false }, sampleInterval, window);
    expect(doubtful.confidence).toBeLessThan(0.05);
    expect(doubtful.sigma).toBeGreaterThan(0.9 * (window / Math.sqrt(12)));
    const clear = pickQuality({ amplitudeRatio: 10, riseSamples: 4, triggered: true }, sampleInterval, window);
    expect(clear.sigma).toBeCloseTo(pickQuality({ amplitudeRatio: 10, riseSamples: 4, triggered: true }, sampleInterval).sigma, 12);
    for (const pick of runs.flatMap((run) => run.picks)) {
      if (pick.confidence < 0.05 && pick.time !== null && pick.note !== null && /never reached/.test(pick.note)) expect(pick.sigma as number).toBeGreaterThan(0.003);
    }
  });
});
