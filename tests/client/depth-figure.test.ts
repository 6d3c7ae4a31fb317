/**
 * The browser client's depth section (client/src/depth-figure.ts), built from the project's
 * engine output as the oracle: lib's interpretation of the bundled demo survey
 * sample-surveys/millbrook-quarry-bedrock.csv (invented data; display units m, ms, m/s), and of
 * the same table with ground elevations added here (an invented smooth profile, for the
 * elevation mode only: the engine reads elevations but does not correct for them yet).
 */
import { describe, expect, it } from 'vitest';
import type { Interpretation as EngineInterpretation } from '../../lib/interpretation/shape.js';
import type { Interpretation, StoredPick } from '../../client/src/api-types.js';
import { depthFigure, groundProfile, refractorMethods, shortMethodName } from '../../client/src/depth-figure.js';
import type { Figure, Trace } from '../../client/src/travel-time-figure.js';
import { asClient, engineView, readTable, SAMPLE_TEXT } from './engine-inputs.js';
import { readFileSync } from 'node:fs';
import { elevationModeAvailable, methodLabel, sectionMethod, seamText, shotLabelPositions } from '../../client/src/depth-figure.js';
import { quantity } from '../../client/src/format.js';

/** Depths and elevations are display values (m) combined by one or two subtractions: 1e-9 m is far above rounding. */
const LENGTH_TOLERANCE_M = 1e-9;

const INTERCEPT_METHOD = 'intercept-time method under each shot side (plane horizontal layers)';
const CROSSOVER_METHOD = 'crossover-distance method under each shot side (plane horizontal layers)';

// ---------------------------------------------------------------- inputs



const SAMPLE = readTable(SAMPLE_TEXT);
const PICKS: readonly StoredPick[] = SAMPLE.picks;
const BASE = engineView(SAMPLE);

/** Invented ground profile (m): smooth, so neighbouring positions differ. */
const groundElevation = (x: number): number => Number((100 + 3 * Math.sin(x / 15)).toFixed(3));

/** The sample table with source_elev_m and receiver_elev_m columns (README, "The pick table"). */
function withElevations(text: string): string {
  return text
    .split('\n')
    .map((row) => {
      if (row.startsWith('#') || row.trim() === '') return row;
      if (row.startsWith('shot,')) return `${row},source_elev_m,receiver_elev_m`;
      const [, sourceX, receiverX] = row.split(',');
      return `${row},${groundElevation(Number(sourceX))},${groundElevation(Number(receiverX))}`;
    })
    .join('\n');
}

const ELEVATED = readTable(withElevations(SAMPLE_TEXT));
const ELEVATED_RESULT = engineView(ELEVATED);

// ---------------------------------------------------------------- reading traces

const meta = (trace: Trace): { role?: string; layer?: number; interface?: number } => (trace.meta ?? {}) as { role?: string; layer?: number; interface?: number };
const tracesOf = (figure: Figure, role: string): Trace[] => figure.data.filter((trace) => meta(trace).role === role);
const single = (figure: Figure, role: string): Trace => {
  const found = tracesOf(figure, role);
  if (found.length !== 1) throw new Error(`expected one '${role}' trace, found ${found.length}`);
  return found[0]!;
};
const numbers = (trace: Trace, key: 'x' | 'y'): number[] => trace[key] as number[];

function expectClose(actual: readonly number[], expected: readonly number[], what: string): void {
  expect(actual.length, what).toBe(expected.length);
  actual.forEach((value, k) => expect(Math.abs(value - expected[k]!), `${what}, point ${k}: ${value} vs ${expected[k]}`).toBeLessThan(LENGTH_TOLERANCE_M));
}

const refractorPoints = (result: EngineInterpretation, method: string, interfaceNumber: number) =>
  [...(result.refractors.find((refractor) => refractor.method === method && refractor.interface === interfaceNumber)?.points ?? [])].sort((left, right) => left.x - right.x);

// ---------------------------------------------------------------- tests

