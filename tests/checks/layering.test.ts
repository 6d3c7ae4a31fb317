import { describe, expect, it } from 'vitest';
import {
  depthMethodsDisagreeWarnings,
  depthNoteWarnings,
  headWavePrecriticalWarnings,
  spreadTooShortWarnings,
  velocityInversionWarnings,
} from '../../lib/checks/layering.js';
import { WARNING_CODES } from '../../lib/checks/warning.js';
import { depthOutsideBracket } from '../../lib/depth/crossover-distance.js';
import { interceptTimeDepths } from '../../lib/depth/intercept-time.js';
import type { DepthNote } from '../../lib/depth/types.js';
import { layerDepthsOf } from '../depth/depth-test-data.js';
import { criticalDistanceByRays } from '../oracles/ray-geometry.js';
import { criticalDistance } from '../../lib/model/layered-model.js';
import { CASE_1_1 } from '../model/check-case-1-1.js';

const PLACE = { shot: 'S3', side: 'forward' } as const;
const model11 = { velocities: CASE_1_1.velocities, thicknesses: CASE_1_1.thicknesses };

describe('velocityInversionWarnings', () => {
  const branch = (index: number, velocity: number, slownessSE: number) => ({ branch: index, slowness: 1 / velocity, slownessSE });
  const separation = 1 / 1200 - 1 / 1800;

  it('velocityInversionWarnings flags a later branch slower by more than 2 SE and says depths below come out too large', () => {
    const se = separation / 2.1 / Math.SQRT2; // the difference is 2.1 SE
    const [warning, ...rest] = velocityInversionWarnings(PLACE, [branch(1, 400, 0), branch(2, 1800, se), branch(3, 1200, se)]);
    expect(rest).toEqual([]);
    expect(warning).toMatchObject({ code: 'velocity-inversion-suspected', level: 'warning', shot: 'S3', side: 'forward', branch: 3 });
    expect(warning?.message).toMatch(/^shot S3, forward side, branch 3: /);
    expect(warning?.message).toMatch(/cannot be seen in first arrivals and the depths below it come out too large/);
    expect(warning?.details?.separationInSE).toBeCloseTo(2.1, 10);
  });

  it('velocityInversionWarnings gives nothing within 2 SE, for faster later branches, or for fewer than two branches', () => {
    const se = separation / 1.9 / Math.SQRT2;
    expect(velocityInversionWarnings(PLACE, [branch(2, 1800, se), branch(3, 1200, se)])).toEqual([]);
    expect(velocityInversionWarnings(PLACE, [branch(1, 400, 0), branch(2, 1600, 0), branch(3, 3500, 0)])).toEqual([]);
    expect(velocityInversionWarnings(PLACE, [branch(1, 400, 0)])).toEqual([]);
  });
});

describe('headWavePrecriticalWarnings', () => {
  // x*_3 = 11.2002 m in METHODS.md check case 1.1 (computed from the stated model).
  const critical3 = criticalDistanceByRays(CASE_1_1.velocities, CASE_1_1.thicknesses, 3) ?? Number.NaN;

  it('headWavePrecriticalWarnings flags a branch whose first pick is nearer than x*_n (case 1.1: branch 3 at 10 m < 11.2002 m)', () => {
    const [warning, ...rest] = headWavePrecriticalWarnings(PLACE, model11, [
      { branch: 1, firstOffset: 0.5 },
      { branch: 2, firstOffset: 15 },
      { branch: 3, firstOffset: 10 },
    ]);
    expect(rest).toEqual([]);
    expect(warning).toMatchObject({ code: 'head-wave-precritical', level: 'warning', branch: 3 });
    expect(warning?.details?.criticalDistance).toBeCloseTo(critical3, 9);
    expect(warning?.message).toMatch(/^shot S3, forward side, branch 3: its first pick at 10\u00a0m is nearer the shot than the critical distance 11\.2\u00a0m/);
  });

  it('headWavePrecriticalWarnings passes a pick exactly at x*_n, skips the direct wave and impossible branches', () => {
    const modelCritical = criticalDistance(model11, 3) ?? Number.NaN;
    expect(headWavePrecriticalWarnings(PLACE, model11, [{ branch: 3, firstOffset: modelCritical }])).toEqual([]);
    expect(headWavePrecriticalWarnings(PLACE, model11, [{ branch: 1, firstOffset: 0 }])).toEqual([]);
    const inversion = { velocities: [800, 500, 3000], thicknesses: [4, 6] };
    expect(headWavePrecriticalWarnings(PLACE, inversion, [{ branch: 2, firstOffset: 0 }])).toEqual([]);
    expect(() => headWavePrecriticalWarnings(PLACE, model11, [{ branch: 4, firstOffset: 1 }])).toThrow(/branch must be an integer from 1 to 3/);
  });
});

