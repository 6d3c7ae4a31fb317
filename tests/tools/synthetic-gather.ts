/**
 * The project's synthetic shot-gather generator: traces with a known first-break time each, for
 * the picker's tests, the sample-gather generator and the picking benchmark.
 *
 * Each trace is the sum of
 * - the first arrival: a causal wavelet that starts exactly at the arrival time t₀ (zero before
 *   it, so the "true" first break is unambiguous), scaled so that its largest |value| is the
 *   trace's peak amplitude;
 * - optional later arrivals, the same wavelet at later times with an amplitude relative to the
 *   first arrival's peak;
 * - band-limited random noise: seeded white Gaussian noise through a causal Butterworth band-pass
 *   (lib/picking, itself checked against scipy), scaled to the trace's noise RMS;
 * - optional spikes (single samples of ± `amplitude` × noise RMS) and bursts (Hann-tapered
 *   band-limited noise of peak `amplitude` × the trace's wavelet peak).
 *
 * **Signal-to-noise ratio** here is the amplitude ratio SNR = (peak |wavelet| of the first arrival
 * on the trace) / (RMS of the band-limited noise on the trace), noise RMS measured on the samples
 * generated, before spikes and bursts. SNR 3 means a peak three times the noise RMS (about
 * 9.5 dB); it is set per trace, so the amplitude decay with offset changes the scale of a trace,
 * not its SNR.
 *
 * Wavelets (τ = t − t₀ ≥ 0, f the dominant frequency):
 * - `damped-sine`: sin(2πfτ)·exp(−τ/d), d = `decayPeriods`/f (default 1 period) — a
 *   minimum-phase-like pulse whose first peak, a quarter period after the onset, is its largest;
 * - `berlage`: τ^n·exp(−τ/d)·sin(2πfτ) (Aldridge1990, as recalled) — a softer onset for n ≥ 1.
 *
 * Amplitude decays with source–receiver distance r as A(r) = A_ref·(r_ref / max(r, r_ref))^p
 * (geometric spreading and attenuation lumped in p; common practice for synthetic gathers).
 *
 * Everything is reproducible from `seed` (lib/random.ts).
 */
import type { GatherTrace } from '../../lib/gathers/gather.js';
import { butterworthBandPass } from '../../lib/picking/butterworth.js';
import { sosFilter } from '../../lib/picking/sos-filter.js';
import { seededNormal, seededRandom } from '../../lib/random.js';

export interface SyntheticWavelet {
  readonly shape: 'damped-sine' | 'berlage';
  /** Dominant frequency, Hz. */
  readonly frequency: number;
  /** Decay time in periods of the dominant frequency; default 1. */
  readonly decayPeriods?: number;
  /** Berlage exponent n; default 1. */
  readonly exponent?: number;
}

export interface SyntheticBurst {
  readonly traceIndex: number;
  /** Start time, s after the shot. */
  readonly start: number;
  /** Duration, s. */
  readonly duration: number;
  /** Peak of the burst in units of the trace's first-arrival peak. */
  readonly amplitude: number;
}

export interface LaterArrival {
  /** Arrival time for each receiver (s after the shot) or a function of offset; times at or before the first break are skipped. */
  readonly times: readonly number[] | ((offset: number, receiverX: number) => number);
  /** Peak relative to the first arrival's peak. */
  readonly relativeAmplitude: number;
  /** Dominant frequency, Hz; default the first arrival's. */
  readonly frequency?: number;
}

type PerTrace<T> = T | readonly T[] | ((traceIndex: number, offset: number) => T);

export interface SyntheticGatherOptions {
  readonly sourceX: number;
  readonly receiverXs: readonly number[];
  /** First-arrival time of each receiver (s after the shot), or a function of offset (receiver − source x, m). */
  readonly arrivalTimes: readonly number[] | ((offset: number, receiverX: number) => number);
  /** s. */
  readonly sampleInterval: number;
  readonly sampleCount: number;
  /** Time of sample 0 after the shot, s; default 0. */
  readonly delay?: number;
  /** Default: damped sine of 100 Hz. A number or function sets the frequency per trace. */
  readonly wavelet?: SyntheticWavelet;
  /** Dominant frequency per trace, Hz (overrides `wavelet.frequency`). */
  readonly frequency?: PerTrace<number>;
  /** Peak amplitude at `referenceDistance` (default 1 at 1 m) and its decay exponent p (default 1). */
  readonly amplitude?: { readonly reference?: number; readonly referenceDistance?: number; readonly exponent?: number };
  readonly laterArrivals?: readonly LaterArrival[];
  /** SNR per trace (module comment); default 10. */
  readonly snr?: PerTrace<number>;
  /** Pass band of the noise, Hz; default 5 Hz to min(400 Hz, 0.45/T). */
  readonly noiseBand?: { readonly low: number; readonly high: number };
  /**
   * A second, low-frequency noise component (wind, traffic; common practice to expect one in
   * field records): its share of the total noise power (0…1) and its band, Hz. Default none.
   */
  readonly lowFrequencyNoise?: { readonly share: number; readonly low: number; readonly high: number };
  /** Spikes: expected count per trace and amplitude in units of the noise RMS. */
  readonly spikes?: { readonly perTrace: number; readonly amplitude: number };
  readonly bursts?: readonly SyntheticBurst[];
  /** Traces recorded as all zeros. */
  readonly deadTraces?: readonly number[];
  /** Samples stored as Float32Array (as a 32-bit float file gives them) instead of Float64Array. */
  readonly float32?: boolean;
  readonly seed: number;
}

