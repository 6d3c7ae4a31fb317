import { describe, expect, it } from 'vitest';
import { normalDensity, normalQuantile, normalUpperTail } from '../../lib/branches/normal.js';
import { regularisedIncompleteBeta, studentTQuantile, studentTUpperTail } from '../../lib/branches/student-t.js';
import { invertUpperTail } from '../../lib/branches/tail-inversion.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';
import { runPythonJson } from '../helpers/python.js';

/**
 * scipy.stats.t.ppf itself is accurate to only ~1e-9 relative in places (measured here: at ν = 30,
 * p = 0.7 its answer gives t.sf = 0.30000000036, not 0.3), so quantiles are compared with it at 1e-8
 * and, more sharply, by the round trip through scipy's tail function, at 1e-12.
 */
const SCIPY_PPF_AGREEMENT = 1e-8;
/**
 * Round trip: scipy.stats.t.sf of our quantile against the asked tail. Measured ≤ 1e-14 for
 * ν ≤ 100 and up to 2.4e-12 at ν = 10³–10⁴ (our ln Γ loses absolute digits at large arguments).
 */
const ROUND_TRIP = 1e-11;
/** scipy.special.betainc agrees to ~1e-14 relative (measured); 1e-12 leaves room across platforms. */
const BETA_AGREEMENT = 1e-12;

const DEGREES = [1, 2, 3, 4.5, 10, 30, 100, 1000, 10000];
const PROBABILITIES = [1e-10, 1e-4, 0.001, 0.025, 0.1, 0.3, 0.6, 0.9, 0.975, 0.999];

describe('studentTQuantile', () => {
  const cases = DEGREES.flatMap((degrees) => PROBABILITIES.map((probability) => ({ degrees, probability })));
  const ours = cases.map(({ degrees, probability }) => studentTQuantile(probability, degrees));
  const scipy = runPythonJson<{ ppf: number[]; sf: number[] }>(
    `
import json, sys
from scipy import stats
data = json.load(sys.stdin)
ppf = [float(stats.t.ppf(c['probability'], c['degrees'])) for c in data['cases']]
sf = [float(stats.t.sf(q, c['degrees'])) for q, c in zip(data['ours'], data['cases'])]
print(json.dumps({'ppf': ppf, 'sf': sf}))
`,
    { cases, ours },
  );

  it('matches scipy.stats.t.ppf for ν from 1 to 10⁴ and p from 1e-10 to 0.999', () => {
    cases.forEach(({ degrees, probability }, index) => {
      expectRelative(ours[index] as number, scipy.ppf[index] as number, SCIPY_PPF_AGREEMENT, `scipy.stats.t.ppf(${probability}, ${degrees})`);
    });
  });

  it('returns quantiles whose scipy.stats.t.sf upper tail is 1 − p', () => {
    cases.forEach(({ degrees, probability }, index) => {
      expectRelative(scipy.sf[index] as number, 1 - probability, ROUND_TRIP, `scipy.stats.t.sf(studentTQuantile(${probability}, ${degrees}))`);
    });
  });

  it('equals the closed forms for ν = 1 (tan) and ν = 2', () => {
    // Cauchy: t = tan(π(p − ½)); ν = 2: t = (2p − 1)/√(2p(1 − p)) (standard closed forms).
    for (const probability of [0.01, 0.2, 0.7, 0.975]) {
      expectRelative(studentTQuantile(probability, 1), Math.tan(Math.PI * (probability - 0.5)), 1e-13, 'Cauchy quantile tan(π(p − ½))');
      expectRelative(
        studentTQuantile(probability, 2),
        (2 * probability - 1) / Math.sqrt(2 * probability * (1 - probability)),
        1e-13,
        'ν = 2 closed form',
      );
    }
  });

  it('gives 2.2281 at p = 0.975, ν = 10 (METHODS.md check case 3.1, t = 2.2281)', () => {
    expectWithin(studentTQuantile(0.975, 10), 2.2281, 0.00005, 'METHODS.md check case 3.1 (computed from the stated data)');
  });

  it('returns 0 at p = ½ and is antisymmetric', () => {
    expect(studentTQuantile(0.5, 7)).toBe(0);
    expect(studentTQuantile(0.2, 7)).toBe(-studentTQuantile(0.8, 7));
  });

  it('throws for p outside (0, 1), NaN, or degrees of freedom that are not positive and finite', () => {
    expect(() => studentTQuantile(0, 5)).toThrow(/strictly between 0 and 1/);
    expect(() => studentTQuantile(1, 5)).toThrow(/strictly between 0 and 1/);
    expect(() => studentTQuantile(Number.NaN, 5)).toThrow(/strictly between 0 and 1/);
    expect(() => studentTQuantile(0.9, 0)).toThrow(/degrees of freedom/);
    expect(() => studentTQuantile(0.9, Number.POSITIVE_INFINITY)).toThrow(/degrees of freedom/);
    expect(() => studentTUpperTail(Number.NaN, 3)).toThrow(/NaN/);
  });
});

