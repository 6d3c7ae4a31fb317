import { describe, expect, it } from 'vitest';
import {
  branchExists,
  branchTime,
  criticalDistance,
  crossoverDistance,
  firstArrival,
  headWaveIntercept,
  rmsResidual,
  syntheticTimes,
  verticalSlowness,
  type LayeredModel,
} from '../../lib/model/index.js';
import { expectWithin } from '../helpers/expect-within.js';
import { CASE_1_1, ROUNDING_DISTANCE, ROUNDING_TIME } from './check-case-1-1.js';

const model11: LayeredModel = { velocities: CASE_1_1.velocities, thicknesses: CASE_1_1.thicknesses };
/** METHODS.md check case 9.3 (computed from the stated model): 800 m/s (4 m) over 500 m/s (6 m) over 3000 m/s. */
const inversion: LayeredModel = { velocities: [800, 500, 3000], thicknesses: [4, 6] };

describe('layered model: METHODS.md check case 1.1', () => {
  it('headWaveIntercept gives τ_2 and τ_3 of case 1.1', () => {
    expectWithin(headWaveIntercept(model11, 2) ?? Number.NaN, CASE_1_1.intercepts[2], ROUNDING_TIME, `${CASE_1_1.source}: τ_2`);
    expectWithin(headWaveIntercept(model11, 3) ?? Number.NaN, CASE_1_1.intercepts[3], ROUNDING_TIME, `${CASE_1_1.source}: τ_3`);
  });

  it('criticalDistance gives x*_2 and x*_3 of case 1.1', () => {
    expectWithin(criticalDistance(model11, 2) ?? Number.NaN, CASE_1_1.criticalDistances[2], ROUNDING_DISTANCE, `${CASE_1_1.source}: x*_2`);
    expectWithin(criticalDistance(model11, 3) ?? Number.NaN, CASE_1_1.criticalDistances[3], ROUNDING_DISTANCE, `${CASE_1_1.source}: x*_3`);
  });

  it('crossoverDistance gives x_c1 and x_c2 of case 1.1', () => {
    expectWithin(crossoverDistance(model11, 1) ?? Number.NaN, CASE_1_1.crossovers[1], ROUNDING_DISTANCE, `${CASE_1_1.source}: x_c1`);
    expectWithin(crossoverDistance(model11, 2) ?? Number.NaN, CASE_1_1.crossovers[2], ROUNDING_DISTANCE, `${CASE_1_1.source}: x_c2`);
  });

  it('firstArrival gives the times and branches of case 1.1 at 10, 30, 60 and 100 m', () => {
    for (const expected of CASE_1_1.firstArrivals) {
      const arrival = firstArrival(model11, expected.offset);
      expectWithin(arrival.time, expected.time, ROUNDING_TIME, `${CASE_1_1.source}: t(${expected.offset} m)`);
      expect(arrival.branch, `${CASE_1_1.source}: branch at ${expected.offset} m`).toBe(expected.branch);
    }
  });

  it('branchTime returns null for branch 3 at 10 m, short of x*_3 (case 1.1: "branch 3 absent")', () => {
    expect(branchTime(model11, 3, 10)).toBeNull();
    expect(branchTime(model11, 2, 10)).not.toBeNull();
  });

  it('syntheticTimes equals firstArrival offset by offset', () => {
    const offsets = [0, 5, 10, 30, 60, 100];
    expect(syntheticTimes(model11, offsets)).toEqual(offsets.map((offset) => firstArrival(model11, offset).time));
    expect(syntheticTimes(model11, [])).toEqual([]);
  });
});

