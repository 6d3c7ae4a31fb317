/**
 * Near-surface corrections (lib/depth/near-surface-corrections.ts) against:
 * - METHODS.md check cases 8.1 and 8.2 (stated there as computed from the stated model by ray
 *   geometry, not published values);
 * - an independent oracle in this file: head-wave times by Fermat's principle — the travel time
 *   minimised over the two refraction points by golden-section search — for a buried shot, a
 *   surface shot and a raised receiver, so the cos θ relations are checked against paths, not
 *   against themselves;
 * - finite differences for the first-order standard errors (JCGM 100:2008 §5.1).
 */
import { describe, expect, it } from 'vitest';
import {
  buriedShotDirectTime, datumTooLow, headWaveDatumCorrection, upholeCorrection,
} from '../../lib/depth/near-surface-corrections.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';

/** Printed digits of METHODS 8.1/8.2 are 1e-5 ms, i.e. 1e-8 s; half a unit of the last digit. */
const CHECK_CASE_TOLERANCE = 0.5e-8;

/** Minimum of f on [low, high] by golden-section search (f unimodal there), to ~1e-12 of the interval. */
function goldenMinimum(f: (x: number) => number, low: number, high: number): number {
  const ratio = (Math.sqrt(5) - 1) / 2;
  let a = low;
  let b = high;
  for (let step = 0; step < 200; step += 1) {
    const left = b - ratio * (b - a);
    const right = a + ratio * (b - a);
    if (f(left) < f(right)) b = right;
    else a = left;
  }
  return f((a + b) / 2);
}

/**
 * Fermat time of the head wave along a horizontal refractor at depth h (below the surface z = 0)
 * from a source at (0, sourceZ) to a receiver at (x, receiverZ), z positive down, both above the
 * refractor: minimise over the entry point a and the exit point b on the refractor.
 */
function headWaveByFermat(x: number, sourceZ: number, receiverZ: number, h: number, v1: number, v2: number): number {
  const legDown = (a: number) => Math.hypot(a, h - sourceZ) / v1;
  const legUp = (b: number) => Math.hypot(x - b, h - receiverZ) / v1;
  // For a fixed entry a, the best exit b; then the best a (the path is convex in each).
  const best = (a: number) => goldenMinimum((b) => legDown(a) + (b - a) / v2 + legUp(b), a, x);
  return goldenMinimum(best, 0, x);
}

const V1 = 600;
const V2 = 2000;
const H = 10;

