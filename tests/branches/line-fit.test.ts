/**
 * fitLine on METHODS.md check cases 3.1 and 3.2, its dispatch, and every edge its doc comment
 * (and `refuseFitInput`'s, `assembleLineFit`'s) promises.
 */
import { describe, expect, it } from 'vitest';
import { fitLine } from '../../lib/branches/line-fit.js';
import { fitLeastSquares } from '../../lib/branches/least-squares.js';
import type { FitMethod, FitOutcome, LineFit } from '../../lib/branches/types.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';
import {
  DIRECT_OFFSETS,
  DIRECT_TIMES,
  OUTLIER_POSITION,
  REFRACTED_OFFSETS,
  REFRACTED_SIGMAS,
  REFRACTED_TIMES,
  REFRACTED_TIMES_WITH_OUTLIER,
} from './check-case-data.js';

const CASE_3_1 = 'METHODS.md check case 3.1 (computed from the stated data with numpy/scipy, not published values)';
const CASE_3_2 = 'METHODS.md check case 3.2 (computed from the stated data with numpy/scipy, not published values)';

/** METHODS prints velocities to 0.001 m/s: half a unit in the last place, plus float slack. */
const VELOCITY_ROUNDING = 0.0006;
/** Times printed to 0.0001 ms = 1e-7 s: half a unit in the last place, plus slack. */
const TIME_ROUNDING = 0.6e-7;

function fitted(outcome: FitOutcome): LineFit {
  if (!outcome.ok) throw new Error(`fit refused: ${outcome.message}`);
  return outcome.fit;
}

describe('fitLine on METHODS check case 3.1', () => {
  it('direct branch through the origin: V₁ = 500.276 ± 1.718 m/s', () => {
    const fit = fitted(fitLine(DIRECT_OFFSETS, DIRECT_TIMES, null, { throughOrigin: true }));
    expectWithin(fit.apparentVelocity, 500.276, VELOCITY_ROUNDING, CASE_3_1);
    expectWithin(fit.apparentVelocitySE, 1.718, VELOCITY_ROUNDING, CASE_3_1);
    expect(fit.throughOrigin).toBe(true);
    expect(fit.degreesOfFreedom).toBe(7);
  });

  it('direct branch with a free intercept: 0.0482 ± 0.1638 ms, consistent with zero', () => {
    const fit = fitted(fitLine(DIRECT_OFFSETS, DIRECT_TIMES, null));
    expectWithin(fit.intercept, 0.0482e-3, 0.00006e-3, CASE_3_1);
    expectWithin(fit.interceptSE, 0.1638e-3, 0.00006e-3, CASE_3_1);
    expect(Math.abs(fit.intercept)).toBeLessThan(3 * fit.interceptSE);
  });

  it('refracted branch: V₂ = 2001.400 ± 27.770 m/s, τ = 31.0000 ± 0.3330 ms, Cov = −2.2110e-9, ρ = −0.9578', () => {
    const fit = fitted(fitLine(REFRACTED_OFFSETS, REFRACTED_TIMES, null));
    expectWithin(fit.apparentVelocity, 2001.4, VELOCITY_ROUNDING, CASE_3_1);
    expectWithin(fit.apparentVelocitySE, 27.77, VELOCITY_ROUNDING, CASE_3_1);
    expectWithin(fit.intercept, 31.0e-3, TIME_ROUNDING, CASE_3_1);
    expectWithin(fit.interceptSE, 0.333e-3, TIME_ROUNDING, CASE_3_1);
    // Printed to 5 significant digits.
    expectWithin(fit.covariance, -2.211e-9, 0.00006e-9, CASE_3_1);
    expectWithin(fit.covariance / (fit.slopeSE * fit.interceptSE), -0.9578, 0.00006, CASE_3_1);
  });

  it('refracted branch: 95 % velocity interval [1941.4, 2065.2] m/s from Student t = 2.2281 (10 dof)', () => {
    const fit = fitted(fitLine(REFRACTED_OFFSETS, REFRACTED_TIMES, null));
    expect(fit.velocityInterval95).not.toBeNull();
    const [low, high] = fit.velocityInterval95 ?? [Number.NaN, Number.NaN];
    // Printed to 0.1 m/s.
    expectWithin(low, 1941.4, 0.06, CASE_3_1);
    expectWithin(high, 2065.2, 0.06, CASE_3_1);
    expect(high - fit.apparentVelocity).toBeGreaterThan(fit.apparentVelocity - low);
  });

  it('weighted refracted fit (σ = 0.3, 0.6 ms): V = 2003.078 m/s, τ = 31.0137 ± 0.3770 ms, SE(b) = 9.2972e-6, Cov = −3.3538e-9, χ² = 8.3821', () => {
    const fit = fitted(fitLine(REFRACTED_OFFSETS, REFRACTED_TIMES, REFRACTED_SIGMAS));
    expect(fit.weighted).toBe(true);
    expectWithin(fit.apparentVelocity, 2003.078, VELOCITY_ROUNDING, CASE_3_1);
    expectWithin(fit.intercept, 31.0137e-3, TIME_ROUNDING, CASE_3_1);
    expectWithin(fit.interceptSE, 0.377e-3, TIME_ROUNDING, CASE_3_1);
    expectWithin(fit.slopeSE, 9.2972e-6, 0.00006e-6, CASE_3_1);
    expectWithin(fit.covariance, -3.3538e-9, 0.00006e-9, CASE_3_1);
    expectWithin(fit.chiSquare ?? Number.NaN, 8.3821, 0.00006, CASE_3_1);
    expect(fit.degreesOfFreedom).toBe(10);
  });
});

