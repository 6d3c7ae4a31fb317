/**
 * generalizedReciprocal when the XY scan is unresolved and the optimum moves to the scanned XY
 * nearest the plane-layer XY of the first depths: the depths at the new XY may have no plane-layer XY
 * at all (every receiver refused), and the reason sentence must still name the plane-layer XY it
 * aimed at (a regression: it used to read the new, missing value).
 *
 * Data: a flat refractor 1 m under 500 m/s over 2500 m/s, head-wave times by Fermat minimisation
 * (tests/oracles/dipping-refractor.ts via tests/helpers/reversed-arrivals.ts); the plane-layer XY the
 * reason names is the closed form 2h·tan θ (Palmer 1980, recalled from memory; METHODS §6) of the
 * depth h = t_G·V·V′/√(V′² − V²) (METHODS §6) that the given overburden velocity V makes of the
 * time-depth t_G = h_true·√(1/500² − 1/2500²) (METHODS §1).
 */
import { describe, expect, it } from 'vitest';
import type { Overburden, ReversedArrivals } from '../../lib/depth/delay-depth.js';
import { generalizedReciprocal } from '../../lib/depth/generalized-reciprocal.js';
import type { DippingModel } from '../oracles/dipping-refractor.js';
import { oracleArrivals } from '../helpers/reversed-arrivals.js';
import { expectRelative } from '../helpers/expect-within.js';

const TRUE_DEPTH = 1;
const MODEL: DippingModel = { velocities: [500, 2500], interfaces: [{ depthAtOrigin: TRUE_DEPTH, dip: 0 }] };
const LENGTH = 60;
const STEP = 2;
/** A receiver static at one receiver, on both shots' picks: it cancels in the minus time (XY = 0) and nowhere else. */
const STATIC_X = 30;
const STATIC = 0.5e-3;
/** The overburden velocity given under the end receivers, m/s: its depths there put the plane-layer XY near 7 m. */
const END_VELOCITY = 1600;
/** Inside, an overburden faster than the refractor: no head wave, so no depth (delayToDepth `no-head-wave`). */
const INSIDE_VELOCITY = 3000;
/** The reason prints 4 significant digits (formatQuantity). */
const PRINTED_RELATIVE = 1e-3;

function withReceiverStatic(input: ReversedArrivals): ReversedArrivals {
  const shifted = (branch: ReversedArrivals['forward']) => ({ ...branch, times: branch.times.map((time, k) => time + (branch.receiverX[k] === STATIC_X ? STATIC : 0)) });
  return { ...input, forward: shifted(input.forward), reverse: shifted(input.reverse) };
}

/** The end receivers (covered by XY = 0 only) accept a depth; every receiver inside refuses one. */
const overburdenAt = (x: number): Overburden => ({
  velocities: [{ value: x <= STEP || x >= LENGTH - STEP ? END_VELOCITY : INSIDE_VELOCITY, standardError: 0 }],
  upperThicknesses: [],
});

describe('generalizedReciprocal: unresolved scan whose nearest-to-plane XY gives no depths', () => {
  const input = withReceiverStatic(oracleArrivals(MODEL, 1, LENGTH, STEP));
  // XY = 0 covers the receivers 2…58 m, XY = 8 m only 4…56 m (X ≥ 0, Y ≤ 60 m).
  const run = () => generalizedReciprocal(input, overburdenAt, { xyValues: [0, 8] });

  it('generalizedReciprocal moves the optimum to the scanned XY nearest the plane-layer XY and names that plane-layer XY although the new depths have none', () => {
    // The regression: building the reason sentence threw a TypeError here.
    expect(run).not.toThrow();
    const result = run();
    // Preconditions: the scan does not resolve XY, and XY = 0 is the least rough (the receiver static cancels there).
    expect(result.optimum?.resolved).toBe(false);
    const [atZero, atEight] = result.scan;
    expect(atZero!.roughness!).toBeLessThan(atEight!.roughness!);
    expect(result.optimum?.xy).toBe(8);
    expect(result.optimum?.planeLayerXY).toBeNull();
    expect(result.receivers).toEqual([]);
    expect(result.coverage).toBeNull();

    // The plane-layer XY of the XY = 0 depths under the end receivers, by the closed forms.
    const refractorVelocity = atZero!.velocity!;
    expectRelative(refractorVelocity, 2500, 1e-9, 'the stated model: V_2 = 2500 m/s (a flat refractor)');
    const timeDepth = TRUE_DEPTH * Math.sqrt(1 / 500 ** 2 - 1 / 2500 ** 2);
    const depth = (timeDepth * END_VELOCITY * refractorVelocity) / Math.sqrt(refractorVelocity ** 2 - END_VELOCITY ** 2);
    const sine = END_VELOCITY / refractorVelocity;
    const target = 2 * depth * (sine / Math.sqrt(1 - sine ** 2));
    expect(Math.abs(target - 8)).toBeLessThan(Math.abs(target - 0));
    const named = /nearest the plane-layer XY of the depths found \(([\d.]+)\u00a0m\)/.exec(result.optimum!.reason);
    expect(named, result.optimum!.reason).not.toBeNull();
    expectRelative(Number(named![1]), target, PRINTED_RELATIVE, 'Palmer 1980 (from memory): 2h·tan θ at the end receivers');
    expect(result.optimum!.reason).toContain('XY = 8\u00a0m is used');
  });

  it('generalizedReciprocal notes the unresolved scan and refuses every receiver of the new XY, naming each', () => {
    const result = run();
    const codes = result.notes.map((note) => note.code);
    expect(codes[0]).toBe('xy-not-resolved');
    const refused = result.notes.filter((note) => note.code === 'no-head-wave').map((note) => note.x);
    expect(refused).toEqual(Array.from({ length: 27 }, (_, k) => 4 + STEP * k));
    expect(result.velocity?.value).toBe(result.scan[1]!.velocity);
  });
});
