/**
 * The browser client's travel-time figure (client/src/travel-time-figure.ts), built from the
 * project's engine output as the oracle: lib's interpretation of the bundled demo survey
 * sample-surveys/millbrook-quarry-bedrock.csv (invented data; display units m, ms, m/s), and a
 * synthetic survey from tests/helpers/synthetic-survey.ts for the WebGL threshold.
 *
 * Unit arithmetic used throughout (engineering display units): a time along a branch line is
 * t [ms] = tᵢ [ms] + offset [m] × 1000 [ms/s] / v [m/s]; reduced time is
 * t − offset [m] × 1000 [ms/s] / V_red [m/s].
 */
import { describe, expect, it } from 'vitest';
import type { BranchEdit } from '../../lib/branches/edits.js';
import type { Interpretation as EngineInterpretation } from '../../lib/interpretation/shape.js';
import type { Interpretation, StoredPick } from '../../client/src/api-types.js';
import { travelTimeFigure, WEBGL_POINT_COUNT, type Figure, type Trace, type TravelTimeOptions } from '../../client/src/travel-time-figure.js';
import { range, syntheticSurvey } from '../helpers/synthetic-survey.js';
import { applied, asClient, engineView, readTable, SAMPLE_TEXT } from './engine-inputs.js';

/**
 * Display values are the engine's SI values times 1000 (s → ms), and the figure adds or subtracts
 * a few such terms: agreement to 1e-9 ms is far above double rounding (~1e-14 ms at 50 ms) and far
 * below any real error (picks are given to 0.01 ms).
 */
const TIME_TOLERANCE_MS = 1e-9;
/** Positions are sums of two display distances (source ± offset): same argument, in metres. */
const POSITION_TOLERANCE_M = 1e-9;

// ---------------------------------------------------------------- inputs




const SAMPLE = readTable(SAMPLE_TEXT);
const PICKS: readonly StoredPick[] = SAMPLE.picks;
const BASE = engineView(SAMPLE);
const SHOT_IDS = BASE.shots.map((shot) => shot.id);
const byLine = new Map(PICKS.map((pick) => [pick.line, pick]));
const indexOfLine = (line: number): number => PICKS.findIndex((pick) => pick.line === line);

const OPTIONS: TravelTimeOptions = { hiddenShots: new Set(), reductionVelocity: null, showLabels: false, dragMode: 'zoom', uiRevision: 'test', allowWebgl: true };
const onlyShot = (id: string): Set<string> => new Set(SHOT_IDS.filter((other) => other !== id));

// ---------------------------------------------------------------- reading traces

const meta = (trace: Trace): { role?: string; branch?: number } => (trace.meta ?? {}) as { role?: string; branch?: number };
const tracesOf = (figure: Figure, role: string): Trace[] => figure.data.filter((trace) => meta(trace).role === role);
const single = (figure: Figure, role: string): Trace => {
  const found = tracesOf(figure, role);
  if (found.length !== 1) throw new Error(`expected one '${role}' trace, found ${found.length}`);
  return found[0]!;
};
const values = (trace: Trace, key: 'x' | 'y' | 'customdata'): (number | null)[] => trace[key] as (number | null)[];
const numbers = (trace: Trace, key: 'x' | 'y' | 'customdata'): number[] => values(trace, key).filter((value): value is number => value !== null);

/** Lines drawn anywhere in the figure (every trace's customdata). */
const drawnLines = (figure: Figure): number[] => figure.data.flatMap((trace) => (Array.isArray(trace.customdata) ? (trace.customdata as number[]) : []));

/** Every branch of lib's interpretation, with its shot and side. */
const engineBranches = (result: EngineInterpretation) =>
  result.shots.flatMap((shot) => shot.sides.flatMap((side) => side.branches.map((branch) => ({ shot, side, branch }))));

// ---------------------------------------------------------------- tests