describe('fitLine on METHODS check case 3.2 (8 ms outlier on the 6th refracted pick)', () => {
  const fitWith = (method: FitMethod): LineFit => fitted(fitLine(REFRACTED_OFFSETS, REFRACTED_TIMES_WITH_OUTLIER, null, { method }));

  it('least squares is pulled: V = 2029.808 m/s, τ = 31.9883 ms', () => {
    const fit = fitWith('least-squares');
    expectWithin(fit.apparentVelocity, 2029.808, VELOCITY_ROUNDING, CASE_3_2);
    expectWithin(fit.intercept, 31.9883e-3, TIME_ROUNDING, CASE_3_2);
  });

  it('Theil–Sen resists: V = 2013.483 m/s, slope CI [4.75e-4, 5.25e-4] s/m, intercept 31.2080 ms by median(t − bx)', () => {
    const fit = fitWith('theil-sen');
    expect(fit.method).toBe('theil-sen');
    expectWithin(fit.apparentVelocity, 2013.483, VELOCITY_ROUNDING, CASE_3_2);
    expectWithin(fit.intercept, 31.208e-3, TIME_ROUNDING, CASE_3_2);
    const [low, high] = fit.velocityInterval95 ?? [Number.NaN, Number.NaN];
    expectRelative(1 / high, 4.75e-4, 1e-12, CASE_3_2);
    expectRelative(1 / low, 5.25e-4, 1e-12, CASE_3_2);
  });

  it('Huber resists: τ = 31.0988 ms, V = 2003.041 m/s, outlier weight 0.064', () => {
    const fit = fitWith('huber');
    expect(fit.method).toBe('huber');
    expectWithin(fit.intercept, 31.0988e-3, TIME_ROUNDING, CASE_3_2);
    expectWithin(fit.apparentVelocity, 2003.041, VELOCITY_ROUNDING, CASE_3_2);
    expectWithin(fit.robustWeights?.[OUTLIER_POSITION] ?? Number.NaN, 0.064, 0.0006, CASE_3_2);
    // Only the outlier loses most of its weight; near-misses keep nearly all of theirs.
    expect(fit.robustWeights?.filter((weight) => weight < 0.5)).toHaveLength(1);
  });
});

