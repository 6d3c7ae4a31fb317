import { describe, expect, it } from 'vitest';
import { delayToDepth, planeLayerOptimumXY, verticalSlowness, type Estimate, type Overburden } from '../../lib/depth/delay-depth.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';

const CASE_62 = 'METHODS.md check case 6.2 (computed from the stated model, not a published value)';
/** Half a unit in the last digit METHODS prints (4 decimals of m/s and m, 5 of ms). */
const HALF_4DP = 0.5e-4;
const HALF_3DP = 0.5e-3;
/** Central differences at a relative step of 1e-6 match an exact first derivative to about 1e-8 relative; 1e-6 leaves room. */
const DIFFERENCE_RELATIVE = 1e-6;
const STEP = 1e-6;

const exact = (value: number): Estimate => ({ value, standardError: 0 });
const oneLayer = (velocity: number, standardError = 0): Overburden => ({ velocities: [{ value: velocity, standardError }], upperThicknesses: [] });

function converted(delay: Estimate, overburden: Overburden, refractor: Estimate) {
  const result = delayToDepth(delay, overburden, refractor);
  if (!result.ok) throw new Error(`delayToDepth refused: ${result.message}`);
  return result;
}

describe('verticalSlowness', () => {
  it('verticalSlowness of 500 over 2500 m/s is 1/DCF = 1/510.3104 m/s (METHODS 6.2) and cos θ/V_1 (METHODS §0)', () => {
    const slowness = verticalSlowness(500, 2500);
    expectWithin(1 / slowness, 510.3104, HALF_4DP, `${CASE_62}: DCF`);
    expectRelative(slowness, Math.cos(Math.asin(500 / 2500)) / 500, 1e-14, 'METHODS.md §0: q = cos θ/V_i, sin θ = V_i/V_n');
  });

  it('verticalSlowness is 0 at grazing incidence (equal velocities) and throws for a slower refractor', () => {
    expect(verticalSlowness(800, 800)).toBe(0);
    expect(() => verticalSlowness(800, 700)).toThrow(/slower than the layer above/);
    expect(() => verticalSlowness(0, 700)).toThrow(/positive finite velocity/);
  });
});

describe('delayToDepth: METHODS.md check case 6.2', () => {
  it('delayToDepth turns t_G = 19.59592 ms over 500/2500 m/s into h = 10.000 m with DCF 510.3104 m/s', () => {
    const result = converted(exact(19.59592e-3), oneLayer(500), exact(2500));
    expectWithin(result.thickness.value, 10.0, HALF_3DP, `${CASE_62}: h`);
    expectWithin(result.depth.value, 10.0, HALF_3DP, `${CASE_62}: depth`);
    expectWithin(result.depthConversionFactor.value, 510.3104, HALF_4DP, `${CASE_62}: DCF`);
  });

  it('delayToDepth strips 3 m of 400 m/s from t_G = 12.77937 ms over 1200/3000 m/s: 7 m of layer 2, refractor at 10 m', () => {
    const overburden: Overburden = { velocities: [exact(400), exact(1200)], upperThicknesses: [exact(3)] };
    const result = converted(exact(12.77937e-3), overburden, exact(3000));
    // t_G is printed to 5 decimals of ms (±5e-9 s); times the DCF of layer 2 (1309 m/s) that is ±7e-6 m.
    expectWithin(result.thickness.value, 7.0, 1e-5, `${CASE_62}: thickness of the 1200 m/s layer`);
    expectWithin(result.depth.value, 10.0, 1e-5, `${CASE_62}: depth to the 3000 m/s refractor`);
  });
});

