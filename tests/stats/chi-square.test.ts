import { describe, expect, it } from 'vitest';
import { chiSquareSurvival, logGamma } from '../../lib/stats/chi-square.js';
import { runPythonJson } from '../helpers/python.js';
import { expectRelative } from '../helpers/expect-within.js';

/** Relative agreement with scipy: the series and continued fraction converge to ~1e-15; 1e-10 leaves room for lgamma. */
const SCIPY_TOLERANCE = 1e-10;

describe('chiSquareSurvival', () => {
  const cases: [number, number][] = [];
  for (const freedom of [1, 2, 3, 5, 10, 34, 100, 1000]) {
    for (const fraction of [0.05, 0.3, 0.9, 1, 1.1, 2, 4]) cases.push([freedom * fraction, freedom]);
  }

  it('agrees with scipy.stats.chi2.sf over small and large degrees of freedom', () => {
    const expected = runPythonJson<number[]>(
      'import sys, json; from scipy.stats import chi2\nprint(json.dumps([float(chi2.sf(x, k)) for x, k in json.load(sys.stdin)]))',
      cases,
    );
    cases.forEach(([value, freedom], k) => {
      expectRelative(chiSquareSurvival(value, freedom), expected[k]!, SCIPY_TOLERANCE, `scipy.stats.chi2.sf(${value}, ${freedom})`);
    });
  });

  it('gives 1 at or below zero, 0 at infinity, and refuses non-positive degrees of freedom', () => {
    expect(chiSquareSurvival(0, 3)).toBe(1);
    expect(chiSquareSurvival(-2, 3)).toBe(1);
    expect(chiSquareSurvival(Number.POSITIVE_INFINITY, 3)).toBe(0);
    expect(() => chiSquareSurvival(1, 0)).toThrow(/degrees of freedom/);
    expect(() => chiSquareSurvival(Number.NaN, 2)).toThrow(/NaN/);
  });

  it('logGamma matches ln((n−1)!) for whole numbers (exact factorials)', () => {
    let factorial = 1;
    for (let n = 1; n <= 20; n += 1) {
      expectRelative(logGamma(n) + 1, Math.log(factorial) + 1, 1e-13, `ln ${n - 1}! (exact)`);
      factorial *= n;
    }
    expectRelative(logGamma(0.5), Math.log(Math.sqrt(Math.PI)), 1e-13, 'Γ(1/2) = √π (exact)');
  });
});
