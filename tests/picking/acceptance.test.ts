/**
 * Acceptance of the automatic picker on synthetic shot gathers with known first breaks
 * (tests/tools/synthetic-gather.ts): engineering-scale lines of 24–96 channels over two horizontal
 * layers, 0.125–1 ms sampling, a signal-to-noise ratio (peak / noise RMS) drawn per trace from
 * 3 to 20, broadband noise with or without a low-frequency share and sparse spikes, and, on some
 * gathers, the direct wave arriving after the head wave and stronger than it.
 *
 * Criteria (the picker's brief): at least 90 % of the accepted (not rejected) picks within one
 * sample interval + 1 ms of the truth; more than half of the misses among the picks flagged low
 * confidence or rejected; the sigmas covering about 68 % / 95 % of the errors (loose bounds
 * 55–85 % within 1σ, at least 88 % within 2σ). The figures are printed for the closing note.
 *
 * The defaults were chosen, and the sigma calibrated, on gathers from this generator with other
 * seeds (1–38); the seeds here (101–106) were not used for tuning.
 */
import { describe, expect, it } from 'vitest';
import { pickableTrace, pickFirstBreaks, type TracePick } from '../../lib/picking/index.js';
import { seededRandom } from '../../lib/random.js';
import { syntheticGather, twoLayerFirstArrival } from '../tools/synthetic-gather.js';

const SAMPLE_INTERVALS = [0.000125, 0.00025, 0.0005, 0.001];
const SEEDS = [101, 102, 103, 104, 105, 106];
const SNR_BANDS: readonly (readonly [number, number])[] = [
  [3, 5],
  [5, 8],
  [8, 12],
  [12, 20],
];

/** One sample interval + 1 ms (the brief's tolerance). */
const tolerance = (sampleInterval: number): number => sampleInterval + 0.001;

interface Scenario {
  readonly label: string;
  readonly gather: ReturnType<typeof syntheticGather>;
  readonly sampleInterval: number;
}

/** A gather whose line, layers, noise and later arrivals are drawn from `seed`. */
function scenario(seed: number, sampleInterval: number): Scenario {
  const draw = seededRandom(seed);
  const pick = <T>(choices: readonly T[]): T => choices[Math.floor(draw() * choices.length)] as T;
  const channels = pick([24, 48, 96]);
  const spacing = pick([1, 2, 2.5, 5]);
  const split = draw() < 0.4;
  const topVelocity = 300 + 500 * draw();
  const refractorVelocity = 1500 + 2500 * draw();
  const thickness = 3 + 12 * draw();
  const receiverXs = Array.from({ length: channels }, (_, index) => index * spacing);
  // split spread: the shot midway between the middle two geophones; end-on: one spacing off the end
  const sourceX = split ? (channels / 2 - 0.5) * spacing : -spacing;
  const arrival = (offset: number): number => twoLayerFirstArrival(offset, topVelocity, refractorVelocity, thickness);
  const delay = draw() < 0.3 ? -0.005 : 0;
  const latest = Math.max(...receiverXs.map((x) => arrival(x - sourceX)));
  const sampleCount = Math.ceil((latest + 0.15 - delay) / sampleInterval);
  const lowFrequencyShare = pick([0, 0.3, 0.6]);
  const laterAmplitude = pick([0, 1, 2]);
  const snr = receiverXs.map(() => 3 * (20 / 3) ** draw());
  const frequencies = receiverXs.map(() => 50 + 100 * draw());
  const gather = syntheticGather({
    sourceX,
    receiverXs,
    arrivalTimes: arrival,
    sampleInterval,
    sampleCount,
    delay,
    seed,
    snr,
    frequency: frequencies,
    amplitude: { exponent: 1.2 },
    ...(lowFrequencyShare > 0 ? { lowFrequencyNoise: { share: lowFrequencyShare, low: 2, high: 15 } } : {}),
    ...(laterAmplitude > 0 ? { laterArrivals: [{ times: (offset: number) => Math.abs(offset) / topVelocity, relativeAmplitude: laterAmplitude }] } : {}),
    spikes: { perTrace: 0.2, amplitude: 8 },
  });
  const label = `${channels} ch × ${spacing} m ${split ? 'split' : 'end-on'}, V ${topVelocity.toFixed(0)}/${refractorVelocity.toFixed(0)} m/s, h ${thickness.toFixed(1)} m, LF ${lowFrequencyShare}, later ×${laterAmplitude}`;
  return { label, gather, sampleInterval };
}

interface Outcome {
  readonly snr: number;
  readonly sampleInterval: number;
  readonly error: number | null;
  readonly pick: TracePick;
}

const percent = (value: number): string => `${(100 * value).toFixed(1)} %`;

