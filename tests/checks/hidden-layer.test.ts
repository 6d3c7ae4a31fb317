import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { assessHiddenLayer, hiddenLayerWarnings, maxHiddenThickness } from '../../lib/checks/hidden-layer.js';
import { interceptTimeDepths } from '../../lib/depth/intercept-time.js';
import type { BranchParameters } from '../../lib/depth/types.js';
import { branchesSeen, criticalDistanceByRays, crossoverByRays, interceptByRays, scanFirstArrivals } from '../oracles/ray-geometry.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';

/** METHODS §9 check cases are printed to 5, 4 or 3 decimals: half a unit in the last place. */
const HALF_5DP = 0.5e-5;
const HALF_4DP = 0.5e-4;
const HALF_3DP = 0.5e-3;
/** METHODS 9.x scans use a 1 mm grid; ours too, so run ends agree to a grid step plus rounding. */
const SCAN_STEP = 0.001;
const SCAN_AGREEMENT = SCAN_STEP + HALF_3DP;
/** Closed forms evaluated two ways in double precision agree to far better than this. */
const ALGEBRA_RELATIVE = 1e-12;
const FORWARD = { shot: 'S1', side: 'forward' } as const;

const slowness = (velocity: number): number => 1 / velocity;
const vertical = (upper: number, lower: number): number => Math.sqrt(slowness(upper) ** 2 - slowness(lower) ** 2);

/** METHODS §9 direct-wave special form, written out here as the test-side check. */
function directWaveForm(topVelocity: number, topThickness: number, intermediateVelocity: number, lowerVelocity: number): number {
  const [top, middle, lower] = [slowness(topVelocity), slowness(intermediateVelocity), slowness(lowerVelocity)];
  return (
    (topThickness * (((top - lower) * vertical(topVelocity, intermediateVelocity)) / (top - middle) - vertical(topVelocity, lowerVelocity))) /
    vertical(intermediateVelocity, lowerVelocity)
  );
}

/** Exact, variance-free branch parameters of the branches a reader would see (velocities given). */
function seenBranches(velocities: readonly number[], thicknesses: readonly number[], seen: readonly number[]): BranchParameters[] {
  return seen.map((branch) => ({
    slowness: slowness(velocities[branch - 1] ?? Number.NaN),
    intercept: interceptByRays(velocities, thicknesses, branch) ?? Number.NaN,
    slownessVariance: 0,
    interceptVariance: 0,
    covariance: 0,
  }));
}

