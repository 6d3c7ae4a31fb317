/**
 * A hidden layer in a published Earth model: the iasp91 crust (Kennett & Engdahl 1991; fixture
 * tests/fixtures/earth-models/iasp91-crust.json) has a 6.5 km/s lower crust between 20 and 35 km
 * that is never a first arrival. Travel times are built by explicit ray geometry through the
 * model's plane layers (tests/oracles/ray-geometry.ts), with seeded noise, on a reversed 300 km
 * profile.
 *
 * From first arrivals alone the interpretation must raise the hidden-layer caution and read the
 * two-layer Moho at about 31.4 km (31.375 km, computed from the model by the fixture's route; not a
 * published figure). With the later lower-crust head wave supplied as a user-assigned branch, it
 * must recover the layer velocities within 1 % and the Moho within 1 km.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { readPickTable } from '../../lib/picks/index.js';
import { interpret } from '../../lib/interpret.js';
import { branchTimeByRays, firstArrivalByRays, criticalDistanceByRays } from '../oracles/ray-geometry.js';
import { seededNormal } from '../../lib/random.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';
import { range } from '../helpers/synthetic-survey.js';

interface EarthModelFixture {
  layers: { top_km: number; bottom_km?: number; vp: number }[];
}

const fixture = JSON.parse(readFileSync('tests/fixtures/earth-models/iasp91-crust.json', 'utf8')) as EarthModelFixture;
const VELOCITIES = fixture.layers.map((layer) => layer.vp * 1000);
const THICKNESSES = fixture.layers.slice(0, -1).map((layer) => ((layer.bottom_km ?? Number.NaN) - layer.top_km) * 1000);
const MOHO = THICKNESSES.reduce((sum, thickness) => sum + thickness, 0);
/** Two-layer Moho read from Pg and Pn alone, computed from the model (fixture README): 31.3751 km. */
const TWO_LAYER_MOHO_KM = 31.3751;
/** Pick noise 20 ms, typical of explosion records read at crustal scale (common practice). */
const NOISE_S = 0.02;
/** Acceptance: velocities within 1 %, Moho within 1 km. */
const VELOCITY_TOLERANCE = 0.01;
const MOHO_TOLERANCE_KM = 1;
/** Noise moves the two-layer reading by ~0.1 km here; 0.5 km still tells 31.4 from 35. */
const TWO_LAYER_TOLERANCE_KM = 0.5;

const SHOTS_KM = [0, 300];
const STATIONS_KM = range(61, 0, 5);

function pickTable(withLowerCrustBranch: boolean): string {
  const noise = seededNormal(1991);
  const rows = ['shot,source_x_km,receiver_x_km,time_s,sigma_s' + (withLowerCrustBranch ? ',branch' : '')];
  const lowerCrustStart = criticalDistanceByRays(VELOCITIES, THICKNESSES, 2) ?? Number.POSITIVE_INFINITY;
  SHOTS_KM.forEach((shotKm, shotIndex) => {
    for (const stationKm of STATIONS_KM) {
      const offset = Math.abs(stationKm - shotKm) * 1000;
      if (offset === 0) continue;
      const first = firstArrivalByRays(VELOCITIES, THICKNESSES, offset);
      const label = first.branch === 1 ? 1 : 3;
      const cells = [`X${shotIndex + 1}`, String(shotKm), String(stationKm), (first.time + NOISE_S * noise()).toFixed(4), String(NOISE_S)];
      rows.push((withLowerCrustBranch ? [...cells, String(label)] : cells).join(','));
      if (withLowerCrustBranch && offset > lowerCrustStart + 5000) {
        const later = branchTimeByRays(VELOCITIES, THICKNESSES, 2, offset);
        if (later !== null) {
          rows.push([`X${shotIndex + 1}`, String(shotKm), String(stationKm), (later + NOISE_S * noise()).toFixed(4), String(NOISE_S), '2'].join(','));
        }
      }
    }
  });
  return `${rows.join('\n')}\n`;
}

function interpretTable(csv: string) {
  const outcome = readPickTable(csv);
  if (!outcome.ok) throw new Error(`iasp91 table refused: ${JSON.stringify(outcome.problems.slice(0, 3))}`);
  return interpret(outcome.value);
}

describe('iasp91 crust: a hidden layer in a published model (Kennett & Engdahl 1991)', () => {
  it('the lower crust is never a first arrival on this profile (ray geometry)', () => {
    for (let offset = 1000; offset <= 300_000; offset += 1000) {
      expect(firstArrivalByRays(VELOCITIES, THICKNESSES, offset).branch).not.toBe(2);
    }
  });

  it('from first arrivals alone: two layers, the hidden-layer caution, and a Moho at about 31.4 km', () => {
    const result = interpretTable(pickTable(false));
    expect(result.units.scale).toBe('crustal');
    expect(result.layers.length).toBe(2);
    expectRelative(result.layers[0]!.velocity, 5.8, VELOCITY_TOLERANCE, 'iasp91 upper crust Vp 5.80 km/s');
    expectRelative(result.layers[1]!.velocity, 8.04, VELOCITY_TOLERANCE, 'iasp91 Vp 8.04 km/s below the Moho');
    expectWithin(result.layers[1]!.depthToTop, TWO_LAYER_MOHO_KM, TWO_LAYER_TOLERANCE_KM, 'two-layer Moho computed from iasp91');
    const hidden = result.warnings.filter((warning) => warning.code === 'hidden-layer-possible');
    expect(hidden.length).toBeGreaterThan(0);
    expect(hidden[0]!.level).toBe('caution');
    expect(hidden[0]!.layer).toBe(2);
    // The bound the warning states covers the real lower crust's effect: with the hidden layer at
    // its largest (default V_m = √(5.8·8.04) km/s) the Moho would lie at or below the true 35 km.
    const depthIfPresent = Number(hidden[0]!.details?.depthIfPresent);
    expect(depthIfPresent).toBeGreaterThanOrEqual(MOHO);
    expect(hidden[0]!.message).toMatch(/km/);
    expect(hidden[0]!.message).toMatch(/too shallow/);
  });

  it('with the later lower-crust branch assigned by hand: three layers, velocities within 1 %, Moho within 1 km', () => {
    const result = interpretTable(pickTable(true));
    expect(result.layers.length).toBe(3);
    VELOCITIES.forEach((velocity, k) => {
      expectRelative(result.layers[k]!.velocity, velocity / 1000, VELOCITY_TOLERANCE, `iasp91 layer ${k + 1} Vp ${velocity / 1000} km/s`);
    });
    expectWithin(result.layers[1]!.depthToTop, THICKNESSES[0]! / 1000, MOHO_TOLERANCE_KM, 'iasp91 upper/lower crust boundary at 20 km');
    expectWithin(result.layers[2]!.depthToTop, MOHO / 1000, MOHO_TOLERANCE_KM, 'iasp91 Moho at 35 km');
  });
});