describe('travelTimeFigure: picks', () => {
  it('travelTimeFigure draws one picks trace and one residuals trace per branch index present, holding exactly that index\'s picks', () => {
    const figure = travelTimeFigure(asClient(BASE), null, new Set(), OPTIONS);
    // Oracle: lib's interpretation, grouped here by branch index.
    const expected = new Map<number, { lines: number[]; residuals: number[] }>();
    for (const { branch } of engineBranches(BASE)) {
      const entry = expected.get(branch.index) ?? { lines: [], residuals: [] };
      expected.set(branch.index, entry);
      entry.lines.push(...branch.picks.map((pick) => pick.line));
      entry.residuals.push(...branch.picks.map((pick) => pick.fitResidual));
    }
    const picksTraces = tracesOf(figure, 'picks');
    expect(picksTraces.map((trace) => meta(trace).branch)).toEqual([...expected.keys()].sort((left, right) => left - right));
    expect(picksTraces.map((trace) => meta(trace).branch)).toEqual([1, 2, 3]);
    for (const trace of picksTraces) {
      const entry = expected.get(meta(trace).branch!)!;
      expect(numbers(trace, 'customdata')).toEqual(entry.lines);
      const residuals = tracesOf(figure, 'residuals').find((candidate) => meta(candidate).branch === meta(trace).branch)!;
      expect(numbers(residuals, 'y')).toEqual(entry.residuals);
      expect(residuals.yaxis).toBe('y2');
    }
    const onBranches = engineBranches(BASE).reduce((sum, { branch }) => sum + branch.picks.length, 0);
    expect(onBranches).toBe(240);
    expect(picksTraces.reduce((sum, trace) => sum + numbers(trace, 'x').length, 0)).toBe(onBranches);
    expect(figure.pointCount).toBe(onBranches);
  });

  it('travelTimeFigure puts each pick at its receiver position and its time in ms (the sample table\'s own values)', () => {
    const figure = travelTimeFigure(asClient(BASE), PICKS, new Set(), OPTIONS);
    for (const trace of tracesOf(figure, 'picks')) {
      numbers(trace, 'customdata').forEach((line, k) => {
        const pick = byLine.get(line)!;
        // Source: the pick table (SI after reading): x in m as written, time s × 1000 = ms.
        expect(numbers(trace, 'x')[k]).toBeCloseTo(pick.receiverX, 9);
        expect(numbers(trace, 'y')[k]).toBeCloseTo(pick.time * 1000, 9);
      });
    }
  });

  it('travelTimeFigure in reduced time subtracts offset × 1000 / V_red (ms) from every point: checked by hand on two table lines', () => {
    const reductionVelocity = 4000; // m/s
    const plain = travelTimeFigure(asClient(BASE), PICKS, new Set(), OPTIONS);
    const reduced = travelTimeFigure(asClient(BASE), PICKS, new Set(), { ...OPTIONS, reductionVelocity });
    const pointOf = (figure: Figure, line: number) => {
      for (const trace of tracesOf(figure, 'picks')) {
        const k = numbers(trace, 'customdata').indexOf(line);
        if (k >= 0) return { x: numbers(trace, 'x')[k]!, y: numbers(trace, 'y')[k]! };
      }
      throw new Error(`table line ${line} is not drawn`);
    };
    // By hand from the table: line 52 is A-W (source 0 m), receiver 1.5 m, 3.73 ms:
    // 3.73 − 1.5 × 1000 / 4000 = 3.73 − 0.375 = 3.355 ms.
    expect(pointOf(reduced, 52).y).toBeCloseTo(3.355, 9);
    // Line 148 is A-E (source 73.5 m), receiver 1.5 m (reverse, offset 72 m), 39.21 ms:
    // 39.21 − 72 × 1000 / 4000 = 39.21 − 18 = 21.21 ms.
    expect(pointOf(reduced, 148).y).toBeCloseTo(21.21, 9);
    for (const pick of PICKS) {
      const offset = Math.abs(pick.receiverX - pick.sourceX);
      expect(pointOf(reduced, pick.line).y - pointOf(plain, pick.line).y).toBeCloseTo(-(offset * 1000) / reductionVelocity, 9);
      expect(pointOf(reduced, pick.line).x).toBe(pointOf(plain, pick.line).x);
    }
    expect(JSON.stringify((reduced.layout.yaxis as { title: unknown }).title)).toContain('Reduced time');
  });

  it('travelTimeFigure leaves out every point, line and crossover of a hidden shot', () => {
    const hidden = new Set(['A-MID']);
    const figure = travelTimeFigure(asClient(BASE), PICKS, new Set(), { ...OPTIONS, hiddenShots: hidden });
    const hiddenLines = new Set(PICKS.filter((pick) => pick.shot === 'A-MID').map((pick) => pick.line));
    expect(hiddenLines.size).toBe(48);
    expect(drawnLines(figure).filter((line) => hiddenLines.has(line))).toEqual([]);
    expect(figure.pointCount).toBe(240 - 48);
    expect(tracesOf(figure, 'picks').reduce((sum, trace) => sum + numbers(trace, 'x').length, 0)).toBe(240 - 48);
    // A-MID has two sides with two fitted crossovers each (lib's interpretation).
    expect(numbers(single(figure, 'crossovers'), 'x')).toHaveLength(10 - 4);
    const segments = tracesOf(figure, 'fitted-lines').reduce((sum, trace) => sum + values(trace, 'x').filter((value) => value === null).length, 0);
    expect(segments).toBe(engineBranches(BASE).filter(({ shot }) => shot.id !== 'A-MID').length);
  });
});