describe('maxHiddenThickness: METHODS.md check cases 9.1 and 9.2 with the brute-force scan', () => {
  const source91 = 'METHODS.md check case 9.1 (computed from the stated model by a brute-force first-arrival scan at 1 mm)';
  const limit91 = maxHiddenThickness({ velocities: [400, 3000], thicknesses: [5] }, 1200);

  it('maxHiddenThickness gives h_2,max = 3.83922 m for 400 (5 m)/1200/3000 m/s and equals the direct-wave form', () => {
    expectWithin(limit91, 3.83922, HALF_5DP, source91);
    expectRelative(limit91, directWaveForm(400, 5, 1200, 3000), ALGEBRA_RELATIVE, 'METHODS.md §9 direct-wave special form');
  });

  it('maxHiddenThickness 9.1: the scan finds branch 2 never first at 0.98·h_max and first over 0.234 m (14.143–14.376 m) at 1.02·h_max', () => {
    const hidden = branchesSeen(scanFirstArrivals([400, 1200, 3000], [5, 0.98 * limit91], 40, SCAN_STEP));
    expect([...hidden.keys()], `${source91}: at 0.98·h_max`).toEqual([1, 3]);
    const seenRuns = scanFirstArrivals([400, 1200, 3000], [5, 1.02 * limit91], 40, SCAN_STEP);
    const run = seenRuns.find((candidate) => candidate.branch === 2);
    expectWithin(run?.from ?? Number.NaN, 14.143, SCAN_AGREEMENT, `${source91}: branch 2 first from`);
    expectWithin(run?.to ?? Number.NaN, 14.376, SCAN_AGREEMENT, `${source91}: branch 2 first to`);
    expectWithin((run?.to ?? Number.NaN) - (run?.from ?? Number.NaN), 0.234, 2 * SCAN_AGREEMENT, `${source91}: width`);
  });

  it('interceptTimeDepths on the 9.1 case at 0.98·h_max reads 6.160 m for the true 8.762 m (−29.7 %)', () => {
    const velocities = [400, 1200, 3000];
    const thicknesses = [5, 0.98 * limit91];
    const read = interceptTimeDepths(seenBranches(velocities, thicknesses, [1, 3]));
    const trueDepth = 5 + 0.98 * limit91;
    expectWithin(read.depths[0] ?? Number.NaN, 6.16, HALF_3DP, `${source91}: two-layer depth`);
    expectWithin(trueDepth, 8.762, HALF_3DP, `${source91}: true depth`);
    expectWithin(((read.depths[0] ?? Number.NaN) - trueDepth) / trueDepth, -0.297, HALF_3DP, `${source91}: relative error`);
  });

  it('maxHiddenThickness gives 5.5648 m for 400 (3 m)/1000 (6 m)/hidden 1800/4000 m/s (9.2), confirmed by the scan at 0.99× and 1.01×', () => {
    const source92 = 'METHODS.md check case 9.2 (computed from the stated model by a brute-force first-arrival scan at 1 mm)';
    const limit = maxHiddenThickness({ velocities: [400, 1000, 4000], thicknesses: [3, 6] }, 1800);
    expectWithin(limit, 5.5648, HALF_4DP, source92);
    const velocities = [400, 1000, 1800, 4000];
    expect([...branchesSeen(scanFirstArrivals(velocities, [3, 6, 0.99 * limit], 80, SCAN_STEP)).keys()], `${source92}: at 0.99×`).toEqual([1, 2, 4]);
    const width = branchesSeen(scanFirstArrivals(velocities, [3, 6, 1.01 * limit], 80, SCAN_STEP)).get(3) ?? Number.NaN;
    expectWithin(width, 0.18, 0.005 + SCAN_STEP, `${source92}: first over 0.18 m at 1.01×`);
  });
});

