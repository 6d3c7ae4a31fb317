/**
 * fitLine (least squares) against numpy/scipy as reference libraries, on data generated here from
 * a stated line plus seeded Gaussian noise, at engineering and crustal scale.
 */
import { describe, expect, it } from 'vitest';
import { fitLine } from '../../lib/branches/line-fit.js';
import type { LineFit } from '../../lib/branches/types.js';
import { seededNormal } from '../../lib/random.js';
import { expectRelative } from '../helpers/expect-within.js';
import { runPythonJson } from '../helpers/python.js';

/**
 * Both sides compute the same closed-form estimates in double precision; 1e-9 relative is the
 * agreement asked for and leaves over two digits of room above the worst difference measured
 * (6e-12, at crustal scale).
 */
const AGREEMENT = 1e-9;

interface Dataset {
  name: string;
  offsets: number[];
  times: number[];
  sigmas: number[];
}

function dataset(name: string, seed: number, count: number, firstOffset: number, spacing: number, intercept: number, slowness: number, noise: number): Dataset {
  const normal = seededNormal(seed);
  const offsets = Array.from({ length: count }, (_, index) => firstOffset + spacing * index);
  // Pick uncertainties vary by a factor 5 along the branch; the noise drawn matches them.
  const sigmas = offsets.map((_, index) => noise * (0.4 + (1.6 * index) / (count - 1)));
  const times = offsets.map((offset, index) => intercept + slowness * offset + (sigmas[index] as number) * normal());
  return { name, offsets, times, sigmas };
}

const DATASETS = [
  dataset('engineering, 25 picks, 5–125 m', 20240601, 25, 5, 5, 0.02, 1 / 2000, 0.5e-3),
  dataset('crustal, 40 picks, 100–600 km', 20240602, 40, 1e5, 12_820.5, 7.0, 1 / 8000, 0.05),
  dataset('short branch, 4 picks', 20240603, 4, 30, 4, 0.031, 1 / 2100, 0.3e-3),
];

interface Reference {
  free: { slope: number; intercept: number; slopeSE: number; interceptSE: number; covariance: number; residualSD: number; interval: [number, number] };
  weighted: { slope: number; intercept: number; slopeSE: number; interceptSE: number; covariance: number; chiSquare: number };
  origin: { slope: number; slopeSE: number; residualSD: number };
  originWeighted: { slope: number; slopeSE: number };
}

const SCRIPT = `
import json, sys
import numpy as np
from scipy import stats
out = []
for d in json.load(sys.stdin):
    x = np.array(d['offsets']); t = np.array(d['times']); s = np.array(d['sigmas']); n = len(x)
    lr = stats.linregress(x, t)
    coef, cov = np.polyfit(x, t, 1, cov=True)            # covariance scaled by RSS/(n-2)
    resid = t - lr.intercept - lr.slope * x
    q = stats.t.ppf(0.975, n - 2)
    wcoef, wcov = np.polyfit(x, t, 1, w=1/s, cov='unscaled')  # absolute sigmas: (X^T W X)^-1
    wres = t - wcoef[1] - wcoef[0] * x
    X = x[:, None]
    b0 = np.linalg.lstsq(X, t, rcond=None)[0][0]
    r0 = t - b0 * x
    s2 = r0 @ r0 / (n - 1)
    W = 1 / s**2
    bw = np.linalg.lstsq(X * np.sqrt(W)[:, None], t * np.sqrt(W), rcond=None)[0][0]
    out.append({
      'free': {'slope': lr.slope, 'intercept': lr.intercept, 'slopeSE': lr.stderr,
               'interceptSE': lr.intercept_stderr, 'covariance': cov[0, 1],
               'residualSD': float(np.sqrt(resid @ resid / (n - 2))),
               'interval': [1 / (lr.slope + q * lr.stderr), 1 / (lr.slope - q * lr.stderr)]},
      'weighted': {'slope': wcoef[0], 'intercept': wcoef[1], 'slopeSE': float(np.sqrt(wcov[0, 0])),
                   'interceptSE': float(np.sqrt(wcov[1, 1])), 'covariance': wcov[0, 1],
                   'chiSquare': float(np.sum((wres / s)**2))},
      'origin': {'slope': b0, 'slopeSE': float(np.sqrt(s2 / (x @ x))), 'residualSD': float(np.sqrt(s2))},
      'originWeighted': {'slope': bw, 'slopeSE': float(np.sqrt(1 / np.sum(W * x * x)))},
    })
print(json.dumps(out, default=float))
`;