describe('refractorMethods and shortMethodName', () => {
  it('refractorMethods lists each method of the interpretation once, in its order: both per-side methods for the sample', () => {
    // Oracle: lib's interpretation gives intercept-time then crossover-distance refractors per interface, then the
    // per-receiver sections (lib/interpretation/present.ts).
    const perSide = BASE.refractors.filter((refractor) => refractor.points.every((point) => point.shot !== null)).map((refractor) => refractor.method);
    expect(perSide).toEqual([INTERCEPT_METHOD, INTERCEPT_METHOD, CROSSOVER_METHOD, CROSSOVER_METHOD]);
    expect(refractorMethods(asClient(BASE)).slice(0, 2)).toEqual([INTERCEPT_METHOD, CROSSOVER_METHOD]);
    expect(new Set(refractorMethods(asClient(BASE))).size).toBe(refractorMethods(asClient(BASE)).length);
    expect(refractorMethods({ ...asClient(BASE), refractors: [] })).toEqual([]);
  });

  it('shortMethodName keeps the words before "under" or "("', () => {
    expect(shortMethodName(INTERCEPT_METHOD)).toBe('intercept-time method');
    expect(shortMethodName(CROSSOVER_METHOD)).toBe('crossover-distance method');
    expect(shortMethodName('delay-time method (plus-minus)')).toBe('delay-time method');
    expect(shortMethodName('weighted mean')).toBe('weighted mean');
  });
});

describe('depthFigure in depth mode', () => {
  it('depthFigure draws refractor points under shots as markers with ±1 SE bars and no band, depth axis pointing down', () => {
    for (const method of [INTERCEPT_METHOD, CROSSOVER_METHOD]) {
      const figure = depthFigure(asClient(BASE), PICKS, method, 'depth', 'test');
      const refractors = tracesOf(figure, 'refractor');
      expect(refractors.map((trace) => meta(trace).interface)).toEqual([1, 2]);
      expect(tracesOf(figure, 'refractor-band')).toEqual([]);
      for (const trace of refractors) {
        // Oracle: lib's refractor points of this method, by position.
        const points = refractorPoints(BASE, method, meta(trace).interface!);
        expect(points.every((point) => point.shot !== null)).toBe(true);
        expect(trace.mode).toBe('markers');
        expect(numbers(trace, 'x')).toEqual(points.map((point) => point.x));
        expect(numbers(trace, 'y')).toEqual(points.map((point) => point.depth));
        expect((trace.error_y as { array: number[] }).array).toEqual(points.map((point) => point.depthSE));
      }
      expect(figure.pointCount).toBe(method === INTERCEPT_METHOD ? 12 : 8);
      expect(figure.layout.yaxis).toMatchObject({ autorange: 'reversed', title: { text: 'Depth below ground (m)' } });
    }
    expect(tracesOf(depthFigure(asClient(BASE), PICKS, null, 'depth', 'test'), 'refractor')).toEqual([]);
  });

  it('depthFigure joins refractor positions given along the line (most not under a shot) into a line with a ±1 SE band', () => {
    const alongLine: Interpretation = {
      ...BASE,
      refractors: BASE.refractors.map((refractor) => ({ ...refractor, points: refractor.points.map((point) => ({ ...point, shot: null, side: null })) })),
    };
    const figure = depthFigure(alongLine, PICKS, INTERCEPT_METHOD, 'depth', 'test');
    const band = tracesOf(figure, 'refractor-band').find((trace) => meta(trace).interface === 1)!;
    const points = refractorPoints(BASE, INTERCEPT_METHOD, 1);
    expect(band.fill).toBe('toself');
    expect(numbers(band, 'x')).toEqual([...points.map((point) => point.x), ...points.map((point) => point.x).reverse()]);
    expectClose(numbers(band, 'y'), [...points.map((point) => point.depth - point.depthSE), ...points.map((point) => point.depth + point.depthSE).reverse()], 'band');
    expect(tracesOf(figure, 'refractor').map((trace) => trace.mode)).toEqual(['lines+markers', 'lines+markers']);
  });

  it('depthFigure spans each survey boundary over the line with a band from depthToTop − SE to depthToTop + SE', () => {
    const figure = depthFigure(asClient(BASE), PICKS, INTERCEPT_METHOD, 'depth', 'test');
    // Extent of the line: sources and receivers of the sample, −12 m (A-OFF-W) to 85.5 m (A-OFF-E).
    const [xMin, xMax] = [-12, 85.5];
    const layers = BASE.layers.filter((layer) => layer.index > 1);
    expect(layers.map((layer) => layer.index)).toEqual([2, 3]);
    expect(tracesOf(figure, 'survey-band').map((trace) => meta(trace).layer)).toEqual([2, 3]);
    for (const layer of layers) {
      // Oracle: lib's survey layers (depth to top and its SE, m).
      const depth = layer.depthToTop!;
      const se = layer.depthToTopSE!;
      const band = tracesOf(figure, 'survey-band').find((trace) => meta(trace).layer === layer.index)!;
      expect(numbers(band, 'x')).toEqual([xMin, xMax, xMax, xMin]);
      expectClose(numbers(band, 'y'), [depth - se, depth - se, depth + se, depth + se], `layer ${layer.index} band`);
      const boundary = tracesOf(figure, 'survey-boundary').find((trace) => meta(trace).layer === layer.index)!;
      expect(numbers(boundary, 'x')).toEqual([xMin, xMax]);
      expect(numbers(boundary, 'y')).toEqual([depth, depth]);
    }
    expect(numbers(single(figure, 'ground'), 'y')).toEqual([0, 0]);
  });
});

