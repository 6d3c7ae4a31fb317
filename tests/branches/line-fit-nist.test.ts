/**
 * fitLine against NIST StRD certified values (tests/fixtures/branches/README.md gives provenance).
 * Digits are counted as NIST counts them: −log10(|ours − certified| / |certified|).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { fitLine } from '../../lib/branches/line-fit.js';
import type { LineFit } from '../../lib/branches/types.js';
import { expectDigits } from '../helpers/expect-within.js';

const fixture = (name: string): string => readFileSync(new URL(`../fixtures/branches/${name}`, import.meta.url), 'utf8');

interface NorrisCertified {
  certified: {
    B0_intercept: number;
    B0_standard_deviation: number;
    B1_slope: number;
    B1_standard_deviation: number;
    residual_standard_deviation: number;
    anova: { residual: { sum_of_squares: number } };
  };
}
interface NoIntCase {
  x: number[];
  y: number[];
  certified: { B1_slope: number; B1_standard_deviation: number; residual_standard_deviation: number; residual_sum_of_squares: number };
}

/** NIST asks a sound double-precision fit of this lower-difficulty set for ~9–10 digits of the estimates. */
const ESTIMATE_DIGITS = 9;
/** Standard errors and residual SD: the brief's floor of 6 digits (we measure 11–13). */
const SE_DIGITS = 6;

const norrisRows = fixture('nist-strd-norris.csv')
  .trim()
  .split('\n')
  .slice(1)
  .map((row) => row.split(',').map(Number));
const norrisX = norrisRows.map((row) => row[0] as number);
const norrisY = norrisRows.map((row) => row[1] as number);
const norris = (JSON.parse(fixture('nist-strd-norris.certified.json')) as NorrisCertified).certified;
const noInt = JSON.parse(fixture('nist-strd-noint.certified.json')) as { NoInt1: NoIntCase; NoInt2: NoIntCase };

function fitted(x: number[], y: number[], throughOrigin: boolean): LineFit {
  const outcome = fitLine(x, y, null, { throughOrigin });
  if (!outcome.ok) throw new Error(outcome.message);
  return outcome.fit;
}

describe('fitLine on NIST StRD Norris (ordinary least squares)', () => {
  const fit = fitted(norrisX, norrisY, false);
  const source = 'NIST StRD Norris certified value';

  it('reads the 36 observations of the fixture', () => {
    expect(norrisX).toHaveLength(36);
  });

  it('recovers slope and intercept to at least 9 significant digits', () => {
    expectDigits(fit.slope, norris.B1_slope, ESTIMATE_DIGITS, `${source} B1`);
    expectDigits(fit.intercept, norris.B0_intercept, ESTIMATE_DIGITS, `${source} B0`);
  });

  it('recovers their standard errors and the residual SD to at least 6 digits', () => {
    expectDigits(fit.slopeSE, norris.B1_standard_deviation, SE_DIGITS, `${source} sd(B1)`);
    expectDigits(fit.interceptSE, norris.B0_standard_deviation, SE_DIGITS, `${source} sd(B0)`);
    expectDigits(fit.residualSD, norris.residual_standard_deviation, SE_DIGITS, `${source} residual SD`);
    expectDigits(fit.residualSumOfSquares, norris.anova.residual.sum_of_squares, SE_DIGITS, `${source} residual SS`);
  });

  it('reports 34 residual degrees of freedom and no χ² for an unweighted fit', () => {
    expect(fit.degreesOfFreedom).toBe(34);
    expect(fit.chiSquare).toBeNull();
    expect(fit.weighted).toBe(false);
  });
});

describe('fitLine through the origin on NIST StRD NoInt1 and NoInt2', () => {
  for (const name of ['NoInt1', 'NoInt2'] as const) {
    it(`${name}: slope, its SE and the residual SD to NIST's certified values`, () => {
      const data = noInt[name];
      const fit = fitted(data.x, data.y, true);
      const source = `NIST StRD ${name} certified value`;
      expectDigits(fit.slope, data.certified.B1_slope, ESTIMATE_DIGITS, `${source} B1`);
      expectDigits(fit.slopeSE, data.certified.B1_standard_deviation, SE_DIGITS, `${source} sd(B1)`);
      expectDigits(fit.residualSD, data.certified.residual_standard_deviation, SE_DIGITS, `${source} residual SD`);
      expect(fit.intercept).toBe(0);
      expect(fit.interceptSE).toBe(0);
      expect(fit.covariance).toBe(0);
      expect(fit.degreesOfFreedom).toBe(data.x.length - 1);
    });
  }
});
