/**
 * Checks of the datum and of buried shots (lib/checks/datum-checks.ts) and what they do in the
 * pipeline: `elevation-missing`, `datum-above-ground`, `datum-too-low` and `shot-below-layer`.
 *
 * Where the numbers come from:
 * - the rules themselves are METHODS §8 (Telford et al. 1990 ch. 4; Sheriff & Geldart 1995): a flat
 *   datum lies below every shot and receiver and above the shallowest refractor used; a correction
 *   larger than half the corrected intercept means the datum is too low; a shot below layer 1 needs
 *   the layers above it, and a shot below refractor n records no branch-n head wave in the usual
 *   sense;
 * - the pipeline surveys are closed-form head-wave times over a horizontal refractor under sloping
 *   ground, t = Δx/V_2 + (e_s − E_r)·q + (e_r − E_r)·q with q = √(1/V_1² − 1/V_2²) and ends at
 *   heights e − E_r above the refractor (METHODS §1 and §8; exact for a plane refractor whatever the
 *   ground between the ends), and the slant direct wave √(Δx² + Δe²)/V_1 (METHODS §8).
 */
import { describe, expect, it } from 'vitest';
import { readPickTable, type PickSet } from '../../lib/picks/index.js';
import { buriedShotPlacement, datumDepthWarnings, datumWarnings, elevationGaps } from '../../lib/checks/datum-checks.js';
import { datumTooLow } from '../../lib/depth/near-surface-corrections.js';
import type { SideRefractorArrivals } from '../../lib/interpretation/refractor-arrivals.js';
import { interpret, type InterpretOptions } from '../../lib/interpret.js';
import { InterpretationSchema, type Interpretation } from '../../lib/interpretation/shape.js';
import { range } from '../helpers/synthetic-survey.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';

/** Messages join a number and its unit by a no-break space; compare them as plain text. */
const plain = (text: string) => text.replace(/\u00a0/g, ' ');

function table(lines: readonly string[]): PickSet {
  const outcome = readPickTable(lines.join('\n'));
  if (!outcome.ok) throw new Error(outcome.problems.map((problem) => problem.message).join('; '));
  return outcome.value;
}

describe('elevationGaps', () => {
  it('elevationGaps names the shots with a blank source elevation and the receiver positions blank in any pick (keyed by x.toFixed(6))', () => {
    const pickSet = table([
      'shot,source_x_m,receiver_x_m,time_ms,source_elev_m,receiver_elev_m',
      'A,0,10,20,100,100.5',
      'A,0,20,30,100,101',
      'A,0,25,32,100,101.2',
      'B,30,10,25,,100.5',
      'B,30,20,18,,',
      'B,30,25,10,,101.2',
    ]);
    const gaps = elevationGaps(pickSet);
    // Source: METHODS §8 — each end is lowered from its own elevation, so a blank cell is a gap for that end.
    expect([...gaps.shots]).toEqual(['B']);
    // The receiver at 20 m has its elevation in shot A's pick but not in shot B's: still a gap.
    expect([...gaps.receivers]).toEqual([(20).toFixed(6)]);
  });
});

