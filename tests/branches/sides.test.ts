/** splitShotSides and picksLeftOutOfSides: every sentence of their doc comment. */
import { describe, expect, it } from 'vitest';
import { picksLeftOutOfSides, splitShotSides } from '../../lib/branches/sides.js';
import { deepFreeze, makePickSet } from './build.js';

// Two shots: S1 at 0 m (forward only, plus one zero-offset pick), S2 at 50 m (both sides).
const PICKS = makePickSet([
  { shot: 'S1', sourceX: 0, receiverX: 20, time: 0.02 },
  { shot: 'S1', sourceX: 0, receiverX: 10, time: 0.01 },
  { shot: 'S1', sourceX: 0, receiverX: 0, time: 0.0 },
  { shot: 'S1', sourceX: 0, receiverX: 30, time: 0.03, excluded: true },
  { shot: 'S2', sourceX: 50, receiverX: 40, time: 0.011, sigma: 0.001 },
  { shot: 'S2', sourceX: 50, receiverX: 70, time: 0.021, sigma: 0.001, branch: 2 },
  { shot: 'S2', sourceX: 50, receiverX: 60, time: 0.0105, sigma: 0.001 },
  { shot: 'S2', sourceX: 50, receiverX: 30, time: 0.0205 },
  { shot: 'S2', sourceX: 50, receiverX: 0, time: 0.05, sigma: 0.002 },
]);

describe('splitShotSides', () => {
  const sides = splitShotSides(deepFreeze(PICKS));

  it('lists shots in shotIds order, forward side before reverse, and leaves out empty sides', () => {
    expect(sides.map((side) => `${side.shot}/${side.side}`)).toEqual(['S1/forward', 'S2/forward', 'S2/reverse']);
  });

  it('sorts each side by offset |receiverX − sourceX| ascending and maps positions back to picks', () => {
    const [s1, s2Forward, s2Reverse] = sides;
    expect(s1?.offsets).toEqual([10, 20]);
    expect(s1?.times).toEqual([0.01, 0.02]);
    expect(s1?.pickIndices).toEqual([1, 0]);
    expect(s2Forward?.offsets).toEqual([10, 20]);
    expect(s2Forward?.pickIndices).toEqual([6, 5]);
    expect(s2Reverse?.offsets).toEqual([10, 20, 50]);
    expect(s2Reverse?.pickIndices).toEqual([4, 7, 8]);
    expect(s2Reverse?.sourceX).toBe(50);
  });

  it('keeps ties in file order', () => {
    const tied = makePickSet([
      { receiverX: 20, time: 0.021 },
      { receiverX: 10, time: 0.01 },
      { receiverX: 20, time: 0.019 },
      { receiverX: 20, time: 0.02 },
    ]);
    expect(splitShotSides(tied)[0]?.pickIndices).toEqual([1, 0, 2, 3]);
  });

  it('leaves excluded picks and zero-offset picks out of every side', () => {
    const held = sides.flatMap((side) => side.pickIndices);
    expect(held).not.toContain(2);
    expect(held).not.toContain(3);
  });

  it('gives sigmas only when every pick on the side has one', () => {
    expect(sides[0]?.sigmas).toBeNull();
    expect(sides[1]?.sigmas).toEqual([0.001, 0.001]);
    expect(sides[2]?.sigmas).toBeNull(); // the 30 m pick has none
  });

  it('carries user branches aligned with the offsets (null = automatic)', () => {
    expect(sides[1]?.userBranches).toEqual([null, 2]);
    expect(sides[0]?.userBranches).toEqual([null, null]);
  });

  it('marks a shot as surface unless some pick gives a source depth above 0', () => {
    const buried = makePickSet([
      { shot: 'A', receiverX: 10, sourceDepth: 0 },
      { shot: 'A', receiverX: 20, sourceDepth: null },
      { shot: 'B', receiverX: 10, sourceDepth: null },
      { shot: 'B', receiverX: 20, sourceDepth: 1.5 },
    ]);
    expect(splitShotSides(buried).map((side) => side.surfaceShot)).toEqual([true, false]);
    expect(sides.every((side) => side.surfaceShot)).toBe(true);
  });

  it('throws, naming the shot and both lines, when one shot has two source positions', () => {
    const inconsistent = makePickSet([
      { shot: 'S9', sourceX: 0, receiverX: 10 },
      { shot: 'S9', sourceX: 2, receiverX: 20 },
    ]);
    expect(() => splitShotSides(inconsistent)).toThrow(/shot S9 .* 0 m on line 2 but at 2 m on line 3/);
  });

  it('gives no sides for a shot id without picks, and none for an empty pick set', () => {
    expect(splitShotSides({ ...PICKS, shotIds: [...PICKS.shotIds, 'ghost'] })).toHaveLength(3);
    expect(splitShotSides(makePickSet([]))).toEqual([]);
  });
});

describe('picksLeftOutOfSides', () => {
  it('lists excluded picks (wherever they lie) and non-excluded zero-offset picks, in file order', () => {
    const withExcludedZero = makePickSet([...PICKS.picks, { shot: 'S2', sourceX: 50, receiverX: 50, time: 0, excluded: true }]);
    expect(picksLeftOutOfSides(withExcludedZero)).toEqual({ excluded: [3, 9], zeroOffset: [2] });
  });

  it('together with the sides accounts for every pick exactly once', () => {
    const left = picksLeftOutOfSides(PICKS);
    const all = [...splitShotSides(PICKS).flatMap((side) => side.pickIndices), ...left.excluded, ...left.zeroOffset].sort((a, b) => a - b);
    expect(all).toEqual(PICKS.picks.map((_, index) => index));
  });
});