describe('depthFigure in elevation mode', () => {
  it('groundProfile gives the table\'s elevations by position, receivers first, sources where no receiver stands, and null without elevations', () => {
    const ground = groundProfile(asClient(ELEVATED_RESULT), ELEVATED.picks)!;
    const positions = [...new Set(ELEVATED.picks.flatMap((pick) => [pick.receiverX, pick.sourceX]))].sort((left, right) => left - right);
    expect(ground.x).toEqual(positions);
    expect(ground.elevation).toEqual(positions.map(groundElevation));
    // Where a source stands at a receiver position, the receiver's elevation is the ground there.
    const pick = PICKS[0]!;
    const overlapping: StoredPick[] = [
      { ...pick, sourceX: 9, receiverX: 3, sourceElevation: 55, receiverElevation: 51 },
      { ...pick, sourceX: 3, receiverX: 6, sourceElevation: 50, receiverElevation: 52 },
    ];
    expect(groundProfile(asClient(BASE), overlapping)).toEqual({ x: [3, 6, 9], elevation: [51, 52, 55] });
    expect(groundProfile(asClient(BASE), PICKS)).toBeNull();
    expect(groundProfile(asClient(ELEVATED_RESULT), null)).toBeNull();
  });

  it('depthFigure in elevation mode draws ground minus depth: refractor points at lib\'s own point elevations, boundaries below the ground profile', () => {
    const figure = depthFigure(asClient(ELEVATED_RESULT), ELEVATED.picks, INTERCEPT_METHOD, 'elevation', 'test');
    expect(figure.layout.yaxis).toMatchObject({ title: { text: 'Elevation (m)' } });
    expect(figure.layout.yaxis).not.toHaveProperty('autorange');
    const ground = groundProfile(asClient(ELEVATED_RESULT), ELEVATED.picks)!;
    expect(numbers(single(figure, 'ground'), 'y')).toEqual(ground.elevation);

    for (const trace of tracesOf(figure, 'refractor')) {
      // Oracle: lib's point elevation = source elevation − depth (lib/interpretation/present.ts);
      // no receiver stands at a shot position here, so the ground there is the source's elevation.
      const points = refractorPoints(ELEVATED_RESULT, INTERCEPT_METHOD, meta(trace).interface!);
      expect(points.every((point) => point.elevation !== null)).toBe(true);
      expectClose(numbers(trace, 'y'), points.map((point) => point.elevation!), `interface ${meta(trace).interface}`);
    }
    for (const layer of ELEVATED_RESULT.layers.filter((candidate) => candidate.index > 1)) {
      const boundary = tracesOf(figure, 'survey-boundary').find((trace) => meta(trace).layer === layer.index)!;
      expect(numbers(boundary, 'x')).toEqual(ground.x);
      expectClose(numbers(boundary, 'y'), ground.elevation.map((elevation) => elevation - layer.depthToTop!), `layer ${layer.index}`);
      const band = tracesOf(figure, 'survey-band').find((trace) => meta(trace).layer === layer.index)!;
      const se = layer.depthToTopSE!;
      expectClose(
        numbers(band, 'y'),
        [...ground.elevation.map((elevation) => elevation - layer.depthToTop! + se), ...[...ground.elevation].reverse().map((elevation) => elevation - layer.depthToTop! - se)],
        `layer ${layer.index} band`,
      );
    }
    expect(numbers(single(figure, 'shots'), 'y')).toEqual(ELEVATED_RESULT.shots.map((shot) => groundElevation(shot.sourceX)));
  });

  it('depthFigure in elevation mode interpolates the ground linearly between positions (common practice) for points between receivers', () => {
    const between: Interpretation = {
      ...ELEVATED_RESULT,
      refractors: [{ interface: 1, method: 'test positions', references: [], points: [2.25, 3.75, 5.25].map((x) => ({ x, depth: 2, depthSE: 0.1, elevation: null, shot: null, side: null })) }],
    };
    const figure = depthFigure(between, ELEVATED.picks, 'test positions', 'elevation', 'test');
    const expected = [2.25, 3.75, 5.25].map((x) => (groundElevation(x - 0.75) + groundElevation(x + 0.75)) / 2 - 2);
    expectClose(numbers(single(figure, 'refractor'), 'y'), expected, 'interpolated ground − depth');
  });

  it('depthFigure in elevation mode falls back to depth mode when the table has no elevations or the stored picks are not given', () => {
    expect(depthFigure(asClient(BASE), PICKS, INTERCEPT_METHOD, 'elevation', 'test')).toEqual(depthFigure(asClient(BASE), PICKS, INTERCEPT_METHOD, 'depth', 'test'));
    expect(depthFigure(asClient(ELEVATED_RESULT), null, INTERCEPT_METHOD, 'elevation', 'test')).toEqual(depthFigure(asClient(ELEVATED_RESULT), null, INTERCEPT_METHOD, 'depth', 'test'));
    const figure = depthFigure(asClient(BASE), PICKS, INTERCEPT_METHOD, 'elevation', 'test');
    expect(figure.layout.yaxis).toMatchObject({ autorange: 'reversed' });
    expect(numbers(single(figure, 'ground'), 'y')).toEqual([0, 0]);
  });
});