describe('datumWarnings: elevation-missing', () => {
  it('datumWarnings warns once for every end without an elevation, naming the shot and the receiver positions, counted in details', () => {
    const pickSet = table([
      'shot,source_x_m,receiver_x_m,time_ms,source_elev_m,receiver_elev_m',
      'A,0,10,20,100,100',
      'A,0,20,30,100,',
      'A,0,25,32,100,100',
      'B,30,10,25,,100',
      'B,30,25,10,,100',
      'B,30,28,5,,100',
    ]);
    const warnings = datumWarnings(pickSet, 95, elevationGaps(pickSet));
    const missing = warnings.filter((warning) => warning.code === 'elevation-missing');
    expect(missing).toHaveLength(1);
    const message = plain(missing[0]!.message);
    // Source: METHODS §8 — an end is lowered from its own elevation, so one without an elevation cannot be.
    expect(message).toContain('datum at 95 m');
    expect(message).toContain('shot B (source elevation blank)');
    expect(message).toContain('1 receiver position at x = 20 m (receiver elevation blank)');
    expect(message).toContain('left out of the delay-time depths');
    expect(missing[0]!.level).toBe('warning');
    expect(missing[0]!.details).toEqual({ shots: 1, receivers: 1 });
  });

  it('datumWarnings lists the blank receivers by x ascending, the first 6 and how many more', () => {
    const positions = range(16, 2.5, 2.5);
    const blank = new Set(positions.filter((_, k) => k % 2 === 1)); // 5, 10, …, 40 m: 8 positions
    // Rows written from the far end back, so that the listing must sort them.
    const rows = [...positions].reverse().map((x) => `A,0,${x},${x},100,${blank.has(x) ? '' : 100}`);
    const pickSet = table(['shot,source_x_m,receiver_x_m,time_ms,source_elev_m,receiver_elev_m', ...rows]);
    const missing = datumWarnings(pickSet, 95, elevationGaps(pickSet)).find((warning) => warning.code === 'elevation-missing')!;
    // Presentation (no physics): positions along the line read in x order; a long list is cut at 6 with a count of the rest.
    expect(plain(missing.message)).toContain('8 receiver positions at x = 5 m, 10 m, 15 m, 20 m, 25 m, 30 m and 2 more (receiver elevation blank)');
    expect(missing.details).toEqual({ shots: 0, receivers: 8 });
  });

  it('datumWarnings gives nothing when every end has an elevation and the datum lies below all of them', () => {
    const pickSet = table(['shot,source_x_m,receiver_x_m,time_ms,source_elev_m,receiver_elev_m', 'A,0,10,20,100,100.5', 'A,0,20,30,100,101', 'A,0,25,32,100,101']);
    // Source: METHODS §8 — a flat datum below all shots and receivers is the intended use.
    expect(datumWarnings(pickSet, 95, elevationGaps(pickSet))).toEqual([]);
  });
});

describe('datumWarnings: datum-above-ground', () => {
  // Ends: shot A at 100 m (surface), shot C buried 3 m under ground at 101 m, so its end is at 98 m
  // (source end = ground − depth, METHODS §8), receivers at 100, 99.5 and 98.5 m.
  const pickSet = table([
    'shot,source_x_m,receiver_x_m,time_ms,source_elev_m,receiver_elev_m,source_depth_m',
    'A,0,10,20,100,100,0',
    'A,0,20,30,100,99.5,0',
    'A,0,25,32,100,98.5,0',
    'C,30,10,25,101,100,3',
    'C,30,20,18,101,99.5,3',
    'C,30,25,8,101,98.5,3',
  ]);

  it('datumWarnings warns when the datum lies above an end, counting those ends and naming the lowest, a buried shot taken at its depth', () => {
    const warnings = datumWarnings(pickSet, 99, elevationGaps(pickSet));
    expect(warnings.map((warning) => warning.code)).toEqual(['datum-above-ground']);
    const [above] = warnings;
    // Source: METHODS §8 (the datum lies below every end): shot C's end at 98 m and the receiver at 98.5 m lie below the 99 m datum.
    expect(above!.details).toEqual({ datum: 99, lowestEnd: 98, endsBelowDatum: 2 });
    const message = plain(above!.message);
    expect(message).toContain('lies above 2 source or receiver ends');
    expect(message).toContain('lowest: shot C (3 m deep) at 98 m');
    expect(message).toContain('choose a datum at or below 98 m');
  });

  it('datumWarnings accepts a datum exactly at the lowest end ("at or below", as the message advises) and warns just above it', () => {
    // Source: METHODS §8 — a datum below (here: at) every end needs no end raised.
    expect(datumWarnings(pickSet, 98, elevationGaps(pickSet))).toEqual([]);
    expect(datumWarnings(pickSet, 98.01, elevationGaps(pickSet)).map((warning) => warning.details?.endsBelowDatum)).toEqual([1]);
  });
});

