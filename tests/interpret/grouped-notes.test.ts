/**
 * Notes grouped over the survey (lib/interpretation/reversed-profile.ts `delayNoteWarnings` and
 * `dippingNoteWarnings`, lib/interpret.ts `mergeWarnings`): a long line has many reversed pairs,
 * and the same limitation of every pair must come out as one warning that counts them, not one
 * warning per pair (or per receiver).
 *
 * Test data:
 * - an early shot over a plane two-layer model: closed-form times (METHODS §1) with shot E's times
 *   20 ms early. Plus time T+ = t_AG + t_BG − t_AB (METHODS §6; Hagedoorn 1959): with t_AB the mean
 *   of the two reciprocal readings, one of them 20 ms early, every receiver of a pair with E has
 *   T+ = 2h·q − 20/2 ms = 7.746 − 10 < 0, a negative delay, which no depth can give;
 * - a steeply dipping refractor: Fermat-path times (tests/oracles/dipping-refractor.ts) at 20° and
 *   at 12°, either side of the 15° beyond which planar dipping-layer formulas are unreliable
 *   (METHODS §5, common practice);
 * - an undulating refractor that automatic segmentation splits in two: fine-grid first arrivals
 *   (tests/oracles/grid-first-arrivals.ts), whose reversed minus times run straight (Hagedoorn 1959).
 */
import { describe, expect, it } from 'vitest';
import { readPickTable, type PickSet } from '../../lib/picks/index.js';
import { DEFAULT_OPTIONS, interpret, interpretSurvey, type InterpretOptions } from '../../lib/interpret.js';
import type { Interpretation } from '../../lib/interpretation/shape.js';
import { dippingHeadWaveTime, type DippingModel } from '../oracles/dipping-refractor.js';
import { gridFirstArrivals } from '../oracles/grid-first-arrivals.js';
import { range } from '../helpers/synthetic-survey.js';
import { expectWithin } from '../helpers/expect-within.js';

interface Row {
  readonly shot: string;
  readonly sourceX: number;
  readonly receiverX: number;
  /** s */
  readonly time: number;
}

function pickSetOf(rows: readonly Row[]): PickSet {
  const lines = rows.map((row) => [row.shot, row.sourceX, row.receiverX, (row.time * 1000).toFixed(4)].join(','));
  const outcome = readPickTable(['shot,source_x_m,receiver_x_m,time_ms', ...lines].join('\n'));
  if (!outcome.ok) throw new Error(outcome.problems.map((problem) => problem.message).join('; '));
  return outcome.value;
}

const ofCode = (result: Interpretation, code: string) => result.warnings.filter((warning) => warning.code === code);

// --- an early shot: V 500/2000 m/s, h = 2 m; shots W 0, M 60, E 120 m, receivers every 2 m.
const H = 2;
const Q = Math.sqrt(1 / 500 ** 2 - 1 / 2000 ** 2);
/** Shot E's time-zero error, s. */
const EARLY = 0.02;
const earlyRows: Row[] = (
  [
    ['W', 0],
    ['M', 60],
    ['E', 120],
  ] as const
).flatMap(([shot, sourceX]) =>
  range(61, 0, 2)
    // E's picks within 30 m would be negative times (refused by the reader): that range is not recorded.
    .filter((receiverX) => receiverX !== sourceX && (shot !== 'E' || Math.abs(receiverX - sourceX) > 30))
    .map((receiverX) => {
      const offset = Math.abs(receiverX - sourceX);
      return { shot, sourceX, receiverX, time: Math.min(offset / 500, offset / 2000 + 2 * H * Q) - (shot === 'E' ? EARLY : 0) };
    }),
);