describe('travelTimeFigure: fitted lines and crossovers', () => {
  it('travelTimeFigure draws each branch line with both ends on t = tᵢ + offset × 1000 / v (ms) and spanning its picks, shot by shot', () => {
    let checked = 0;
    for (const shot of BASE.shots) {
      const figure = travelTimeFigure(asClient(BASE), null, new Set(), { ...OPTIONS, hiddenShots: onlyShot(shot.id) });
      for (const trace of tracesOf(figure, 'fitted-lines')) {
        const index = meta(trace).branch!;
        const x = values(trace, 'x');
        const y = values(trace, 'y');
        // Segments are [start, end, null], one per side in the shot's side order.
        const sides = shot.sides.filter((side) => side.branches.some((branch) => branch.index === index && branch.apparentVelocity !== null));
        expect(x).toHaveLength(3 * sides.length);
        sides.forEach((side, s) => {
          const branch = side.branches.find((candidate) => candidate.index === index)!;
          const direction = side.side === 'forward' ? 1 : -1;
          const ends = [0, 1].map((k) => ({ x: x[3 * s + k]!, y: y[3 * s + k]! }));
          expect(x[3 * s + 2]).toBeNull();
          const offsets = ends.map((end) => (end.x - shot.sourceX) * direction);
          for (const [k, end] of ends.entries()) {
            // Oracle: lib's fitted tᵢ (ms) and apparent velocity (m/s) of this branch.
            const expected = branch.interceptTime + (offsets[k]! * 1000) / branch.apparentVelocity!;
            expect(Math.abs(end.y - expected), `shot ${shot.id} ${side.side} branch ${index} end ${k}`).toBeLessThan(TIME_TOLERANCE_MS);
            checked += 1;
          }
          expect(offsets[0]!).toBeLessThanOrEqual(branch.firstOffset + POSITION_TOLERANCE_M);
          expect(offsets[1]!).toBeGreaterThanOrEqual(branch.lastOffset - POSITION_TOLERANCE_M);
        });
      }
    }
    expect(checked).toBe(2 * engineBranches(BASE).length);
  });

  it('travelTimeFigure extends a branch line to the fitted crossovers beyond its picks (A-W forward branch 2, lib\'s crossovers)', () => {
    const figure = travelTimeFigure(asClient(BASE), null, new Set(), { ...OPTIONS, hiddenShots: onlyShot('A-W') });
    const side = BASE.shots.find((shot) => shot.id === 'A-W')!.sides[0]!;
    const line = tracesOf(figure, 'fitted-lines').find((trace) => meta(trace).branch === 2)!;
    const [below, above] = side.crossovers.map((crossover) => crossover.fitted!);
    // Both fitted crossovers lie outside branch 2's picks (7.5–19.5 m): 6.92 m and 22.46 m.
    expect(below!).toBeLessThan(side.branches[1]!.firstOffset);
    expect(above!).toBeGreaterThan(side.branches[1]!.lastOffset);
    expect(values(line, 'x')[0]).toBeCloseTo(below!, 9);
    expect(values(line, 'x')[1]).toBeCloseTo(above!, 9);
  });

  it('travelTimeFigure marks each fitted crossover where the two branch lines meet, at source ± the fitted crossover distance', () => {
    const figure = travelTimeFigure(asClient(BASE), null, new Set(), OPTIONS);
    const marker = single(figure, 'crossovers');
    const expected = BASE.shots.flatMap((shot) =>
      shot.sides.flatMap((side) =>
        side.crossovers.filter((crossover) => crossover.fitted !== null).map((crossover) => ({ shot, side, crossover })),
      ),
    );
    expect(expected).toHaveLength(10);
    expect(numbers(marker, 'x')).toHaveLength(expected.length);
    expected.forEach(({ shot, side, crossover }, k) => {
      const distance = crossover.fitted!;
      const position = shot.sourceX + (side.side === 'forward' ? distance : -distance);
      expect(Math.abs(numbers(marker, 'x')[k]! - position)).toBeLessThan(POSITION_TOLERANCE_M);
      // Oracle: lib's two branch lines give the same time at lib's fitted crossover distance.
      for (const index of [crossover.lowerBranch, crossover.upperBranch]) {
        const branch = side.branches.find((candidate) => candidate.index === index)!;
        const lineTime = branch.interceptTime + (distance * 1000) / branch.apparentVelocity!;
        expect(Math.abs(numbers(marker, 'y')[k]! - lineTime), `${shot.id} ${side.side} crossover ${crossover.lowerBranch}|${crossover.upperBranch}`).toBeLessThan(TIME_TOLERANCE_MS);
      }
    });
  });

  it('travelTimeFigure writes one label per fitted branch line only when labels are asked for', () => {
    expect(travelTimeFigure(asClient(BASE), null, new Set(), OPTIONS).layout.annotations).toEqual([]);
    const labels = travelTimeFigure(asClient(BASE), null, new Set(), { ...OPTIONS, showLabels: true }).layout.annotations as { text: string }[];
    expect(labels).toHaveLength(engineBranches(BASE).length);
    // A-OFF-W forward branch 2 comes first: 1461 m/s (lib: 1460.56 m/s), tᵢ 12.3 ms.
    expect(labels[0]!.text).toBe('1461 m/s<br>t<sub>i</sub> 12.3 ms');
  });
});