describe('datumTooLow and datumDepthWarnings: datum-too-low', () => {
  it('datumTooLow is true only when the correction exceeds half the corrected intercept, in magnitude (METHODS §8)', () => {
    expect(datumTooLow(0.005, 0.01)).toBe(false); // exactly half: not more
    expect(datumTooLow(0.0051, 0.01)).toBe(true);
    expect(datumTooLow(0.004, 0.01)).toBe(false);
    expect(datumTooLow(-0.0051, 0.01)).toBe(true); // a correction removed (negative) counts by its size
    expect(datumTooLow(0.0051, -0.01)).toBe(true); // so does a negative intercept
  });

  /** A side with only what the check reads: the corrections at its ends and its corrected intercept. */
  const side = (shot: string, which: 'forward' | 'reverse', sourceCorrection: number, largestReceiverCorrection: number, intercept: number): SideRefractorArrivals => ({
    shot,
    side: which,
    sourceX: 0,
    refractor: 2,
    receiverX: [],
    times: [],
    sigmas: [],
    receiverElevations: [],
    pickIndices: [],
    line: { slowness: 1 / 2400, intercept, slownessVariance: 0, interceptVariance: 0, covariance: 0 },
    lineResidualSD: 0,
    sourceCorrection,
    largestReceiverCorrection,
    receiverSpacing: 2.5,
    correctionRefusals: [],
  });

  it('datumDepthWarnings warns for each side where one end\'s correction (the shot\'s in size, or the largest receiver\'s) exceeds half its corrected intercept', () => {
    // METHODS §8: "warn if a correction exceeds half the corrected intercept (datum too low)" — one end's
    // correction. Binary-exact times (s).
    const sides = [
      side('A', 'forward', -(2 ** -8), 2 ** -9, 2 * 2 ** -8 - 1e-6), // shot end 2⁻⁸ just over half the intercept: warned
      side('B', 'reverse', -(2 ** -8), 2 ** -9, 2 * 2 ** -8), // exactly half: not warned ("exceeds")
      side('C', 'forward', 0, 2 ** -9, 3 * 2 ** -9), // the receiver end alone: a third: not warned
      side('D', 'forward', -(2 ** -9), 2 ** -8, 2 * 2 ** -8 - 1e-6), // the receiver end is the larger: warned
      side('E', 'reverse', -(2 ** -9), 2 ** -9, 3 * 2 ** -9), // the ends sum to two thirds, neither exceeds half: not warned
    ];
    const warnings = datumDepthWarnings(sides, 95);
    expect(warnings.map((warning) => [warning.code, warning.shot, warning.side, warning.layer])).toEqual([['datum-too-low', 'A', 'forward', 2], ['datum-too-low', 'D', 'forward', 2]]);
    expect(warnings[0]!.details).toEqual({ correction: 2 ** -8, correctedIntercept: 2 * 2 ** -8 - 1e-6 });
    const message = plain(warnings[0]!.message);
    expect(message).toContain('shot A, forward side, refractor 2');
    expect(message).toContain('datum at 95 m removes up to 3.91 ms');
    expect(message).toContain('corrected intercept time (7.81 ms)');
  });

  it('datumDepthWarnings says the datum lies at or below the refractor when the corrected intercept is not positive', () => {
    const [warning] = datumDepthWarnings([side('A', 'forward', -(2 ** -8), 2 ** -8, -0.002)], 88);
    expect(plain(warning!.message)).toContain('lies at or below the refractor');
  });
});

