/**
 * Single-branch checks. Picks are built from stated lines (a velocity and an intercept) with
 * seeded noise; the curvature statistic is cross-checked against numpy's polyfit covariance.
 */
import { describe, expect, it } from 'vitest';
import {
  branchWarnings,
  directOriginWarnings,
  knownArrivalWarnings,
  outlierWarnings,
  poorFitWarnings,
  quadraticTermT,
  tooFewPicksWarnings,
  unboundedVelocityWarnings,
  type BranchContext,
} from '../../lib/checks/branch-checks.js';
import { branchFromMembers } from '../../lib/branches/branch-fit.js';
import type { FitMethod } from '../../lib/branches/types.js';
import { seededNormal } from '../../lib/random.js';
import { runPythonJson } from '../helpers/python.js';
import { expectRelative } from '../helpers/expect-within.js';
import { makeSide } from '../branches/build.js';

const RESOLUTION = 1e-4;

function context(
  offsets: number[],
  times: number[],
  options: { index?: number; sigmas?: number[]; method?: FitMethod; surfaceShot?: boolean } = {},
): BranchContext {
  const side = makeSide(offsets, times, { sigmas: options.sigmas ?? null, surfaceShot: options.surfaceShot ?? true });
  const outcome = branchFromMembers(side, options.index ?? 2, offsets.map((_, k) => k), options.method ?? 'least-squares', 'automatic');
  if (!outcome.ok) throw new Error(outcome.note.message);
  return { shot: 'S1', side: 'forward', branch: outcome.branch, sidePicks: side };
}

const line = (velocity: number, intercept: number, offsets: number[], noiseSD = 0, seed = 1) => {
  const noise = seededNormal(seed);
  return offsets.map((offset) => intercept + offset / velocity + noiseSD * noise());
};
const OFFSETS = Array.from({ length: 12 }, (_, k) => 20 + 4 * k);

describe('tooFewPicksWarnings', () => {
  it('says nothing from 4 picks, informs at 3, warns below 3', () => {
    expect(tooFewPicksWarnings(context(OFFSETS.slice(0, 4), line(2000, 0.03, OFFSETS.slice(0, 4), 2e-4)))).toEqual([]);
    const three = tooFewPicksWarnings(context(OFFSETS.slice(0, 3), line(2000, 0.03, OFFSETS.slice(0, 3), 2e-4)));
    expect(three.map((warning) => [warning.code, warning.level])).toEqual([['branch-too-few-picks', 'info']]);
    const two = tooFewPicksWarnings(context([20, 24], [0.04, 0.042], { sigmas: [3e-4, 3e-4] }));
    expect(two.map((warning) => warning.level)).toEqual(['warning']);
    expect(two[0]!.message).toMatch(/shot S1, forward side, branch 2: only 2 picks/);
  });
});

describe('poorFitWarnings', () => {
  it('warns when χ² is improbable for the sigmas (sigmas understated tenfold) and not when they are right', () => {
    const times = line(2000, 0.03, OFFSETS, 5e-4, 3);
    expect(poorFitWarnings(context(OFFSETS, times, { sigmas: OFFSETS.map(() => 5e-4) }), RESOLUTION)).toEqual([]);
    const understated = poorFitWarnings(context(OFFSETS, times, { sigmas: OFFSETS.map(() => 5e-5) }), RESOLUTION);
    expect(understated.map((warning) => warning.code)).toContain('branch-poor-fit');
    expect(understated[0]!.message).toMatch(/χ²/);
  });

  it('warns on a curved branch (velocity gradient) and not on a straight noisy one', () => {
    const curved = OFFSETS.map((offset) => 0.03 + offset / 2000 - 2e-6 * (offset - 40) ** 2);
    const noise = seededNormal(8);
    const warnings = poorFitWarnings(context(OFFSETS, curved.map((time) => time + 1e-4 * noise())), RESOLUTION);
    expect(warnings.map((warning) => warning.message).join(' ')).toMatch(/curved/);
    expect(poorFitWarnings(context(OFFSETS, line(2000, 0.03, OFFSETS, 3e-4, 5)), RESOLUTION)).toEqual([]);
  });

  it('never calls noise-free picks curved (scatter below the time resolution)', () => {
    expect(poorFitWarnings(context(OFFSETS, line(2000, 0.03, OFFSETS)), RESOLUTION)).toEqual([]);
  });
});

describe('quadraticTermT', () => {
  it('equals the t statistic of the x² coefficient from numpy.polyfit(deg=2, cov=True)', () => {
    const noise = seededNormal(21);
    const times = OFFSETS.map((offset) => 0.03 + offset / 2000 + 1e-7 * offset * offset + 3e-4 * noise());
    const expected = runPythonJson<number>(
      'import sys, json, numpy as np\nd = json.load(sys.stdin)\np, c = np.polyfit(d["x"], d["t"], 2, cov="unscaled")\nr = np.array(d["t"]) - np.polyval(p, d["x"])\ns2 = float(r @ r) / (len(r) - 3)\nprint(json.dumps(float(p[0] / np.sqrt(c[0, 0] * s2))))',
      { x: OFFSETS, t: times },
      ['numpy'],
    );
    expectRelative(quadraticTermT(OFFSETS, times)!, expected, 1e-8, 'numpy.polyfit t statistic of the quadratic term');
  });

  it('returns null for fewer than 4 picks or all offsets equal', () => {
    expect(quadraticTermT([1, 2, 3], [1, 2, 3])).toBeNull();
    expect(quadraticTermT([5, 5, 5, 5], [1, 2, 3, 4])).toBeNull();
  });
});