describe('delayToDepth: standard errors against central finite differences', () => {
  // Three layers: every kind of input has a non-zero SE.
  const delay: Estimate = { value: 0.013, standardError: 0.4e-3 };
  const velocities: Estimate[] = [
    { value: 420, standardError: 12 },
    { value: 1150, standardError: 40 },
  ];
  const upper: Estimate[] = [{ value: 2.8, standardError: 0.3 }];
  const refractor: Estimate = { value: 3100, standardError: 90 };
  const depthOf = (d: number, v1: number, v2: number, h1: number, vn: number, options = {}) => {
    const result = delayToDepth({ value: d, standardError: 0 }, { velocities: [exact(v1), exact(v2)], upperThicknesses: [exact(h1)] }, exact(vn), options);
    if (!result.ok) throw new Error(result.message);
    return { depth: result.depth.value, thickness: result.thickness.value };
  };
  const central = (f: (scale: number) => { depth: number; thickness: number }, value: number) => {
    const step = STEP * value;
    const up = f(1 + STEP);
    const down = f(1 - STEP);
    return { depth: (up.depth - down.depth) / (2 * step), thickness: (up.thickness - down.thickness) / (2 * step) };
  };
  const [v1, v2] = [velocities[0]!, velocities[1]!];
  const h1 = upper[0]!;
  const derivatives = [
    { se: delay.standardError, d: central((s) => depthOf(delay.value * s, v1.value, v2.value, h1.value, refractor.value), delay.value) },
    { se: v1.standardError, d: central((s) => depthOf(delay.value, v1.value * s, v2.value, h1.value, refractor.value), v1.value) },
    { se: v2.standardError, d: central((s) => depthOf(delay.value, v1.value, v2.value * s, h1.value, refractor.value), v2.value) },
    { se: h1.standardError, d: central((s) => depthOf(delay.value, v1.value, v2.value, h1.value * s, refractor.value), h1.value) },
    { se: refractor.standardError, d: central((s) => depthOf(delay.value, v1.value, v2.value, h1.value, refractor.value * s), refractor.value) },
  ];

  it('delayToDepth gives the thickness and depth SEs of √Σ(∂/∂input · SE)² with derivatives by finite differences', () => {
    const result = converted(delay, { velocities, upperThicknesses: upper }, refractor);
    const expected = (key: 'depth' | 'thickness') => Math.sqrt(derivatives.reduce((sum, { se, d }) => sum + (d[key] * se) ** 2, 0));
    expectRelative(result.thickness.standardError, expected('thickness'), DIFFERENCE_RELATIVE, 'JCGM 100:2008 §5.1 (delta method), derivatives by central differences');
    expectRelative(result.depth.standardError, expected('depth'), DIFFERENCE_RELATIVE, 'JCGM 100:2008 §5.1 (delta method), derivatives by central differences');
  });

  it('delayToDepth carries the delay’s own dependence on V_n (delayRefractorVelocityDerivative) into the V_n sensitivity', () => {
    // A delay that itself depends on V_n, as the GRM time-depth does: delay(V_n) = c − XY/(2·V_n).
    const xy = 6;
    const base = delay.value + xy / (2 * refractor.value);
    const delayAt = (vn: number) => base - xy / (2 * vn);
    const derivative = xy / (2 * refractor.value ** 2);
    const composite = central((s) => depthOf(delayAt(refractor.value * s), v1.value, v2.value, h1.value, refractor.value * s), refractor.value);
    const result = delayToDepth({ value: delayAt(refractor.value), standardError: 0 }, { velocities: velocities.map((v) => exact(v.value)), upperThicknesses: [exact(h1.value)] }, refractor, {
      delayRefractorVelocityDerivative: derivative,
    });
    if (!result.ok) throw new Error(result.message);
    expectRelative(result.depthSensitivities.refractorVelocity, composite.depth, DIFFERENCE_RELATIVE, 'total derivative of depth(delay(V_n), V_n) by central differences');
    expectRelative(result.depth.standardError, Math.abs(composite.depth) * refractor.standardError, DIFFERENCE_RELATIVE, 'delta method with the total V_n derivative');
  });

  it('delayToDepth gives the DCF SE from V_{n−1} and V_n by the delta method', () => {
    const dcf = (v: number, vn: number) => (v * vn) / Math.sqrt(vn * vn - v * v);
    const byLayer = (dcf(v2.value * (1 + STEP), refractor.value) - dcf(v2.value * (1 - STEP), refractor.value)) / (2 * STEP * v2.value);
    const byRefractor = (dcf(v2.value, refractor.value * (1 + STEP)) - dcf(v2.value, refractor.value * (1 - STEP))) / (2 * STEP * refractor.value);
    const result = converted(delay, { velocities, upperThicknesses: upper }, refractor);
    expectRelative(result.depthConversionFactor.standardError, Math.hypot(byLayer * v2.standardError, byRefractor * refractor.standardError), DIFFERENCE_RELATIVE, 'METHODS.md §6 DCF, derivatives by central differences');
  });
});

