import { describe, expect, it } from 'vitest';
import { delayToDepth, type Overburden, type ReversedArrivals } from '../../lib/depth/delay-depth.js';
import { plusMinus, type PlusMinusReceiver } from '../../lib/depth/plus-minus.js';
import { seededNormal } from '../../lib/random.js';
import { dippingHeadWaveTime, type DippingModel } from '../oracles/dipping-refractor.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';
import { oracleArrivals } from '../helpers/reversed-arrivals.js';

const CASE_61 = 'METHODS.md check case 6.1 (computed from the stated model by Fermat minimisation, not a published value)';
const ORACLE = 'Fermat-minimisation oracle (tests/oracles/dipping-refractor.ts)';
/** Half a unit in the last digit METHODS prints (4 decimals of m and m/s, 5 of ms). */
const HALF_4DP = 0.5e-4;
const HALF_5DP_MS = 0.5e-5;
/** METHODS 6.1 prints t_AG and t_BG to 4 decimals of ms. */
const HALF_4DP_MS = 0.5e-4;
/**
 * The plus-minus depth against the exact perpendicular depth: METHODS 6.1 shows the method's own
 * approximation (1.1e-4 relative at 4°, from V_n′ = V_n/cos α in the DCF); at 8° that grows to about
 * 4e-4, so 0.1 % bounds the dips tested (−8…+8°).
 */
const PERPENDICULAR_RELATIVE = 1e-3;
/** The brief's bound on V′ = V_2/cos α for exact plane-layer data. */
const VELOCITY_RELATIVE = 1e-3;
/** Central differences at a relative step of 1e-6: about 1e-8 relative error; 1e-6 leaves room. */
const DIFFERENCE_RELATIVE = 1e-6;
/** Pick SE given with exact oracle times: a typical engineering pick SE (0.1 ms, common practice). */
const PICK_SE = 1e-4;
const SEED = 6101;

const radians = (degrees: number): number => (degrees * Math.PI) / 180;
const oneLayer = (velocity: number, standardError = 0) => (): Overburden => ({ velocities: [{ value: velocity, standardError }], upperThicknesses: [] });


function receiverAt(receivers: readonly PlusMinusReceiver[], x: number): PlusMinusReceiver {
  const found = receivers.find((receiver) => Math.abs(receiver.x - x) < 1e-9);
  if (found === undefined) throw new Error(`no receiver at ${x} m`);
  return found;
}

/** A plane refractor dipping `dip` (°) with vertical depth `middleDepth` under the middle of a `length` m line. */
const planeModel = (dip: number, middleDepth: number, length: number): DippingModel => ({
  velocities: [500, 2500],
  interfaces: [{ depthAtOrigin: middleDepth - (length / 2) * Math.tan(radians(dip)), dip: radians(dip) }],
});

const CASE_61_MODEL: DippingModel = { velocities: [500, 2500], interfaces: [{ depthAtOrigin: 6, dip: radians(4) }] };
const CASE_61_ARRIVALS = oracleArrivals(CASE_61_MODEL, 1, 100, 2);