describe('travelTimeFigure: picks on no branch and the selection', () => {
  const EXCLUDED_LINES = [60, 150];
  const EXCLUDED_SET = applied(SAMPLE, EXCLUDED_LINES.map((line): BranchEdit => ({ pickIndex: indexOfLine(line), assign: 'exclude' })));
  const EXCLUDED_RESULT = engineView(EXCLUDED_SET);

  it("travelTimeFigure draws the stored picks the user excluded in the 'excluded' trace, at receiver position and time in ms, nowhere else, and not for a hidden shot", () => {
    const figure = travelTimeFigure(asClient(EXCLUDED_RESULT), EXCLUDED_SET.picks, new Set(), OPTIONS);
    const excluded = single(figure, 'excluded');
    expect(numbers(excluded, 'customdata')).toEqual(EXCLUDED_LINES);
    EXCLUDED_LINES.forEach((line, k) => {
      const pick = byLine.get(line)!;
      expect(numbers(excluded, 'x')[k]).toBeCloseTo(pick.receiverX, 9);
      expect(numbers(excluded, 'y')[k]).toBeCloseTo(pick.time * 1000, 9);
    });
    const elsewhere = figure.data.filter((trace) => meta(trace).role !== 'excluded').flatMap((trace) => (Array.isArray(trace.customdata) ? (trace.customdata as number[]) : []));
    expect(elsewhere.filter((line) => EXCLUDED_LINES.includes(line))).toEqual([]);
    expect(tracesOf(figure, 'unassigned')).toEqual([]);
    expect(figure.pointCount).toBe(240);
    // Line 150 is a pick of shot A-E: hiding that shot hides its excluded pick too.
    const hidden = travelTimeFigure(asClient(EXCLUDED_RESULT), EXCLUDED_SET.picks, new Set(), { ...OPTIONS, hiddenShots: new Set(['A-E']) });
    expect(byLine.get(150)?.shot).toBe('A-E');
    expect(numbers(single(hidden, 'excluded'), 'customdata')).toEqual([60]);
    // Without the stored picks the client cannot know them: no such trace.
    expect(tracesOf(travelTimeFigure(asClient(EXCLUDED_RESULT), null, new Set(), OPTIONS), 'excluded')).toEqual([]);
  });

  it("travelTimeFigure draws stored picks that lib left on no branch (not excluded) in the 'unassigned' trace", () => {
    // One pick of A-W forward labelled branch 2: lib cannot fit a one-pick branch and leaves the side without branches.
    const pickSet = applied(SAMPLE, [{ pickIndex: indexOfLine(55), assign: 2 }]);
    const figure = travelTimeFigure(asClient(engineView(pickSet)), pickSet.picks, new Set(), OPTIONS);
    const expected = PICKS.filter((pick) => pick.shot === 'A-W' && pick.receiverX > pick.sourceX).map((pick) => pick.line);
    expect(numbers(single(figure, 'unassigned'), 'customdata')).toEqual(expected);
    expect(tracesOf(figure, 'excluded')).toEqual([]);
    expect(figure.pointCount).toBe(240);
  });

  it('travelTimeFigure rings exactly the selected lines that are drawn, at their points, and nothing for an empty selection', () => {
    const hiddenLine = PICKS.find((pick) => pick.shot === 'A-MID')!.line;
    const selection = new Set([52, 148, EXCLUDED_LINES[0]!, 999_999, hiddenLine]);
    const options = { ...OPTIONS, hiddenShots: new Set(['A-MID']) };
    const figure = travelTimeFigure(asClient(EXCLUDED_RESULT), EXCLUDED_SET.picks, selection, options);
    const ring = single(figure, 'selection');
    expect(numbers(ring, 'customdata')).toEqual([52, 148, EXCLUDED_LINES[0]]);
    expect(ring.name).toBe('selected (3)');
    // Each ring sits on the point drawn for that line.
    numbers(ring, 'customdata').forEach((line, k) => {
      const trace = figure.data.find((candidate) => meta(candidate).role !== 'selection' && meta(candidate).role !== 'residuals' && Array.isArray(candidate.customdata) && (candidate.customdata as number[]).includes(line))!;
      const at = (trace.customdata as number[]).indexOf(line);
      expect([numbers(ring, 'x')[k], numbers(ring, 'y')[k]]).toEqual([numbers(trace, 'x')[at], numbers(trace, 'y')[at]]);
    });
    expect(tracesOf(travelTimeFigure(asClient(EXCLUDED_RESULT), EXCLUDED_SET.picks, new Set(), options), 'selection')).toEqual([]);
  });
});