describe('buriedShotPlacement: shot-below-layer', () => {
  // Plane-layer depths: refractor 2 at 5 m, refractor 3 at 15 m below the ground.
  const pickSet = table([
    'shot,source_x_m,receiver_x_m,time_ms,source_depth_m',
    // S6 stands exactly on refractor 3 (15 m): "at or below refractor n" leaves it out of refractor 3 too.
    ...['S1,0', 'S2,40', 'S3,80', 'S4,120', 'S5,160', 'S6,200'].flatMap((shot, k) =>
      [10, 20, 30].map((receiverX) => `${shot},${receiverX},${20 + receiverX},${['3', '7', '20', '', '0', '15'][k]}`),
    ),
  ]);

  it('buriedShotPlacement leaves a shot within layer 1 alone, and warns about one below it, leaving it out of every refractor at or above its depth (METHODS §8)', () => {
    const placement = buriedShotPlacement(pickSet, [5, 15]);
    expect(placement.warnings.map((warning) => [warning.code, warning.shot])).toEqual([
      ['shot-below-layer', 'S2'],
      ['shot-below-layer', 'S3'],
      ['shot-below-layer', 'S6'],
    ]);
    expect([...placement.excluded].sort()).toEqual(['S2\u00002', 'S3\u00002', 'S3\u00003', 'S6\u00002', 'S6\u00003']);
    const [s2, s3] = placement.warnings;
    expect(s2!.details).toEqual({ shotDepth: 7, layerOneBase: 5 });
    expect(plain(s2!.message)).toContain('shot S2 is 7 m deep, below the base of layer 1 (5 m');
    expect(plain(s2!.message)).toContain('at or below refractor 2,');
    expect(plain(s2!.message)).toContain('left out of that refractor');
    expect(s3!.details).toEqual({ shotDepth: 20, layerOneBase: 5 });
    expect(plain(s3!.message)).toContain('at or below refractors 2, 3,');
    expect(plain(s3!.message)).toContain('left out of those refractors');
  });

  it('buriedShotPlacement reads no depth it does not have: no plane depths, a layer-1 base not positive, or a deeper refractor not resolved', () => {
    // Common practice: a check against a depth the survey did not resolve would judge against nothing.
    expect(buriedShotPlacement(pickSet, [])).toEqual({ excluded: new Set(), warnings: [] });
    expect(buriedShotPlacement(pickSet, [0]).warnings).toEqual([]);
    expect(buriedShotPlacement(pickSet, [Number.NaN]).warnings).toEqual([]);
    // Refractor 3 unresolved (depth 0): S3 (20 m) is left out of refractor 2 only.
    const unresolved = buriedShotPlacement(pickSet, [5, 0]);
    expect([...unresolved.excluded].sort()).toEqual(['S2\u00002', 'S3\u00002', 'S6\u00002']);
  });
});

// --- the checks in the pipeline: V 600/2400 m/s, a horizontal refractor at elevation 90 m under
// ground rising from 100 m (x = 0) to 104 m (x = 240 m); shots A at 0, M at 120 and B at 240 m,
// receivers every 2.5 m over the whole line.
const V1 = 600;
const V2 = 2400;
const REFRACTOR = 90;
const Q = Math.sqrt(1 / V1 ** 2 - 1 / V2 ** 2);
const ground = (x: number) => 100 + x / 60;
const SHOTS = [['A', 0], ['M', 120], ['B', 240]] as const;
const RECEIVERS = range(97, 0, 2.5);

/** First arrival from a source whose top is at elevation `top` (ground minus depth) to a receiver on the ground (METHODS §1, §8). */
function firstArrival(sourceX: number, top: number, receiverX: number): number {
  const direct = Math.hypot(receiverX - sourceX, ground(receiverX) - top) / V1;
  const head = Math.abs(receiverX - sourceX) / V2 + (top - REFRACTOR) * Q + (ground(receiverX) - REFRACTOR) * Q;
  return Math.min(direct, head);
}

interface SurveyChanges {
  /** Receiver x whose receiver_elev_m cell is left blank in every pick. */
  readonly blankReceiverX?: number;
  /** Shot whose source_elev_m cell is left blank. */
  readonly blankShot?: string;
  /** Shot M's depth below ground, m, and whether its times are those of a shot at that depth (with uphole time) or of a surface shot. */
  readonly buriedM?: { readonly depth: number; readonly timesFromDepth: boolean };
}

