/**
 * End-to-end checks of the horizontal-layer pipeline on noisy synthetic surveys. The picks come
 * from explicit ray geometry (tests/oracles/ray-geometry.ts) plus seeded noise, not from the
 * inversion formula run backwards; the models are those of METHODS.md check cases 1.1 and 2.2
 * (stated models; the figures they must meet are the acceptance criteria of the core engine).
 */
import { describe, expect, it } from 'vitest';
import { readPickTable } from '../../lib/picks/index.js';
import { interpret, type InterpretOptions } from '../../lib/interpret.js';
import type { Interpretation } from '../../lib/interpretation/shape.js';
import { InterpretationSchema } from '../../lib/interpretation/shape.js';
import { range, syntheticSurvey, type SyntheticSpec, type SyntheticSurvey } from '../helpers/synthetic-survey.js';
import { expectRelative } from '../helpers/expect-within.js';

/** Acceptance: velocities within 3 % on noisy data. */
const VELOCITY_TOLERANCE = 0.03;
/** Acceptance: depths within 5 % on noisy data. */
const DEPTH_TOLERANCE = 0.05;
/** Acceptance: at least 95 % of picks on their true branch. */
const SEGMENTATION_SCORE = 0.95;

function run(survey: SyntheticSurvey, options: InterpretOptions = {}): Interpretation {
  const outcome = readPickTable(survey.csv);
  if (!outcome.ok) throw new Error(`synthetic table refused: ${JSON.stringify(outcome.problems.slice(0, 3))}`);
  const result = interpret(outcome.value, options);
  InterpretationSchema.parse(JSON.parse(JSON.stringify(result)));
  return result;
}

/** Fraction of ALL data rows (header is line 1) that sit on a branch of their true number: a pick left off every branch counts as wrong. */
function segmentationScore(result: Interpretation, survey: SyntheticSurvey): number {
  let right = 0;
  for (const shot of result.shots) {
    for (const side of shot.sides) {
      for (const branch of side.branches) {
        for (const pick of branch.picks) {
          if (survey.trueBranches[pick.line - 2] === branch.index) right += 1;
        }
      }
    }
  }
  return right / survey.trueBranches.length;
}

function checkRecovery(result: Interpretation, spec: SyntheticSpec, label: string): void {
  expect(result.layers.length, `${label}: layer count`).toBe(spec.velocities.length);
  spec.velocities.forEach((velocity, k) => {
    expectRelative(result.layers[k]!.velocity, velocity, VELOCITY_TOLERANCE, `${label}: layer ${k + 1} velocity (stated model)`);
  });
  let depth = 0;
  spec.thicknesses.forEach((thickness, k) => {
    depth += thickness;
    expectRelative(result.layers[k + 1]!.depthToTop, depth, DEPTH_TOLERANCE, `${label}: survey depth to layer ${k + 2} (stated model)`);
    for (const shot of result.shots) {
      for (const side of shot.sides) {
        const underShot = side.depths.interceptTime[k];
        if (underShot === undefined) continue;
        expectRelative(underShot.depth, depth, DEPTH_TOLERANCE, `${label}: shot ${shot.id} ${side.side}, intercept-time depth z${k + 1} (stated model)`);
      }
    }
  });
}

const TWO_LAYER: SyntheticSpec = {
  velocities: [500, 2000],
  thicknesses: [8],
  receivers: range(48, 2, 2),
  shots: [0, 49, 98],
  noise: 0.0003,
  sigma: 0.0003,
  seed: 202,
};

const THREE_LAYER: SyntheticSpec = {
  velocities: [400, 1600, 3500],
  thicknesses: [4, 10],
  receivers: range(48, 2.5, 2.5),
  shots: [0, 61.25, 122.5],
  noise: 0.00025,
  sigma: null,
  seed: 303,
};

