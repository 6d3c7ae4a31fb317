/** segmentSide on user-assigned sides (segmentByUserBranches): every sentence of its doc comment. */
import { describe, expect, it } from 'vitest';
import { fitLine } from '../../lib/branches/line-fit.js';
import { segmentSide } from '../../lib/branches/segment.js';
import { segmentByUserBranches } from '../../lib/branches/user-branches.js';
import { expectRelative } from '../helpers/expect-within.js';
import { makeSide } from './build.js';
import { CASE_1_1 } from '../model/check-case-1-1.js';
import { firstArrivalByRays } from '../oracles/ray-geometry.js';

// METHODS check case 1.1 model, picks every 2.5 m to 60 m by ray geometry, with a small fixed ripple.
const OFFSETS = Array.from({ length: 24 }, (_, index) => 2.5 * (index + 1));
const TIMES = OFFSETS.map(
  (offset, index) => firstArrivalByRays(CASE_1_1.velocities, CASE_1_1.thicknesses, offset).time + 0.1e-3 * Math.sin(2.3 * (index + 1)),
);
/** True first-arrival branch of each pick (crossovers 10.33 and 34.25 m, METHODS check case 1.1). */
const TRUE_BRANCH = OFFSETS.map((offset) => (offset < 10.33 ? 1 : offset < 34.25 ? 2 : 3));