describe('assessHiddenLayer: the bound consistent with the observed intercept', () => {
  it('assessHiddenLayer recovers the true 9.1 bound from the two-layer reading of the model at exactly h_max', () => {
    const velocities = [400, 1200, 3000];
    const limit = maxHiddenThickness({ velocities: [400, 3000], thicknesses: [5] }, 1200);
    const read = interceptTimeDepths(seenBranches(velocities, [5, limit], [1, 3]));
    const assessment = assessHiddenLayer({ velocities: [400, 3000], thicknesses: read.thicknesses }, 1, 1200);
    expectRelative(assessment.maxHiddenThickness, limit, 1e-9, 'METHODS.md check case 9.1: the true model lies on the bound');
    expectRelative(assessment.upperThicknessIfPresent, 5, 1e-9, 'METHODS.md check case 9.1: true top layer 5 m');
    expectRelative(assessment.depthIfPresent, 5 + limit, 1e-9, 'METHODS.md check case 9.1: true depth to 3000 m/s');
    expectRelative(assessment.depthErrorIfPresent, (read.depths[0] ?? Number.NaN) - (5 + limit), 1e-9, 'interpreted − true depth');
  });

  it('assessHiddenLayer for a deeper pair: a layer at 0.98× its bound keeps τ_b and is never first; at 1.02× it is first (ray scan)', () => {
    const read = interceptTimeDepths(seenBranches([400, 1000, 4000], [3, 6], [1, 2, 3]));
    const interpreted = { velocities: [400, 1000, 4000], thicknesses: read.thicknesses };
    const assessment = assessHiddenLayer(interpreted, 2, 1800);
    const ratio = vertical(1800, 4000) / vertical(1000, 4000);
    const observedIntercept = interceptByRays([400, 1000, 4000], [3, 6], 3) ?? Number.NaN;
    for (const [factor, seen] of [
      [0.98, [1, 2, 4]],
      [1.02, [1, 2, 3, 4]],
    ] as const) {
      const hiddenThickness = factor * assessment.maxHiddenThickness;
      const thicknesses = [3, (read.thicknesses[1] ?? Number.NaN) - ratio * hiddenThickness, hiddenThickness];
      const velocities = [400, 1000, 1800, 4000];
      expectWithin(interceptByRays(velocities, thicknesses, 4) ?? Number.NaN, observedIntercept, 1e-15, 'the hidden layer keeps the observed τ_b (ray oracle)');
      expect([...branchesSeen(scanFirstArrivals(velocities, thicknesses, 80, SCAN_STEP)).keys()], `scan at ${factor}× the bound`).toEqual(seen);
    }
  });

  it('assessHiddenLayer caps the bound where layer a would vanish (h_a′ = 0), and that layer stays hidden', () => {
    const model = { velocities: [340, 420, 825], thicknesses: [36, 3.2] };
    const assessment = assessHiddenLayer(model, 2, 587);
    const ratio = vertical(587, 825) / vertical(420, 825);
    expectRelative(assessment.maxHiddenThickness, 3.2 / ratio, ALGEBRA_RELATIVE, 'cap h_a/r');
    expectWithin(assessment.upperThicknessIfPresent, 0, 1e-12, 'layer a vanishes at the cap');
    const runs = scanFirstArrivals([340, 420, 587, 825], [36, 0, assessment.maxHiddenThickness], 400, 0.01);
    expect(branchesSeen(runs).has(3)).toBe(false);
  });

  it('maxHiddenThickness is positive for every stack with positive thicknesses (intercepts concave in slowness; seeded)', () => {
    const stack = fc.record({
      top: fc.double({ min: 200, max: 2000, noNaN: true }),
      factors: fc.array(fc.double({ min: 1.1, max: 4, noNaN: true }), { minLength: 1, maxLength: 4 }),
      thicknesses: fc.array(fc.double({ min: 0.5, max: 40, noNaN: true }), { minLength: 4, maxLength: 4 }),
      position: fc.double({ min: 0.01, max: 0.99, noNaN: true }),
    });
    fc.assert(
      fc.property(stack, ({ top, factors, thicknesses, position }) => {
        const velocities = [top];
        for (const factor of factors) velocities.push((velocities[velocities.length - 1] ?? top) * factor);
        const upper = velocities[velocities.length - 2] ?? Number.NaN;
        const lower = velocities[velocities.length - 1] ?? Number.NaN;
        const model = { velocities, thicknesses: thicknesses.slice(0, velocities.length - 1) };
        expect(maxHiddenThickness(model, upper + position * (lower - upper))).toBeGreaterThan(0);
      }),
      { seed: 7_9_1, numRuns: 300 },
    );
  });

  it('assessHiddenLayer gives 0 for an upper layer of zero thickness', () => {
    expect(assessHiddenLayer({ velocities: [400, 3000], thicknesses: [0] }, 1).maxHiddenThickness).toBe(0);
    expect(maxHiddenThickness({ velocities: [400, 3000], thicknesses: [0] }, 1200)).toBe(0);
  });

  it('assessHiddenLayer defaults V_m to √(V_a·V_b)', () => {
    expect(assessHiddenLayer({ velocities: [400, 3600], thicknesses: [5] }, 1).intermediateVelocity).toBe(1200);
  });

  it('maxHiddenThickness and assessHiddenLayer throw with a message on misuse', () => {
    expect(() => maxHiddenThickness({ velocities: [400, 3000], thicknesses: [5] }, 300)).toThrow(/strictly between 400 and 3000/);
    expect(() => maxHiddenThickness({ velocities: [400], thicknesses: [] }, 300)).toThrow(/at least two layers/);
    expect(() => maxHiddenThickness({ velocities: [800, 500, 3000], thicknesses: [4, 6] }, 1000)).toThrow(/must increase downwards/);
    expect(() => assessHiddenLayer({ velocities: [400, 3000], thicknesses: [5] }, 2)).toThrow(/upper layer must be an integer from 1 to 1/);
  });
});

