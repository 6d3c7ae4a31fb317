/** applyBranchEdits: every sentence of its doc comment, immutability included. */
import { describe, expect, it } from 'vitest';
import { applyBranchEdits } from '../../lib/branches/edits.js';
import type { PickSet } from '../../lib/picks/types.js';
import { deepFreeze, makePickSet } from './build.js';

const PICKS = makePickSet([
  { receiverX: 10, time: 0.01 },
  { receiverX: 20, time: 0.02, branch: 1 },
  { receiverX: 30, time: 0.025, branch: 2, excluded: true },
  { receiverX: 40, time: 0.03 },
]);

function edited(outcome: ReturnType<typeof applyBranchEdits>): PickSet {
  if (!outcome.ok) throw new Error(outcome.problems.map((problem) => problem.message).join('; '));
  return outcome.value;
}

describe('applyBranchEdits', () => {
  it('assigns a branch number (and un-excludes), excludes keeping the branch, and hands a pick back to automatic', () => {
    const result = edited(
      applyBranchEdits(PICKS, [
        { pickIndex: 0, assign: 3 },
        { pickIndex: 1, assign: 'exclude' },
        { pickIndex: 2, assign: 'automatic' },
      ]),
    );
    expect(result.picks.map((pick) => [pick.branch, pick.excluded])).toEqual([
      [3, false],
      [1, true],
      [null, false],
      [null, false],
    ]);
    const reassigned = edited(applyBranchEdits(PICKS, [{ pickIndex: 2, assign: 2 }]));
    expect(reassigned.picks[2]?.excluded).toBe(false);
  });

  it('applies edits in order, so a later edit of the same pick wins', () => {
    const result = edited(
      applyBranchEdits(PICKS, [
        { pickIndex: 3, assign: 2 },
        { pickIndex: 3, assign: 'exclude' },
        { pickIndex: 3, assign: 4 },
      ]),
    );
    expect(result.picks[3]).toMatchObject({ branch: 4, excluded: false });
  });

  it('returns a new pick set and never changes the input; unchanged picks are shared, edited ones copied', () => {
    const frozen = deepFreeze(structuredClone(PICKS));
    const before = JSON.stringify(frozen);
    const result = edited(applyBranchEdits(frozen, [{ pickIndex: 0, assign: 2 }]));
    expect(JSON.stringify(frozen)).toBe(before);
    expect(result).not.toBe(frozen);
    expect(result.picks).not.toBe(frozen.picks);
    expect(result.picks[1]).toBe(frozen.picks[1]);
    expect(result.picks[0]).not.toBe(frozen.picks[0]);
    expect(result.columns).toEqual(frozen.columns); // columns record the table, not the edits
    expect(result.shotIds).toEqual(frozen.shotIds);
  });

  it('returns an equal copy for an empty edit list, with no warnings', () => {
    const outcome = applyBranchEdits(PICKS, []);
    expect(outcome).toEqual({ ok: true, value: PICKS, warnings: [] });
    expect(outcome.ok && outcome.value).not.toBe(PICKS);
  });

  it('refuses the whole list for a pick index out of range or not an integer, at line 1', () => {
    const outcome = applyBranchEdits(PICKS, [
      { pickIndex: 0, assign: 2 },
      { pickIndex: 4, assign: 1 },
      { pickIndex: -1, assign: 'exclude' },
      { pickIndex: 1.5, assign: 'automatic' },
    ]);
    expect(outcome.ok).toBe(false);
    if (outcome.ok) return;
    expect(outcome.problems.map((problem) => [problem.code, problem.line, problem.severity])).toEqual([
      ['edit-pick-out-of-range', 1, 'error'],
      ['edit-pick-out-of-range', 1, 'error'],
      ['edit-pick-out-of-range', 1, 'error'],
    ]);
    expect(outcome.problems[0]?.message).toMatch(/branch edit 2 names pick 4, but the picks are numbered 0 to 3/);
    expect(outcome.problems[0]?.fix).toMatch(/reload the picks/);
  });

  it("refuses a branch below 1 or not an integer, on the pick's own file line", () => {
    const outcome = applyBranchEdits(PICKS, [
      { pickIndex: 1, assign: 0 },
      { pickIndex: 2, assign: 2.5 },
      { pickIndex: 3, assign: Number.NaN },
    ]);
    expect(outcome.ok).toBe(false);
    if (outcome.ok) return;
    expect(outcome.problems.map((problem) => [problem.code, problem.line, problem.field])).toEqual([
      ['edit-branch-invalid', 3, 'branch'],
      ['edit-branch-invalid', 4, 'branch'],
      ['edit-branch-invalid', 5, 'branch'],
    ]);
    expect(outcome.problems[1]?.message).toMatch(/shot S1 on branch 2.5, but branches are whole numbers from 1/);
  });
});
