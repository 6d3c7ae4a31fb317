import { describe, expect, it } from 'vitest';
import { medianSlopePrediction, neighbourConsistency, type ConsistencyItem } from '../../lib/picking/index.js';
import { twoLayerFirstArrival } from '../tools/synthetic-gather.js';

const OPTIONS = { neighbours: 3, threshold: 3 };
const SIGMA = 0.00025;

function items(positions: readonly number[], times: readonly (number | null)[], anchor = true): ConsistencyItem[] {
  return positions.map((position, index) => ({ position, time: times[index] ?? null, sigma: SIGMA, usable: true, anchor }));
}

describe('medianSlopePrediction (Theil1950; Sen1968)', () => {
  it('through exact points on a line predicts the line; two points give zero scatter', () => {
    const line = medianSlopePrediction([0, 2, 4], [1, 2, 3], [SIGMA, SIGMA, SIGMA], 10);
    expect(line.prediction).toBeCloseTo(6, 12);
    expect(line.scatter).toBe(0);
    expect(medianSlopePrediction([0, 2], [1, 5], [SIGMA, SIGMA], 3).prediction).toBeCloseTo(7, 12);
  });
  it('one wild point of five does not move the median-slope line', () => {
    const line = medianSlopePrediction([0, 1, 2, 3, 4], [0, 1, 20, 3, 4], [SIGMA, SIGMA, SIGMA, SIGMA, SIGMA], 6);
    expect(line.prediction).toBeCloseTo(6, 12);
  });
  it('equal positions give no slope: the line is flat through the median time', () => {
    expect(medianSlopePrediction([5, 5, 5], [1, 2, 4], [SIGMA, SIGMA, SIGMA], 9).prediction).toBeCloseTo(2, 12);
  });
});

describe('neighbourConsistency', () => {
  it('rejects the doc example: 14 ms among 2, 4, (6), 8, 10 ms is 8 ms later than predicted', () => {
    const verdicts = neighbourConsistency(items([0, 2, 4, 6, 8], [0.002, 0.004, 0.014, 0.008, 0.01]), OPTIONS);
    expect(verdicts.map((verdict) => verdict.rejected)).toEqual([false, false, true, false, false]);
    expect(verdicts[2]?.misfit).toBeCloseTo(0.008, 9);
    expect(verdicts[2]?.prediction).toBeCloseTo(0.006, 9);
  });

  it('keeps every pick of an exact two-layer curve across the crossover and the shot of a split spread', () => {
    const positions = Array.from({ length: 48 }, (_, index) => -47 + 2 * index);
    const times = positions.map((offset) => twoLayerFirstArrival(offset, 500, 2000, 6));
    const verdicts = neighbourConsistency(items(positions, times), OPTIONS);
    expect(verdicts.filter((verdict) => verdict.rejected)).toHaveLength(0);
    // every pick was judged (each has at least one side with two neighbours)
    expect(verdicts.every((verdict) => verdict.prediction !== null)).toBe(true);
  });

  it('rejects a wild pick and keeps its exact neighbours; holds a confident pick to k·√(σ² + σ_neighbours²)', () => {
    const positions = Array.from({ length: 20 }, (_, index) => 2 * index);
    const times = positions.map((offset) => offset / 1000);
    times[9] = (times[9] as number) + 0.02;
    // 1.1 ms off: beyond 3·√2·0.25 ms = 1.06 ms, within 5·√2·0.25 ms = 1.77 ms
    times[10] = (times[10] as number) + 0.0011;
    const verdicts = neighbourConsistency(items(positions, times), OPTIONS);
    expect(verdicts.map((verdict, index) => (verdict.rejected ? index : -1)).filter((index) => index >= 0)).toEqual([9, 10]);
    const lenient = neighbourConsistency(items(positions, times), { neighbours: 3, threshold: 5 });
    expect(lenient.map((verdict, index) => (verdict.rejected ? index : -1)).filter((index) => index >= 0)).toEqual([9]);
  });

  it('rejects one pick at a time: a wild pick next to the end of the line does not get the end pick rejected with it', () => {
    const positions = Array.from({ length: 10 }, (_, index) => 2 * index);
    const times = positions.map((offset) => 0.001 + offset / 1000);
    times[1] = (times[1] as number) + 0.02;
    // In the first pass the end pick's only prediction leans on the wild pick; once that is out it fits.
    const verdicts = neighbourConsistency(items(positions, times), OPTIONS);
    expect(verdicts.map((verdict, index) => (verdict.rejected ? index : -1)).filter((index) => index >= 0)).toEqual([1]);
    expect(verdicts[0]?.misfit).toBeCloseTo(0, 9);
  });

  it('holds a pick that is not an anchor to the local scatter alone, not to its own large sigma', () => {
    const positions = [0, 2, 4, 6, 8, 10, 12];
    const times = positions.map((offset) => offset / 1000);
    times[3] = (times[3] as number) + 0.003;
    const weak = items(positions, times).map((item, index) => (index === 3 ? { ...item, sigma: 0.002, anchor: false } : item));
    expect(neighbourConsistency(weak, OPTIONS)[3]?.rejected).toBe(true);
    const confident = weak.map((item, index) => (index === 3 ? { ...item, anchor: true } : item));
    expect(neighbourConsistency(confident, OPTIONS)[3]?.rejected).toBe(false);
  });

  it('never uses or judges unusable picks and picks without a time; leaves lone picks unjudged', () => {
    const list = items([0, 2, 4, 6, 8], [0.002, null, 0.1, 0.008, 0.01]).map((item, index) => (index === 2 ? { ...item, usable: false } : item));
    const verdicts = neighbourConsistency(list, OPTIONS);
    expect(verdicts[1]).toEqual({ prediction: null, misfit: null, tolerance: null, earliest: null, rejected: false });
    expect(verdicts[2]).toEqual({ prediction: null, misfit: null, tolerance: null, earliest: null, rejected: false });
    expect(verdicts.some((verdict) => verdict.rejected)).toBe(false);
    const lone = neighbourConsistency(items([0, 5], [0.001, 0.5]), OPTIONS);
    expect(lone.every((verdict) => verdict.prediction === null && !verdict.rejected)).toBe(true);
  });

  it('orders by position, not by input order', () => {
    const positions = [8, 0, 6, 2, 4];
    const times = [0.008, 0.0, 0.006, 0.002, 0.015];
    const verdicts = neighbourConsistency(items(positions, times), OPTIONS);
    expect(verdicts.map((verdict) => verdict.rejected)).toEqual([false, false, false, false, true]);
  });
});