describe('plusMinus: METHODS.md check case 6.1', () => {
  it('the Fermat oracle reproduces t_AB, t_AG and t_BG at G = 50 m printed in case 6.1', () => {
    expectWithin(CASE_61_ARRIVALS.reciprocalTime.value * 1000, 77.0298, HALF_5DP_MS, `${CASE_61}: t_AB (ms)`);
    expectWithin((dippingHeadWaveTime(CASE_61_MODEL, 1, 100, 0) ?? Number.NaN) * 1000, 77.0298, HALF_5DP_MS, `${CASE_61}: t_BA (ms)`);
    expectWithin((dippingHeadWaveTime(CASE_61_MODEL, 1, 0, 50) ?? Number.NaN) * 1000, 50.2438, HALF_4DP_MS, `${CASE_61}: t_AG (ms)`);
    expectWithin((dippingHeadWaveTime(CASE_61_MODEL, 1, 100, 50) ?? Number.NaN) * 1000, 63.9132, HALF_4DP_MS, `${CASE_61}: t_BG (ms)`);
  });

  it('plusMinus gives V′ = 2506.1047 m/s and depths 6.6823, 9.4722, 12.2622 m at G = 10, 50, 90 m with DCF 510.2586 m/s', () => {
    const result = plusMinus(CASE_61_ARRIVALS, oneLayer(500));
    expect(result.notes).toEqual([]);
    expectWithin(result.velocity?.value, 2506.1047, HALF_4DP, `${CASE_61}: V_n′`);
    const expected = [
      [10, 6.6823, 6.6829],
      [50, 9.4722, 9.4732],
      [90, 12.2622, 12.2635],
    ] as const;
    for (const [x, depth, perpendicular] of expected) {
      const receiver = receiverAt(result.receivers, x);
      expectWithin(receiver.depth, depth, HALF_4DP, `${CASE_61}: plus-minus depth at G = ${x} m`);
      expectRelative(receiver.depth, perpendicular, PERPENDICULAR_RELATIVE, `${CASE_61}: exact perpendicular depth at G = ${x} m`);
      expectWithin(receiver.depthConversionFactor, 510.2586, HALF_4DP, `${CASE_61}: DCF`);
      expectWithin(receiver.thickness, receiver.depth, 0, 'one layer: thickness = depth');
    }
    expectWithin(receiverAt(result.receivers, 50).delay * 1000, 18.56362, HALF_5DP_MS, `${CASE_61}: T+/2 at 50 m (= t_G at XY = 0)`);
    // Receivers every 2 m from 4 m (the forward head wave starts beyond the critical distance) to 94 m.
    expect(result.coverage).toEqual([4, 94]);
  });
});

describe('plusMinus: plane dipping refractors from the Fermat oracle', () => {
  it.each([-8, -4, 0, 4, 8])('plusMinus on a refractor dipping %i° gives V′ = V_2/cos α and the perpendicular depth under every receiver', (dip) => {
    const model = planeModel(dip, 10, 100);
    const result = plusMinus(oracleArrivals(model, 1, 100, 2), oneLayer(500));
    expect(result.notes).toEqual([]);
    expectRelative(result.velocity?.value, 2500 / Math.cos(radians(dip)), VELOCITY_RELATIVE, `METHODS.md §6 (V_n′ = V_n/cos α), times from the ${ORACLE}`);
    expect(result.receivers.length).toBeGreaterThan(40);
    for (const receiver of result.receivers) {
      const vertical = model.interfaces[0]!.depthAtOrigin + receiver.x * Math.tan(radians(dip));
      expectRelative(receiver.depth, vertical * Math.cos(radians(dip)), PERPENDICULAR_RELATIVE, `${ORACLE}: perpendicular depth at ${receiver.x} m, dip ${dip}°`);
    }
  });
});

