/**
 * The browser client's reversed-profile tables (client/src/reversed-results.ts), built from the
 * project's engine output as the oracle: lib's interpretation of the demo survey
 * sample-surveys/ashcombe-hollow-undulating-bedrock.csv (invented data: three overlapping spreads
 * over undulating bedrock; display units m, ms, m/s), of the same table with one shot's times
 * late by a trigger delay added here (so that lib's reciprocal-time check fails for its pairs),
 * and of sample-surveys/fenwick-meadow-water-table.csv (two refractors).
 *
 * Number formatting itself (format.ts: the value to the precision of its SE) is checked in
 * format-and-routes.test.ts; here the expected texts are built with the same functions from lib's
 * numbers, so each check is that the right engine value lands in the right cell.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import type { Interpretation as EngineInterpretation } from '../../lib/interpretation/shape.js';
import type { Interpretation, ReversedPairResult } from '../../client/src/api-types.js';
import { plain, withError } from '../../client/src/format.js';
import {
  dippingLayerTable, EXCEEDS_MARK, forwardCheckSummary, reciprocalReadings, reciprocalState, reversedPairTable, seamTable,
  withRefractorInCaption, worstReceivers, WORST_RECEIVER_COUNT, type Table,
} from '../../client/src/reversed-results.js';
import { asClient, engineView, readTable } from './engine-inputs.js';

// ---------------------------------------------------------------- inputs

const sampleText = (name: string): string => readFileSync(new URL(`../../sample-surveys/${name}.csv`, import.meta.url), 'utf8');
const ASHCOMBE_TEXT = sampleText('ashcombe-hollow-undulating-bedrock');
const ASHCOMBE: EngineInterpretation = engineView(readTable(ASHCOMBE_TEXT));
const FENWICK: EngineInterpretation = engineView(readTable(sampleText('fenwick-meadow-water-table')));

/** A trigger delay added to every pick of one shot: 3 ms, nearly three times lib's reciprocal-time limit for these picks (about 1.09 ms). */
const TRIGGER_DELAY_MS = 3;
const DELAYED_SHOT = 'S2-E';

/** The table with `shot`'s times late by `delay` ms (columns shot, source_x_m, receiver_x_m, time_ms, sigma_ms). */
function withTriggerDelay(text: string, shot: string, delay: number): string {
  return text.split('\n').map((row) => {
    const fields = row.split(',');
    if (fields[0] !== shot) return row;
    fields[3] = (Number(fields[3]) + delay).toFixed(2);
    return fields.join(',');
  }).join('\n');
}
const DELAYED: EngineInterpretation = engineView(readTable(withTriggerDelay(ASHCOMBE_TEXT, DELAYED_SHOT, TRIGGER_DELAY_MS)));

const GRM_METHOD = ASHCOMBE.refractors.find((refractor) => refractor.method.startsWith('generalized reciprocal'))!.method;

/** The texts of one column of a table, row by row. */
const column = (table: Table, name: string): string[] => {
  const index = table.columns.indexOf(name);
  if (index < 0) throw new Error(`no column '${name}' in ${table.columns.join(' | ')}`);
  return table.rows.map((row) => row.cells[index]!.text);
};
const cellOf = (table: Table, key: string, name: string) => table.rows.find((row) => row.key === key)!.cells[table.columns.indexOf(name)]!;

// ---------------------------------------------------------------- reversed pairs