describe('delay-time notes: one warning per method and note code over all the pairs', () => {
  const picks = pickSetOf(earlyRows);
  const result = interpret(picks);
  // The per-pair notes the grouping starts from (the same pipeline, before the warnings are formed).
  const survey = interpretSurvey(picks, { ...DEFAULT_OPTIONS, scale: 'engineering' });
  const quiet = new Set(['xy-interpolated', 'too-few-common-receivers']);

  it('the survey forms the three pairs, and every receiver of the two pairs with the early shot has a negative plus time (METHODS §6)', () => {
    expect(result.reversedPairs.map((pair) => pair.id)).toEqual(['W → M', 'W → E', 'M → E']);
    const notes = ofCode(result, 'delay-time-note').filter((warning) => warning.details?.note === 'delay-below-upper-layers' && warning.details?.method === 'plus-minus');
    expect(notes).toHaveLength(1);
    // Source: T+ = 2h·q − EARLY/2 (METHODS §6 with the reciprocal time the mean of an exact and an early reading).
    const plusTime = Number(/plus time (-?[\d.]+)/.exec(notes[0]!.message.replace(/\u00a0/g, ' '))?.[1]);
    expectWithin(plusTime / 1000, 2 * H * Q - EARLY / 2, 2e-6, 'METHODS §6: T+ of a pair with a shot 20 ms early');
    const withE = result.reversedPairs.filter((pair) => pair.id.includes('E'));
    // Every common receiver of W → E and M → E is refused, none of W → M.
    expect(notes[0]!.details).toMatchObject({ pairs: 2, notes: withE.reduce((sum, pair) => sum + pair.commonReceivers, 0) });
    expect(notes[0]!.details!.notes).toBeGreaterThan(20);
    expect(notes[0]!.message).toContain('plus-minus: the same note on 2 pairs (W → E, M → E)');
  });

  it('each (method, note code) is one warning whose details count the pairs that have the note and the notes themselves', () => {
    // Source: the per-pair notes of the same run (what is grouped), counted here independently.
    const expected = new Map<string, { pairs: number; notes: number }>();
    for (const analysis of survey.reversed.pairs) {
      for (const [method, notes] of [['plus-minus', analysis.plusMinus.notes], ['GRM', analysis.generalizedReciprocal.notes]] as const) {
        const codes = notes.map((note) => note.code).filter((code) => !quiet.has(code));
        for (const code of new Set(codes)) {
          const key = `${method} ${code}`;
          const entry = expected.get(key) ?? { pairs: 0, notes: 0 };
          expected.set(key, { pairs: entry.pairs + 1, notes: entry.notes + codes.filter((other) => other === code).length });
        }
      }
    }
    const warnings = ofCode(result, 'delay-time-note');
    const got = new Map(warnings.map((warning) => [`${warning.details?.method} ${warning.details?.note}`, { pairs: Number(warning.details?.pairs), notes: Number(warning.details?.notes) }]));
    expect(got.size).toBe(warnings.length); // no (method, code) twice
    expect(got).toEqual(expected);
    // What the grouping has to do here: GRM's XY note on all three pairs, and a note repeated on many receivers.
    expect(got.get('GRM xy-not-resolved')).toEqual({ pairs: 3, notes: 3 });
    expect(got.get('GRM delay-below-upper-layers')!.notes).toBeGreaterThan(got.get('GRM delay-below-upper-layers')!.pairs);
  });

  it('a note on one pair only names the pair and counts its repeats on that pair', () => {
    // Source: METHODS §6 as above — every common receiver of W → E has a negative plus time.
    const one = interpret(picks, { reversedPairs: [{ forwardShot: 'W', reverseShot: 'E' }] });
    const note = ofCode(one, 'delay-time-note').find((warning) => warning.details?.method === 'plus-minus' && warning.details?.note === 'delay-below-upper-layers')!;
    const receivers = one.reversedPairs[0]!.commonReceivers;
    expect(note.details).toMatchObject({ pairs: 1, notes: receivers, reverseShot: 'E' });
    expect(note.shot).toBe('W');
    expect(note.message).toMatch(/^pair W → E, refractor 2, plus-minus: receiver at /);
    expect(note.message).toContain(`(and ${receivers - 1} more such notes on this pair)`);
  });
});

// --- a steeply dipping refractor: V 800/1600 m/s (critical angle 30°), 2 m under x = 0, receivers every 1 m over 0…80 m.
function dippingRows(dipDegrees: number): Row[] {
  const model: DippingModel = { velocities: [800, 1600], interfaces: [{ depthAtOrigin: 2, dip: (dipDegrees * Math.PI) / 180 }] };
  return [0, 4, 76, 80].flatMap((sourceX, k) =>
    range(81, 0, 1)
      .filter((receiverX) => receiverX !== sourceX)
      .map((receiverX) => ({
        shot: `S${k + 1}`,
        sourceX,
        receiverX,
        time: Math.min(Math.abs(receiverX - sourceX) / 800, dippingHeadWaveTime(model, 1, sourceX, receiverX) ?? Number.POSITIVE_INFINITY),
      })),
  );
}