describe('plusMinus: standard errors', () => {
  it('plusMinus passes the reciprocal-time, pick and velocity variances to the depth SE (derivatives by central differences)', () => {
    const sigmaReciprocal = 0.3e-3;
    const base: ReversedArrivals = { ...CASE_61_ARRIVALS, reciprocalTime: { value: CASE_61_ARRIVALS.reciprocalTime.value, standardError: sigmaReciprocal } };
    const velocitySE = 15;
    const overburden = oneLayer(500, velocitySE);
    const result = plusMinus(base, overburden);
    const receiver = receiverAt(result.receivers, 50);
    const velocity = result.velocity!;
    // ∂depth/∂t_AB: t_AB shifts every T+ and no T−, so a change of t_AB moves the depth through T+ alone.
    const step = 1e-6 * base.reciprocalTime.value;
    const depthWith = (reciprocal: number) =>
      receiverAt(plusMinus({ ...base, reciprocalTime: { value: reciprocal, standardError: 0 } }, overburden).receivers, 50).depth;
    const byReciprocal = (depthWith(base.reciprocalTime.value + step) - depthWith(base.reciprocalTime.value - step)) / (2 * step);
    // ∂depth/∂V′ and ∂depth/∂V_1 through the conversion alone.
    const convert = (v1: number, vn: number) => {
      const out = delayToDepth({ value: receiver.delay, standardError: 0 }, { velocities: [{ value: v1, standardError: 0 }], upperThicknesses: [] }, { value: vn, standardError: 0 });
      if (!out.ok) throw new Error(out.message);
      return out.depth.value;
    };
    const byRefractor = (convert(500, velocity.value * (1 + 1e-6)) - convert(500, velocity.value * (1 - 1e-6))) / (2e-6 * velocity.value);
    const byLayer = (convert(500 * (1 + 1e-6), velocity.value) - convert(500 * (1 - 1e-6), velocity.value)) / (2e-6 * 500);
    // T+ = t_AG + t_BG − t_AB: ∂/∂t_AG = ∂/∂t_BG = −∂/∂t_AB.
    const plusVariance = PICK_SE ** 2 + PICK_SE ** 2 + sigmaReciprocal ** 2;
    const expected = Math.sqrt(byReciprocal ** 2 * plusVariance + (byRefractor * velocity.standardError) ** 2 + (byLayer * velocitySE) ** 2);
    expectRelative(receiver.depthSE, expected, DIFFERENCE_RELATIVE, 'JCGM 100:2008 §5.1 (delta method), derivatives by central differences');
    expectWithin(receiver.plusTimeSE, Math.sqrt(plusVariance), 1e-15, 'Var T+ = σ_AG² + σ_BG² + σ_AB²');
    // Without the reciprocal-time SE the depth SE is smaller by exactly that term.
    const without = receiverAt(plusMinus(CASE_61_ARRIVALS, overburden).receivers, 50).depthSE;
    expectWithin(receiver.depthSE ** 2 - without ** 2, (byReciprocal * sigmaReciprocal) ** 2, 1e-9 * receiver.depthSE ** 2, 'the t_AB term of the delta method');
  });

  it('plusMinus gives V′ the SE of 2/slope from the weighted T− line: SE(V′) = 2·SE(slope)/slope²', () => {
    const result = plusMinus(CASE_61_ARRIVALS, oneLayer(500));
    const fit = result.minusTimeFit!;
    expectRelative(result.velocity?.standardError, (2 * fit.slopeSE) / fit.slope ** 2, 1e-12, 'delta method on V′ = 2/slope');
    // Equal weights, exact times: the slope SE is σ_T−/√Σ(x − x̄)² with σ_T− = √2·σ_pick (Draper & Smith 1998 §1.4).
    const xs = result.receivers.map((receiver) => receiver.x);
    const mean = xs.reduce((sum, x) => sum + x, 0) / xs.length;
    const spread = Math.sqrt(xs.reduce((sum, x) => sum + (x - mean) ** 2, 0));
    expectRelative(fit.slopeSE, (Math.SQRT2 * PICK_SE) / spread, 1e-9, 'Draper & Smith 1998 §1.4: SE of a least-squares slope');
    expect(fit.count).toBe(46);
  });

  it('plusMinus widens the V′ SE to the T− scatter when the pick SEs are too small (Birge ratio), and notes the scatter but no curvature', () => {
    // Picks with 0.5 ms noise given SEs of 0.05 and 0.1 ms: the line's SE then follows the residuals, whatever SE was claimed.
    const plane = oracleArrivals(planeModel(4, 10, 100), 1, 100, 2);
    for (let seed = SEED; seed < SEED + 5; seed += 1) {
      const normal = seededNormal(seed);
      const noisyTimes = (times: readonly number[]) => times.map((time) => time + 0.5e-3 * normal());
      const forwardTimes = noisyTimes(plane.forward.times);
      const reverseTimes = noisyTimes(plane.reverse.times);
      const claimed = (sigma: number): ReversedArrivals => ({
        ...plane,
        forward: { ...plane.forward, times: forwardTimes, sigmas: plane.forward.sigmas.map(() => sigma) },
        reverse: { ...plane.reverse, times: reverseTimes, sigmas: plane.reverse.sigmas.map(() => sigma) },
      });
      const small = plusMinus(claimed(0.5e-4), oneLayer(500));
      const smaller = plusMinus(claimed(1e-4), oneLayer(500));
      expectRelative(small.velocity?.standardError, smaller.velocity!.standardError, 1e-9, `seed ${seed}: Birge ratio, the inflated SE does not depend on the claimed SE`);
      // Equal weights: the ordinary least-squares slope SE √(Σr²/(n − 2)/Σ(x − x̄)²) (Draper & Smith 1998 §1.4), through V′ = 2/slope.
      const fit = small.minusTimeFit!;
      const xs = small.receivers.map((receiver) => receiver.x);
      const mean = xs.reduce((sum, x) => sum + x, 0) / xs.length;
      const spread = Math.sqrt(xs.reduce((sum, x) => sum + (x - mean) ** 2, 0));
      expectRelative(fit.slopeSE, fit.residualSD / spread, 1e-9, `seed ${seed}: Draper & Smith 1998 §1.4, SE of a least-squares slope from the residuals`);
      // The quadratic term's SE is widened alike, so plain scatter is not read as curvature.
      const codes = small.notes.map((note) => note.code);
      expect(codes, `seed ${seed}`).toContain('minus-time-scatter');
      expect(codes, `seed ${seed}`).not.toContain('minus-time-curved');
    }
  });
});