describe('pickFirstBreaks acceptance on synthetic gathers (SNR 3–20, 0.125–1 ms, 24–96 channels, two layers)', () => {
  const outcomes: Outcome[] = [];
  for (const sampleInterval of SAMPLE_INTERVALS) {
    for (const seed of SEEDS) {
      const { gather } = scenario(seed * 10 + SAMPLE_INTERVALS.indexOf(sampleInterval), sampleInterval);
      const picks = pickFirstBreaks(gather.traces.map(pickableTrace));
      picks.forEach((pick, index) => {
        outcomes.push({ snr: gather.snr[index] as number, sampleInterval, error: pick.time === null ? null : pick.time - (gather.trueTimes[index] as number), pick });
      });
    }
  }
  const accepted = outcomes.filter((outcome) => !outcome.pick.rejected && outcome.error !== null);
  const within = (outcome: Outcome): boolean => outcome.error !== null && Math.abs(outcome.error) <= tolerance(outcome.sampleInterval);
  const misses = outcomes.filter((outcome) => !within(outcome));
  const flaggedMisses = misses.filter((outcome) => outcome.pick.rejected || outcome.pick.lowConfidence);
  const coverage = (factor: number): number =>
    accepted.filter((outcome) => Math.abs(outcome.error as number) <= factor * (outcome.pick.sigma as number)).length / accepted.length;

  const lines = [
    `picker acceptance: ${outcomes.length} traces in ${SAMPLE_INTERVALS.length * SEEDS.length} gathers; ${percent(accepted.length / outcomes.length)} accepted`,
    `  accepted picks within one sample + 1 ms: ${percent(accepted.filter(within).length / accepted.length)}`,
    ...SNR_BANDS.map(([low, high]) => {
      const band = outcomes.filter((outcome) => outcome.snr >= low && outcome.snr < (high === 20 ? 20.0001 : high));
      const bandAccepted = band.filter((outcome) => !outcome.pick.rejected && outcome.error !== null);
      return `  SNR ${low}–${high}: ${percent(bandAccepted.filter(within).length / bandAccepted.length)} of ${bandAccepted.length} accepted within tolerance (${percent(bandAccepted.length / band.length)} of the band accepted)`;
    }),
    ...SAMPLE_INTERVALS.map((sampleInterval) => {
      const set = accepted.filter((outcome) => outcome.sampleInterval === sampleInterval);
      return `  ${sampleInterval * 1000} ms: ${percent(set.filter(within).length / set.length)} within tolerance`;
    }),
    `  misses (of all traces): ${misses.length}; flagged low-confidence or rejected: ${percent(flaggedMisses.length / Math.max(1, misses.length))}`,
    `  sigma coverage of accepted errors: ${percent(coverage(1))} within 1σ, ${percent(coverage(2))} within 2σ`,
  ];
  console.log(lines.join('\n'));

  it('at least 90 % of accepted picks lie within one sample interval + 1 ms of the truth', () => {
    expect(accepted.filter(within).length / accepted.length).toBeGreaterThanOrEqual(0.9);
  });
  it('most accepted picks survive: at least 80 % of all traces are accepted', () => {
    expect(accepted.length / outcomes.length).toBeGreaterThanOrEqual(0.8);
  });
  it('the picks flagged low-confidence or rejected hold more than half of the misses', () => {
    expect(flaggedMisses.length / misses.length).toBeGreaterThan(0.5);
  });
  it('sigma covers 55–85 % of accepted errors within 1σ and at least 88 % within 2σ', () => {
    expect(coverage(1)).toBeGreaterThanOrEqual(0.55);
    expect(coverage(1)).toBeLessThanOrEqual(0.85);
    expect(coverage(2)).toBeGreaterThanOrEqual(0.88);
  });
  it('every accepted pick has a sigma of at least half a sample interval', () => {
    for (const outcome of accepted) expect(outcome.pick.sigma as number).toBeGreaterThanOrEqual(outcome.sampleInterval / 2);
  });
  it('the share within tolerance does not fall as SNR rises (3–5 ≤ 12–20)', () => {
    const share = ([low, high]: readonly [number, number]): number => {
      const band = accepted.filter((outcome) => outcome.snr >= low && outcome.snr < high + 0.0001);
      return band.filter(within).length / band.length;
    };
    expect(share(SNR_BANDS[0] as [number, number])).toBeLessThanOrEqual(share(SNR_BANDS[3] as [number, number]));
  });
});

describe('pickFirstBreaks acceptance: a dead trace and a big noise burst before the arrival', () => {
  it('are handled without throwing, and both are flagged', () => {
    const sampleInterval = 0.00025;
    const gather = syntheticGather({
      sourceX: -2,
      receiverXs: Array.from({ length: 48 }, (_, index) => 2 * index),
      arrivalTimes: (offset) => twoLayerFirstArrival(offset, 450, 2200, 7),
      sampleInterval,
      sampleCount: 1600,
      snr: 10,
      seed: 99,
      deadTraces: [17],
      // five times the arrival's peak, 10 ms long, ending 3.6 ms before the arrival at 58.6 ms
      bursts: [{ traceIndex: 30, start: 0.045, duration: 0.01, amplitude: 5 }],
    });
    let picks: TracePick[] = [];
    expect(() => {
      picks = pickFirstBreaks(gather.traces.map(pickableTrace));
    }).not.toThrow();
    const dead = picks[17] as TracePick;
    expect(dead).toMatchObject({ time: null, sigma: null, rejected: true, lowConfidence: true });
    expect(dead.note).toMatch(/dead trace/);
    const burst = picks[30] as TracePick;
    console.log(`burst trace: ${JSON.stringify(burst)}; true first break ${((gather.trueTimes[30] as number) * 1000).toFixed(2)} ms`);
    expect(burst.note).not.toBeNull();
    expect(burst.note).toMatch(/earlier than its neighbours predict/);
    // either re-picked at the true arrival, or rejected
    if (!burst.rejected) expect(Math.abs((burst.time as number) - (gather.trueTimes[30] as number))).toBeLessThanOrEqual(tolerance(sampleInterval));
    // the neighbours of both are untouched
    for (const index of [16, 18, 29, 31]) {
      expect(picks[index]?.rejected).toBe(false);
      expect(Math.abs((picks[index]?.time as number) - (gather.trueTimes[index] as number))).toBeLessThanOrEqual(tolerance(sampleInterval));
    }
  });
});