describe('spreadTooShortWarnings', () => {
  it('spreadTooShortWarnings flags a farthest offset under 3 × the deepest depth (common practice 3–5 ×)', () => {
    const [warning] = spreadTooShortWarnings(PLACE, 40, 15);
    expect(warning).toMatchObject({ code: 'spread-too-short', level: 'caution', details: { farthestOffset: 40, deepestDepth: 15, neededOffset: 45 } });
    expect(warning?.message).toMatch(/lengthen the spread to at least 45\u00a0m /);
  });

  it('spreadTooShortWarnings passes exactly 3 × the depth and gives nothing when no depth is claimed', () => {
    expect(spreadTooShortWarnings(PLACE, 45, 15)).toEqual([]);
    expect(spreadTooShortWarnings(PLACE, 10, 0)).toEqual([]);
    expect(spreadTooShortWarnings(PLACE, 10, Number.NaN)).toEqual([]);
    expect(() => spreadTooShortWarnings(PLACE, -1, 5)).toThrow(/farthest offset must be zero or positive/);
  });
});

describe('depthMethodsDisagreeWarnings', () => {

  it('depthMethodsDisagreeWarnings turns each interface outside its bracket into a warning naming both methods and the layer below it', () => {
    const comparisons = depthOutsideBracket(layerDepthsOf([4, 14], [0.1, 0.3]), layerDepthsOf([3.9, 15], [0, 0]), layerDepthsOf([4.3, 16], [0, 0]));
    const warnings = depthMethodsDisagreeWarnings(PLACE, comparisons);
    expect(warnings.map((warning) => [warning.code, warning.layer])).toEqual([['depth-methods-disagree', 3]]);
    expect(warnings[0]?.message).toMatch(/^shot S3, forward side, top of layer 3: the intercept-time method puts it at 14\u00a0m ± 0\.3\u00a0m, outside the 15\u00a0m to 16\u00a0m that the crossover-distance method allows/);
    expect(depthMethodsDisagreeWarnings(PLACE, [])).toEqual([]);
  });
});

describe('depthNoteWarnings', () => {
  it('depthNoteWarnings maps the notes of interceptTimeDepths to registered warning codes, one per code and layer', () => {
    const result = interceptTimeDepths([
      { slowness: 1 / 400, intercept: 0, slownessVariance: 0, interceptVariance: 0, covariance: 0 },
      { slowness: 1 / 1600, intercept: -0.001, slownessVariance: 0, interceptVariance: 0, covariance: 0 },
      { slowness: 1 / 1200, intercept: 0.02, slownessVariance: 0, interceptVariance: 0, covariance: 0 },
    ]);
    const warnings = depthNoteWarnings(PLACE, result.notes);
    expect(warnings.map((warning) => [warning.code, warning.layer, warning.details?.notes])).toEqual([
      ['thickness-not-positive', 1, 2],
      ['velocity-inversion-suspected', 3, 1],
    ]);
    expect(warnings[0]?.message).toMatch(/^shot S3, forward side, branch 2: intercept time/);
    for (const warning of warnings) expect(Object.keys(WARNING_CODES)).toContain(warning.code);
  });

  it('depthNoteWarnings makes an ill-conditioned depth a caution and gives nothing for no notes', () => {
    const note: DepthNote = { code: 'depth-ill-conditioned', layer: 2, message: 'layer 2: test note' };
    expect(depthNoteWarnings(PLACE, [note])).toEqual([
      { code: 'depth-ill-conditioned', level: 'caution', message: 'shot S3, forward side, layer 2: test note', shot: 'S3', side: 'forward', layer: 2, details: { notes: 1 } },
    ]);
    expect(depthNoteWarnings(PLACE, [])).toEqual([]);
  });
});
