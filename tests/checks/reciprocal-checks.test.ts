/**
 * reciprocalTimeWarnings (lib/checks/reciprocal-checks.ts): misfit warnings and the suspect shot.
 *
 * Data: four shots W, M1, M2, E at 0, 40, 80, 120 m over a two-layer plane model (500/2000 m/s, 6 m),
 * picks from the closed forms x/V_1 and x/V_2 + 2h·cos θ/V_1 (METHODS §1; Telford et al. 1990 ch. 4),
 * which obey reciprocity exactly; a time-zero error of δ is then added to every pick of one shot. The
 * reference for each misfit is that injected δ (common practice: a time-zero error of shot S shifts
 * t_SX by δ, so t_AB − t_BA is +δ when S = A and −δ when S = B). Pairs are formed by the pipeline's
 * own pieces: readPickTable → splitShotSides → segmentSide → refractorArrivals → reversedPairs.
 */
import { describe, expect, it } from 'vitest';
import { readPickTable, type PickSet } from '../../lib/picks/index.js';
import { splitShotSides } from '../../lib/branches/sides.js';
import { segmentSide } from '../../lib/branches/segment.js';
import { refractorArrivals, type SideRefractorArrivals } from '../../lib/interpretation/refractor-arrivals.js';
import { reversedPairs, type ReversedPair } from '../../lib/interpretation/reversed-pairs.js';
import { reciprocalTimeWarnings } from '../../lib/checks/reciprocal-checks.js';
import type { InterpretationWarning } from '../../lib/checks/warning.js';
import { range } from '../helpers/synthetic-survey.js';
import { expectWithin } from '../helpers/expect-within.js';

const V1 = 500;
const V2 = 2000;
const TAU = 2 * 6 * Math.sqrt(1 / V1 ** 2 - 1 / V2 ** 2);
/** The engineering time resolution the pipeline uses (lib/interpret.ts TIME_RESOLUTION). */
const TIME_RESOLUTION = 1e-4;
/** Both reciprocal times are picks written to 1e-4 ms: their difference is exact to 2e-7 s. */
const TABLE_ROUNDING = 2e-7;
/** A trigger delay of a few milliseconds, the size the pipeline test injects too. */
const DELAY = 0.003;

const SHOTS = [['W', 0], ['M1', 40], ['M2', 80], ['E', 120]] as const;

function pairsWith(errors: Readonly<Record<string, number>>, shots: readonly (readonly [string, number])[] = SHOTS): ReversedPair[] {
  const lines = shots.flatMap(([shot, sourceX]) =>
    range(61, 0, 2)
      .filter((receiverX) => receiverX !== sourceX)
      .map((receiverX) => {
        const offset = Math.abs(receiverX - sourceX);
        const time = Math.min(offset / V1, offset / V2 + TAU) + (errors[shot] ?? 0);
        return `${shot},${sourceX},${receiverX},${(time * 1000).toFixed(4)}`;
      }),
  );
  const outcome = readPickTable(['shot,source_x_m,receiver_x_m,time_ms', ...lines].join('\n'));
  if (!outcome.ok) throw new Error(outcome.problems.map((problem) => problem.message).join('; '));
  const pickSet: PickSet = outcome.value;
  const arrivals = splitShotSides(pickSet)
    .map((side) => segmentSide(side, { timeResolution: TIME_RESOLUTION }))
    .map((segmentation) => refractorArrivals(segmentation, 2, { pickSet, nearSurfaceVelocity: V1, refractorVelocity: V2, datumElevation: null, timeResolution: TIME_RESOLUTION }))
    .filter((entry): entry is SideRefractorArrivals => entry !== null);
  return [...reversedPairs(arrivals, null, TIME_RESOLUTION).pairs];
}

const misfits = (warnings: readonly InterpretationWarning[]) => warnings.filter((warning) => warning.code === 'reciprocal-time-misfit');
const suspects = (warnings: readonly InterpretationWarning[]) => warnings.filter((warning) => warning.code === 'reciprocal-time-shot-suspect');
const pairName = (warning: InterpretationWarning) => `${String(warning.details?.forwardShot)}→${String(warning.details?.reverseShot)}`;

