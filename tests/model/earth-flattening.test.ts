import { describe, expect, it } from 'vitest';
import {
  EARTH_MEAN_RADIUS,
  flattenDepth,
  flattenedDistance,
  flattenVelocity,
  unflattenDepth,
  unflattenLayers,
  unflattenVelocity,
} from '../../lib/model/index.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';

const METHODS_10_2 = 'METHODS.md §10 / check case 10.2 (computed from the stated model, not a published value)';
/** METHODS prints z_f = 35.0965 km and v_f = 8.0844 km/s: half a unit in the last digit. */
const HALF_4DP_KM = 0.05; // m
const HALF_4DP_KMS = 0.05; // m/s
/** Round trips go through exp and log1p once each: a few ulps, 1e-12 relative is generous. */
const ROUND_TRIP = 1e-12;

describe('earth flattening: METHODS.md §10 values', () => {
  it('flattenDepth maps the Moho at 35 km to z_f = 35.0965 km (R = 6371.0088 km and R = 6371 km alike)', () => {
    expectWithin(flattenDepth(35_000), 35_096.5, HALF_4DP_KM, `${METHODS_10_2}: z_f(35 km), R = 6371.0088 km`);
    expectWithin(flattenDepth(35_000, 6_371_000), 35_096.5, HALF_4DP_KM, `${METHODS_10_2}: z_f(35 km), R = 6371 km`);
  });

  it('flattenVelocity maps 8.04 km/s at 35 km to 8.0844 km/s', () => {
    expectWithin(flattenVelocity(8040, 35_000), 8084.4, HALF_4DP_KMS, `${METHODS_10_2}: v_f(8.04 km/s at 35 km)`);
  });

  it('EARTH_MEAN_RADIUS is 6371.0088 km (GRS80 mean radius, Moritz2000; METHODS §10)', () => {
    expect(EARTH_MEAN_RADIUS).toBe(6_371_008.8);
    expect(flattenDepth(35_000)).toBe(flattenDepth(35_000, 6_371_008.8));
  });
});

describe('earth flattening: closed forms', () => {
  it('flattenDepth follows the series −R·ln(1 − z/R) = z + z²/2R + z³/3R² + z⁴/4R³ + … at crustal depths', () => {
    const radius = EARTH_MEAN_RADIUS;
    for (const depth of [1000, 10_000, 35_000, 100_000]) {
      const ratio = depth / radius;
      const series = depth * (1 + ratio / 2 + ratio ** 2 / 3 + ratio ** 3 / 4);
      // The next term z·(z/R)⁴/5 bounds the truncation error (all terms positive, ratios < 1/60).
      const truncation = 2 * depth * ratio ** 4 / 5;
      expectWithin(flattenDepth(depth), series, truncation + 1e-9, `Taylor series of −R·ln(1 − z/R) at ${depth} m`);
    }
  });

  it('flattenDepth keeps its digits for shallow points (log1p): 1 m flattens to 1 + 1/(2R) + 1/(3R²) m', () => {
    const expected = 1 + 1 / (2 * EARTH_MEAN_RADIUS) + 1 / (3 * EARTH_MEAN_RADIUS ** 2);
    // log(R/(R − 1)) computed naively carries ~1e-10 m of rounding; log1p is exact to an ulp (2e-16 m).
    expectWithin(flattenDepth(1), expected, 1e-14, 'series of −R·ln(1 − z/R) at z = 1 m');
  });

  it('flattenVelocity is v·R/r and unflattenVelocity is v_f·exp(−z_f/R), its inverse', () => {
    const radius = EARTH_MEAN_RADIUS;
    for (const depth of [0, 5_000, 35_000, 410_000, 2_891_000]) {
      const flatVelocity = flattenVelocity(8000, depth);
      expectRelative(flatVelocity, (8000 * radius) / (radius - depth), ROUND_TRIP, `v·R/r at ${depth} m`);
      expectRelative(unflattenVelocity(flatVelocity, flattenDepth(depth)), 8000, ROUND_TRIP, `round trip of the velocity at ${depth} m`);
    }
  });

  it('unflattenDepth inverts flattenDepth from the surface to near the centre', () => {
    for (const depth of [1, 35_000, 660_000, 2_891_000, 6_000_000]) {
      expectRelative(unflattenDepth(flattenDepth(depth)), depth, ROUND_TRIP, `round trip of the depth ${depth} m`);
    }
    // z_f → ∞ is the centre: at z_f = 1e8 m the point is R·exp(−15.7) ≈ 0.96 m from it.
    expectWithin(unflattenDepth(1e8), EARTH_MEAN_RADIUS * (1 - Math.exp(-1e8 / EARTH_MEAN_RADIUS)), 1e-6, 'R·(1 − exp(−z_f/R)) near the centre');
    expect(unflattenDepth(1e8)).toBeLessThan(EARTH_MEAN_RADIUS);
  });

  it('flattenedDistance is R·Δ, the arc length along the surface', () => {
    expect(flattenedDistance(0.1)).toBe(EARTH_MEAN_RADIUS * 0.1);
    expect(flattenedDistance(Math.PI, 6_371_000)).toBe(6_371_000 * Math.PI);
    expect(flattenedDistance(0)).toBe(0);
  });

  it('depth 0 maps to z_f = 0 and leaves velocities unchanged, both ways', () => {
    expect(flattenDepth(0)).toBe(0);
    expect(unflattenDepth(0)).toBe(0);
    expect(flattenVelocity(6300, 0)).toBe(6300);
    expect(unflattenVelocity(6300, 0)).toBe(6300);
  });
});

