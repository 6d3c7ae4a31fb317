/**
 * Warnings that need the whole survey: lateral variation, spread length, forward-model misfit and a
 * layer missing on one side. Picks come from the ray-geometry oracle on stated plane-layer models
 * (a different model under one shot stands in for a lateral change).
 */
import { describe, expect, it } from 'vitest';
import { readPickTable } from '../../lib/picks/index.js';
import { interpret } from '../../lib/interpret.js';
import type { Interpretation } from '../../lib/interpretation/shape.js';
import { firstArrivalByRays } from '../oracles/ray-geometry.js';
import { seededNormal } from '../../lib/random.js';
import { range } from '../helpers/synthetic-survey.js';

interface ShotSpec {
  readonly x: number;
  readonly velocities: readonly number[];
  readonly thicknesses: readonly number[];
  readonly delay?: number;
}

function survey(shots: readonly ShotSpec[], receivers: readonly number[], seed = 1): Interpretation {
  const noise = seededNormal(seed);
  const rows = ['shot,source_x_m,receiver_x_m,time_ms,sigma_ms'];
  shots.forEach((shot, k) => {
    for (const receiver of receivers) {
      const offset = Math.abs(receiver - shot.x);
      if (offset === 0) continue;
      const time = firstArrivalByRays(shot.velocities, shot.thicknesses, offset).time + (shot.delay ?? 0) + 2e-4 * noise();
      rows.push(`S${k + 1},${shot.x},${receiver},${(time * 1000).toFixed(4)},0.2`);
    }
  });
  const outcome = readPickTable(rows.join('\n'));
  if (!outcome.ok) throw new Error(JSON.stringify(outcome.problems.slice(0, 2)));
  return interpret(outcome.value);
}

const codes = (result: Interpretation) => result.warnings.map((warning) => warning.code);
const RECEIVERS = range(48, 2, 2);
const TWO = { velocities: [500, 2000], thicknesses: [8] };

describe('survey warnings', () => {
  it('lateral-variation: the refractor is 8 m deep under one shot and 12 m under the other', () => {
    const result = survey([{ x: 0, ...TWO }, { x: 98, velocities: [500, 2000], thicknesses: [12] }], RECEIVERS);
    expect(codes(result)).toContain('lateral-variation');
    const same = survey([{ x: 0, ...TWO }, { x: 98, ...TWO }], RECEIVERS);
    expect(codes(same)).not.toContain('lateral-variation');
  });

  it('spread-too-short: a refractor at 20 m read from offsets of at most 58 m (common practice: 3–5 × depth)', () => {
    const deep = { velocities: [500, 5000], thicknesses: [20] };
    const result = survey([{ x: 0, ...deep }, { x: 60, ...deep }], range(29, 2, 2));
    expect(codes(result)).toContain('spread-too-short');
    expect(codes(survey([{ x: 0, ...TWO }, { x: 98, ...TWO }], RECEIVERS))).not.toContain('spread-too-short');
  });

  it('model-misfit: one shot recorded with a 4 ms trigger delay misfits the survey model most, and its direct wave misses the origin', () => {
    const result = survey([{ x: 0, ...TWO }, { x: 49, ...TWO }, { x: 98, ...TWO, delay: 4e-3 }], RECEIVERS);
    const misfits = result.warnings.filter((warning) => warning.code === 'model-misfit').map((warning) => warning.shot);
    expect(misfits).toContain('S3');
    const worst = [...result.residuals.perShot].sort((a, b) => (b.rms ?? 0) - (a.rms ?? 0))[0]!;
    expect(worst.shot).toBe('S3');
    expect(codes(survey([{ x: 0, ...TWO }, { x: 49, ...TWO }, { x: 98, ...TWO }], RECEIVERS))).not.toContain('model-misfit');
    expect(result.warnings.some((warning) => warning.code === 'direct-not-through-origin' && warning.shot === 'S3')).toBe(true);
  });

  it('missing-layer-branch: bedrock seen from one end but absent under the other shot', () => {
    const three = { velocities: [400, 1600, 3500], thicknesses: [4, 10] };
    const result = survey([{ x: 0, ...three }, { x: 122, velocities: [400, 1600], thicknesses: [4] }], range(60, 2, 2));
    const missing = result.warnings.filter((warning) => warning.code === 'missing-layer-branch');
    expect(missing.map((warning) => [warning.shot, warning.branch])).toEqual([['S2', 3]]);
  });
});