describe('fitLine dispatch and options', () => {
  it('defaults to least squares with a free intercept, and leastSquares equals fitLeastSquares', () => {
    const byDefault = fitted(fitLine(REFRACTED_OFFSETS, REFRACTED_TIMES, null));
    expect(byDefault.method).toBe('least-squares');
    expect(byDefault.throughOrigin).toBe(false);
    expect(byDefault).toEqual(fitted(fitLeastSquares(REFRACTED_OFFSETS, REFRACTED_TIMES, null)));
  });

  it('ignores (and does not check) sigmas given to Theil–Sen', () => {
    const badSigmas = REFRACTED_OFFSETS.map(() => Number.NaN);
    const withSigmas = fitted(fitLine(REFRACTED_OFFSETS, REFRACTED_TIMES, badSigmas, { method: 'theil-sen' }));
    expect(withSigmas.weighted).toBe(false);
    expect(withSigmas.chiSquare).toBeNull();
    expect(withSigmas).toEqual(fitted(fitLine(REFRACTED_OFFSETS, REFRACTED_TIMES, null, { method: 'theil-sen' })));
  });

  it('passes sigmas to the Huber fit, which then reports a weighted fit with χ²', () => {
    const sigmas = REFRACTED_OFFSETS.map(() => 0.3e-3);
    const huber = fitted(fitLine(REFRACTED_OFFSETS, REFRACTED_TIMES, sigmas, { method: 'huber' }));
    expect(huber.weighted).toBe(true);
    expect(huber.chiSquare).not.toBeNull();
    expect(fitLine(REFRACTED_OFFSETS, REFRACTED_TIMES, REFRACTED_OFFSETS.map(() => Number.NaN), { method: 'huber' }).ok).toBe(false);
  });

  it('throws for an unknown method and for arrays of different lengths', () => {
    expect(() => fitLine([1, 2, 3], [1, 2, 3], null, { method: 'median' as FitMethod })).toThrow(/unknown fit method/);
    expect(() => fitLine([1, 2, 3], [1, 2], null)).toThrow(/same length/);
    expect(() => fitLine([1, 2, 3], [1, 2, 3], [1, 1])).toThrow(/same length/);
  });

  it('reports residuals in input order, whatever the order of the picks', () => {
    const order = [3, 0, 11, 5, 7, 1, 2, 4, 6, 8, 9, 10];
    const shuffled = fitted(
      fitLine(
        order.map((index) => REFRACTED_OFFSETS[index] as number),
        order.map((index) => REFRACTED_TIMES[index] as number),
        null,
      ),
    );
    const sorted = fitted(fitLine(REFRACTED_OFFSETS, REFRACTED_TIMES, null));
    order.forEach((index, position) => expectWithin(shuffled.residuals[position] as number, sorted.residuals[index] as number, 1e-15, 'same fit, permuted input'));
  });
});

describe('fitLine refusals (values, never throws)', () => {
  const methods: FitMethod[] = ['least-squares', 'theil-sen', 'huber'];

  it.each(methods)('%s: a free line refuses 2 picks without sigmas (too-few-picks) and accepts 3', (method) => {
    const refused = fitLine([10, 20], [0.01, 0.02], null, { method });
    expect(refused.ok).toBe(false);
    if (!refused.ok) {
      expect(refused.code).toBe('too-few-picks');
      expect(refused.message).toMatch(/at least 3 picks.*found 2/);
    }
    expect(fitLine([10, 20, 30], [0.01, 0.02, 0.031], null, { method }).ok).toBe(true);
  });

  it.each(methods)('%s: a line through the origin refuses 1 pick without sigmas and accepts 2', (method) => {
    const refused = fitLine([10], [0.01], null, { method, throughOrigin: true });
    expect(refused.ok ? null : refused.code).toBe('too-few-picks');
    expect(fitLine([10, 20], [0.01, 0.021], null, { method, throughOrigin: true }).ok).toBe(true);
  });

  it('weighted least squares needs only as many picks as parameters: 2 free, 1 through the origin, SEs from the sigmas', () => {
    const two = fitted(fitLine([10, 20], [0.01, 0.02], [0.001, 0.001]));
    expect(two.degreesOfFreedom).toBe(0);
    // Two picks of equal σ: Var b = 2σ²/(x₂ − x₁)² for the line through both (error propagation by hand).
    expectRelative(two.slopeSE, Math.sqrt(2) * 0.001 / 10, 1e-12, 'σ√2/Δx for a line through two picks');
    // Zero residual freedom: the line passes through both picks; the residual SD is reported as 0.
    expect(two.residualSD).toBe(0);
    const one = fitted(fitLine([10], [0.01], [0.001], { throughOrigin: true }));
    expectRelative(one.slopeSE, 0.001 / 10, 1e-12, 'σ/x for a line through the origin and one pick');
    expect(fitLine([10], [0.01], [0.001]).ok).toBe(false);
  });

  it.each(methods)('%s: all offsets equal is refused as offsets-all-equal; all zero for the origin line', (method) => {
    const free = fitLine([15, 15, 15], [0.01, 0.011, 0.012], null, { method });
    expect(free.ok ? null : free.code).toBe('offsets-all-equal');
    const origin = fitLine([0, 0, 0], [0.01, 0.011, 0.012], null, { method, throughOrigin: true });
    expect(origin.ok ? null : origin.code).toBe('offsets-all-equal');
  });

  it.each(methods)('%s: a non-finite offset or time is refused as not-finite, naming the pick', (method) => {
    const time = fitLine([10, 20, 30], [0.01, Number.NaN, 0.03], null, { method });
    expect(time.ok ? null : time.code).toBe('not-finite');
    if (!time.ok) expect(time.message).toMatch(/pick 2 of 3/);
    const offset = fitLine([10, Number.POSITIVE_INFINITY, 30], [0.01, 0.02, 0.03], null, { method });
    expect(offset.ok ? null : offset.code).toBe('not-finite');
  });

  it('checks non-finite values before the pick count, and the count before equal offsets', () => {
    const single = fitLine([Number.NaN], [0.01], null);
    expect(single.ok ? null : single.code).toBe('not-finite');
    const pair = fitLine([10, 10], [0.01, 0.02], null);
    expect(pair.ok ? null : pair.code).toBe('too-few-picks');
  });

  it('a zero, negative or NaN sigma is refused as not-finite by weighted least squares', () => {
    for (const bad of [0, -0.001, Number.NaN]) {
      const outcome = fitLine([10, 20, 30], [0.01, 0.02, 0.03], [0.001, bad, 0.001]);
      expect(outcome.ok ? null : outcome.code).toBe('not-finite');
      if (!outcome.ok) expect(outcome.message).toMatch(/sigma/);
    }
  });
});