describe('reciprocalTimeWarnings', () => {
  it('reciprocalTimeWarnings is silent on data that obey reciprocity (all six pairs of four shots checked)', () => {
    const pairs = pairsWith({});
    expect(pairs.map((pair) => `${pair.forward.shot}→${pair.reverse.shot}`)).toEqual(['W→M1', 'W→M2', 'W→E', 'M1→M2', 'M1→E', 'M2→E']);
    expect(pairs.every((pair) => pair.check !== null)).toBe(true);
    expect(reciprocalTimeWarnings(pairs)).toEqual([]);
  });

  it('reciprocalTimeWarnings flags the three pairs of one late shot with misfits of ∓δ and names that shot, late by δ', () => {
    const warnings = reciprocalTimeWarnings(pairsWith({ M1: DELAY }));
    expect(misfits(warnings).map(pairName)).toEqual(['W→M1', 'M1→M2', 'M1→E']);
    for (const warning of misfits(warnings)) {
      const sign = warning.details?.forwardShot === 'M1' ? 1 : -1;
      expectWithin(Number(warning.details?.misfit), sign * DELAY, TABLE_ROUNDING, `injected time-zero error: t_AB − t_BA = ${sign > 0 ? '+' : '−'}δ`);
      expect(Number(warning.details?.limit)).toBeLessThan(DELAY / 10);
      expect(warning.layer).toBe(2);
      expect(warning.message).toContain(`shots ${String(warning.details?.forwardShot)} and ${String(warning.details?.reverseShot)}, refractor 2`);
    }
    const named = suspects(warnings);
    expect(named.map((warning) => warning.shot)).toEqual(['M1']);
    expect(named[0]!.message).toContain('its times are late by 3\u00a0ms');
    expect(named[0]!.details).toMatchObject({ pairs: 3, misfits: 3 });
    expectWithin(Number(named[0]!.details?.lateness), DELAY, TABLE_ROUNDING, 'injected time-zero error δ');
  });

  it('reciprocalTimeWarnings names an early shot with a negative lateness and the word "early"', () => {
    const warnings = reciprocalTimeWarnings(pairsWith({ M2: -DELAY }));
    expect(misfits(warnings).map(pairName)).toEqual(['W→M2', 'M1→M2', 'M2→E']);
    const named = suspects(warnings);
    expect(named.map((warning) => warning.shot)).toEqual(['M2']);
    expect(named[0]!.message).toContain('its times are early by 3\u00a0ms');
    expectWithin(Number(named[0]!.details?.lateness), -DELAY, TABLE_ROUNDING, 'injected time-zero error −δ');
  });

  it('reciprocalTimeWarnings names no shot when two shots are wrong and the rule does not hold (one of them has lateness of both signs)', () => {
    // M1 +3 ms, M2 +2 ms: M1's latenesses are +3, +1, +3 ms (a suspect alone), M2's +2, −1, +2 ms (mixed), and the pair
    // W→M2 misfits with neither of its shots a suspect: the misfits are not explained by single shots.
    const warnings = reciprocalTimeWarnings(pairsWith({ M1: DELAY, M2: 0.002 }));
    expect(misfits(warnings).map(pairName)).toEqual(['W→M1', 'W→M2', 'M1→M2', 'M1→E', 'M2→E']);
    const between = misfits(warnings).find((warning) => pairName(warning) === 'M1→M2')!;
    expectWithin(Number(between.details?.misfit), DELAY - 0.002, TABLE_ROUNDING, 'injected errors: δ_M1 − δ_M2');
    expect(suspects(warnings)).toEqual([]);
  });

  it('reciprocalTimeWarnings names both shots when two shots are wrong and every misfit is explained by them (one late, one early)', () => {
    const warnings = reciprocalTimeWarnings(pairsWith({ M1: DELAY, M2: -DELAY }));
    expect(misfits(warnings)).toHaveLength(5);
    const named = suspects(warnings);
    expect(named.map((warning) => warning.shot)).toEqual(['M1', 'M2']);
    expect(named[0]!.message).toContain('late');
    expect(named[1]!.message).toContain('early');
    // The pair of the two wrong shots misfits by δ_M1 − δ_M2 = 6 ms, which counts for both: mean lateness (3 + 6 + 3)/3.
    expectWithin(Number(named[0]!.details?.lateness), (DELAY + 2 * DELAY + DELAY) / 3, TABLE_ROUNDING, 'injected errors');
    expectWithin(Number(named[1]!.details?.lateness), -(DELAY + 2 * DELAY + DELAY) / 3, TABLE_ROUNDING, 'injected errors');
  });

  it('reciprocalTimeWarnings flags one misfitting pair alone but names neither shot: either could be at fault', () => {
    const warnings = reciprocalTimeWarnings(pairsWith({ E: DELAY }, [['W', 0], ['E', 120]]));
    expect(misfits(warnings).map(pairName)).toEqual(['W→E']);
    expectWithin(Number(misfits(warnings)[0]!.details?.misfit), -DELAY, TABLE_ROUNDING, 'injected time-zero error of the reverse shot: −δ');
    expect(suspects(warnings)).toEqual([]);
  });

  it('reciprocalTimeWarnings ignores pairs without a check (one reciprocal reading), in the warnings and in the tally', () => {
    const pairs = pairsWith({ M1: DELAY }).map((pair) => (pair.forward.shot === 'M1' || pair.reverse.shot === 'M1' ? { ...pair, check: null } : pair));
    expect(reciprocalTimeWarnings(pairs)).toEqual([]);
  });
});