describe('segmentSide with user branches', () => {
  it('is user-assigned as soon as one pick carries a user branch: no candidates, assignedBy user', () => {
    const labels = OFFSETS.map((_, index) => (index === 10 ? 2 : null));
    const segmentation = segmentSide(makeSide(OFFSETS, TIMES, { userBranches: labels }));
    expect(segmentation.assignedBy).toBe('user');
    expect(segmentation.candidates).toEqual([]);
    expect(segmentation.branches.every((branch) => branch.assignedBy === 'user')).toBe(true);
  });

  it('keeps labelled picks on their branch and gives each unlabelled pick to the line predicting it best', () => {
    // Label three picks of each true branch; leave the rest to the lines.
    const labelled = new Set([0, 1, 2, 5, 8, 11, 16, 20, 23]);
    const labels = TRUE_BRANCH.map((branch, index) => (labelled.has(index) ? branch : null));
    const segmentation = segmentSide(makeSide(OFFSETS, TIMES, { userBranches: labels }));
    expect(segmentation.branches.map((branch) => branch.index)).toEqual([1, 2, 3]);
    // Predicted by hand: each line from its three labelled picks, nearest |t − a − b·x| wins.
    const lines = [1, 2, 3].map((branch) => {
      const members = [...labelled].filter((index) => TRUE_BRANCH[index] === branch);
      const outcome = fitLine(
        members.map((index) => OFFSETS[index] as number),
        members.map((index) => TIMES[index] as number),
        null,
        { throughOrigin: branch === 1 },
      );
      if (!outcome.ok) throw new Error(outcome.message);
      return outcome.fit;
    });
    const expected = OFFSETS.map((offset, index) => {
      const label = labels[index];
      if (label !== null && label !== undefined) return label;
      const misfits = lines.map((line) => Math.abs((TIMES[index] as number) - line.intercept - line.slope * offset));
      return misfits.indexOf(Math.min(...misfits)) + 1;
    });
    const assigned = new Array<number>(OFFSETS.length).fill(0);
    for (const branch of segmentation.branches) for (const member of branch.members) assigned[member] = branch.index;
    expect(assigned).toEqual(expected);
    expect(segmentation.branches.every((branch) => branch.members.every((member, order) => order === 0 || member > (branch.members[order - 1] as number)))).toBe(true);
  });

  it('refits each branch from all its members; branch 1 of a surface shot through the origin', () => {
    const labels = TRUE_BRANCH.map((branch, index) => (index % 3 === 0 ? branch : null));
    const segmentation = segmentSide(makeSide(OFFSETS, TIMES, { userBranches: labels }), { fitMethod: 'theil-sen' });
    expect(segmentation.branches.map((branch) => branch.index)).toEqual([1, 2, 3]);
    for (const branch of segmentation.branches) {
      const outcome = fitLine(
        branch.members.map((member) => OFFSETS[member] as number),
        branch.members.map((member) => TIMES[member] as number),
        null,
        { method: 'theil-sen', throughOrigin: branch.index === 1 },
      );
      expect(outcome.ok && outcome.fit).toEqual(branch.fit);
      expect(branch.firstOffset).toBe(OFFSETS[branch.members[0] as number]);
    }
    expect(segmentation.branches[0]?.fit.throughOrigin).toBe(true);
    const buried = segmentSide(makeSide(OFFSETS, TIMES, { userBranches: labels, surfaceShot: false }));
    expect(buried.branches[0]?.fit.throughOrigin).toBe(false);
  });

  it('keeps the user numbering with a gap and notes each missing number (user-branch-gap)', () => {
    // Labels 1 and 4 only: 2 and 3 are missing.
    const labels = OFFSETS.map((offset, index) => (index < 3 ? 1 : index > 19 ? 4 : null));
    const segmentation = segmentSide(makeSide(OFFSETS, TIMES, { userBranches: labels }));
    expect(segmentation.branches.map((branch) => branch.index)).toEqual([1, 4]);
    expect(segmentation.notes.filter((note) => note.code === 'user-branch-gap').map((note) => note.branch)).toEqual([2, 3]);
    expect(segmentation.notes[0]?.message).toMatch(/shot S1, forward side: the user-assigned branches skip branch 2/);
  });

  it('notes a branch missing below the lowest label too (labels start at 2)', () => {
    const labels = TRUE_BRANCH.map((branch) => (branch === 1 ? null : branch));
    const segmentation = segmentSide(makeSide(OFFSETS, TIMES, { userBranches: labels }));
    expect(segmentation.notes.map((note) => [note.code, note.branch])).toEqual([['user-branch-gap', 1]]);
    // Unlabelled direct picks go to the best-predicting fitted line (branch 2 here).
    expect(segmentation.branches.map((branch) => branch.index)).toEqual([2, 3]);
  });

  it('notes fit-refused for a user branch whose labelled picks cannot be fitted, and leaves it out', () => {
    // Branch 3 has one labelled pick: a free line needs 3.
    const labels = OFFSETS.map((_, index) => (index < 4 ? 1 : index >= 5 && index < 12 ? 2 : index === 20 ? 3 : null));
    const segmentation = segmentByUserBranches(makeSide(OFFSETS, TIMES, { userBranches: labels }), 'least-squares');
    expect(segmentation.branches.map((branch) => branch.index)).toEqual([1, 2]);
    const refused = segmentation.notes.filter((note) => note.code === 'fit-refused');
    expect(refused.map((note) => note.branch)).toEqual([3]);
    expect(refused[0]?.message).toMatch(/branch 3 \(user-assigned\): a line with a free intercept needs at least 3 picks/);
    // Every unlabelled pick still found a home among the fitted branches; the refused pick is in none.
    const held = segmentation.branches.flatMap((branch) => branch.members);
    expect(held).toHaveLength(OFFSETS.length - 1);
    expect(held).not.toContain(20);
  });

  it('leaves unlabelled picks in no branch when no user branch can be fitted', () => {
    const labels = OFFSETS.map((_, index) => (index === 3 ? 2 : null));
    const segmentation = segmentSide(makeSide(OFFSETS, TIMES, { userBranches: labels }));
    expect(segmentation.branches).toEqual([]);
    expect(segmentation.notes.map((note) => note.code)).toEqual(['user-branch-gap', 'fit-refused']);
  });

  it('gives a tie in misfit to the lower branch index', () => {
    // Two labelled lines crossing at x = 20 m; an unlabelled pick exactly at the crossover.
    const offsets = [5, 10, 15, 20, 25, 30, 35];
    const times = [0.005, 0.01, 0.015, 0.02, 0.0225, 0.025, 0.0275];
    const labels = [1, 1, 1, null, 2, 2, 2];
    const segmentation = segmentSide(makeSide(offsets, times, { userBranches: labels, surfaceShot: false }));
    expect(segmentation.branches[0]?.members).toEqual([0, 1, 2, 3]);
    expectRelative(segmentation.branches[1]?.fit.apparentVelocity ?? Number.NaN, 2000, 1e-9, 'the stated line 0.0125 + x/2000');
  });
});
