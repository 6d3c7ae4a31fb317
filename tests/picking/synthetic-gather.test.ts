import { describe, expect, it } from 'vitest';
import { syntheticGather, twoLayerFirstArrival, waveletPeak, waveletValue } from '../tools/synthetic-gather.js';

describe('syntheticGather (the test tool that makes shot gathers with known first breaks)', () => {
  const base = {
    sourceX: 10,
    receiverXs: [0, 4, 8, 12, 16, 20, 40],
    arrivalTimes: (offset: number) => twoLayerFirstArrival(offset, 500, 2000, 5),
    sampleInterval: 0.00025,
    sampleCount: 2000,
    seed: 3,
  } as const;

  it('sets receiver and source locations, signed offsets and the true times as given', () => {
    const gather = syntheticGather(base);
    expect(gather.offsets).toEqual([-10, -6, -2, 2, 6, 10, 30]);
    gather.traces.forEach((trace, index) => {
      expect(trace.receiver?.x).toBe(base.receiverXs[index]);
      expect(trace.source?.x).toBe(10);
      expect(trace.sampleInterval).toBe(0.00025);
      expect(trace.delay).toBe(0);
      expect(trace.samples).toHaveLength(2000);
      expect(gather.trueTimes[index]).toBe(twoLayerFirstArrival(gather.offsets[index] as number, 500, 2000, 5));
    });
  });

  it('puts nothing before the arrival and the wavelet from it when there is no noise (SNR huge)', () => {
    const gather = syntheticGather({ ...base, snr: 1e12, delay: -0.002 });
    gather.traces.forEach((trace, index) => {
      const onsetSample = ((gather.trueTimes[index] as number) + 0.002) / 0.00025;
      const firstAfter = Math.ceil(onsetSample - 1e-9);
      for (let k = 0; k < firstAfter; k += 1) expect(Math.abs(trace.samples[k] as number)).toBeLessThan(1e-9);
      // the first sample at or after t0 is the wavelet's value there, and the peak is the trace's peak amplitude
      let peak = 0;
      for (const value of trace.samples) peak = Math.max(peak, Math.abs(value));
      expect(peak).toBeLessThanOrEqual((gather.peakAmplitude[index] as number) * (1 + 1e-9));
      expect(peak).toBeGreaterThan((gather.peakAmplitude[index] as number) * 0.99);
    });
  });

  it('scales the noise so that peak / noise RMS is the SNR asked for (measured where there is no signal)', () => {
    const gather = syntheticGather({ ...base, arrivalTimes: () => 0.45, snr: [3, 5, 8, 12, 20, 3, 3] });
    gather.traces.forEach((trace, index) => {
      let sum = 0;
      const quiet = 1600; // the arrival is at sample 1800
      for (let k = 0; k < quiet; k += 1) sum += (trace.samples[k] as number) ** 2;
      const rms = Math.sqrt(sum / quiet);
      expect(rms / (gather.noiseRms[index] as number)).toBeGreaterThan(0.85);
      expect(rms / (gather.noiseRms[index] as number)).toBeLessThan(1.15);
      expect((gather.peakAmplitude[index] as number) / (gather.noiseRms[index] as number)).toBeCloseTo(gather.snr[index] as number, 12);
    });
  });

  it('decays amplitude with distance and is reproducible from its seed', () => {
    const first = syntheticGather(base);
    const again = syntheticGather(base);
    const other = syntheticGather({ ...base, seed: 4 });
    expect(Array.from(first.traces[2]?.samples ?? [])).toEqual(Array.from(again.traces[2]?.samples ?? []));
    expect(Array.from(first.traces[2]?.samples ?? [])).not.toEqual(Array.from(other.traces[2]?.samples ?? []));
    expect(first.peakAmplitude[6] as number).toBeLessThan(first.peakAmplitude[5] as number);
    expect(first.peakAmplitude[2]).toBe(first.peakAmplitude[3]); // ±2 m
  });

  it('adds dead traces, bursts and spikes where asked', () => {
    const gather = syntheticGather({
      ...base,
      deadTraces: [1],
      bursts: [{ traceIndex: 4, start: 0.001, duration: 0.004, amplitude: 5 }],
      spikes: { perTrace: 2, amplitude: 50 },
      snr: 10,
    });
    for (const value of gather.traces[1]?.samples ?? []) expect(value).toBe(0);
    let burstPeak = 0;
    for (let k = 0; k < 24; k += 1) burstPeak = Math.max(burstPeak, Math.abs(gather.traces[4]?.samples[k] as number));
    expect(burstPeak).toBeGreaterThan(3 * (gather.peakAmplitude[4] as number));
    let spikes = 0;
    for (const value of gather.traces[0]?.samples ?? []) if (Math.abs(value) > 20 * (gather.noiseRms[0] as number)) spikes += 1;
    expect(spikes).toBeGreaterThanOrEqual(1);
  });

  it('the damped sine rises from zero at the onset and its largest |value| is the first peak, just before a quarter period', () => {
    const wavelet = { shape: 'damped-sine', frequency: 100 } as const;
    const peak = waveletPeak(wavelet, 100);
    expect(waveletValue(wavelet, 100, 0, peak)).toBe(0);
    expect(waveletValue(wavelet, 100, -0.001, peak)).toBe(0);
    // d/dτ [sin(2πfτ)·exp(−τ/d)] = 0 at tan(2πfτ) = 2πf·d (d = 1/f here): τ = atan(2π)/(2π·100 Hz) = 2.249 ms
    const peakTime = Math.atan(2 * Math.PI) / (2 * Math.PI * 100);
    expect(waveletValue(wavelet, 100, peakTime, peak)).toBeCloseTo(1, 6);
    expect(peak).toBeCloseTo(Math.sin(Math.atan(2 * Math.PI)) * Math.exp(-peakTime * 100), 6);
    const berlage = { shape: 'berlage', frequency: 100, exponent: 2 } as const;
    expect(waveletValue(berlage, 100, 0.0002, waveletPeak(berlage, 100))).toBeLessThan(waveletValue(wavelet, 100, 0.0002, peak));
  });
});
