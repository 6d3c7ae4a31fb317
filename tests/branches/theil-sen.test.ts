/**
 * fitTheilSen against scipy.stats.theilslopes (reference library), on data generated here from a
 * stated line plus seeded noise and wild picks, and the documented covariance choice.
 */
import { describe, expect, it } from 'vitest';
import { median } from '../../lib/branches/median.js';
import { fitTheilSen, roundHalfEven } from '../../lib/branches/theil-sen.js';
import type { FitOutcome, LineFit } from '../../lib/branches/types.js';
import { seededNormal, seededRandom } from '../../lib/random.js';
import { expectRelative } from '../helpers/expect-within.js';
import { runPythonJson } from '../helpers/python.js';

/** Medians and order statistics are single divisions or means of two: agreement to rounding. */
const AGREEMENT = 1e-12;

function fitted(outcome: FitOutcome): LineFit {
  if (!outcome.ok) throw new Error(outcome.message);
  return outcome.fit;
}

interface Dataset {
  name: string;
  offsets: number[];
  times: number[];
}

function noisyBranch(name: string, seed: number, count: number, spacing: number, roundTo: number | null): Dataset {
  const normal = seededNormal(seed);
  const uniform = seededRandom(seed + 1);
  const offsets = Array.from({ length: count }, (_, index) => 10 + spacing * index);
  const times = offsets.map((offset) => {
    // 10 % wild picks, 5–20 ms late (a mispicked later cycle).
    const wild = uniform() < 0.1 ? 0.005 + 0.015 * uniform() : 0;
    const time = 0.02 + offset / 2500 + 0.4e-3 * normal() + wild;
    return roundTo === null ? time : Math.round(time / roundTo) * roundTo;
  });
  return { name, offsets, times };
}

const DATASETS: Dataset[] = [
  noisyBranch('30 picks with wild picks', 7001, 30, 4, null),
  // Times rounded to 1 ms and offsets repeated: ties in both variables enter Sen's variance.
  { ...noisyBranch('ties in t (1 ms rounding) and in x', 7002, 24, 5, 1e-3), name: 'ties in t and x' },
  noisyBranch('2000 picks', 7003, 2000, 0.5, null),
];
const tied = DATASETS[1] as Dataset;
tied.offsets = tied.offsets.map((offset, index) => (index % 4 === 3 ? (tied.offsets[index - 1] as number) : offset));

interface Reference {
  slope: number;
  joint: number;
  separate: number;
  low: number;
  high: number;
}

const references = runPythonJson<Reference[]>(
  `
import json, sys
import numpy as np
from scipy import stats
out = []
for d in json.load(sys.stdin):
    j = stats.theilslopes(d['times'], d['offsets'], 0.95, method='joint')
    s = stats.theilslopes(d['times'], d['offsets'], 0.95, method='separate')
    out.append({'slope': j.slope, 'joint': j.intercept, 'separate': s.intercept,
                'low': j.low_slope, 'high': j.high_slope})
print(json.dumps(out, default=float))
`,
  DATASETS,
);

describe.each(DATASETS.map((data, index) => ({ data, reference: references[index] as Reference })))(
  'fitTheilSen against scipy.stats.theilslopes: $data.name',
  ({ data, reference }) => {
    const fit = fitted(fitTheilSen(data.offsets, data.times));

    it('slope equals the median pairwise slope', () => {
      expectRelative(fit.slope, reference.slope, AGREEMENT, 'scipy.stats.theilslopes slope');
    });

    it("intercept is median(t − b·x), scipy's method='joint' (not its default 'separate')", () => {
      expectRelative(fit.intercept, reference.joint, AGREEMENT, "scipy.stats.theilslopes(method='joint') intercept");
      expect(Math.abs(reference.joint - reference.separate)).toBeGreaterThan(0);
    });

    it('slope interval equals the Kendall-τ interval (Sen 1968 eq. 2.6) and the velocity interval inverts it', () => {
      const [low, high] = fit.velocityInterval95 ?? [Number.NaN, Number.NaN];
      expectRelative(1 / high, reference.low, AGREEMENT, 'scipy.stats.theilslopes low_slope');
      expectRelative(1 / low, reference.high, AGREEMENT, 'scipy.stats.theilslopes high_slope');
    });

    it('covariance follows the documented choice: SE(b) = CI width/(2·1.96), Var a = SE(b)²·mean(x²), Cov = −mean(x)·SE(b)²', () => {
      const slopeSE = (reference.high - reference.low) / (2 * 1.959963984540054);
      const count = data.offsets.length;
      const meanOffset = data.offsets.reduce((sum, offset) => sum + offset, 0) / count;
      const meanSquare = data.offsets.reduce((sum, offset) => sum + offset * offset, 0) / count;
      expectRelative(fit.slopeSE, slopeSE, 1e-12, 'scipy interval half-width / z₀.₉₇₅');
      expectRelative(fit.interceptSE, slopeSE * Math.sqrt(meanSquare), 1e-12, 'documented intercept SE');
      expectRelative(fit.covariance, -meanOffset * slopeSE ** 2, 1e-12, 'documented covariance');
      expect(fit.covariance / (fit.slopeSE * fit.interceptSE)).toBeLessThan(-0.5);
    });
  },
);