describe('dipping-layer notes: one warning per note code over the pairs of shots', () => {
  it('a 20° refractor under two pairs of shots gives one dipping-layer-note (dip-steep) counting both pairs', () => {
    const result = interpret(pickSetOf(dippingRows(20)));
    // Source: the Fermat oracle's model dips 20°; the inversion recovers it under every pair.
    expect(result.dippingLayers.length).toBeGreaterThanOrEqual(2);
    for (const entry of result.dippingLayers) expectWithin(entry.interfaces[0]!.dipDegrees, 20, 0.5, `dip under ${entry.forwardShot} → ${entry.reverseShot}`);
    const steep = ofCode(result, 'dipping-layer-note').filter((warning) => warning.details?.note === 'dip-steep');
    expect(steep).toHaveLength(1);
    expect(steep[0]!.details?.pairs).toBe(result.dippingLayers.length);
    const names = result.dippingLayers.map((entry) => `${entry.forwardShot} → ${entry.reverseShot}`);
    expect(steep[0]!.message).toContain(`dipping layers under ${names.length} pairs of shots (${names.join(', ')})`);
    expect(steep[0]!.message.replace(/\u00a0/g, ' ')).toContain('steeper than 15 °');
    expect(steep[0]!.shot).toBe(result.dippingLayers[0]!.forwardShot);
  });

  it('a 12° refractor (below the 15° limit) gives the same solutions without a dip-steep note', () => {
    const result = interpret(pickSetOf(dippingRows(12)));
    expect(result.dippingLayers.length).toBeGreaterThanOrEqual(2);
    for (const entry of result.dippingLayers) expectWithin(entry.interfaces[0]!.dipDegrees, 12, 0.5, `dip under ${entry.forwardShot} → ${entry.reverseShot}`);
    expect(ofCode(result, 'dipping-layer-note').filter((warning) => warning.details?.note === 'dip-steep')).toEqual([]);
  });

  it('different dipping-layer note codes stay separate warnings, each counting its own pairs', () => {
    // The early-shot survey: the pairs with E give an interface that is not below shot B, and inconsistent depths
    // (METHODS §5: τ_B − τ_A must equal 2L·sin α·cos θ_c/V_1; E's 20 ms lowers τ_B, so the depth under B comes out negative).
    const result = interpret(pickSetOf(earlyRows));
    const notes = ofCode(result, 'dipping-layer-note');
    const codes = notes.map((warning) => String(warning.details?.note));
    expect(new Set(codes).size).toBe(codes.length);
    expect(codes).toEqual(expect.arrayContaining(['depth-not-positive', 'dip-inconsistent']));
    for (const warning of notes.filter((entry) => entry.details?.note !== undefined && ['depth-not-positive', 'dip-inconsistent'].includes(String(entry.details.note)))) {
      expect(warning.details?.pairs).toBe(2);
      expect(warning.message).toContain('dipping layers under 2 pairs of shots (W → E, M → E)');
    }
  });
});

describe('branches-one-refractor: one warning per branch whose split was undone', () => {
  // An undulating refractor 10 ± 3 m (λ 120 m) under 600/3000 m/s; one spread of 48 receivers, end and off-end shots.
  const receivers = range(48, 0, 2.5);
  const shots = [
    { id: 'OW', x: -30, receivers },
    { id: 'W', x: 0, receivers },
    { id: 'E', x: 117.5, receivers },
    { id: 'OE', x: 147.5, receivers },
  ];
  const rows: Row[] = gridFirstArrivals({ section: { velocities: [600, 3000], interfaces: [(x) => 10 + 3 * Math.sin((2 * Math.PI * x) / 120)] }, shots, depthExtent: 18 }).map(
    (arrival) => ({ shot: arrival.shot, sourceX: arrival.sourceX, receiverX: arrival.receiverX, time: arrival.time }),
  );
  const options: InterpretOptions = { forwardCheck: false };
  const picks = pickSetOf(rows);
  const result = interpret(picks, options);
  const survey = interpretSurvey(picks, { ...DEFAULT_OPTIONS, ...options, scale: 'engineering' });

  it('the split of branches 2 and 3 is undone on the evidence of several pairs, and one warning says so, for branch 2', () => {
    // Source: the oracle's model has one refractor; the evidence grouped is the same run's refractor tests.
    const merged = survey.refractorTests.filter((test) => test.merged);
    const straight = merged.flatMap((test) => test.evidence.filter((entry) => entry.verdict === 'straight'));
    // Precondition: several straight pairs (one refractor: the minus times run straight, Hagedoorn 1959).
    expect(straight.length).toBeGreaterThanOrEqual(2);
    const warnings = ofCode(result, 'branches-one-refractor');
    expect(warnings.map((warning) => warning.branch)).toEqual([...new Set(merged.map((test) => test.branch))]);
    expect(warnings.map((warning) => warning.branch)).toEqual([2]);
    expect(warnings[0]!.details?.pairs).toBe(straight.length);
  });

  it('details.hingeX is where the split lay for the first straight pair, between the shots and among the x listed in the message', () => {
    // Source: the same run's refractor tests (the hinge is where the branch labels change, between the end shots at 0 and 117.5 m).
    const warning = ofCode(result, 'branches-one-refractor')[0]!;
    const first = survey.refractorTests.find((test) => test.merged)!.evidence.find((entry) => entry.verdict === 'straight')!;
    expect(warning.details?.hingeX).toBe(first.hingeX);
    expect(first.hingeX).toBeGreaterThan(0);
    expect(first.hingeX).toBeLessThan(117.5);
    const listed = /at x = ([^)]*)\)/.exec(warning.message.replace(/\u00a0/g, ' '))![1]!.split(', ').map((text) => Number.parseFloat(text));
    expect(listed).toContain(first.hingeX);
    expect(warning.message).toContain('branches 2 and 3');
  });
});