describe('upholeCorrection (buried shot)', () => {
  it('turns a buried shot into a surface shot by t_uh·cos θ: METHODS 8.1 to its printed digits, and the Fermat oracle', () => {
    const depth = 2;
    const uphole = depth / V1; // 3.33333 ms
    const correction = upholeCorrection({ upholeTime: uphole, shotDepth: depth, refractorVelocity: V2 });
    if (!correction.ok) throw new Error(correction.message);
    expectWithin(correction.time, 3.1798e-3, CHECK_CASE_TOLERANCE, 'METHODS 8.1: difference 3.17980 ms');
    expectWithin(correction.cosine, 0.953939, 0.5e-6, 'METHODS 8.1: cos θ = 0.953939');
    const buried = headWaveByFermat(50, depth, 0, H, V1, V2);
    const surface = headWaveByFermat(50, 0, 0, H, V1, V2);
    expectWithin(buried, 53.61818e-3, CHECK_CASE_TOLERANCE, 'METHODS 8.1: buried 53.61818 ms (Fermat oracle)');
    expectWithin(surface, 56.79797e-3, CHECK_CASE_TOLERANCE, 'METHODS 8.1: surface 56.79797 ms (Fermat oracle)');
    expectWithin(buried + correction.time, surface, 1e-10, 'Fermat oracle: corrected buried time = surface time');
    // Adding the whole uphole time over-corrects by t_uh(1 − cos θ) = 0.15354 ms (METHODS 8.1).
    expectWithin(buried + uphole - surface, 0.15354e-3, CHECK_CASE_TOLERANCE, 'METHODS 8.1: over-correction 0.15354 ms');
  });

  it('is exact at other offsets and depths (Fermat oracle), since the correction does not depend on the offset', () => {
    for (const [offset, depth] of [[35, 0.5], [80, 4], [120, 7.5]] as const) {
      const correction = upholeCorrection({ upholeTime: depth / V1, shotDepth: depth, refractorVelocity: V2 });
      if (!correction.ok) throw new Error(correction.message);
      expectWithin(headWaveByFermat(offset, depth, 0, H, V1, V2) + correction.time, headWaveByFermat(offset, 0, 0, H, V1, V2), 1e-10, `Fermat oracle at ${offset} m, shot ${depth} m deep`);
    }
  });

  it('propagates the SEs of uphole time, depth and refractor velocity to first order (finite differences)', () => {
    const input = { upholeTime: 0.004, upholeTimeSE: 0.0002, shotDepth: 2, shotDepthSE: 0.05, refractorVelocity: 2000, refractorVelocitySE: 60 };
    const at = (changes: Partial<typeof input>) => {
      const outcome = upholeCorrection({ ...input, ...changes });
      if (!outcome.ok) throw new Error(outcome.message);
      return outcome.time;
    };
    const step = 1e-6;
    const derivative = (key: 'upholeTime' | 'shotDepth' | 'refractorVelocity') => (at({ [key]: input[key] * (1 + step) }) - at({ [key]: input[key] * (1 - step) })) / (2 * step * input[key]);
    const expected = Math.hypot(derivative('upholeTime') * input.upholeTimeSE, derivative('shotDepth') * input.shotDepthSE, derivative('refractorVelocity') * input.refractorVelocitySE);
    const outcome = upholeCorrection(input);
    if (!outcome.ok) throw new Error(outcome.message);
    expectRelative(outcome.timeSE, expected, 1e-6, 'finite-difference Jacobian (JCGM 100:2008 §5.1)');
  });

  it('refuses a refractor no faster than depth/uphole time, and non-positive inputs, with a code and a message', () => {
    const slow = upholeCorrection({ upholeTime: 0.001, shotDepth: 2, refractorVelocity: 1500 }); // 2000 m/s to the surface
    expect(slow).toMatchObject({ ok: false, code: 'no-head-wave' });
    expect(slow.ok ? '' : slow.message).toContain('1500 m/s');
    expect(upholeCorrection({ upholeTime: 0, shotDepth: 2, refractorVelocity: 2000 })).toMatchObject({ ok: false, code: 'not-positive' });
    expect(upholeCorrection({ upholeTime: 0.003, shotDepth: -1, refractorVelocity: 2000 })).toMatchObject({ ok: false, code: 'not-positive' });
    expect(upholeCorrection({ upholeTime: 0.003, shotDepth: 2, refractorVelocity: Number.NaN })).toMatchObject({ ok: false, code: 'not-positive' });
  });
});