describe('delayToDepth: edges', () => {
  it('delayToDepth refuses with no-head-wave when V_n is not faster than every overburden layer (equal included)', () => {
    for (const refractor of [1200, 1100]) {
      const result = delayToDepth(exact(0.01), { velocities: [exact(400), exact(1200)], upperThicknesses: [exact(3)] }, exact(refractor));
      expect(result.ok).toBe(false);
      if (!result.ok) {
        expect(result.code).toBe('no-head-wave');
        expect(result.message).toMatch(/layer 2/);
      }
    }
  });

  it('delayToDepth refuses with delay-below-upper-layers for a negative delay and for a delay the upper layers use up', () => {
    const negative = delayToDepth(exact(-1e-4), oneLayer(500), exact(2500));
    expect(negative.ok === false && negative.code).toBe('delay-below-upper-layers');
    // 3 m of 400 m/s over 3000 m/s take 3·q = 7.43 ms; 7 ms is not enough.
    const usedUp = delayToDepth(exact(7e-3), { velocities: [exact(400), exact(1200)], upperThicknesses: [exact(3)] }, exact(3000));
    expect(usedUp.ok === false && usedUp.code).toBe('delay-below-upper-layers');
    expect(usedUp.ok === false && usedUp.message).toMatch(/negative thickness/);
  });

  it('delayToDepth gives a layer of zero thickness when the delay is exactly what the upper layers take', () => {
    const taken = 3 * verticalSlowness(400, 3000);
    const result = converted(exact(taken), { velocities: [exact(400), exact(1200)], upperThicknesses: [exact(3)] }, exact(3000));
    expectWithin(result.thickness.value, 0, 1e-12, 'common practice: a pinched-out layer');
    expectWithin(result.depth.value, 3, 1e-12, 'common practice: a pinched-out layer');
  });

  it('delayToDepth throws for misuse: no velocities, a wrong number of upper thicknesses, a negative SE, a non-finite delay', () => {
    expect(() => delayToDepth(exact(0.01), { velocities: [], upperThicknesses: [] }, exact(2500))).toThrow(/at least one layer velocity/);
    expect(() => delayToDepth(exact(0.01), { velocities: [exact(500)], upperThicknesses: [exact(1)] }, exact(2500))).toThrow(/need 0 upper thicknesses/);
    expect(() => delayToDepth({ value: 0.01, standardError: -1 }, oneLayer(500), exact(2500))).toThrow(/must not be negative/);
    expect(() => delayToDepth(exact(Number.NaN), oneLayer(500), exact(2500))).toThrow(/finite/);
  });
});

describe('planeLayerOptimumXY', () => {
  it('planeLayerOptimumXY gives 4.0825 m for 10 m of 500 over 2500 m/s and 6.9173 m for 3 m of 400 + 7 m of 1200 over 3000 m/s', () => {
    expectWithin(planeLayerOptimumXY([10], [500], 2500), 4.0825, HALF_4DP, `${CASE_62}: XY_opt, one layer`);
    expectWithin(planeLayerOptimumXY([3, 7], [400, 1200], 3000), 6.9173, HALF_4DP, `${CASE_62}: XY_opt, two layers`);
  });

  it('planeLayerOptimumXY is 0 for no layers and throws when a layer is not slower than the refractor', () => {
    expect(planeLayerOptimumXY([], [], 2500)).toBe(0);
    expect(() => planeLayerOptimumXY([3], [3000], 3000)).toThrow(/must exceed/);
    expect(() => planeLayerOptimumXY([3, 4], [400], 3000)).toThrow(/as many thicknesses/);
  });
});