interface EarthModelFixture {
  readonly layers: readonly { readonly top_km: number; readonly vp: number }[];
  readonly derived_flat_layer_check_values: Readonly<Record<string, number | string | boolean>>;
}

describe('hidden layer on iasp91 (Kennett & Engdahl 1991): the 6.5 km/s lower crust', () => {
  const fixture = JSON.parse(readFileSync(new URL('../fixtures/earth-models/iasp91-crust.json', import.meta.url), 'utf8')) as EarthModelFixture;
  const derived = fixture.derived_flat_layer_check_values;
  // km/s → m/s, rounded to the millimetre per second so 8.04 km/s is exactly 8040 m/s.
  const velocities = fixture.layers.map((layer) => Math.round(layer.vp * 1e6) / 1000);
  const tops = fixture.layers.map((layer) => layer.top_km * 1000);
  const thicknesses = tops.slice(1).map((top, index) => top - (tops[index] ?? Number.NaN));
  const source = 'iasp91 (Kennett & Engdahl 1991) flat-layer value [O] from tests/fixtures/earth-models';
  /** The fixture prints km to 2 decimals and s to 4: half a unit in the last place (5 m, 0.05 ms). */
  const HALF_CENTIMETRE_KM = 5;
  const HALF_4DP_S = 0.5e-4;
  /**
   * The shared note gives the Moho read as "31.37 km"; computed here it is 31 375.1 m, which rounds
   * to 31.38: the note cut the value to 2 decimals. Allow one unit in the last place, 10 m.
   */
  const ONE_UNIT_2DP_KM = 10;

  it('the ray oracle reproduces the fixture intercepts, crossovers and critical distance of iasp91', () => {
    expect(velocities).toEqual([5800, 6500, 8040]);
    expect(thicknesses).toEqual([20000, 15000]);
    expectWithin(interceptByRays(velocities, thicknesses, 2) ?? Number.NaN, Number(derived.intercept_time_lower_crust_head_wave_s), HALF_4DP_S, `${source}: P* intercept`);
    expectWithin(interceptByRays(velocities, thicknesses, 3) ?? Number.NaN, Number(derived.intercept_time_Pn_s), HALF_4DP_S, `${source}: Pn intercept`);
    expectWithin(crossoverByRays(velocities, thicknesses, 1, 2, 100e3, 300e3), Number(derived.crossover_direct_vs_lower_crust_km) * 1000, HALF_CENTIMETRE_KM, `${source}: Pg/P*`);
    expectWithin(crossoverByRays(velocities, thicknesses, 2, 3, 90e3, 300e3), Number(derived.crossover_lower_crust_vs_Pn_km) * 1000, HALF_CENTIMETRE_KM, `${source}: P*/Pn`);
    expectWithin(crossoverByRays(velocities, thicknesses, 1, 3, 90e3, 300e3), Number(derived.crossover_direct_vs_Pn_km) * 1000, HALF_CENTIMETRE_KM, `${source}: Pg/Pn`);
    expectWithin(criticalDistanceByRays(velocities, thicknesses, 3) ?? Number.NaN, Number(derived.critical_distance_Pn_km) * 1000, HALF_CENTIMETRE_KM, `${source}: Pn critical distance`);
  });

  it('a 10 m scan to 300 km shows the lower crust never first on iasp91', () => {
    const seen = branchesSeen(scanFirstArrivals(velocities, thicknesses, 300e3, 10));
    expect([...seen.keys()]).toEqual([1, 3]);
    expect(derived.lower_crust_ever_first_arrival).toBe(false);
  });

  it('interceptTimeDepths reads the Moho at 31.37 km from Pg and Pn alone, and hiddenLayerWarnings covers the true 15 km lower crust at 6.5 km/s', () => {
    const read = interceptTimeDepths(seenBranches(velocities, thicknesses, [1, 3]));
    expectWithin(read.depths[0] ?? Number.NaN, Number(derived.moho_depth_from_Pg_and_Pn_alone_km) * 1000, ONE_UNIT_2DP_KM, `${source}: Moho read`);
    const interpreted = { velocities: [5800, 8040], thicknesses: read.thicknesses };
    const assessment = assessHiddenLayer(interpreted, 1, 6500);
    // Measured: 16 840 m ≥ the true 15 km; with it present the Moho is at 35.445 km ≥ the true 35 km.
    expect(assessment.maxHiddenThickness).toBeGreaterThanOrEqual(15000);
    expect(assessment.depthIfPresent).toBeGreaterThanOrEqual(35000);
    expectWithin(assessment.maxHiddenThickness, 16840, 1, 'iasp91 reading: consistent bound at 6.5 km/s, computed here by this check (value [O])');
    // The true model (20 km over 15 km of 6.5 km/s) lies inside the family the bound describes.
    const trueRatio = vertical(6500, 8040) / vertical(5800, 8040);
    expectRelative((read.thicknesses[0] ?? Number.NaN) - trueRatio * 15000, 20000, 1e-9, 'h_a′ = h_a − r·h_m reproduces the true 20 km upper crust');
    // With the true upper crust known, the METHODS §9 formula itself allows 18.1 km ≥ 15 km.
    expect(maxHiddenThickness({ velocities: [5800, 8040], thicknesses: [20000] }, 6500)).toBeGreaterThanOrEqual(15000);

    const [warning, ...others] = hiddenLayerWarnings(FORWARD, interpreted, [6500]);
    expect(others).toEqual([]);
    expect(warning).toMatchObject({ code: 'hidden-layer-possible', level: 'caution', shot: 'S1', side: 'forward', layer: 2 });
    expect(Object.keys(warning?.details ?? {}).sort()).toEqual(['depthErrorIfPresent', 'depthIfPresent', 'intermediateVelocity', 'interpretedDepth', 'maxHiddenThickness']);
    expect(warning?.details?.maxHiddenThickness).toBe(assessment.maxHiddenThickness);
    expect(warning?.details?.depthErrorIfPresent).toBe(assessment.depthErrorIfPresent);
    expect(warning?.message).toMatch(/^shot S1, forward side: a layer of about 6500\u00a0m\/s between layer 1 .* and layer 2 .* too shallow/);
  });
});

describe('hiddenLayerWarnings', () => {
  it('hiddenLayerWarnings gives one caution per adjacent pair with the default √(V_a·V_b)', () => {
    const warnings = hiddenLayerWarnings({ shot: 'S2', side: 'reverse' }, { velocities: [400, 1600, 3600], thicknesses: [4, 10] });
    expect(warnings.map((warning) => warning.layer)).toEqual([2, 3]);
    expect(warnings.map((warning) => warning.details?.intermediateVelocity)).toEqual([800, Math.sqrt(1600 * 3600)]);
    expect(warnings.every((warning) => warning.level === 'caution' && warning.side === 'reverse')).toBe(true);
  });

  it('hiddenLayerWarnings gives none for a one-layer model or an upper layer of zero thickness', () => {
    expect(hiddenLayerWarnings(FORWARD, { velocities: [400], thicknesses: [] })).toEqual([]);
    expect(hiddenLayerWarnings(FORWARD, { velocities: [400, 3000], thicknesses: [0] })).toEqual([]);
  });
});