describe('headWaveDatumCorrection (ends above a flat datum)', () => {
  it('removes Δe·cos θ / V_1 for a receiver 3 m above the datum: METHODS 8.2 to its printed digits, and the Fermat oracle', () => {
    const correction = headWaveDatumCorrection({ lowering: 3, nearSurfaceVelocity: V1, refractorVelocity: V2 });
    if (!correction.ok) throw new Error(correction.message);
    expectWithin(correction.time, 4.7697e-3, CHECK_CASE_TOLERANCE, 'METHODS 8.2: difference 4.76970 ms');
    expect(correction.datumAboveEnd).toBe(false);
    // Receiver 3 m up: the datum is the surface of METHODS 8.1 and the refractor 13 m below the receiver.
    const raised = headWaveByFermat(50, 3, 0, H + 3, V1, V2);
    expectWithin(raised, 61.56767e-3, CHECK_CASE_TOLERANCE, 'METHODS 8.2: 61.56767 ms with the receiver raised (Fermat oracle)');
    expectWithin(raised - correction.time, 56.79797e-3, CHECK_CASE_TOLERANCE, 'METHODS 8.2: back to the datum time 56.79797 ms');
    // The vertical static 3/V_1 = 5.00000 ms over-corrects.
    expect(3 / V1 - correction.time).toBeGreaterThan(0.2e-3);
  });

  it('is exact for a raised source and a raised receiver together (Fermat oracle), and flags a datum above an end', () => {
    const source = headWaveDatumCorrection({ lowering: 1.5, nearSurfaceVelocity: V1, refractorVelocity: V2 });
    const receiver = headWaveDatumCorrection({ lowering: 4, nearSurfaceVelocity: V1, refractorVelocity: V2 });
    if (!source.ok || !receiver.ok) throw new Error('corrections refused');
    // Datum at depth 0 of a model whose source sits 1.5 m and receiver 4 m above it: a path between z = −1.5 and z = −4.
    const shift = 4; // put the highest end at z = 0 for the oracle
    const observed = headWaveByFermat(70, shift - 1.5, 0, H + shift, V1, V2);
    expectWithin(observed - source.time - receiver.time, headWaveByFermat(70, 0, 0, H, V1, V2), 1e-10, 'Fermat oracle: both ends brought to the datum');
    const below = headWaveDatumCorrection({ lowering: -1, nearSurfaceVelocity: V1, refractorVelocity: V2 });
    expect(below).toMatchObject({ ok: true, datumAboveEnd: true });
    expect(below.ok && below.time < 0).toBe(true);
  });

  it('propagates the SEs of both velocities to first order (finite differences)', () => {
    const input = { lowering: 3, nearSurfaceVelocity: 600, nearSurfaceVelocitySE: 20, refractorVelocity: 2000, refractorVelocitySE: 80 };
    const at = (changes: Partial<typeof input>) => {
      const outcome = headWaveDatumCorrection({ ...input, ...changes });
      if (!outcome.ok) throw new Error(outcome.message);
      return outcome.time;
    };
    const step = 1e-6;
    const derivative = (key: 'nearSurfaceVelocity' | 'refractorVelocity') => (at({ [key]: input[key] * (1 + step) }) - at({ [key]: input[key] * (1 - step) })) / (2 * step * input[key]);
    const outcome = headWaveDatumCorrection(input);
    if (!outcome.ok) throw new Error(outcome.message);
    expectRelative(outcome.timeSE, Math.hypot(derivative('nearSurfaceVelocity') * 20, derivative('refractorVelocity') * 80), 1e-6, 'finite-difference Jacobian (JCGM 100:2008 §5.1)');
  });

  it('refuses a refractor not faster than the near surface, and non-positive velocities', () => {
    expect(headWaveDatumCorrection({ lowering: 2, nearSurfaceVelocity: 800, refractorVelocity: 800 })).toMatchObject({ ok: false, code: 'no-head-wave' });
    expect(headWaveDatumCorrection({ lowering: 2, nearSurfaceVelocity: 0, refractorVelocity: 800 })).toMatchObject({ ok: false, code: 'not-positive' });
    expect(headWaveDatumCorrection({ lowering: Number.NaN, nearSurfaceVelocity: 600, refractorVelocity: 800 })).toMatchObject({ ok: false, code: 'not-positive' });
  });
});

describe('buriedShotDirectTime and datumTooLow', () => {
  it('gives the hyperbolic direct wave of a buried shot: METHODS 8.1 (3.72678 ms at 1 m, 8.97527 ms at 5 m, shot 2 m deep)', () => {
    expectWithin(buriedShotDirectTime(1, 2, V1), 3.72678e-3, CHECK_CASE_TOLERANCE, 'METHODS 8.1: 3.72678 ms at 1 m');
    expectWithin(buriedShotDirectTime(5, 2, V1), 8.97527e-3, CHECK_CASE_TOLERANCE, 'METHODS 8.1: 8.97527 ms at 5 m');
    expect(() => buriedShotDirectTime(5, 2, 0)).toThrow(/velocity must be positive/);
  });

  it('datumTooLow says so when the corrections exceed half the corrected intercept (METHODS §8)', () => {
    expect(datumTooLow(0.006, 0.011)).toBe(true);
    expect(datumTooLow(0.005, 0.011)).toBe(false);
  });
});