describe('unflattenLayers: a flat stack mapped back into the sphere', () => {
  it('maps METHODS 10.2 flattened (Moho at z_f = 35.0965 km, v_f = 8.0844 km/s) back to 35 km and 8.04 km/s', () => {
    const flatMoho = flattenDepth(35_000);
    const layers = unflattenLayers({ velocities: [6300, flattenVelocity(8040, 35_000)], thicknesses: [flatMoho] });
    const [crust, mantle] = layers;
    expect(layers).toHaveLength(2);
    expectWithin(mantle?.topDepth, 35_000, 1e-6, `${METHODS_10_2}: Moho depth after the round trip`);
    expectWithin(mantle?.topVelocity, 8040, 1e-9, `${METHODS_10_2}: mantle velocity after the round trip`);
    expect(mantle?.bottomDepth).toBeNull();
    expect(mantle?.bottomVelocity).toBeNull();
    expect(mantle?.thickness).toBeNull();
    expect(mantle?.flatBottom).toBeNull();
    // A constant flat layer is a shell slowing with depth: 6.3 km/s at the top, 6.3·r/R at the bottom.
    expect(crust?.topVelocity).toBe(6300);
    expectRelative(crust?.bottomVelocity, (6300 * (EARTH_MEAN_RADIUS - 35_000)) / EARTH_MEAN_RADIUS, ROUND_TRIP, 'v_f·r/R at the Moho');
    expectWithin(crust?.thickness, 35_000, 1e-6, 'shell thickness = bottom − top depth');
    expect(crust?.thickness ?? Number.POSITIVE_INFINITY).toBeLessThan(flatMoho);
    expect(crust?.flatBottom).toBe(flatMoho);
    expect(mantle?.flatTop).toBe(flatMoho);
  });

  it('accumulates thicknesses: each layer starts where the one above ends, in flat and in spherical depth', () => {
    const layers = unflattenLayers({ velocities: [5800, 6500, 8040], thicknesses: [20_000, 15_000] }, 6_371_000);
    expect(layers.map((layer) => layer.layer)).toEqual([1, 2, 3]);
    expect(layers[1]?.flatTop).toBe(20_000);
    expect(layers[2]?.flatTop).toBe(35_000);
    expect(layers[1]?.topDepth).toBe(layers[0]?.bottomDepth);
    expect(layers[2]?.topDepth).toBe(layers[1]?.bottomDepth);
    expectRelative(layers[2]?.topDepth, unflattenDepth(35_000, 6_371_000), ROUND_TRIP, 'R·(1 − exp(−z_f/R)) of the deepest interface');
  });

  it('gives one layer with top 0 for a half-space alone, and a layer with top = bottom for a zero thickness', () => {
    const alone = unflattenLayers({ velocities: [8000], thicknesses: [] });
    expect(alone).toHaveLength(1);
    expect(alone[0]?.topDepth).toBe(0);
    expect(alone[0]?.topVelocity).toBe(8000);
    const zero = unflattenLayers({ velocities: [6000, 7000, 8000], thicknesses: [10_000, 0] });
    expect(zero[1]?.thickness).toBe(0);
    expect(zero[1]?.topDepth).toBe(zero[1]?.bottomDepth);
  });
});

describe('earth flattening: misuse throws with the field and the fix', () => {
  it('flattenDepth refuses depths below 0, at or beyond the centre, and a bad radius', () => {
    expect(() => flattenDepth(-1)).toThrow(/depth must be zero or positive/);
    expect(() => flattenDepth(Number.NaN)).toThrow(/depth must be zero or positive/);
    expect(() => flattenDepth(EARTH_MEAN_RADIUS)).toThrow(/reaches the centre.*give a depth below the radius/);
    expect(() => flattenDepth(10, 0)).toThrow(/radius must be positive and finite/);
    expect(() => flattenVelocity(8000, 10, Number.POSITIVE_INFINITY)).toThrow(/radius must be positive and finite/);
  });

  it('velocity functions refuse a velocity not positive and finite', () => {
    expect(() => flattenVelocity(0, 10)).toThrow(/velocity must be positive and finite/);
    expect(() => flattenVelocity(8000, EARTH_MEAN_RADIUS + 1)).toThrow(/reaches the centre/);
    expect(() => unflattenVelocity(-1, 10)).toThrow(/flattened velocity must be positive and finite/);
  });

  it('inverse functions refuse a flattened depth negative or not finite', () => {
    expect(() => unflattenDepth(-1)).toThrow(/flattened depth must be zero or positive/);
    expect(() => unflattenDepth(Number.POSITIVE_INFINITY)).toThrow(/flattened depth must be zero or positive/);
    expect(() => unflattenVelocity(8000, -5)).toThrow(/flattened depth must be zero or positive/);
  });

  it('flattenedDistance refuses an angle outside [0, π]', () => {
    expect(() => flattenedDistance(-0.1)).toThrow(/within \[0, π\]/);
    expect(() => flattenedDistance(Math.PI + 1e-9)).toThrow(/shorter great-circle arc/);
  });

  it('unflattenLayers refuses a bad stack', () => {
    expect(() => unflattenLayers({ velocities: [], thicknesses: [] })).toThrow(/at least one velocity/);
    expect(() => unflattenLayers({ velocities: [6000, 8000], thicknesses: [] })).toThrow(/2 velocities need 1 thicknesses/);
    expect(() => unflattenLayers({ velocities: [6000, 8000], thicknesses: [-1] })).toThrow(/thickness of layer 1 must be zero or positive/);
    expect(() => unflattenLayers({ velocities: [6000, 0], thicknesses: [1000] })).toThrow(/flattened velocity of layer 2 must be positive/);
    expect(() => unflattenLayers({ velocities: [8000], thicknesses: [] }, -1)).toThrow(/radius must be positive/);
  });
});