// ---------------------------------------------------------------- sections under every receiver
// Oracle: lib's interpretation of sample-surveys/ashcombe-hollow-undulating-bedrock.csv (invented data: three overlapping
// spreads over undulating bedrock, 12 shots), and of the same table with the invented ground profile above added.

const ASHCOMBE_TEXT = readFileSync(new URL('../../sample-surveys/ashcombe-hollow-undulating-bedrock.csv', import.meta.url), 'utf8');
const ASHCOMBE_TABLE = readTable(ASHCOMBE_TEXT);
const ASHCOMBE = engineView(ASHCOMBE_TABLE);
const ASHCOMBE_ELEVATED_TABLE = readTable(withElevations(ASHCOMBE_TEXT));
const ASHCOMBE_ELEVATED = engineView(ASHCOMBE_ELEVATED_TABLE);
const alongLineMethods = (result: EngineInterpretation) => [...new Set(result.refractors.filter((refractor) => refractor.points.every((point) => point.shot === null)).map((refractor) => refractor.method))];
const [PLUS_MINUS_METHOD, GRM_METHOD] = alongLineMethods(ASHCOMBE);
const SEAM_POINTS = 24;

/** The seams trace's marks: runs of positions between the nulls that separate them. */
function seamRuns(trace: Trace): { x: number[]; y: number[]; text: string[] }[] {
  const runs: { x: number[]; y: number[]; text: string[] }[] = [];
  let run = { x: [] as number[], y: [] as number[], text: [] as string[] };
  (trace['x'] as (number | null)[]).forEach((x, k) => {
    if (x === null) {
      runs.push(run);
      run = { x: [], y: [], text: [] };
      return;
    }
    run.x.push(x);
    run.y.push((trace['y'] as number[])[k]!);
    run.text.push((trace['text'] as string[])[k]!);
  });
  if (run.x.length > 0) runs.push(run);
  return runs;
}

