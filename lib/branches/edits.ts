/**
 * Branch edits: the user's corrections to the split of picks into branches, applied to a pick
 * set — assign a pick to a branch, exclude it from every fit, or hand it back to the automatic
 * segmentation.
 *
 * - `assign: n` (integer ≥ 1) sets `branch = n` and `excluded = false`;
 * - `assign: 'exclude'` sets `excluded = true` and keeps `branch` (so un-excluding by a number or
 *   'automatic' is explicit);
 * - `assign: 'automatic'` sets `branch = null` and `excluded = false`.
 * Edits apply in list order, so a later edit of the same pick wins. The result is a new PickSet;
 * the input and its picks are never changed (unchanged picks are shared, edited ones are copies).
 * `columns` is kept as it was: it records what the table carried.
 *
 * Edges: a bad edit is a Problem (severity error) and refuses the whole list, every bad edit
 * reported: a pick index that is not an integer in [0, picks.length) (`edit-pick-out-of-range`,
 * line 1, since there is no pick line to name), or a branch that is not an integer ≥ 1
 * (`edit-branch-invalid`, on the pick's own file line). An empty list returns an equal copy.
 *
 * @example
 * applyBranchEdits(pickSet, [{ pickIndex: 4, assign: 2 }, { pickIndex: 9, assign: 'exclude' }])
 * // → { ok: true, value: { …pickSet, picks: [… pick 4 with branch 2, pick 9 excluded …] }, warnings: [] }
 */
import type { Outcome, Problem } from '../problems.js';
import type { Pick, PickSet } from '../picks/types.js';

/** One edit: which pick (index into `PickSet.picks`) and what to do with it. */
export interface BranchEdit {
  readonly pickIndex: number;
  readonly assign: number | 'exclude' | 'automatic';
}

export function applyBranchEdits(pickSet: PickSet, edits: readonly BranchEdit[]): Outcome<PickSet> {
  const problems: Problem[] = [];
  edits.forEach((edit, order) => {
    const pick = Number.isInteger(edit.pickIndex) ? pickSet.picks[edit.pickIndex] : undefined;
    if (pick === undefined) {
      problems.push({
        code: 'edit-pick-out-of-range',
        severity: 'error',
        line: 1,
        column: null,
        message: `branch edit ${order + 1} names pick ${edit.pickIndex}, but the picks are numbered 0 to ${pickSet.picks.length - 1}; the edit list may belong to another version of the pick table`,
        fix: 'reload the picks and make the edit again',
      });
      return;
    }
    if (typeof edit.assign === 'number' && !(Number.isInteger(edit.assign) && edit.assign >= 1)) {
      problems.push({
        code: 'edit-branch-invalid',
        severity: 'error',
        line: pick.line,
        column: null,
        field: 'branch',
        message: `branch edit ${order + 1} puts the pick of shot ${pick.shot} on branch ${edit.assign}, but branches are whole numbers from 1 (1 = direct wave)`,
        fix: "give a branch number 1, 2, 3, …, or 'exclude' or 'automatic'",
      });
    }
  });
  if (problems.length > 0) return { ok: false, problems };

  const picks: Pick[] = [...pickSet.picks];
  for (const edit of edits) {
    const pick = picks[edit.pickIndex] as Pick;
    if (edit.assign === 'exclude') picks[edit.pickIndex] = { ...pick, excluded: true };
    else if (edit.assign === 'automatic') picks[edit.pickIndex] = { ...pick, branch: null, excluded: false };
    else picks[edit.pickIndex] = { ...pick, branch: edit.assign, excluded: false };
  }
  return { ok: true, value: { ...pickSet, picks }, warnings: [] };
}