describe('plusMinus: edges', () => {
  it('plusMinus notes too-few-common-receivers and gives no velocity when the branches share fewer than 3 receivers', () => {
    const keep = (values: readonly number[], xs: readonly number[], from: number) => values.filter((_, index) => xs[index]! >= from);
    const forward = CASE_61_ARRIVALS.forward;
    // Forward picks only from 92 m on: common receivers at 92 and 94 m.
    const input: ReversedArrivals = {
      ...CASE_61_ARRIVALS,
      forward: { receiverX: keep(forward.receiverX, forward.receiverX, 92), times: keep(forward.times, forward.receiverX, 92), sigmas: keep(forward.sigmas, forward.receiverX, 92) },
    };
    const result = plusMinus(input, oneLayer(500));
    expect(result.velocity).toBeNull();
    expect(result.receivers).toEqual([]);
    expect(result.coverage).toEqual([92, 94]);
    expect(result.notes.map((note) => note.code)).toEqual(['too-few-common-receivers']);
    expect(result.notes[0]?.message).toMatch(/only 2 receiver/);
  });

  it('plusMinus matches receivers within 1e-6·(B − A) and not beyond', () => {
    const shifted = (offset: number): ReversedArrivals => ({
      ...CASE_61_ARRIVALS,
      reverse: { ...CASE_61_ARRIVALS.reverse, receiverX: CASE_61_ARRIVALS.reverse.receiverX.map((x) => x + offset) },
    });
    expect(plusMinus(shifted(0.9e-4), oneLayer(500)).receivers.length).toBe(46);
    const apart = plusMinus(shifted(1.1e-4), oneLayer(500));
    expect(apart.receivers).toEqual([]);
    expect(apart.coverage).toBeNull();
    expect(apart.notes[0]?.code).toBe('too-few-common-receivers');
  });

  it('plusMinus uses only receivers strictly between the shots', () => {
    // Both branches carry a receiver at A (x = 0) and at B (x = 100 m): the shot's own trace (t = 0) and the reciprocal time.
    const { forward, reverse, reciprocalTime } = CASE_61_ARRIVALS;
    expect([forward.receiverX.at(-1), reverse.receiverX[0]]).toEqual([100, 0]);
    const input: ReversedArrivals = {
      ...CASE_61_ARRIVALS,
      forward: { receiverX: [0, ...forward.receiverX], times: [0, ...forward.times], sigmas: [PICK_SE, ...forward.sigmas] },
      reverse: { receiverX: [...reverse.receiverX, 100], times: [...reverse.times, 0], sigmas: [...reverse.sigmas, PICK_SE] },
    };
    expect(input.reverse.times[0]).toBeCloseTo(reciprocalTime.value, 12);
    const result = plusMinus(input, oneLayer(500));
    expect(result.coverage).toEqual([4, 94]);
    expect(result.receivers.length).toBe(46);
  });

  it('plusMinus notes minus-time-slope-not-positive and gives no depths when the branches are swapped', () => {
    const { forward, reverse } = CASE_61_ARRIVALS;
    // Reverse times at the forward receivers and vice versa (same positions where they overlap).
    const input: ReversedArrivals = { ...CASE_61_ARRIVALS, forward: reverse, reverse: forward };
    const result = plusMinus(input, oneLayer(500));
    expect(result.velocity).toBeNull();
    expect(result.receivers).toEqual([]);
    expect(result.notes.map((note) => note.code)).toEqual(['minus-time-slope-not-positive']);
  });

  it('plusMinus refuses every receiver with no-head-wave when the overburden is faster than V′, naming the receiver', () => {
    const result = plusMinus(CASE_61_ARRIVALS, oneLayer(3000));
    expect(result.velocity?.value).toBeCloseTo(2506.1, 1);
    expect(result.receivers).toEqual([]);
    expect(result.notes.length).toBe(46);
    expect(result.notes.every((note) => note.code === 'no-head-wave' && typeof note.x === 'number')).toBe(true);
    expect(result.notes[0]?.message).toMatch(/receiver at 4/);
  });

  it('plusMinus refuses receivers with delay-below-upper-layers when the reciprocal time is too large for the picks', () => {
    // t_AB 30 ms late: T+ falls below zero where the true T+ (26.2…48.1 ms) is under 30 ms.
    const input: ReversedArrivals = { ...CASE_61_ARRIVALS, reciprocalTime: { value: CASE_61_ARRIVALS.reciprocalTime.value + 0.03, standardError: 0 } };
    const result = plusMinus(input, oneLayer(500));
    const refused = result.notes.filter((note) => note.code === 'delay-below-upper-layers');
    expect(refused.length).toBeGreaterThan(0);
    expect(refused.every((note) => note.x !== undefined && !result.receivers.some((receiver) => receiver.x === note.x))).toBe(true);
    expect(result.receivers.every((receiver) => receiver.plusTime >= 0)).toBe(true);
    expect(result.receivers.length + refused.length).toBe(46);
  });

  // minus-time-curved and minus-time-scatter on a refractor whose velocity changes along the line: with the GRM's
  // velocity-analysis-curved in generalized-reciprocal.test.ts (one grid model for both methods).
  it('plusMinus notes neither minus-time-curved nor minus-time-scatter on plane data with pick noise of the stated SE', () => {
    // Ten seeds: at the thresholds used (3 SE, χ² tail 0.1 %) a false alarm in any of them has a chance of a few per cent.
    const sigma = 0.5e-3;
    const plane = oracleArrivals(planeModel(4, 10, 100), 1, 100, 2, sigma);
    for (let seed = SEED; seed < SEED + 10; seed += 1) {
      const normal = seededNormal(seed);
      const noisy: ReversedArrivals = {
        ...plane,
        forward: { ...plane.forward, times: plane.forward.times.map((time) => time + sigma * normal()) },
        reverse: { ...plane.reverse, times: plane.reverse.times.map((time) => time + sigma * normal()) },
        reciprocalTime: { value: plane.reciprocalTime.value + sigma * normal(), standardError: sigma },
      };
      expect(plusMinus(noisy, oneLayer(500)).notes, `seed ${seed}`).toEqual([]);
    }
  });

  it('plusMinus notes refractor-steep on a 14° refractor and not on an 8° one with pick noise', () => {
    const steep = plusMinus(oracleArrivals(planeModel(14, 16, 100), 1, 100, 2), oneLayer(500));
    expect(steep.notes.map((note) => note.code)).toEqual(['refractor-steep']);
    // The plus-minus depths are perpendicular to the refractor, so they slope by sin 14° along x: atan(sin 14°) = 13.6°.
    expect(steep.notes[0]?.message).toMatch(/dips 13\.6/);
    const normal = seededNormal(SEED + 1);
    const sigma = 0.5e-3;
    const plane = oracleArrivals(planeModel(8, 10, 100), 1, 100, 2, sigma);
    const noisy: ReversedArrivals = {
      ...plane,
      forward: { ...plane.forward, times: plane.forward.times.map((time) => time + sigma * normal()) },
      reverse: { ...plane.reverse, times: plane.reverse.times.map((time) => time + sigma * normal()) },
    };
    expect(plusMinus(noisy, oneLayer(500)).notes.map((note) => note.code)).not.toContain('refractor-steep');
  });

  it('plusMinus throws for misuse: shots out of order, unsorted receivers, a pick SE of zero, lengths that disagree', () => {
    const base = CASE_61_ARRIVALS;
    expect(() => plusMinus({ ...base, reverseSourceX: 0 }, oneLayer(500))).toThrow(/must lie beyond shot A/);
    expect(() => plusMinus({ ...base, forward: { ...base.forward, receiverX: [...base.forward.receiverX].reverse() } }, oneLayer(500))).toThrow(/strictly ascending/);
    expect(() => plusMinus({ ...base, forward: { ...base.forward, sigmas: base.forward.sigmas.map(() => 0) } }, oneLayer(500))).toThrow(/positive finite pick SE/);
    expect(() => plusMinus({ ...base, reverse: { ...base.reverse, times: base.reverse.times.slice(1) } }, oneLayer(500))).toThrow(/give one of each/);
  });
});
