/**
 * Earth curvature on a 600 km crustal profile, through the whole pipeline.
 *
 * Data: first arrivals in a sphere of constant-velocity shells, H = 35 km, V_c = 6.3 km/s,
 * V_m = 8.0 km/s, R = 6371 km — the check case 10.2 of the project's formula reference (values
 * computed from the stated model by exact straight-chord rays, not published figures). The
 * generator (lib/model/spherical-earth.ts) is first held to those five Pn times, which
 * tests/model/spherical-earth.test.ts also checks against scipy's Fermat minimisation, so the data
 * do not rest on the code under test alone. Picks carry seeded Gaussian noise of 50 ms (common
 * practice for explosion records read at crustal scale).
 *
 * Acceptance (issue): the curvature-corrected interpretation recovers the Moho within 1 km (and Pn
 * within 0.5 %); the flat-earth one is reported as biased by the amount the tool predicts.
 */
import { describe, expect, it } from 'vitest';
import { readPickTable } from '../../lib/picks/index.js';
import { interpret, type InterpretOptions } from '../../lib/interpret.js';
import { InterpretationSchema } from '../../lib/interpretation/shape.js';
import { sphericalBranchTime, sphericalFirstArrival } from '../../lib/model/spherical-earth.js';
import { seededNormal } from '../../lib/random.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';

const MODEL = { velocities: [6300, 8000], thicknesses: [35_000], radius: 6_371_000 };
/** Check case 10.2: Pn at these arcs (km) takes these times (s), computed from the model. */
const CHECK_10_2: readonly [number, number][] = [[150, 25.5255], [200, 31.741], [300, 44.1714], [400, 56.6], [600, 81.4495]];
const NOISE_S = 0.05;

function table(maxKm: number, stepKm: number, seed: number): string {
  const normal = seededNormal(seed);
  const rows = ['shot,source_x_km,receiver_x_km,time_s,sigma_s'];
  for (const [id, sourceKm] of [['W', 0], ['E', maxKm]] as const) {
    for (let km = 0; km <= maxKm; km += stepKm) {
      const offset = Math.abs(km - sourceKm) * 1000;
      if (offset === 0) continue;
      rows.push(`${id},${sourceKm},${km},${(sphericalFirstArrival(MODEL, offset)!.time + NOISE_S * normal()).toFixed(3)},${NOISE_S}`);
    }
  }
  return rows.join('\n');
}

function run(csv: string, options: InterpretOptions = {}) {
  const outcome = readPickTable(csv);
  if (!outcome.ok) throw new Error(outcome.problems.map((problem) => problem.message).join('; '));
  return InterpretationSchema.parse(interpret(outcome.value, options));
}

describe('earth curvature on a 600 km profile (check case 10.2 model)', () => {
  it('the generator gives the check case\'s Pn times to 0.1 ms', () => {
    for (const [km, seconds] of CHECK_10_2) expectWithin(sphericalBranchTime(MODEL, 2, km * 1000)!, seconds, 1e-4, `Pn at ${km} km`);
  });

  const long = table(600, 5, 102);

  it('auto: the offsets pass the flat-earth limit, the layers are refit in a sphere, Moho within 1 km and Pn within 0.5 %', () => {
    const result = run(long);
    const curvature = result.earthCurvature!;
    expect(curvature.choice).toBe('auto');
    expect(curvature.applied).toBe(true);
    expect(curvature.maxOffset).toBe(600);
    // Flat-earth lateness of Pn at 150 km is 0.072 s (check case 10.2), beyond σ = 0.05 s: the limit lies short of 150 km.
    expect(curvature.flatErrorOffset!).toBeLessThan(150);
    expect(curvature.flatErrorOffset!).toBeGreaterThan(60);
    expectWithin(curvature.flatErrorAtMaxOffset!, 0.398, 0.01, 'flat-earth lateness at 600 km (check case 10.2: 0.398 s)');
    const [crust, mantle] = curvature.sphericalLayers;
    expectWithin(mantle!.depthToTop, 35, 1, 'Moho 35 km (acceptance: within 1 km)');
    expectRelative(mantle!.velocity, 8.0, 0.005, 'Pn 8.0 km/s (acceptance: within 0.5 %)');
    expectRelative(crust!.velocity, 6.3, 0.005, 'crust 6.3 km/s');
    expect(mantle!.phase).toBe('Pn');
    // Honest SEs: the truth within 3 SE.
    expect(Math.abs(mantle!.depthToTop - 35)).toBeLessThan(3 * mantle!.depthToTopSE!);
    const applied = result.warnings.find((warning) => warning.code === 'earth-curvature-applied');
    expect(applied?.message).toContain('refit in a sphere');
    expect(result.references.map((entry) => entry.key)).toEqual(expect.arrayContaining(['Muller1971', 'Chapman1973']));
  });

  it('flat: the flat reading stands, carries the bias the tool predicts, and is warned about', () => {
    const result = run(long, { earthModel: 'flat' });
    const curvature = result.earthCurvature!;
    expect(curvature.applied).toBe(false);
    const flatPn = result.layers[1]!;
    // A flat fit of the 10.2 times over 200–600 km reads 8.0468 km/s and 34.882 km (check case 10.2): biased fast.
    expect(flatPn.velocity).toBeGreaterThan(8.0 * 1.004);
    const predicted = curvature.flatBias!;
    // The flat reading minus the truth is the predicted bias (flat − spherical of the fitted sphere), within
    // the noise: 3 SE of the flat velocity and depth.
    expectWithin(flatPn.velocity - 8.0, predicted.velocity[1]!, 3 * flatPn.velocitySE, 'Pn bias, flat − true, against the predicted bias');
    expectWithin(flatPn.depthToTop! - 35, predicted.depth[0]!, 3 * flatPn.depthToTopSE!, 'Moho bias, flat − true, against the predicted bias');
    const warning = result.warnings.find((entry) => entry.code === 'flat-earth-bias');
    expect(warning?.level).toBe('warning');
    expect(warning?.message).toContain('flat − spherical');
    expect(result.warnings.some((entry) => entry.code === 'earth-curvature-applied')).toBe(false);
  });

  it('spherical: forced on a profile where the flat error stays within the picks, the sphere still agrees with the flat reading', () => {
    const shallow = { velocities: [6000, 8000], thicknesses: [10_000], radius: 6_371_000 };
    const normal = seededNormal(11);
    const rows = ['shot,source_x_km,receiver_x_km,time_s,sigma_s'];
    for (const [id, sourceKm] of [['W', 0], ['E', 100]] as const) {
      for (let km = 0; km <= 100; km += 2) {
        const offset = Math.abs(km - sourceKm) * 1000;
        if (offset === 0) continue;
        rows.push(`${id},${sourceKm},${km},${(sphericalFirstArrival(shallow, offset)!.time + NOISE_S * normal()).toFixed(3)},${NOISE_S}`);
      }
    }
    const auto = run(rows.join('\n'));
    expect(auto.earthCurvature!.applied).toBe(false);
    expect(auto.earthCurvature!.reason).toContain('flat earth');
    expect(auto.earthCurvature!.sphericalLayers).toEqual([]);
    const forced = run(rows.join('\n'), { earthModel: 'spherical' });
    expect(forced.earthCurvature!.applied).toBe(true);
    expectWithin(forced.earthCurvature!.sphericalLayers[1]!.depthToTop, auto.layers[1]!.depthToTop!, 2 * auto.layers[1]!.depthToTopSE!, 'sphere and flat agree within 2 SE at 100 km');
  });
});
