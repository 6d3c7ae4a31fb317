/**
 * writePickTable: the inverse of readPickTable. The reference is the pick-table contract itself
 * (a written table must read back to the same pick set) and the fixture of METHODS.md check
 * case 1.1 (computed from the stated model).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { DISPLAY_UNITS } from '../../lib/units.js';
import { readPickTable, writePickTable, type Pick, type PickSet } from '../../lib/picks/index.js';

const fixture = (name: string): Buffer => readFileSync(new URL(`../fixtures/picks/${name}`, import.meta.url));

function loaded(input: string | Uint8Array): PickSet {
  const outcome = readPickTable(input);
  if (!outcome.ok) throw new Error(outcome.problems.map((problem) => `${problem.code} line ${problem.line}: ${problem.message}`).join('\n'));
  return outcome.value;
}

/** Everything of a pick set except line numbers, which are the written file's own. */
function content(set: PickSet): unknown {
  return { ...set, picks: set.picks.map(({ line: _line, ...rest }) => rest) };
}

const FULL = [
  'shot,receiver,source_x_m,receiver_x_m,time_ms,sigma_ms,branch,source_elev_m,receiver_elev_m,source_depth_m,uphole_ms',
  '" S 1 ",G1,0,10,25,0.3,1,100.25,100.5,1.5,2.1',
  '" S 1 ","G, 2",0,30,38.1149,0.3,x,100.25,,1.5,2.1',
  '" S 1 ","say ""G3""",0,60,48.1292,,,100.25,99.75,1.5,2.1',
  '#7,G1,100,90,25,0.3,2,101,100.5,,',
  '#7,G2,100,70,38.1149,0.3,2,101,100.5,,',
  '#7,G3,100,40,48.1292,0.3,3,101,100.5,,',
].join('\n');

describe('writePickTable', () => {
  it('writePickTable writes the check-case fixture in m and ms with the contract header', () => {
    const text = writePickTable(loaded(fixture('check-case-1-1.csv')));
    expect(text.split('\n').slice(0, 3)).toEqual(['shot,source_x_m,receiver_x_m,time_ms', 'S1,0,10,25', 'S1,0,30,38.1149']);
    expect(text.endsWith('59.5578\n')).toBe(true);
  });

  it('writePickTable output reads back to the same pick set in every unit pair (m, km, ft; ms, s)', () => {
    const original = loaded(fixture('check-case-1-1.csv'));
    for (const distance of ['m', 'km'] as const) {
      for (const time of ['ms', 's'] as const) {
        const back = loaded(writePickTable(original, { distance, time }));
        expect(content(back), `${distance}/${time}`).toEqual({ ...(content(original) as object), suggestedScale: distance === 'km' ? 'crustal' : 'engineering' });
      }
    }
    // Feet: one division by 0.3048 when writing, so positions come back within 2 ulp.
    const TWO_ULP = 2 * Number.EPSILON;
    const feet = loaded(writePickTable(original, { distance: 'ft', time: 'ms' }));
    feet.picks.forEach((pick, index) => {
      const expected = original.picks[index]?.receiverX ?? Number.NaN;
      expect(Math.abs(pick.receiverX - expected)).toBeLessThanOrEqual(TWO_ULP * Math.abs(expected));
    });
  });

  it('writePickTable keeps every optional column, quoted ids, excluded picks and empty cells through a round trip', () => {
    const original = loaded(FULL.replaceAll('#7,', '"#7",'));
    const written = writePickTable(original);
    expect(content(loaded(written))).toEqual(content(original));
    expect(written).toContain('"#7"');
    expect(written).toContain('" S 1 ","G, 2"');
    expect(written).toContain('"say ""G3"""');
  });

  it('writePickTable keeps the suggested scale when the units follow it', () => {
    const crustal = loaded(fixture('check-case-1-1-crustal.csv'));
    expect(loaded(writePickTable(crustal, DISPLAY_UNITS[crustal.suggestedScale])).suggestedScale).toBe('crustal');
    expect(writePickTable(crustal, DISPLAY_UNITS.crustal).split('\n')[0]).toBe('shot,source_x_km,receiver_x_km,time_s');
  });

  it('writePickTable writes geographic sets as latitude/longitude without x columns', () => {
    const original = loaded('shot,source_lat,source_lon,receiver_lat,receiver_lon,time_s\nS1,51.5,-0.12,51.6,-0.13,1\nS1,51.5,-0.12,51.7,-0.14,2\nS1,51.5,-0.12,51.8,-0.15,3\n');
    const written = writePickTable(original);
    expect(written.split('\n')[0]).toBe('shot,source_lat,source_lon,receiver_lat,receiver_lon,time_ms');
    expect(content(loaded(written))).toEqual(content(original));
  });

  it('writePickTable writes a column whose flag is off when a pick carries a value for it', () => {
    const original = loaded(fixture('check-case-1-1.csv'));
    const edited: PickSet = { ...original, picks: original.picks.map((pick, index): Pick => (index === 0 ? { ...pick, excluded: true, sigma: 0.0004 } : pick)) };
    const header = writePickTable(edited).split('\n')[0];
    expect(header).toBe('shot,source_x_m,receiver_x_m,time_ms,sigma_ms,branch');
    expect(writePickTable(edited).split('\n')[1]).toBe('S1,0,10,25,0.4,x');
  });

  it('writePickTable throws on a pick that no pick table can hold', () => {
    const original = loaded(fixture('check-case-1-1.csv'));
    const withPick = (change: Partial<Pick>): PickSet => ({ ...original, picks: [{ ...(original.picks[0] as Pick), ...change }] });
    expect(() => writePickTable(withPick({ time: Number.NaN }))).toThrow(/finite numbers only/);
    expect(() => writePickTable(withPick({ shot: '  ' }))).toThrow(/empty shot id/);
    expect(() => writePickTable(withPick({ shot: 'S\n1' }))).toThrow(/line break/);
  });

  it('writePickTable of an empty pick set is a header the reader refuses as table-no-data', () => {
    const original = loaded(fixture('check-case-1-1.csv'));
    const outcome = readPickTable(writePickTable({ ...original, picks: [], shotIds: [] }));
    expect(outcome.ok ? [] : outcome.problems.map((problem) => problem.code)).toEqual(['table-no-data']);
  });
});
