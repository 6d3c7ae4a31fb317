/**
 * Surveys at the edges of what the horizontal-layer methods can say: lateral changes that make the
 * mean layering non-increasing, user branch numbers with gaps, no direct wave anywhere, picks at
 * the source, buried shots and relief, and nothing to interpret. Each must give a valid
 * interpretation (the documented schema) and say plainly what it could not do. Picks come from the
 * ray-geometry oracle on stated plane-layer models.
 */
import { describe, expect, it } from 'vitest';
import { readPickTable } from '../../lib/picks/index.js';
import { interpret } from '../../lib/interpret.js';
import { InterpretationSchema, type Interpretation } from '../../lib/interpretation/shape.js';
import { firstArrivalByRays } from '../oracles/ray-geometry.js';
import { range } from '../helpers/synthetic-survey.js';

interface Row {
  shot: string;
  source: number;
  receiver: number;
  time: number;
  extra?: string[];
}

function arrivals(shot: string, source: number, receivers: readonly number[], velocities: number[], thicknesses: number[]): Row[] {
  return receivers
    .filter((receiver) => receiver !== source)
    .map((receiver) => ({ shot, source, receiver, time: firstArrivalByRays(velocities, thicknesses, Math.abs(receiver - source)).time }));
}

function run(rows: readonly Row[], extraHeader: string[] = []): Interpretation {
  const header = ['shot', 'source_x_m', 'receiver_x_m', 'time_ms', ...extraHeader].join(',');
  const lines = rows.map((row) => [row.shot, row.source, row.receiver, (row.time * 1000).toFixed(4), ...(row.extra ?? [])].join(','));
  const outcome = readPickTable([header, ...lines].join('\n'));
  if (!outcome.ok) throw new Error(JSON.stringify(outcome.problems.slice(0, 3)));
  const result = interpret(outcome.value);
  InterpretationSchema.parse(JSON.parse(JSON.stringify(result)));
  return result;
}

const codes = (result: Interpretation) => result.warnings.map((warning) => warning.code);
const RECEIVERS = range(40, 2, 2);

describe('interpret at the edges', () => {
  it('a lateral change that makes the mean layers non-increasing: no crash, the survey model stops, and says why', () => {
    const rows = [...arrivals('A', 0, RECEIVERS, [1000, 1200], [5]), ...arrivals('B', 82, RECEIVERS, [400, 500], [5])];
    const result = run(rows);
    expect(codes(result)).toContain('velocity-inversion-suspected');
    const unresolved = result.layers.filter((layer) => layer.depthToTop === null);
    expect(unresolved.length).toBeGreaterThan(0);
  });

  it('user branches 1 and 3 only: layer 3 has a velocity but no depth, and a gap note', () => {
    const model = { velocities: [400, 1600, 3500], thicknesses: [4, 10] };
    const rows = arrivals('S1', 0, range(48, 2.5, 2.5), model.velocities, model.thicknesses).map((row) => {
      const branch = firstArrivalByRays(model.velocities, model.thicknesses, row.receiver).branch;
      return { ...row, extra: [String(branch === 1 ? 1 : 3)] };
    });
    const result = run(rows, ['branch']);
    const third = result.layers.find((layer) => layer.index === 3);
    // Branch "3" holds the 1600 and 3500 m/s head waves together: a velocity between them, no depth.
    expect(third?.velocity).toBeGreaterThan(1600);
    expect(third?.velocity).toBeLessThan(3500);
    expect(third?.depthToTop).toBeNull();
    expect(codes(result)).toContain('user-branch-gap');
    expect(result.layers.filter((layer) => layer.thickness === null && layer.depthToTop !== null).length).toBeLessThanOrEqual(1);
  });

  it('no direct wave on any shot (only off-end shots): no head wave forced through the origin, layer 1 unknown', () => {
    const rows = [...arrivals('W', -40, RECEIVERS, [500, 2000], [8]), ...arrivals('E', 122, RECEIVERS, [500, 2000], [8])];
    const result = run(rows);
    expect(result.layers.some((layer) => layer.index === 1)).toBe(false);
    expect(result.layers.find((layer) => layer.index === 2)?.velocity).toBeCloseTo(2000, -1);
    expect(result.warnings.some((warning) => warning.code === 'missing-layer-branch' && warning.layer === 1)).toBe(true);
    for (const side of result.shots.flatMap((shot) => shot.sides)) {
      expect(side.branches.every((branch) => !branch.throughOrigin)).toBe(true);
    }
  });

  it('a pick at the source position is kept, not fitted, and named', () => {
    const rows = [{ shot: 'S1', source: 0, receiver: 0, time: 0 }, ...arrivals('S1', 0, RECEIVERS, [500, 2000], [8])];
    const result = run(rows);
    const note = result.warnings.find((warning) => warning.code === 'zero-offset-picks');
    expect(note?.level).toBe('info');
    expect(note?.message).toMatch(/line 2/);
  });

  it('buried shots and ground relief are named as not corrected for', () => {
    const rows = arrivals('S1', 0, RECEIVERS, [500, 2000], [8]).map((row, k) => ({ ...row, extra: ['2', String(100 + 0.05 * k)] }));
    const result = run(rows, ['source_depth_m', 'receiver_elev_m']);
    const notes = result.warnings.filter((warning) => warning.code === 'corrections-not-applied');
    expect(notes.map((warning) => warning.message).join(' ')).toMatch(/buried/);
    expect(notes.map((warning) => warning.message).join(' ')).toMatch(/elevations vary/);
  });

  it('every pick excluded: no layers, and a warning that nothing was interpreted', () => {
    const rows = arrivals('S1', 0, RECEIVERS.slice(0, 5), [500, 2000], [8]).map((row) => ({ ...row, extra: ['x'] }));
    const result = run(rows, ['branch']);
    expect(result.layers).toEqual([]);
    expect(codes(result)).toContain('nothing-interpreted');
  });

  it('a water-table refractor is named at survey level from the mean velocity', () => {
    const model = { velocities: [480, 1500, 3000], thicknesses: [3, 8] };
    const rows = [...arrivals('S1', 0, range(48, 2, 2), model.velocities, model.thicknesses), ...arrivals('S2', 98, range(48, 2, 2), model.velocities, model.thicknesses)];
    const result = run(rows);
    expect(result.warnings.some((warning) => warning.code === 'water-table-suspected' && warning.layer === 2 && warning.shot === undefined)).toBe(true);
  });

  it('a survey of 150,000 picks (more than a spread argument list holds) is interpreted without overflowing the stack', () => {
    const model = { velocities: [500, 2000, 4000], thicknesses: [5, 10] };
    const rows: Row[] = [];
    for (let shot = 0; shot < 150; shot += 1) rows.push(...arrivals(`S${shot}`, shot * 6.7, range(1000, 0, 1), model.velocities, model.thicknesses));
    expect(rows.length).toBeGreaterThan(100_000);
    const result = run(rows);
    expect(result.layers.map((layer) => Math.round(layer.velocity))).toEqual([500, 2000, 4000]);
  });
});