describe('reversedPairTable', () => {
  it('reversedPairTable lists every reversed pair of lib in lib\'s order, with the reciprocal time and both refractor velocities ± SE', () => {
    const table = reversedPairTable(asClient(ASHCOMBE));
    // Oracle: lib's reversed pairs of the sample (13: each spread's shots paired with the shots of their own and the neighbouring spread).
    expect(table.rows.map((row) => row.key)).toEqual(ASHCOMBE.reversedPairs.map((pair) => pair.id));
    expect(ASHCOMBE.reversedPairs.length).toBeGreaterThan(3);
    expect(column(table, 'Reciprocal time (ms)')).toEqual(ASHCOMBE.reversedPairs.map((pair) => withError(pair.reciprocalTime.value, pair.reciprocalTime.valueSE)));
    expect(column(table, 'Plus-minus velocity (m/s)')).toEqual(ASHCOMBE.reversedPairs.map((pair) => withError(pair.plusMinus.velocity, pair.plusMinus.velocitySE)));
    expect(column(table, 'GRM velocity (m/s)')).toEqual(ASHCOMBE.reversedPairs.map((pair) => withError(pair.generalizedReciprocal.velocity, pair.generalizedReciprocal.velocitySE)));
    expect(column(table, 'Optimum XY (m)')).toEqual(ASHCOMBE.reversedPairs.map((pair) => plain(pair.generalizedReciprocal.optimumXY!, 3)));
  });

  it('reversedPairTable names the single refractor in the caption instead of a column, and keeps the column when pairs lie on two refractors', () => {
    // Oracle: every Ashcombe pair is on branch 2 (one refractor); Fenwick's pairs are on branches 2 and 3.
    expect(new Set(ASHCOMBE.reversedPairs.map((pair) => pair.refractor))).toEqual(new Set([2]));
    const single = reversedPairTable(asClient(ASHCOMBE));
    expect(single.columns).not.toContain('Refractor');
    expect(single.caption).toBe('Reversed pairs, refractor: top of layer 2 (± one standard error)');
    expect(new Set(FENWICK.reversedPairs.map((pair) => pair.refractor)).size).toBe(2);
    const two = reversedPairTable(asClient(FENWICK));
    expect(column(two, 'Refractor')).toEqual(FENWICK.reversedPairs.map((pair) => `top of layer ${pair.refractor}`));
    expect(two.rows.map((row) => row.cells[1]!.chip)).toEqual(FENWICK.reversedPairs.map((pair) => pair.refractor));
  });

  it('reversedPairTable marks "exceeds" exactly on the pairs lib\'s reciprocal-time check fails, and says "not checked" where only one time was recorded', () => {
    // Oracle: lib's check on the table with a trigger delay on one shot; every pair with that shot and both times read fails it.
    const failing = DELAYED.reversedPairs.filter((pair) => pair.reciprocalTime.exceeds === true).map((pair) => pair.id);
    expect(failing.length).toBeGreaterThan(0);
    expect(failing.every((id) => id.includes(DELAYED_SHOT))).toBe(true);
    const table = reversedPairTable(asClient(DELAYED));
    const misfitColumn = 'Reciprocal-time misfit (ms)';
    expect(table.rows.filter((row) => row.flagged).map((row) => row.key)).toEqual(failing);
    for (const pair of DELAYED.reversedPairs) {
      const cell = cellOf(table, pair.id, misfitColumn);
      const state = reciprocalState(pair);
      if (pair.reciprocalTime.misfit === null) {
        expect(state).toBe('not checked');
        expect(cell.text).toBe('—');
        expect(cell.details).toEqual(['not checked: one time only']);
      } else {
        // lib/interpretation/shape.ts: misfit = t_AB − t_BA against `limit`; the sign is kept (− as U+2212).
        expect(state).toBe(pair.reciprocalTime.exceeds ? 'exceeds' : 'within');
        expect(cell.text.replace('\u2212', '-')).toBe(`${pair.reciprocalTime.misfit > 0 ? '+' : ''}${pair.reciprocalTime.misfit.toFixed(2)}`);
        expect(cell.details).toEqual([`limit ${pair.reciprocalTime.limit!.toFixed(2)}`]);
        expect(cell.mark).toBe(pair.reciprocalTime.exceeds ? EXCEEDS_MARK : undefined);
      }
    }
    // Without the delay no pair of the sample fails (lib's check at two SEs of the difference).
    expect(reversedPairTable(asClient(ASHCOMBE)).rows.some((row) => row.flagged)).toBe(false);
  });

  it('reciprocalReadings names each shot\'s time at the other, says which was not recorded, and which was read from nearby picks', () => {
    const both = ASHCOMBE.reversedPairs.find((pair) => pair.reciprocalTime.misfit !== null)!;
    expect(reciprocalReadings(both, asClient(ASHCOMBE))).toEqual([
      `${both.forwardShot} at ${both.reverseShot}: ${both.reciprocalTime.forwardAtReverseShot!.toFixed(2)}`,
      `${both.reverseShot} at ${both.forwardShot}: ${both.reciprocalTime.reverseAtForwardShot!.toFixed(2)}`,
    ]);
    // An off-end shot stands beyond the spread: the other shot has no receiver there (oracle: lib reads one time only).
    const one = ASHCOMBE.reversedPairs.find((pair) => pair.reciprocalTime.forwardAtReverseShot === null)!;
    expect(reciprocalReadings(one, asClient(ASHCOMBE))[0]).toBe(`${one.forwardShot} at ${one.reverseShot}: not recorded`);
    // `from` lists how each time that was read was read, in order (lib/interpretation/present.ts): a time from
    // nearby picks after a missing one belongs to the second reading.
    const nearby: ReversedPairResult = { ...one, reciprocalTime: { ...one.reciprocalTime, from: ['nearby picks'] } };
    expect(reciprocalReadings(nearby, asClient(ASHCOMBE))[1]).toBe(`${one.reverseShot} at ${one.forwardShot}: ${one.reciprocalTime.reverseAtForwardShot!.toFixed(2)} (from nearby picks)`);
  });

  it('reversedPairTable prints every optimum-XY reason of lib as a footnote and as the XY cell\'s tooltip, and says when the data did not resolve it', () => {
    const table = reversedPairTable(asClient(ASHCOMBE));
    const withReason = ASHCOMBE.reversedPairs.filter((pair) => pair.generalizedReciprocal.reason !== null);
    expect(table.footnotes.filter((note) => note.startsWith('Optimum XY of'))).toEqual(withReason.map((pair) => `Optimum XY of ${pair.id}: ${pair.generalizedReciprocal.reason}.`));
    for (const pair of ASHCOMBE.reversedPairs) {
      const cell = cellOf(table, pair.id, 'Optimum XY (m)');
      expect(cell.title).toBe(pair.generalizedReciprocal.reason ?? undefined);
      expect(cell.details?.includes('not resolved by the data') ?? false).toBe(pair.generalizedReciprocal.resolved === false);
    }
    // Oracle: lib leaves the XY of some short-overlap pairs unresolved (every XY as straight as the noise allows).
    expect(ASHCOMBE.reversedPairs.some((pair) => pair.generalizedReciprocal.resolved === false)).toBe(true);
  });

  it('reversedPairTable of a revision stored before reversed pairs existed (no field) has no rows and no footnotes', () => {
    const { reversedPairs: _dropped, ...older } = asClient(ASHCOMBE);
    const table = reversedPairTable(older);
    expect(table.rows).toEqual([]);
    expect(table.footnotes).toEqual([]);
  });
});