describe('travelTimeFigure: WebGL', () => {
  // Synthetic survey (ray-geometry oracle): 31 shots at even positions, 100 receivers at odd ones,
  // so every shot has 100 picks: 3,100 in all, 3,000 with one shot hidden.
  const survey = syntheticSurvey({
    velocities: [600, 2400],
    thicknesses: [6],
    receivers: range(100, 1, 2),
    shots: range(31, 0, 6),
    noise: 0.0002,
    sigma: null,
    seed: 11,
  });
  const pickSet = readTable(survey.csv);
  const result = engineView(pickSet);

  it('travelTimeFigure draws picks with WebGL only above WEBGL_POINT_COUNT points, counting every drawn pick', () => {
    expect(pickSet.picks).toHaveLength(WEBGL_POINT_COUNT + 100);
    const atLimit = travelTimeFigure(asClient(result), pickSet.picks, new Set(), { ...OPTIONS, hiddenShots: new Set(['S31']) });
    expect(atLimit.pointCount).toBe(WEBGL_POINT_COUNT);
    expect(atLimit.webgl).toBe(false);
    expect(new Set(atLimit.data.map((trace) => trace.type))).toEqual(new Set(['scatter']));

    const selection = new Set([pickSet.picks[0]!.line]);
    const above = travelTimeFigure(asClient(result), pickSet.picks, selection, OPTIONS);
    expect(above.pointCount).toBe(WEBGL_POINT_COUNT + 100);
    expect(above.webgl).toBe(true);
    for (const role of ['picks', 'residuals', 'selection']) {
      for (const trace of tracesOf(above, role)) expect(trace.type, role).toBe('scattergl');
    }
    expect(tracesOf(above, 'selection')).toHaveLength(1);
    // Lines and crossover markers stay SVG.
    for (const role of ['fitted-lines', 'crossovers']) {
      for (const trace of tracesOf(above, role)) expect(trace.type, role).toBe('scatter');
    }
  });

  it('travelTimeFigure stays SVG above WEBGL_POINT_COUNT when WebGL is not allowed (a browser without it, a report image)', () => {
    const noWebgl = travelTimeFigure(asClient(result), pickSet.picks, new Set(), { ...OPTIONS, allowWebgl: false });
    expect(noWebgl.pointCount).toBe(WEBGL_POINT_COUNT + 100);
    expect(noWebgl.webgl).toBe(false);
    expect(new Set(noWebgl.data.map((trace) => trace.type))).toEqual(new Set(['scatter']));
  });
});