describe('normalQuantile', () => {
  const probabilities = [1e-12, 1e-6, 0.001, 0.025, 0.3, 0.5, 0.7, 0.975, 0.999999];
  const ours = probabilities.map((probability) => normalQuantile(probability));
  const scipy = runPythonJson<number[]>(
    `
import json, sys
from scipy import stats
print(json.dumps([float(stats.norm.ppf(p)) for p in json.load(sys.stdin)]))
`,
    probabilities,
  );

  it('matches scipy.stats.norm.ppf to 1e-14 relative', () => {
    // norm.ppf is accurate to a few ulp (ndtri); our inversion measured ≤ 4e-16.
    probabilities.forEach((probability, index) => {
      if (probability === 0.5) expect(ours[index]).toBe(0);
      else expectRelative(ours[index] as number, scipy[index] as number, 1e-14, `scipy.stats.norm.ppf(${probability})`);
    });
  });

  it('gives 1.959963984540054 at 0.975 and handles infinite z in the tail', () => {
    expectRelative(normalQuantile(0.975), 1.959963984540054, 1e-15, 'scipy.stats.norm.ppf(0.975)');
    expect(normalUpperTail(Number.POSITIVE_INFINITY)).toBe(0);
    expect(normalUpperTail(Number.NEGATIVE_INFINITY)).toBe(1);
    expect(normalUpperTail(0)).toBe(0.5);
  });

  it('throws for p outside (0, 1) and NaN z', () => {
    expect(() => normalQuantile(0)).toThrow(/strictly between 0 and 1/);
    expect(() => normalQuantile(1.5)).toThrow(/strictly between 0 and 1/);
    expect(() => normalUpperTail(Number.NaN)).toThrow(/NaN/);
  });
});

describe('regularisedIncompleteBeta', () => {
  const cases = [
    [0.3, 2, 3],
    [0.1, 0.5, 0.5],
    [0.006, 0.5, 0.5],
    [0.9, 5, 0.5],
    [0.2, 15, 0.5],
    [0.5, 500, 0.5],
    [0.999, 0.5, 2000],
  ] as const;
  const scipy = runPythonJson<number[]>(
    `
import json, sys
from scipy import special
print(json.dumps([float(special.betainc(a, b, x)) for x, a, b in json.load(sys.stdin)]))
`,
    cases,
  );

  it('matches scipy.special.betainc', () => {
    cases.forEach(([x, shapeA, shapeB], index) => {
      expectRelative(regularisedIncompleteBeta(x, shapeA, shapeB), scipy[index] as number, BETA_AGREEMENT, `scipy.special.betainc(${shapeA}, ${shapeB}, ${x})`);
    });
  });

  it('gives 0 at x = 0 and 1 at x = 1, and throws outside [0, 1] or for shapes that are not positive', () => {
    expect(regularisedIncompleteBeta(0, 2, 3)).toBe(0);
    expect(regularisedIncompleteBeta(1, 2, 3)).toBe(1);
    expect(() => regularisedIncompleteBeta(1.1, 2, 3)).toThrow(/\[0, 1\]/);
    expect(() => regularisedIncompleteBeta(0.5, 0, 3)).toThrow(/positive/);
  });
});

describe('invertUpperTail', () => {
  it('returns 0 for a target of exactly ½ and throws for targets outside (0, ½]', () => {
    expect(invertUpperTail(normalUpperTail, normalDensity, 0.5)).toBe(0);
    expect(() => invertUpperTail(normalUpperTail, normalDensity, 0.7)).toThrow(/\(0, 0.5\]/);
    expect(() => invertUpperTail(normalUpperTail, normalDensity, 0)).toThrow(/\(0, 0.5\]/);
  });

  it('stops on a closed bracket when no Newton step helps (density given as 0)', () => {
    // With a zero density every step is a bisection; the answer must still be the quantile.
    expectRelative(invertUpperTail(normalUpperTail, () => 0, 0.025), 1.959963984540054, 1e-14, 'scipy.stats.norm.ppf(0.975)');
  });
});