describe('withRefractorInCaption', () => {
  const table: Table = {
    caption: 'c',
    columns: ['a', 'refractor', 'b'],
    rows: [
      { key: '1', flagged: false, notes: [], cells: [{ text: 'x' }, { text: 'top of layer 2', chip: 2 }, { text: 'y' }] },
      { key: '2', flagged: false, notes: [], cells: [{ text: 'z' }, { text: 'top of layer 2', chip: 2 }, { text: 'w' }] },
    ],
    footnotes: [],
  };
  it('withRefractorInCaption drops a column whose every row reads the same and names it in the caption; keeps a column that differs, and an empty table as it is', () => {
    const collapsed = withRefractorInCaption(table, 1, (refractor) => `c on ${refractor}`);
    expect(collapsed.caption).toBe('c on top of layer 2');
    expect(collapsed.columns).toEqual(['a', 'b']);
    expect(collapsed.rows.map((row) => row.cells.map((cell) => cell.text))).toEqual([['x', 'y'], ['z', 'w']]);
    const differing: Table = { ...table, rows: [table.rows[0]!, { ...table.rows[1]!, cells: [{ text: 'z' }, { text: 'top of layer 3', chip: 3 }, { text: 'w' }] }] };
    expect(withRefractorInCaption(differing, 1, () => 'never')).toBe(differing);
    const empty: Table = { ...table, rows: [] };
    expect(withRefractorInCaption(empty, 1, () => 'never')).toBe(empty);
  });
});

// ---------------------------------------------------------------- dipping layers