function survey(changes: SurveyChanges = {}, options: InterpretOptions = {}): Interpretation {
  const buried = changes.buriedM;
  const header = ['shot', 'source_x_m', 'receiver_x_m', 'time_ms', 'source_elev_m', 'receiver_elev_m', ...(buried ? ['source_depth_m', 'uphole_ms'] : [])];
  const lines = [header.join(',')];
  for (const [shot, sourceX] of SHOTS) {
    const depth = buried && shot === 'M' ? buried.depth : 0;
    const top = ground(sourceX) - (buried?.timesFromDepth ? depth : 0);
    for (const receiverX of RECEIVERS) {
      if (receiverX === sourceX) continue;
      lines.push(
        [
          shot,
          sourceX,
          receiverX,
          (firstArrival(sourceX, top, receiverX) * 1000).toFixed(4),
          shot === changes.blankShot ? '' : ground(sourceX),
          receiverX === changes.blankReceiverX ? '' : ground(receiverX),
          ...(buried ? [depth, depth > 0 && buried.timesFromDepth ? ((depth / V1) * 1000).toFixed(4) : ''] : []),
        ].join(','),
      );
    }
  }
  const result = interpret(table(lines), options);
  InterpretationSchema.parse(result);
  return result;
}

const ofCode = (result: Interpretation, code: string) => result.warnings.filter((warning) => warning.code === code);
const pairIds = (result: Interpretation) => result.reversedPairs.map((pair) => pair.id);
const delaySections = (result: Interpretation) => result.refractors.filter((refractor) => refractor.method.startsWith('plus-minus') || refractor.method.startsWith('generalized'));

describe('datum checks through interpret(): a datum with elevations given', () => {
  // A datum at 99.5 m: 0.5–4.5 m below every end and 9.5 m above the refractor.
  const DATUM = 99.5;
  const clean = survey({}, { datumElevation: DATUM });

  it('a datum below every end and well above the refractor gives none of the datum warnings, and the refractor stands 9.5 m below the datum', () => {
    for (const code of ['elevation-missing', 'datum-above-ground', 'datum-too-low']) expect(ofCode(clean, code)).toEqual([]);
    expect(pairIds(clean)).toEqual(['A → M', 'A → B', 'M → B']);
    // Source: the stated model, refractor at elevation 90 m (METHODS §8: times lowered to the datum).
    for (const section of delaySections(clean)) {
      expect(section.points.length).toBeGreaterThan(60);
      for (const point of section.points) {
        expectWithin(point.depthBelowDatum, DATUM - REFRACTOR, 0.2, `${section.method} at x = ${point.x}: depth below the datum`);
        expectWithin(point.elevation, REFRACTOR, 0.2, `${section.method} at x = ${point.x}: refractor elevation`);
      }
    }
  });

  it('a receiver whose elevation cell is blank is named in an elevation-missing warning, and its picks are left out of the delay-time sections', () => {
    const result = survey({ blankReceiverX: 60 }, { datumElevation: DATUM });
    const missing = ofCode(result, 'elevation-missing');
    expect(missing).toHaveLength(1);
    expect(plain(missing[0]!.message)).toContain('1 receiver position at x = 60 m (receiver elevation blank)');
    expect(missing[0]!.details).toEqual({ shots: 0, receivers: 1 });
    // Source: METHODS §8 — the end cannot be lowered by an unknown height, so no depth at x = 60 m;
    // the neighbours keep theirs, still 9.5 m below the datum.
    for (const section of delaySections(result)) {
      expect(section.points.some((point) => point.x === 60), section.method).toBe(false);
      const neighbour = section.points.find((point) => point.x === 57.5 || point.x === 62.5);
      expect(neighbour, section.method).toBeDefined();
      expectWithin(neighbour!.depthBelowDatum, DATUM - REFRACTOR, 0.2, `${section.method}: depth below the datum next to the gap`);
    }
    // Precondition: the same table without a datum (depths below the ground need no elevation) has a point there.
    const noDatum = survey({ blankReceiverX: 60 });
    expect(ofCode(noDatum, 'elevation-missing')).toEqual([]);
    for (const section of delaySections(noDatum)) expect(section.points.some((point) => point.x === 60), section.method).toBe(true);
  });

  it('a shot whose elevation cell is blank is named, and its sides give no reversed pair', () => {
    const result = survey({ blankShot: 'M' }, { datumElevation: DATUM });
    const missing = ofCode(result, 'elevation-missing');
    expect(missing).toHaveLength(1);
    expect(plain(missing[0]!.message)).toContain('shot M (source elevation blank)');
    expect(missing[0]!.details).toEqual({ shots: 1, receivers: 0 });
    expect(pairIds(result)).toEqual(['A → B']);
    expect(result.dippingLayers.map((entry) => `${entry.forwardShot} → ${entry.reverseShot}`)).toEqual(['A → B']);
  });

  it('a datum above part of the ground gives datum-above-ground: shot A and the 24 receivers west of x = 60 m lie below a 101 m datum', () => {
    const result = survey({}, { datumElevation: 101 });
    const above = ofCode(result, 'datum-above-ground');
    expect(above).toHaveLength(1);
    // Source: the stated ground 100 + x/60 m — below 101 m for x < 60 m: receivers 0…57.5 m (24) and shot A.
    expect(above[0]!.details).toEqual({ datum: 101, lowestEnd: 100, endsBelowDatum: 25 });
    expect(plain(above[0]!.message)).toContain('choose a datum at or below 100 m');
  });

  it('a datum below the refractor gives datum-too-low on every side, with the corrections of the closed form', () => {
    const result = survey({}, { datumElevation: 88 });
    const tooLow = ofCode(result, 'datum-too-low');
    expect(tooLow.map((warning) => `${warning.shot} ${warning.side}`)).toEqual(['A forward', 'M forward', 'M reverse', 'B reverse']);
    const a = tooLow[0]!;
    // Source: METHODS §8, Δt = (e − E_d)·q per end: the largest end correction of shot A's forward side is its
    // farthest receiver's (x = 240 m, 104 m) lowered to 88 m, 16·q; the corrected intercept is that of ends on the
    // datum, 2·(88 − 90)·q (negative: the datum is below the refractor). The fitted V_1, V_2 differ from the model's by < 0.1 %.
    expectRelative(Number(a.details?.correction), 16 * Q, 0.002, 'METHODS §8: largest end correction of shot A, forward side');
    expectWithin(Number(a.details?.correctedIntercept), 2 * (88 - REFRACTOR) * Q, 2e-5, 'METHODS §8: intercept of ends on the datum');
    expect(plain(a.message)).toContain('shot A, forward side, refractor 2: the datum at 88 m lies at or below the refractor');
  });
});