export interface SyntheticGather {
  readonly traces: GatherTrace[];
  /** The first-arrival time of every trace, s after the shot (dead traces too). */
  readonly trueTimes: readonly number[];
  /** Signed offsets, receiver x − source x, m. */
  readonly offsets: readonly number[];
  readonly snr: readonly number[];
  readonly noiseRms: readonly number[];
  readonly peakAmplitude: readonly number[];
  readonly frequency: readonly number[];
}

function perTrace<T>(value: PerTrace<T> | undefined, fallback: T, index: number, offset: number): T {
  if (value === undefined) return fallback;
  if (typeof value === 'function') return (value as (traceIndex: number, offset: number) => T)(index, offset);
  if (Array.isArray(value)) {
    const item = (value as readonly T[])[index];
    if (item === undefined) throw new RangeError(`synthetic gather: no per-trace value for trace ${index}`);
    return item;
  }
  return value as T;
}

function timeOf(times: readonly number[] | ((offset: number, receiverX: number) => number), index: number, offset: number, receiverX: number): number {
  if (typeof times === 'function') return times(offset, receiverX);
  const time = times[index];
  if (time === undefined) throw new RangeError(`synthetic gather: no arrival time for trace ${index}`);
  return time;
}

/** The unit-peak wavelet's value τ seconds after its onset (0 before). */
export function waveletValue(wavelet: SyntheticWavelet, frequency: number, tau: number, peak: number): number {
  if (tau < 0) return 0;
  const decay = (wavelet.decayPeriods ?? 1) / frequency;
  const oscillation = Math.sin(2 * Math.PI * frequency * tau) * Math.exp(-tau / decay);
  const value = wavelet.shape === 'berlage' ? (tau * frequency) ** (wavelet.exponent ?? 1) * oscillation : oscillation;
  return value / peak;
}

/** The largest |value| of the raw wavelet, found on a fine grid over ten decay times. */
export function waveletPeak(wavelet: SyntheticWavelet, frequency: number): number {
  const decay = (wavelet.decayPeriods ?? 1) / frequency;
  let peak = 0;
  const steps = 20_000;
  for (let step = 0; step <= steps; step += 1) peak = Math.max(peak, Math.abs(waveletValue(wavelet, frequency, (10 * decay * step) / steps, 1)));
  return peak;
}

/**
 * First arrival over two horizontal layers from a surface shot (Telford1990 ch. 4): the direct
 * wave |x|/V₁ or the head wave |x|/V₂ + 2h·√(1/V₁² − 1/V₂²), whichever is earlier.
 */
export function twoLayerFirstArrival(offset: number, topVelocity: number, refractorVelocity: number, thickness: number): number {
  const distance = Math.abs(offset);
  const direct = distance / topVelocity;
  const intercept = 2 * thickness * Math.sqrt(1 / topVelocity ** 2 - 1 / refractorVelocity ** 2);
  return Math.min(direct, distance / refractorVelocity + intercept);
}

