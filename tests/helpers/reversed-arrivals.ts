/**
 * Reversed head-wave arrivals for the delay-time method tests, built from the Fermat-path oracle
 * (tests/oracles/dipping-refractor.ts): explicit ray geometry, independent of the methods tested.
 */
import type { ReversedArrivals } from '../../lib/depth/delay-depth.js';
import { dippingHeadWaveTime, type DippingModel } from '../oracles/dipping-refractor.js';

/** Pick SE given with exact oracle times: a typical engineering pick SE (0.1 ms, common practice). */
export const ORACLE_PICK_SE = 1e-4;

/**
 * Head-wave arrivals of refractor `refractor` from shot A at 0 (receivers step…length) and shot B at
 * `length` (receivers 0…length − step) by the Fermat oracle, every `step` m, with pick SE `sigma`;
 * t_AB from the oracle too.
 */
export function oracleArrivals(model: DippingModel, refractor: number, length: number, step: number, sigma = ORACLE_PICK_SE): ReversedArrivals {
  const count = Math.round(length / step);
  const forwardX: number[] = [];
  const forwardTimes: number[] = [];
  const reverseX: number[] = [];
  const reverseTimes: number[] = [];
  for (let index = 1; index <= count; index += 1) {
    const time = dippingHeadWaveTime(model, refractor, 0, index * step);
    if (time !== null) {
      forwardX.push(index * step);
      forwardTimes.push(time);
    }
  }
  for (let index = 0; index < count; index += 1) {
    const time = dippingHeadWaveTime(model, refractor, length, index * step);
    if (time !== null) {
      reverseX.push(index * step);
      reverseTimes.push(time);
    }
  }
  const reciprocal = dippingHeadWaveTime(model, refractor, 0, length);
  if (reciprocal === null) throw new Error('oracle: no head wave from A to B');
  return {
    forwardSourceX: 0,
    reverseSourceX: length,
    forward: { receiverX: forwardX, times: forwardTimes, sigmas: forwardX.map(() => sigma) },
    reverse: { receiverX: reverseX, times: reverseTimes, sigmas: reverseX.map(() => sigma) },
    reciprocalTime: { value: reciprocal, standardError: 0 },
  };
}