describe('fitLine velocity edges (assembleLineFit)', () => {
  it('a slope of exactly zero gives an infinite apparent velocity and velocity SE, and no interval', () => {
    // Binary-exact times symmetric about the middle offset: the centred sums give slope 0 exactly.
    const fit = fitted(fitLine([10, 20, 30, 40], [0.25, 0.5, 0.5, 0.25], null));
    expect(fit.slope).toBe(0);
    expect(fit.apparentVelocity).toBe(Number.POSITIVE_INFINITY);
    expect(fit.apparentVelocitySE).toBe(Number.POSITIVE_INFINITY);
    expect(fit.velocityInterval95).toBeNull();
  });

  it('a negative slope gives a negative apparent velocity, reported as is, and no interval', () => {
    const fit = fitted(fitLine([10, 20, 30, 40], [0.04, 0.031, 0.02, 0.01], null));
    expect(fit.apparentVelocity).toBeLessThan(0);
    expect(fit.velocityInterval95).toBeNull();
  });

  it('a positive slope whose interval reaches zero is unbounded: null interval, finite velocity', () => {
    // Slope ~1e-5 s/m with scatter of milliseconds: b − t·SE < 0.
    const fit = fitted(fitLine([10, 20, 30, 40, 50], [0.01, 0.0125, 0.0098, 0.0121, 0.0107], null));
    expect(fit.slope).toBeGreaterThan(0);
    expect(fit.slope - 3.182 * fit.slopeSE).toBeLessThan(0);
    expect(Number.isFinite(fit.apparentVelocity)).toBe(true);
    expect(fit.velocityInterval95).toBeNull();
  });

  it('the interval of a weighted fit uses the normal quantile (σ known), of an unweighted one Student t', () => {
    const weighted = fitted(fitLine(REFRACTED_OFFSETS, REFRACTED_TIMES, REFRACTED_SIGMAS));
    const [, high] = weighted.velocityInterval95 ?? [Number.NaN, Number.NaN];
    // z₀.₉₇₅ = 1.959963984540054 (scipy.stats.norm.ppf).
    expectRelative(high, 1 / (weighted.slope - 1.959963984540054 * weighted.slopeSE), 1e-12, 'scipy.stats.norm.ppf(0.975)');
    const plain = fitted(fitLine(REFRACTED_OFFSETS, REFRACTED_TIMES, null));
    const [, plainHigh] = plain.velocityInterval95 ?? [Number.NaN, Number.NaN];
    // t₀.₉₇₅,₁₀ = 2.2281388519649385 (scipy.stats.t.ppf).
    expectRelative(plainHigh, 1 / (plain.slope - 2.2281388519649385 * plain.slopeSE), 1e-12, 'scipy.stats.t.ppf(0.975, 10)');
  });
});