/** A shot gather with known first-break times (module comment). */
export function syntheticGather(options: SyntheticGatherOptions): SyntheticGather {
  const { sourceX, receiverXs, sampleInterval, sampleCount } = options;
  const delay = options.delay ?? 0;
  const wavelet = options.wavelet ?? { shape: 'damped-sine', frequency: 100 };
  const normal = seededNormal(options.seed);
  const uniform = seededRandom((options.seed ^ 0x5bd1e995) >>> 0);
  const nyquist = 0.5 / sampleInterval;
  const noiseBand = options.noiseBand ?? { low: 5, high: Math.min(400, 0.9 * nyquist) };
  const noiseSections = butterworthBandPass(2, noiseBand.low, noiseBand.high, sampleInterval);
  const lowFrequency = options.lowFrequencyNoise;
  const lowFrequencySections = lowFrequency === undefined ? null : butterworthBandPass(2, lowFrequency.low, lowFrequency.high, sampleInterval);
  const lowestNoiseFrequency = Math.min(noiseBand.low, lowFrequency?.low ?? Number.POSITIVE_INFINITY);
  const warmUp = Math.min(40_000, Math.ceil(4 / (lowestNoiseFrequency * sampleInterval)));
  const reference = options.amplitude?.reference ?? 1;
  const referenceDistance = options.amplitude?.referenceDistance ?? 1;
  const exponent = options.amplitude?.exponent ?? 1;
  const dead = new Set(options.deadTraces ?? []);

  const traces: GatherTrace[] = [];
  const trueTimes: number[] = [];
  const offsets: number[] = [];
  const snrs: number[] = [];
  const noiseLevels: number[] = [];
  const peaks: number[] = [];
  const frequencies: number[] = [];
  const filteredNoise = (sections: ReturnType<typeof butterworthBandPass>, count: number): Float64Array => {
    const white = new Float64Array(count + warmUp);
    for (let k = 0; k < white.length; k += 1) white[k] = normal();
    const filtered = sosFilter(sections, white).slice(warmUp);
    let sumOfSquares = 0;
    for (const value of filtered) sumOfSquares += value * value;
    const unit = Math.sqrt(sumOfSquares / count);
    return filtered.map((value) => value / unit);
  };
  /** Unit-RMS noise: the broadband component, plus the low-frequency one in its share of the power. */
  const bandLimitedNoise = (count: number): Float64Array => {
    const broadband = filteredNoise(noiseSections, count);
    if (lowFrequency === undefined || lowFrequencySections === null) return broadband;
    const slow = filteredNoise(lowFrequencySections, count);
    const share = lowFrequency.share;
    const mixed = broadband.map((value, k) => Math.sqrt(1 - share) * value + Math.sqrt(share) * (slow[k] as number));
    let sumOfSquares = 0;
    for (const value of mixed) sumOfSquares += value * value;
    const unit = Math.sqrt(sumOfSquares / count);
    return mixed.map((value) => value / unit);
  };

  receiverXs.forEach((receiverX, index) => {
    const offset = receiverX - sourceX;
    const arrival = timeOf(options.arrivalTimes, index, offset, receiverX);
    const frequency = perTrace(options.frequency, wavelet.frequency, index, offset);
    const snr = perTrace(options.snr, 10, index, offset);
    const peak = reference * (referenceDistance / Math.max(Math.abs(offset), referenceDistance)) ** exponent;
    const rawPeak = waveletPeak(wavelet, frequency);
    const samples = new Float64Array(sampleCount);
    const noiseRms = peak / snr;

    const addWavelet = (onset: number, amplitude: number, waveletFrequency: number, waveletPeakValue: number): void => {
      const first = Math.max(0, Math.ceil((onset - delay) / sampleInterval - 1e-9));
      const span = Math.ceil((12 * (wavelet.decayPeriods ?? 1)) / waveletFrequency / sampleInterval);
      for (let k = first; k < Math.min(sampleCount, first + span); k += 1) {
        samples[k] = (samples[k] as number) + amplitude * waveletValue(wavelet, waveletFrequency, delay + k * sampleInterval - onset, waveletPeakValue);
      }
    };
    addWavelet(arrival, peak, frequency, rawPeak);
    for (const later of options.laterArrivals ?? []) {
      const time = timeOf(later.times, index, offset, receiverX);
      if (!(time > arrival)) continue;
      const laterFrequency = later.frequency ?? frequency;
      addWavelet(time, peak * later.relativeAmplitude, laterFrequency, waveletPeak(wavelet, laterFrequency));
    }

    const noise = bandLimitedNoise(sampleCount);
    for (let k = 0; k < sampleCount; k += 1) samples[k] = (samples[k] as number) + noiseRms * (noise[k] as number);

    if (options.spikes !== undefined) {
      const whole = Math.floor(options.spikes.perTrace);
      const count = whole + (uniform() < options.spikes.perTrace - whole ? 1 : 0);
      for (let spike = 0; spike < count; spike += 1) {
        const at = Math.floor(uniform() * sampleCount);
        samples[at] = (samples[at] as number) + (uniform() < 0.5 ? -1 : 1) * options.spikes.amplitude * noiseRms;
      }
    }
    for (const burst of options.bursts ?? []) {
      if (burst.traceIndex !== index) continue;
      const first = Math.max(0, Math.round((burst.start - delay) / sampleInterval));
      const length = Math.max(2, Math.round(burst.duration / sampleInterval));
      const segment = bandLimitedNoise(length);
      let segmentPeak = 0;
      for (let k = 0; k < length; k += 1) {
        const taper = 0.5 - 0.5 * Math.cos((2 * Math.PI * (k + 0.5)) / length);
        segment[k] = (segment[k] as number) * taper;
        segmentPeak = Math.max(segmentPeak, Math.abs(segment[k] as number));
      }
      for (let k = 0; k < length && first + k < sampleCount; k += 1) {
        samples[first + k] = (samples[first + k] as number) + (burst.amplitude * peak * (segment[k] as number)) / segmentPeak;
      }
    }
    if (dead.has(index)) samples.fill(0);

    traces.push({
      samples: options.float32 === true ? Float32Array.from(samples) : samples,
      sampleInterval,
      delay,
      receiver: { x: receiverX, y: null, elevation: null },
      source: { x: sourceX, y: null, elevation: null },
      receiverStation: String(index + 1),
      sourceStation: 'S1',
      metadata: new Map(),
    });
    trueTimes.push(arrival);
    offsets.push(offset);
    snrs.push(snr);
    noiseLevels.push(noiseRms);
    peaks.push(peak);
    frequencies.push(frequency);
  });
  return { traces, trueTimes, offsets, snr: snrs, noiseRms: noiseLevels, peakAmplitude: peaks, frequency: frequencies };
}