describe('outlierWarnings', () => {
  it('names the pick a Huber fit down-weighted, and says nothing for least squares', () => {
    const times = line(2000, 0.03, OFFSETS, 2e-4, 4).map((time, k) => (k === 6 ? time + 8e-3 : time));
    const robust = outlierWarnings(context(OFFSETS, times, { method: 'huber' }));
    expect(robust.map((warning) => warning.code)).toEqual(['branch-outlier-picks']);
    expect(robust[0]!.message).toMatch(/offset 44\.00 m/);
    expect(outlierWarnings(context(OFFSETS, times))).toEqual([]);
  });
});

describe('unboundedVelocityWarnings', () => {
  it('warns when the slope cannot be told from zero', () => {
    const flat = line(1e7, 0.05, OFFSETS.slice(0, 5), 2e-3, 6);
    expect(unboundedVelocityWarnings(context(OFFSETS.slice(0, 5), flat)).map((warning) => warning.code)).toEqual(['velocity-unbounded']);
    expect(unboundedVelocityWarnings(context(OFFSETS, line(2000, 0.03, OFFSETS, 2e-4)))).toEqual([]);
  });
});

describe('knownArrivalWarnings (common practice: air wave 320–350 m/s, water table 1450–1550 m/s)', () => {
  it('calls 340 m/s an air blast on any branch', () => {
    const warnings = knownArrivalWarnings(context(OFFSETS, line(340, 0, OFFSETS, 1e-4), { index: 1 }));
    expect(warnings.map((warning) => warning.code)).toEqual(['air-wave-suspected']);
  });
  it('calls a 1500 m/s refractor the water table, but not a 1500 m/s direct wave', () => {
    expect(knownArrivalWarnings(context(OFFSETS, line(1500, 0.01, OFFSETS, 1e-4))).map((warning) => warning.code)).toEqual(['water-table-suspected']);
    expect(knownArrivalWarnings(context(OFFSETS, line(1500, 0, OFFSETS, 1e-4), { index: 1 }))).toEqual([]);
  });
});

describe('directOriginWarnings', () => {
  const direct = Array.from({ length: 8 }, (_, k) => 2 + 2 * k);
  it('warns when the free direct-wave line misses time zero by more than 3 SE (a 3 ms trigger delay)', () => {
    const late = line(500, 3e-3, direct, 1e-4, 9);
    const warnings = directOriginWarnings(context(direct, late, { index: 1 }), RESOLUTION);
    expect(warnings.map((warning) => warning.code)).toEqual(['direct-not-through-origin']);
    expect(warnings[0]!.message).toMatch(/meets zero offset at [23]\.\d\d ms/);
  });
  it('warns on exact picks that miss the origin by more than the time resolution (SE 0), and not within it', () => {
    const constant = direct.map(() => 5e-3);
    expect(directOriginWarnings(context(direct, constant, { index: 1 }), RESOLUTION).map((warning) => warning.code)).toEqual(['direct-not-through-origin']);
    const rounded = line(500, 0.5e-4, direct);
    expect(directOriginWarnings(context(direct, rounded, { index: 1 }), RESOLUTION)).toEqual([]);
  });
  it('uses the Student-t quantile: a 4-pick branch 5.8 SE off zero passes (scipy t.ppf(0.99865, 2) = 19.2), 11.5 SE too, but not with 12 picks', () => {
    // Intercepts and SEs by scipy.stats.linregress on these picks: 2 ms at 5.77 and 11.5 SE.
    const four = [2, 4, 6, 8];
    expect(directOriginWarnings(context(four, [5.2e-3, 7.8e-3, 10.8e-3, 14.2e-3], { index: 1 }), RESOLUTION)).toEqual([]);
    expect(directOriginWarnings(context(four, [5.1e-3, 7.9e-3, 10.9e-3, 14.1e-3], { index: 1 }), RESOLUTION)).toEqual([]);
    const twelve = Array.from({ length: 12 }, (_, k) => 2 + 2 * k);
    const wobble = twelve.map((offset, k) => (2 + 1.5 * offset + (k % 2 === 0 ? 0.2 : -0.2)) * 1e-3);
    expect(directOriginWarnings(context(twelve, wobble, { index: 1 }), RESOLUTION).map((warning) => warning.code)).toEqual(['direct-not-through-origin']);
  });
  it('says nothing for a clean direct wave, a buried shot, or a head-wave branch', () => {
    expect(directOriginWarnings(context(direct, line(500, 0, direct, 1e-4, 9), { index: 1 }), RESOLUTION)).toEqual([]);
    expect(directOriginWarnings(context(direct, line(500, 3e-3, direct, 1e-4, 9), { index: 1, surfaceShot: false }), RESOLUTION)).toEqual([]);
    expect(directOriginWarnings(context(direct, line(500, 3e-3, direct, 1e-4, 9), { index: 2 }), RESOLUTION)).toEqual([]);
  });
});

describe('branchWarnings', () => {
  it('gathers every single-branch check in a fixed order', () => {
    const times = line(340, 0, OFFSETS.slice(0, 3), 1e-4, 2);
    expect(branchWarnings(context(OFFSETS.slice(0, 3), times, { index: 1 }), RESOLUTION).map((warning) => warning.code)).toEqual([
      'branch-too-few-picks',
      'air-wave-suspected',
    ]);
  });
});