describe('fitTheilSen through the origin', () => {
  const data = DATASETS[0] as Dataset;
  const reference = runPythonJson<{ slope: number; low: number; high: number }>(
    `
import json, sys
import numpy as np
d = json.load(sys.stdin)
x = np.array(d['offsets']); t = np.array(d['times'])
r = np.sort(t[x != 0] / x[x != 0]); m = len(r)
z = 1.959963984540054
# sign-test order statistics, rounded half to even as numpy does
lo = max(int(np.round((m - z * np.sqrt(m)) / 2)) - 1, 0)
hi = min(int(np.round((m + z * np.sqrt(m)) / 2)), m - 1)
print(json.dumps({'slope': float(np.median(r)), 'low': float(r[lo]), 'high': float(r[hi])}))
`,
    { offsets: [0, ...data.offsets], times: [0.001, ...data.times] },
  );

  it('slope is the median of t/x over picks with x ≠ 0; interval from sign-test order statistics (numpy)', () => {
    const fit = fitted(fitTheilSen([0, ...data.offsets], [0.001, ...data.times], { throughOrigin: true }));
    expect(fit.throughOrigin).toBe(true);
    expect(fit.intercept).toBe(0);
    expect(fit.interceptSE).toBe(0);
    expect(fit.degreesOfFreedom).toBe(data.offsets.length);
    expectRelative(fit.slope, reference.slope, AGREEMENT, 'numpy.median of t/x');
    const [low, high] = fit.velocityInterval95 ?? [Number.NaN, Number.NaN];
    expectRelative(1 / high, reference.low, AGREEMENT, 'numpy sign-test lower order statistic');
    expectRelative(1 / low, reference.high, AGREEMENT, 'numpy sign-test upper order statistic');
  });
});

describe('fitTheilSen edges', () => {
  it('with 3 picks the interval is the full range of the 3 pairwise slopes', () => {
    const fit = fitted(fitTheilSen([10, 20, 30], [0.01, 0.0215, 0.0305]));
    const slopes = [0.0115 / 10, 0.0205 / 20, 0.009 / 10].sort((left, right) => left - right);
    const [low, high] = fit.velocityInterval95 ?? [Number.NaN, Number.NaN];
    expectRelative(1 / high, slopes[0] as number, 1e-12, 'smallest pairwise slope, by hand');
    expectRelative(1 / low, slopes[2] as number, 1e-12, 'largest pairwise slope, by hand');
  });

  it("takes Sen's variance as 0 when heavy ties make it negative: the interval shrinks to the middle slopes", () => {
    // Seven picks share one offset and six share one time: the tie sums (798 + 510) exceed
    // n(n−1)(2n+5) = 1176, so σ_S² < 0 (scipy returns NaN bounds here).
    const offsets = [10, 10, 10, 10, 10, 10, 10, 20];
    const times = [0.01, 0.01, 0.01, 0.01, 0.01, 0.01, 0.015, 0.02];
    const fit = fitted(fitTheilSen(offsets, times));
    // The 7 slopes are 0.0005 once and 0.001 six times: the middle ones are 0.001.
    expectRelative(fit.slope, 0.001, 1e-12, 'median of the 7 pairwise slopes, by hand');
    expect(fit.slopeSE).toBe(0);
    expect(fit.velocityInterval95).toEqual([1 / fit.slope, 1 / fit.slope]);
  });

  it('refuses 2 picks, all offsets equal and non-finite input as values', () => {
    expect(fitTheilSen([1, 2], [1, 2]).ok).toBe(false);
    expect(fitTheilSen([5, 5, 5], [1, 2, 3]).ok).toBe(false);
    expect(fitTheilSen([1, 2, Number.NaN], [1, 2, 3]).ok).toBe(false);
  });

  it('roundHalfEven rounds halves to the even neighbour, as numpy.round does', () => {
    expect([0.5, 1.5, 2.5, -0.5, -1.5, 2.4, 2.6, -2.6].map(roundHalfEven)).toEqual([0, 2, 2, 0, -2, 2, 3, -3]);
  });
});

describe('median', () => {
  it('takes the middle value, or the mean of the two middle values (numpy.median convention), without reordering the input', () => {
    const values = [3, 1, 4, 1];
    expect(median(values)).toBe(2);
    expect(values).toEqual([3, 1, 4, 1]);
    expect(median([5, -2, 9])).toBe(5);
  });

  it('throws for an empty list and for NaN', () => {
    expect(() => median([])).toThrow(/empty/);
    expect(() => median([1, Number.NaN, 2])).toThrow(/NaN/);
  });
});
