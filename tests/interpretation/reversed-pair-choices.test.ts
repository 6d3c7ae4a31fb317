/**
 * Pairs the user names (lib/interpretation/reversed-pairs.ts, `reversedPairs` with the survey's shot
 * positions): a shot that is not in the pick table, and a pair written in the wrong order, are
 * refused with a reason that says what is wrong and how to write it — and through interpret() they
 * come out as `reversed-pair-refused` warnings.
 *
 * Data: a two-layer plane model (500/2000 m/s over 6 m), first arrivals the earlier of the direct
 * wave x/V_1 and the head wave x/V_2 + 2h·cos θ/V_1 (METHODS §1; Telford et al. 1990 ch. 4). The
 * convention checked — shot A's forward side with shot B's reverse side, x_A < x_B — is METHODS §5
 * and §6 (shot A at x = 0, B at x = L).
 */
import { describe, expect, it } from 'vitest';
import { readPickTable, type PickSet } from '../../lib/picks/index.js';
import { splitShotSides } from '../../lib/branches/sides.js';
import { segmentSide } from '../../lib/branches/segment.js';
import { refractorArrivals, type SideRefractorArrivals } from '../../lib/interpretation/refractor-arrivals.js';
import { reversedPairs } from '../../lib/interpretation/reversed-pairs.js';
import { interpret } from '../../lib/interpret.js';
import { range } from '../helpers/synthetic-survey.js';

const V1 = 500;
const V2 = 2000;
/** Intercept 2h·cos θ/V_1 for h = 6 m, s (METHODS §1). */
const TAU = 2 * 6 * Math.sqrt(1 / V1 ** 2 - 1 / V2 ** 2);
/** The engineering time resolution the pipeline uses (lib/interpret.ts TIME_RESOLUTION). */
const TIME_RESOLUTION = 1e-4;
const SHOTS = [['W', 0], ['M', 60], ['E', 120]] as const;

function pickSet(): PickSet {
  const lines = SHOTS.flatMap(([shot, sourceX]) =>
    range(61, 0, 2)
      .filter((receiverX) => receiverX !== sourceX)
      .map((receiverX) => {
        const offset = Math.abs(receiverX - sourceX);
        return [shot, sourceX, receiverX, (Math.min(offset / V1, offset / V2 + TAU) * 1000).toFixed(4)].join(',');
      }),
  );
  const outcome = readPickTable(['shot,source_x_m,receiver_x_m,time_ms', ...lines].join('\n'));
  if (!outcome.ok) throw new Error(outcome.problems.map((problem) => problem.message).join('; '));
  return outcome.value;
}

const PICKS = pickSet();

/** Refractor-2 arrivals of every side that has them, as the pipeline builds them. */
const ARRIVALS: SideRefractorArrivals[] = splitShotSides(PICKS)
  .map((side) => segmentSide(side, { timeResolution: TIME_RESOLUTION }))
  .map((segmentation) => refractorArrivals(segmentation, 2, { pickSet: PICKS, nearSurfaceVelocity: V1, refractorVelocity: V2, datumElevation: null, timeResolution: TIME_RESOLUTION }))
  .filter((entry): entry is SideRefractorArrivals => entry !== null);

/** Every shot of the survey and its source x, as reversed-profile.ts passes them. */
const POSITIONS = new Map<string, number>(SHOTS.map(([shot, x]) => [shot, x]));

const ids = (pairs: readonly { forward: { shot: string }; reverse: { shot: string } }[]) => pairs.map((pair) => `${pair.forward.shot} → ${pair.reverse.shot}`);
const plain = (text: string) => text.replace(/\u00a0/g, ' ');