describe('depthFigure for sections under every receiver (plus-minus, GRM) and their seams', () => {
  it('the sample gives a plus-minus and a GRM section under the receivers, each with seams and a refractor velocity', () => {
    expect(PLUS_MINUS_METHOD).toMatch(/^plus-minus method/);
    expect(GRM_METHOD).toMatch(/^generalized reciprocal method/);
    for (const method of [PLUS_MINUS_METHOD!, GRM_METHOD!]) {
      const refractor = ASHCOMBE.refractors.find((candidate) => candidate.method === method)!;
      expect(refractor.seams.length).toBeGreaterThan(0);
      expect(refractor.velocity).not.toBeNull();
    }
  });

  it('depthFigure draws a section under every receiver as a line with its ±1 SE band and no bars, each point\'s hover naming its reversed pair', () => {
    for (const method of [PLUS_MINUS_METHOD!, GRM_METHOD!]) {
      const figure = depthFigure(asClient(ASHCOMBE), ASHCOMBE_TABLE.picks, method, 'depth', 'test');
      const points = refractorPoints(ASHCOMBE, method, 1);
      const refractor = ASHCOMBE.refractors.find((candidate) => candidate.method === method)!;
      const trace = single(figure, 'refractor');
      expect(trace.mode).toBe('lines+markers');
      expect(trace).not.toHaveProperty('error_y');
      expect(numbers(trace, 'x')).toEqual(points.map((point) => point.x));
      expect(numbers(trace, 'y')).toEqual(points.map((point) => point.depth));
      const band = single(figure, 'refractor-band');
      expectClose(numbers(band, 'y'), [...points.map((point) => point.depth - point.depthSE), ...points.map((point) => point.depth + point.depthSE).reverse()], `${method} band`);
      (trace['text'] as string[]).forEach((text, k) => expect(text.startsWith(`pair ${points[k]!.pair}, at ${points[k]!.x} m: depth `), text).toBe(true));
      expect(points.every((point) => typeof point.pair === 'string' && point.pair.includes(' → '))).toBe(true);
      expect(trace['name']).toContain(`refractor velocity ${quantity(refractor.velocity, refractor.velocitySE, 'm/s')}`);
    }
  });

  it('depthFigure draws each seam as a dotted vertical mark at lib\'s seam position, from the ground to below the deepest band edge, its hover the seam\'s text', () => {
    for (const method of [PLUS_MINUS_METHOD!, GRM_METHOD!]) {
      const figure = depthFigure(asClient(ASHCOMBE), ASHCOMBE_TABLE.picks, method, 'depth', 'test');
      const refractor = ASHCOMBE.refractors.find((candidate) => candidate.method === method)!;
      const trace = single(figure, 'seams');
      expect(trace['line']).toMatchObject({ dash: 'dot', width: 1 });
      const runs = seamRuns(trace);
      expect(runs.map((run) => run.x[0])).toEqual(refractor.seams.map((seam) => seam.x));
      const deepest = Math.max(...refractor.points.map((point) => point.depth + point.depthSE));
      runs.forEach((run, k) => {
        expect(run.x).toEqual(Array.from({ length: SEAM_POINTS }, () => refractor.seams[k]!.x));
        expect(run.y[0]).toBe(0);
        expect(run.y[run.y.length - 1]!).toBeGreaterThan(deepest);
        expect(new Set(run.text)).toEqual(new Set([seamText(refractor.seams[k]!, 2, 'm')]));
      });
    }
    // A per-shot method has no seams.
    expect(tracesOf(depthFigure(asClient(ASHCOMBE), ASHCOMBE_TABLE.picks, INTERCEPT_METHOD, 'depth', 'test'), 'seams')).toEqual([]);
  });

  it('depthFigure writes the half-space\'s velocity below a section under every receiver instead of over it, keeping room for it in the axis range', () => {
    const figure = depthFigure(asClient(ASHCOMBE), ASHCOMBE_TABLE.picks, GRM_METHOD!, 'depth', 'test');
    const deepest = Math.max(...refractorPoints(ASHCOMBE, GRM_METHOD!, 1).map((point) => point.depth + point.depthSE));
    const annotations = figure.layout['annotations'] as { y: number; text: string }[];
    const halfSpace = annotations.find((annotation) => annotation.text.startsWith('layer 2:'))!;
    expect(halfSpace.y).toBeGreaterThan(deepest);
    expect(numbers(single(figure, 'label-room'), 'y')[0]!).toBeGreaterThan(halfSpace.y);
    // Oracle: the sample's survey layer 2 starts above the deepest GRM point, where the label used to go (top + 25 % of it).
    const top = ASHCOMBE.layers[1]!.depthToTop!;
    expect(top * 1.25).toBeLessThan(deepest);
    // Per-shot methods keep the label where it was.
    const perShot = depthFigure(asClient(ASHCOMBE), ASHCOMBE_TABLE.picks, INTERCEPT_METHOD, 'depth', 'test');
    expect((perShot.layout['annotations'] as { y: number; text: string }[]).find((annotation) => annotation.text.startsWith('layer 2:'))!.y).toBeCloseTo(top * 1.25, 9);
    expect(tracesOf(perShot, 'label-room')).toEqual([]);
  });

  it('seamText names the position, both pairs and the signed depth step ± SE over the common receivers, or says no receiver was in common', () => {
    // By hand from the seam's fields (common practice: the step with its SE, sign shown).
    expect(seamText({ x: 21.25, fromPair: 'A → B', toPair: 'C → B', step: 0.2, stepSE: 0.23, commonReceivers: 32 }, 2, 'm'))
      .toBe('seam in the top of layer 2 at 21.25 m<br>from pair A → B<br>to pair C → B<br>depth step +0.20 ± 0.23\u202fm<br>(new pair minus old, mean over 32 common receivers)');
    expect(seamText({ x: 5, fromPair: 'A → B', toPair: 'C → D', step: -0.054, stepSE: 0.21, commonReceivers: 1 }, 3, 'm'))
      .toBe('seam in the top of layer 3 at 5 m<br>from pair A → B<br>to pair C → D<br>depth step \u22120.05 ± 0.21\u202fm<br>(new pair minus old, mean over 1 common receiver)');
    expect(seamText({ x: 211.25, fromPair: 'A → B', toPair: 'C → D', step: null, stepSE: null, commonReceivers: 0 }, 2, 'm'))
      .toBe('seam in the top of layer 2 at 211.25 m<br>from pair A → B<br>to pair C → D<br>no receiver in common, so no depth step measured');
    // Shot names are escaped for plotly's labels.
    expect(seamText({ x: 1, fromPair: '<b>A</b> → B', toPair: 'C → D', step: null, stepSE: null, commonReceivers: 0 }, 2, 'm')).toContain('from pair &lt;b&gt;A&lt;/b&gt; → B');
  });

  it('elevationModeAvailable needs the table\'s elevations and an elevation at every point of the chosen method', () => {
    // Oracle: lib gives each point's refractor elevation (ground or source elevation minus depth) when elevations are given.
    expect(elevationModeAvailable(asClient(ASHCOMBE), ASHCOMBE_TABLE.picks, GRM_METHOD!)).toBe(false);
    for (const method of [GRM_METHOD!, PLUS_MINUS_METHOD!, INTERCEPT_METHOD]) {
      expect(ASHCOMBE_ELEVATED.refractors.filter((refractor) => refractor.method === method).every((refractor) => refractor.points.every((point) => point.elevation !== null))).toBe(true);
      expect(elevationModeAvailable(asClient(ASHCOMBE_ELEVATED), ASHCOMBE_ELEVATED_TABLE.picks, method), method).toBe(true);
    }
    expect(elevationModeAvailable(asClient(ASHCOMBE_ELEVATED), null, GRM_METHOD!)).toBe(false);
    expect(elevationModeAvailable(asClient(ASHCOMBE_ELEVATED), ASHCOMBE_ELEVATED_TABLE.picks, null)).toBe(false);
    const oneMissing: Interpretation = {
      ...ASHCOMBE_ELEVATED,
      refractors: ASHCOMBE_ELEVATED.refractors.map((refractor) => refractor.method !== GRM_METHOD ? refractor
        : { ...refractor, points: refractor.points.map((point, k) => (k === 3 ? { ...point, elevation: null } : point)) }),
    };
    expect(elevationModeAvailable(oneMissing, ASHCOMBE_ELEVATED_TABLE.picks, GRM_METHOD!)).toBe(false);
  });

  it('depthFigure in elevation mode draws a section under every receiver at lib\'s own refractor elevations, its seams from the ground elevation down', () => {
    const figure = depthFigure(asClient(ASHCOMBE_ELEVATED), ASHCOMBE_ELEVATED_TABLE.picks, GRM_METHOD!, 'elevation', 'test');
    const points = refractorPoints(ASHCOMBE_ELEVATED, GRM_METHOD!, 1);
    expect(numbers(single(figure, 'refractor'), 'y')).toEqual(points.map((point) => point.elevation!));
    // Without a datum, lib's elevation is the ground's (the receiver's) minus the depth.
    expectClose(points.map((point) => point.elevation!), points.map((point) => groundElevation(point.x) - point.depth), 'ground − depth');
    const lowest = Math.min(...points.map((point) => point.elevation! - point.depthSE));
    const refractor = ASHCOMBE_ELEVATED.refractors.find((candidate) => candidate.method === GRM_METHOD)!;
    seamRuns(single(figure, 'seams')).forEach((run, k) => {
      const seamX = refractor.seams[k]!.x;
      // The seams lie between receivers: the ground there is interpolated between its neighbours (2.5 m apart).
      expectClose([run.y[0]!], [(groundElevation(seamX - 1.25) + groundElevation(seamX + 1.25)) / 2], `seam at ${seamX}`);
      expect(run.y[run.y.length - 1]!).toBeLessThan(lowest);
    });
  });
});