const references = runPythonJson<Reference[]>(SCRIPT, DATASETS);

function fitted(data: Dataset, sigmas: number[] | null, throughOrigin: boolean): LineFit {
  const outcome = fitLine(data.offsets, data.times, sigmas, { throughOrigin });
  if (!outcome.ok) throw new Error(outcome.message);
  return outcome.fit;
}

describe.each(DATASETS.map((data, index) => ({ data, reference: references[index] as Reference })))(
  'fitLine against numpy/scipy: $data.name',
  ({ data, reference }) => {
    it('OLS: slope, intercept, SEs, covariance and residual SD match scipy.stats.linregress and numpy.polyfit(cov=True)', () => {
      const fit = fitted(data, null, false);
      const source = 'scipy.stats.linregress / numpy.polyfit';
      expectRelative(fit.slope, reference.free.slope, AGREEMENT, `${source} slope`);
      expectRelative(fit.intercept, reference.free.intercept, AGREEMENT, `${source} intercept`);
      expectRelative(fit.slopeSE, reference.free.slopeSE, AGREEMENT, `${source} stderr`);
      expectRelative(fit.interceptSE, reference.free.interceptSE, AGREEMENT, `${source} intercept_stderr`);
      expectRelative(fit.covariance, reference.free.covariance, AGREEMENT, `${source} cov[0, 1]`);
      expectRelative(fit.residualSD, reference.free.residualSD, AGREEMENT, `${source} residual SD`);
    });

    it('OLS: the 95 % velocity interval inverts the Student-t slope interval (scipy.stats.t.ppf)', () => {
      const fit = fitted(data, null, false);
      const interval = fit.velocityInterval95;
      expect(interval).not.toBeNull();
      expectRelative(interval?.[0] ?? Number.NaN, reference.free.interval[0], AGREEMENT, 'scipy: 1/(b + t·SE)');
      expectRelative(interval?.[1] ?? Number.NaN, reference.free.interval[1], AGREEMENT, 'scipy: 1/(b − t·SE)');
      expectRelative(fit.apparentVelocitySE, fit.slopeSE / fit.slope ** 2, 1e-15, 'METHODS §3: SE(V) = SE(b)/b²');
    });

    it('WLS with absolute sigmas: estimates, SEs, covariance and χ² match numpy.polyfit(w=1/σ, cov="unscaled")', () => {
      const fit = fitted(data, data.sigmas, false);
      const source = "numpy.polyfit(w=1/sigma, cov='unscaled')";
      expect(fit.weighted).toBe(true);
      expectRelative(fit.slope, reference.weighted.slope, AGREEMENT, `${source} slope`);
      expectRelative(fit.intercept, reference.weighted.intercept, AGREEMENT, `${source} intercept`);
      expectRelative(fit.slopeSE, reference.weighted.slopeSE, AGREEMENT, `${source} sqrt(cov[0, 0])`);
      expectRelative(fit.interceptSE, reference.weighted.interceptSE, AGREEMENT, `${source} sqrt(cov[1, 1])`);
      expectRelative(fit.covariance, reference.weighted.covariance, AGREEMENT, `${source} cov[0, 1]`);
      expectRelative(fit.chiSquare ?? Number.NaN, reference.weighted.chiSquare, AGREEMENT, `${source} χ²`);
    });

    it('through the origin, unweighted and weighted: slope and SE match numpy.linalg.lstsq', () => {
      const plain = fitted(data, null, true);
      expectRelative(plain.slope, reference.origin.slope, AGREEMENT, 'numpy.linalg.lstsq slope through origin');
      expectRelative(plain.slopeSE, reference.origin.slopeSE, AGREEMENT, 'numpy: sqrt(s²/Σx²), s² = RSS/(n−1)');
      expectRelative(plain.residualSD, reference.origin.residualSD, AGREEMENT, 'numpy: sqrt(RSS/(n−1))');
      const weighted = fitted(data, data.sigmas, true);
      expectRelative(weighted.slope, reference.originWeighted.slope, AGREEMENT, 'numpy.linalg.lstsq on √w-scaled rows');
      expectRelative(weighted.slopeSE, reference.originWeighted.slopeSE, AGREEMENT, 'numpy: sqrt(1/Σwx²)');
    });
  },
);