describe('reversedPairs: a named shot that is not in the pick table', () => {
  it('reversedPairs refuses the pair, naming the unknown shot in quotes and listing the shots the table has, and still forms the good pairs', () => {
    const { pairs, refused } = reversedPairs(ARRIVALS, [{ forwardShot: 'W', reverseShot: 'E' }, { forwardShot: 'Z', reverseShot: 'E' }], TIME_RESOLUTION, POSITIONS);
    expect(ids(pairs)).toEqual(['W → E']);
    expect(refused.map((entry) => entry.choice)).toEqual([{ forwardShot: 'Z', reverseShot: 'E' }]);
    const reason = refused[0]!.reason;
    // Source: the pick table itself (its shots W, M, E, in the order they first appear).
    expect(reason).toContain('there is no shot "Z" in the pick table');
    expect(reason).toContain('(its shots: W, M, E)');
    expect(reason).toContain('check the spelling');
  });

  it('reversedPairs names an unknown reverse shot too, and both when neither is known', () => {
    // Source: the pick table — shot ids are matched exactly, so "e" is not shot E.
    const { refused } = reversedPairs(ARRIVALS, [{ forwardShot: 'W', reverseShot: 'e' }, { forwardShot: 'Y', reverseShot: 'Z' }], TIME_RESOLUTION, POSITIONS);
    expect(refused.map((entry) => entry.reason.split(' in the pick table')[0])).toEqual(['there is no shot "e"', 'there is no shot "Y" or "Z"']);
  });

  it('reversedPairs lists at most 8 of the table\'s shots, then an ellipsis', () => {
    // Presentation (no physics): a long list of shots is cut at 8.
    const many = new Map<string, number>(range(10, 0, 12).map((x, k) => [`S${k + 1}`, x]));
    const { refused } = reversedPairs(ARRIVALS, [{ forwardShot: 'S1', reverseShot: 'S99' }], TIME_RESOLUTION, many);
    expect(refused[0]!.reason).toContain('(its shots: S1, S2, S3, S4, S5, S6, S7, S8, …)');
    expect(refused[0]!.reason).not.toContain('S9,');
  });

  it('the unknown shot is reported before any question of order', () => {
    // Z is unknown and E lies east of W: only the unknown shot is the problem named.
    const { refused } = reversedPairs(ARRIVALS, [{ forwardShot: 'E', reverseShot: 'Z' }], TIME_RESOLUTION, POSITIONS);
    expect(refused[0]!.reason).toContain('there is no shot "Z"');
    expect(refused[0]!.reason).not.toContain('order');
  });
});

describe('reversedPairs: a pair named in the wrong order', () => {
  it('reversedPairs refuses E:W, saying the order is wrong, where each shot is, and that W:E is the way to write it (METHODS §5: x_A < x_B)', () => {
    const { pairs, refused } = reversedPairs(ARRIVALS, [{ forwardShot: 'E', reverseShot: 'W' }], TIME_RESOLUTION, POSITIONS);
    expect(pairs).toEqual([]);
    const reason = plain(refused[0]!.reason);
    expect(reason).toContain('the order is wrong');
    expect(reason).toContain('the first shot of a pair is the one at the smaller x');
    expect(reason).toContain('(E is at 120 m, W at 0 m)');
    expect(reason).toContain('name it W:E');
    // The advice works: W:E forms the pair.
    expect(ids(reversedPairs(ARRIVALS, [{ forwardShot: 'W', reverseShot: 'E' }], TIME_RESOLUTION, POSITIONS).pairs)).toEqual(['W → E']);
  });

  it('reversedPairs refuses two shots at the same position, saying so (no reversed pair without two ends)', () => {
    // Source: METHODS §5/§6 — a reversed pair has its shots at the two ends, x_A < x_B.
    const withTwin = new Map(POSITIONS).set('W2', 0);
    const { refused } = reversedPairs(ARRIVALS, [{ forwardShot: 'W', reverseShot: 'W2' }], TIME_RESOLUTION, withTwin);
    expect(plain(refused[0]!.reason)).toContain('both shots are at x = 0 m');
    expect(refused[0]!.reason).not.toContain('order is wrong');
  });

  it('without the shot positions, reversedPairs falls back to the branches it has: no order or spelling advice', () => {
    // Source: the arrivals themselves — E has only a reverse head-wave branch (it is the east end), W only a forward one.
    const { refused } = reversedPairs(ARRIVALS, [{ forwardShot: 'E', reverseShot: 'W' }, { forwardShot: 'Z', reverseShot: 'E' }], TIME_RESOLUTION);
    expect(refused.map((entry) => entry.reason)).toEqual(['shot E has no forward head-wave branch; shot W has no reverse head-wave branch', 'shot Z has no forward head-wave branch']);
  });
});

describe('bad pair choices through interpret()', () => {
  it('interpret() turns each refused choice into a reversed-pair-refused warning on its first shot, with the reason, and keeps the good pair', () => {
    const result = interpret(PICKS, {
      reversedPairs: [
        { forwardShot: 'W', reverseShot: 'M' },
        { forwardShot: 'E', reverseShot: 'M' },
        { forwardShot: 'W', reverseShot: 'X' },
      ],
    });
    // Source: METHODS §5/§6 (x_A < x_B: W 0 m < M 60 m; E 120 m is east of M) and the pick table (no shot X).
    expect(result.reversedPairs.map((pair) => [pair.id, pair.chosenBy])).toEqual([['W → M', 'user']]);
    const refused = result.warnings.filter((warning) => warning.code === 'reversed-pair-refused');
    expect(refused.map((warning) => warning.shot)).toEqual(['E', 'W']);
    expect(plain(refused[0]!.message)).toMatch(/^pair E → M: the order is wrong: .*\(E is at 120 m, M at 60 m\) — name it M:E \(forward shot M, reverse shot E\)$/);
    expect(refused[1]!.message).toMatch(/^pair W → X: there is no shot "X" in the pick table \(its shots: W, M, E\); check the spelling$/);
  });
});
