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