describe('layered model: edges stated in the doc comments', () => {
  it('verticalSlowness is √(s_i² − s_n²) and null when the layer is not slower than the refractor', () => {
    const expected = Math.sqrt(1 / 400 ** 2 - 1 / 1600 ** 2); // the §0 definition, evaluated directly
    expect(verticalSlowness(model11, 1, 2)).toBe(expected);
    expect(verticalSlowness(inversion, 1, 2)).toBeNull();
    expect(verticalSlowness({ velocities: [500, 500], thicknesses: [3] }, 1, 2)).toBeNull();
    expect(() => verticalSlowness(model11, 2, 2)).toThrow(/layer must be an integer from 1 to branch − 1/);
  });

  it('headWaveIntercept and criticalDistance are 0 for the direct wave and null for an impossible branch', () => {
    expect(headWaveIntercept(model11, 1)).toBe(0);
    expect(criticalDistance(model11, 1)).toBe(0);
    expect(headWaveIntercept(inversion, 2)).toBeNull();
    expect(criticalDistance(inversion, 2)).toBeNull();
    expect(branchExists(inversion, 2)).toBe(false);
    expect(branchExists(inversion, 3)).toBe(true);
    expect(branchExists(inversion, 1)).toBe(true);
  });

  it('crossoverDistance is null when either branch is impossible and throws outside 1…N−1', () => {
    expect(crossoverDistance(inversion, 1)).toBeNull();
    expect(crossoverDistance(inversion, 2)).toBeNull();
    expect(() => crossoverDistance(model11, 3)).toThrow(/from 1 to N − 1/);
  });

  it('branchTime is null for an impossible branch, exists exactly at x*_n, and throws for a bad branch or offset', () => {
    expect(branchTime(inversion, 2, 500)).toBeNull();
    const critical = criticalDistance(model11, 3) ?? Number.NaN;
    expect(branchTime(model11, 3, critical)).not.toBeNull();
    expect(branchTime(model11, 3, critical * (1 - 1e-12))).toBeNull();
    expect(() => branchTime(model11, 4, 10)).toThrow(/branch must be an integer from 1 to 3/);
    expect(() => branchTime(model11, 0, 10)).toThrow(/branch must be an integer/);
    expect(() => branchTime(model11, 2, -1)).toThrow(/offset must be zero or positive/);
  });

  it('firstArrival skips an impossible branch (never NaN) and gives time 0 at offset 0', () => {
    for (const offset of [0, 1, 10, 30, 100, 1000]) {
      const arrival = firstArrival(inversion, offset);
      expect(Number.isFinite(arrival.time)).toBe(true);
      expect(arrival.branch).not.toBe(2);
    }
    expect(firstArrival(model11, 0)).toEqual({ time: 0, branch: 1 });
  });

  it('firstArrival reports the shallower branch on an exact tie', () => {
    const twoLayer: LayeredModel = { velocities: [500, 1000], thicknesses: [0] };
    // With zero thickness, τ_2 = 0 and x*_2 = 0, so at offset 0 both branches give exactly 0 s.
    expect(firstArrival(twoLayer, 0)).toEqual({ time: 0, branch: 1 });
  });

  it('a zero-thickness layer still bars head waves along slower layers below it', () => {
    const model: LayeredModel = { velocities: [400, 2000, 1500, 3000], thicknesses: [5, 0, 8] };
    expect(branchExists(model, 3)).toBe(false);
    expect(headWaveIntercept(model, 4)).not.toBeNull();
  });

  it('the model functions throw with a message on a malformed model', () => {
    expect(() => firstArrival({ velocities: [], thicknesses: [] }, 1)).toThrow(/at least one velocity/);
    expect(() => firstArrival({ velocities: [400, 1600], thicknesses: [] }, 1)).toThrow(/need 1 thicknesses/);
    expect(() => firstArrival({ velocities: [400, -1600], thicknesses: [3] }, 1)).toThrow(/velocity of layer 2 must be positive/);
    expect(() => firstArrival({ velocities: [400, 1600], thicknesses: [-3] }, 1)).toThrow(/thickness of layer 1 must be zero or positive/);
    expect(() => firstArrival({ velocities: [400, 1600], thicknesses: [Number.NaN] }, 1)).toThrow(/thickness of layer 1/);
    expect(() => syntheticTimes(model11, [1, Number.POSITIVE_INFINITY])).toThrow(/offset must be zero or positive and finite/);
  });
});

describe('rmsResidual', () => {
  it('rmsResidual is the root mean square of observed minus model first arrivals', () => {
    const offsets = [10, 30, 60, 100];
    const shifts = [0.001, -0.002, 0.0005, 0.0015];
    const observed = offsets.map((offset, index) => firstArrival(model11, offset).time + (shifts[index] ?? 0));
    const expected = Math.sqrt(shifts.reduce((sum, shift) => sum + shift * shift, 0) / shifts.length);
    expectWithin(rmsResidual(model11, offsets, observed), expected, 1e-15, 'RMS of the shifts added to the model times');
  });

  it('rmsResidual throws for mismatched lengths, no picks or a non-finite time', () => {
    expect(() => rmsResidual(model11, [10, 20], [0.01])).toThrow(/2 offsets but 1 observed times/);
    expect(() => rmsResidual(model11, [], [])).toThrow(/no picks given/);
    expect(() => rmsResidual(model11, [10], [Number.NaN])).toThrow(/observed time 1 is not finite/);
  });
});