describe('buried shots through interpret()', () => {
  it('a shot 3 m deep (inside layer 1, about 12 m thick) takes part in the reversed pairs and is not warned about', () => {
    const result = survey({ buriedM: { depth: 3, timesFromDepth: true } });
    expect(ofCode(result, 'shot-below-layer')).toEqual([]);
    expect(pairIds(result)).toEqual(['A → M', 'A → B', 'M → B']);
  });

  it('a shot declared 16 m deep, below the base of layer 1, is warned about and left out of refractor 2', () => {
    // Shot M keeps a surface shot's times: the check reads only the declared depth against the plane-layer depth.
    const result = survey({ buriedM: { depth: 16, timesFromDepth: false } });
    const below = ofCode(result, 'shot-below-layer');
    expect(below).toHaveLength(1);
    expect(below[0]!.shot).toBe('M');
    // Source: the stated model (layer 1 is 10–14 m thick under the shots); the base is the survey's own plane-layer depth.
    expect(below[0]!.details?.shotDepth).toBe(16);
    expectWithin(Number(below[0]!.details?.layerOneBase), result.layers[1]!.depthToTop!, 1e-9, 'the survey plane depth to layer 2');
    expectWithin(Number(below[0]!.details?.layerOneBase), 12, 0.5, 'the stated model: 12 m below the middle shot');
    expect(plain(below[0]!.message)).toContain('at or below refractor 2');
    // METHODS §8: a shot below refractor n records no branch-n head wave in the usual sense — M's sides are left out.
    expect(pairIds(result)).toEqual(['A → B']);
    expect(result.dippingLayers.map((entry) => `${entry.forwardShot} → ${entry.reverseShot}`)).toEqual(['A → B']);
    for (const section of delaySections(result)) for (const point of section.points) expect(point.pair).not.toContain('M');
  });
});