describe('sectionMethod, methodLabel and shotLabelPositions', () => {
  it('sectionMethod prefers the GRM section, then another section under every receiver, then the first method, and is null without refractors', () => {
    expect(sectionMethod(asClient(ASHCOMBE))).toBe(GRM_METHOD);
    const withoutGrm: Interpretation = { ...ASHCOMBE, refractors: ASHCOMBE.refractors.filter((refractor) => refractor.method !== GRM_METHOD) };
    expect(sectionMethod(withoutGrm)).toBe(PLUS_MINUS_METHOD);
    const perShotOnly: Interpretation = { ...ASHCOMBE, refractors: ASHCOMBE.refractors.filter((refractor) => refractor.points.every((point) => point.shot !== null)) };
    expect(sectionMethod(perShotOnly)).toBe(INTERCEPT_METHOD);
    expect(sectionMethod({ ...ASHCOMBE, refractors: [] })).toBeNull();
  });

  it('methodLabel keeps a method\'s short name without "method" and without what follows "at"', () => {
    expect(methodLabel(INTERCEPT_METHOD)).toBe('intercept-time');
    expect(methodLabel(CROSSOVER_METHOD)).toBe('crossover-distance');
    expect(methodLabel(PLUS_MINUS_METHOD!)).toBe('plus-minus');
    expect(methodLabel(GRM_METHOD!)).toBe('generalized reciprocal');
    expect(methodLabel('weighted mean')).toBe('weighted mean');
  });

  it('shotLabelPositions writes a label below its star when it would overlap the label above it to its left, and leaves spaced labels above', () => {
    // By hand (label widths 0.7 % of the plot per character plus a 1 % gap): on the 357.5 m Ashcombe line (−30 to
    // 327.5 m), S1-OFF-E at 147.5 m and S3-OFF-W at 150 m are 2.5 m (0.7 %) apart, less than the 6.6 % two 8-character
    // labels need; every other pair of neighbours is at least 27.5 m (7.7 %) apart, more than the 5.2 % at most that
    // a 4- and an 8-character label need.
    const positions = shotLabelPositions(ASHCOMBE.shots, 357.5);
    const below = ASHCOMBE.shots.filter((_, k) => positions[k] === 'bottom center').map((shot) => shot.id);
    expect(below).toEqual(['S3-OFF-W']);
    expect(positions.filter((position) => position === 'top center')).toHaveLength(ASHCOMBE.shots.length - 1);
    // Three labels on one spot: the second and the third both overlap the first (the last label written above), so both go below.
    expect(shotLabelPositions([{ id: 'A', sourceX: 0 }, { id: 'B', sourceX: 0.1 }, { id: 'C', sourceX: 0.2 }], 100)).toEqual(['top center', 'bottom center', 'bottom center']);
    expect(shotLabelPositions([{ id: 'A', sourceX: 0 }], 0)).toEqual(['top center']);
    expect(single(depthFigure(asClient(ASHCOMBE), ASHCOMBE_TABLE.picks, GRM_METHOD!, 'depth', 'test'), 'shots')['textposition']).toEqual(positions);
  });
});