describe('dippingLayerTable', () => {
  it('dippingLayerTable gives one row per pair of shots and interface with lib\'s true velocity, dip and depths under both shots ± SE', () => {
    const table = dippingLayerTable(asClient(FENWICK));
    // Oracle: lib's dipping layers of the Fenwick sample (F1 → F3 resolves two interfaces, F2 → F3 one).
    const expected = FENWICK.dippingLayers.flatMap((entry) => entry.interfaces.map((layer) => ({ entry, layer })));
    expect(table.rows.map((row) => row.key)).toEqual(expected.map(({ entry, layer }) => `${entry.forwardShot} → ${entry.reverseShot} #${layer.interface}`));
    expect(column(table, 'Refractor')).toEqual(expected.map(({ layer }) => `top of layer ${layer.interface + 1}`));
    expect(column(table, 'True velocity (m/s)')).toEqual(expected.map(({ layer }) => withError(layer.trueVelocity, layer.trueVelocitySE)));
    expect(column(table, 'Dip (°)')).toEqual(expected.map(({ layer }) => withError(Math.abs(layer.dipDegrees), layer.dipDegreesSE)));
    expect(column(table, 'Depth under the forward shot (m)')).toEqual(expected.map(({ layer }) => withError(layer.depthUnderForwardShot, layer.depthUnderForwardShotSE)));
    expect(column(table, 'Depth under the reverse shot (m)')).toEqual(expected.map(({ layer }) => withError(layer.depthUnderReverseShot, layer.depthUnderReverseShotSE)));
  });

  it('dippingLayerTable says which shot each interface goes down towards (positive dip: towards the reverse shot) and puts a pair\'s notes under its last row', () => {
    const table = dippingLayerTable(asClient(ASHCOMBE));
    // lib/interpretation/shape.ts: dipDegrees is positive when the interface deepens from the forward shot towards the reverse shot.
    for (const entry of ASHCOMBE.dippingLayers) {
      for (const layer of entry.interfaces) {
        const row = table.rows.find((candidate) => candidate.key === `${entry.forwardShot} → ${entry.reverseShot} #${layer.interface}`)!;
        const dip = row.cells[table.columns.indexOf('Dip (°)')]!;
        expect(dip.details).toEqual([`down towards ${layer.dipDegrees > 0 ? entry.reverseShot : entry.forwardShot}`]);
        // Where lib has nothing to note, the plane is consistent: the deeper end is the one the dip goes down towards
        // (lib notes a pair whose depths under the shots and dip disagree, as over this undulating bedrock).
        if (entry.notes.length === 0) expect(layer.dipDegrees > 0).toBe(layer.depthUnderReverseShot > layer.depthUnderForwardShot);
        expect(row.notes).toEqual(layer === entry.interfaces[entry.interfaces.length - 1] ? entry.notes : []);
      }
    }
    expect(ASHCOMBE.dippingLayers.some((entry) => entry.notes.length === 0)).toBe(true);
    expect(ASHCOMBE.dippingLayers.some((entry) => entry.interfaces.some((layer) => layer.dipDegrees < 0))).toBe(true);
    expect(ASHCOMBE.dippingLayers.some((entry) => entry.interfaces.some((layer) => layer.dipDegrees > 0))).toBe(true);
  });
});

// ---------------------------------------------------------------- seams

describe('seamTable', () => {
  it('seamTable lists lib\'s seams of the chosen method by position, with the signed depth step ± SE or "no receiver in common"', () => {
    const table = seamTable(asClient(ASHCOMBE), GRM_METHOD);
    const seams = ASHCOMBE.refractors.filter((refractor) => refractor.method === GRM_METHOD).flatMap((refractor) => refractor.seams);
    expect(seams.length).toBeGreaterThan(0);
    expect(table.rows.map((row) => row.cells[0]!.text)).toEqual([...seams].sort((left, right) => left.x - right.x).map((seam) => plain(seam.x, 3)));
    for (const seam of seams) {
      const row = table.rows.find((candidate) => candidate.cells[0]!.text === plain(seam.x, 3))!;
      expect(row.cells[table.columns.indexOf('From pair')]!.text).toBe(seam.fromPair);
      expect(row.cells[table.columns.indexOf('To pair')]!.text).toBe(seam.toPair);
      const step = row.cells[table.columns.indexOf('Depth step, new pair minus old (m)')]!;
      if (seam.step === null) expect(step.details).toEqual(['no receiver in common']);
      else expect(step.text).toBe(`${seam.step >= 0 ? '+' : '\u2212'}${withError(Math.abs(seam.step), seam.stepSE)}`);
    }
    // Oracle: the sample's GRM section has a seam where the pairs on either side share no receiver.
    expect(seams.some((seam) => seam.step === null)).toBe(true);
    // A per-shot method has no seams.
    expect(seamTable(asClient(ASHCOMBE), ASHCOMBE.refractors[0]!.method).rows).toEqual([]);
    // Listed by position whatever order they come in (the rows of lib's seams reversed here).
    const reversedOrder: Interpretation = { ...ASHCOMBE, refractors: ASHCOMBE.refractors.map((refractor) => ({ ...refractor, seams: [...refractor.seams].reverse() })) };
    expect(seamTable(reversedOrder, GRM_METHOD).rows.map((row) => row.key)).toEqual(table.rows.map((row) => row.key));
  });
});

// ---------------------------------------------------------------- forward check