describe('interpret on noisy horizontal-layer surveys (ray-geometry picks)', () => {
  it('recovers a two-layer model (METHODS.md 2.2 model: 500/2000 m/s over 8 m) within 3 % and 5 %', () => {
    const survey = syntheticSurvey(TWO_LAYER);
    const result = run(survey);
    checkRecovery(result, TWO_LAYER, 'two layers');
    expect(segmentationScore(result, survey)).toBeGreaterThanOrEqual(SEGMENTATION_SCORE);
  });

  it('recovers a three-layer model (METHODS.md 1.1 model: 400/1600/3500 m/s, 4 and 10 m) within 3 % and 5 %', () => {
    const survey = syntheticSurvey(THREE_LAYER);
    const result = run(survey);
    checkRecovery(result, THREE_LAYER, 'three layers');
    expect(segmentationScore(result, survey)).toBeGreaterThanOrEqual(SEGMENTATION_SCORE);
  });

  for (const spec of [TWO_LAYER, THREE_LAYER]) {
    const layers = spec.velocities.length;
    it(`with 5 % outlier picks, the robust fit still recovers the ${layers}-layer model and its branches`, () => {
      const survey = syntheticSurvey({ ...spec, seed: spec.seed + 1, outlierFraction: 0.05, outlierSize: [0.003, 0.008] });
      expect(survey.outliers.filter(Boolean).length).toBeGreaterThan(0);
      const robust = run(survey, { fitMethod: 'huber' });
      checkRecovery(robust, spec, `${layers} layers, 5 % outliers, Huber`);
      expect(segmentationScore(robust, survey)).toBeGreaterThanOrEqual(SEGMENTATION_SCORE);
    });
  }

  it('lists refractors by the intercept-time and crossover-distance methods (one point per shot side) and by plus-minus and GRM (per receiver), near the stated depth', () => {
    const result = run(syntheticSurvey(TWO_LAYER));
    const methods = result.refractors.map((refractor) => refractor.method.split(' ')[0]);
    expect(methods).toEqual(['intercept-time', 'crossover-distance', 'plus-minus', 'generalized']);
    const sideCount = result.shots.reduce((count, shot) => count + shot.sides.length, 0);
    for (const refractor of result.refractors.slice(2)) {
      // Delay-time methods (Hagedoorn 1959; Palmer 1980) on the same ray-geometry picks: the stated thickness under every receiver.
      expect(refractor.points.length).toBeGreaterThan(10);
      for (const point of refractor.points) {
        expect(point.shot).toBeNull();
        expectRelative(point.depth, TWO_LAYER.thicknesses[0]!, DEPTH_TOLERANCE, `${refractor.method}: receiver at ${point.x} m (stated model)`);
      }
    }
    for (const refractor of result.refractors.slice(0, 2)) {
      expect(refractor.interface).toBe(1);
      expect(refractor.points).toHaveLength(sideCount);
      for (const point of refractor.points) {
        expectRelative(point.depth, TWO_LAYER.thicknesses[0]!, DEPTH_TOLERANCE, `${refractor.method}: shot ${point.shot} ${point.side} (stated model)`);
        expect(point.depthSE).toBeGreaterThan(0);
      }
    }
    const byCrossover = result.refractors[1]!.points.map((point) => point.depth);
    const fromSides = result.shots.flatMap((shot) => shot.sides.map((side) => side.depths.crossoverDistance[0]!.depth));
    expect(byCrossover).toEqual(fromSides);
  });

  it('reports residuals of the picks against the forward model near the pick noise', () => {
    const result = run(syntheticSurvey(TWO_LAYER));
    // Noise is 0.3 ms; the survey model is an average, so allow twice that (ms, engineering units).
    expect(result.residuals.overallRms).not.toBeNull();
    expect(result.residuals.overallRms!).toBeLessThan(0.6);
    expect(result.residuals.perShot.map((entry) => entry.shot)).toEqual(['S1', 'S2', 'S3']);
  });

  it('gives a bootstrap depth SE close to the propagated (Jacobian) SE on every shot side', () => {
    // Two independent routes to the same uncertainty (STYLE: an oracle twin for propagation).
    // 400 replicates estimate an SE to about ±4 %; the linearisation is good here, so a factor of
    // 1.5 either way is a generous bound that a wrong covariance (e.g. dropped) would still break.
    const result = run(syntheticSurvey(TWO_LAYER), { bootstrapReplicates: 400, seed: 5 });
    for (const shot of result.shots) {
      for (const side of shot.sides) {
        const interval = side.depths.bootstrap?.[0];
        const propagated = side.depths.interceptTime[0];
        expect(interval, `shot ${shot.id} ${side.side}: bootstrap interval`).toBeDefined();
        expect(interval!.low95).toBeLessThan(interval!.high95);
        expect(interval!.replicates + interval!.droppedReplicates).toBe(400);
        const ratio = interval!.depthSE / propagated!.depthSE;
        expect(ratio, `shot ${shot.id} ${side.side}: bootstrap SE / propagated SE`).toBeGreaterThan(1 / 1.5);
        expect(ratio).toBeLessThan(1.5);
      }
    }
  });
});