describe('forwardCheckSummary and worstReceivers', () => {
  it('forwardCheckSummary gives lib\'s overall RMS over the picks of every shot, and each shot\'s pick count, RMS and signed mean', () => {
    const check = ASHCOMBE.forwardCheck!;
    const summary = forwardCheckSummary(asClient(ASHCOMBE))!;
    const pickCount = check.perShot.reduce((sum, entry) => sum + entry.pickCount, 0);
    expect(pickCount).toBe(ASHCOMBE.summary.pickCount - ASHCOMBE.summary.excludedPickCount);
    expect(summary.overall).toBe(`${check.overallRms!.toFixed(2)}\u202fms over ${pickCount} picks`);
    expect(summary.perShot.rows.map((row) => row.key)).toEqual(check.perShot.map((entry) => entry.shot));
    expect(column(summary.perShot, 'Picks')).toEqual(check.perShot.map((entry) => String(entry.pickCount)));
    expect(column(summary.perShot, 'RMS (ms)')).toEqual(check.perShot.map((entry) => entry.rms!.toFixed(2)));
    // Mean of observed − computed (lib/model/forward-check.ts), signed, − as U+2212; a mean that rounds to zero has no
    // sign (+ 0 turns −0 into 0 on both sides).
    expect(column(summary.perShot, 'Mean, observed \u2212 computed (ms)').map((text) => Number(text.replace('\u2212', '-')) + 0)).toEqual(check.perShot.map((entry) => Number(entry.mean!.toFixed(2)) + 0));
    expect(summary.grid).toContain(`${check.grid.columns} × ${check.grid.rows}`);
  });

  it('forwardCheckSummary marks "exceeds" on exactly the shots lib warns the forward check misses (forward-check-misfit)', () => {
    // The survey as picked: no shot warned, none marked.
    expect(ASHCOMBE.warnings.filter((warning) => warning.code === 'forward-check-misfit')).toEqual([]);
    expect(forwardCheckSummary(asClient(ASHCOMBE))!.perShot.rows.filter((row) => row.flagged)).toEqual([]);
    // One shot 3 ms late: lib warns about it (and about neighbours whose section it bent).
    const warned = DELAYED.warnings.filter((warning) => warning.code === 'forward-check-misfit').map((warning) => warning.shot);
    expect(warned).toContain(DELAYED_SHOT);
    const summary = forwardCheckSummary(asClient(DELAYED))!;
    expect(summary.perShot.rows.filter((row) => row.flagged).map((row) => row.key).sort()).toEqual([...warned].sort());
    for (const row of summary.perShot.rows) expect(row.cells[summary.perShot.columns.indexOf('RMS (ms)')]!.mark).toBe(row.flagged ? EXCEEDS_MARK : undefined);
  });

  it('forwardCheckSummary lists the five receivers with the largest RMS, largest first (oracle: lib\'s per-receiver residuals sorted here)', () => {
    const check = ASHCOMBE.forwardCheck!;
    const expected = [...check.perReceiver].filter((entry) => entry.rms !== null).sort((left, right) => right.rms! - left.rms!).slice(0, WORST_RECEIVER_COUNT);
    const summary = forwardCheckSummary(asClient(ASHCOMBE))!;
    expect(WORST_RECEIVER_COUNT).toBe(5);
    expect(summary.worstReceivers.caption).toBe('The 5 receivers fitted worst');
    expect(column(summary.worstReceivers, 'Receiver position (m)')).toEqual(expected.map((entry) => plain(entry.receiverX, 3)));
    expect(column(summary.worstReceivers, 'RMS (ms)')).toEqual(expected.map((entry) => entry.rms!.toFixed(2)));
  });

  it('worstReceivers leaves out receivers without an RMS, breaks ties by position, and returns fewer when there are fewer', () => {
    const receivers = [
      { receiverX: 30, pickCount: 2, rms: 1.5, mean: 0 },
      { receiverX: 10, pickCount: 0, rms: null, mean: null },
      { receiverX: 20, pickCount: 2, rms: 1.5, mean: 0 },
      { receiverX: 40, pickCount: 2, rms: 2.5, mean: 1 },
    ];
    expect(worstReceivers(receivers, 5).map((entry) => entry.receiverX)).toEqual([40, 20, 30]);
    expect(worstReceivers(receivers, 2).map((entry) => entry.receiverX)).toEqual([40, 20]);
    expect(worstReceivers([], 5)).toEqual([]);
  });

  it('forwardCheckSummary is null when lib made no forward check (null) and for a revision stored before it existed (no field)', () => {
    // lib: the forward check can be switched off (option forwardCheck: false) and is null then.
    const off: Interpretation = { ...asClient(ASHCOMBE), forwardCheck: null };
    expect(forwardCheckSummary(off)).toBeNull();
    const { forwardCheck: _dropped, ...older } = asClient(ASHCOMBE);
    expect(forwardCheckSummary(older)).toBeNull();
  });
});
