/**
 * Branches assigned by the user: when any pick of a side carries a user branch, the user's labels
 * decide the split instead of the automatic segmentation.
 *
 * - Labelled picks keep their branch.
 * - Each branch's line is fitted (by the chosen method) from its labelled picks; a branch whose
 *   labelled picks cannot be fitted (`refuseFitInput`: too few, all at one offset) gets a
 *   `fit-refused` note and is left out of `branches`.
 * - Each unlabelled pick joins the branch whose line predicts its time best (smallest
 *   |t − a − b·x|; ties to the lower index). When no branch could be fitted, unlabelled picks
 *   belong to no branch.
 * - Every branch is then refitted from all its members for the report, as automatic branches are
 *   (`branchFromMembers`: branch 1 of a surface shot through the origin).
 * - Branch numbers missing between 1 and the highest label get one `user-branch-gap` note each
 *   (numbering is kept as the user gave it: branches {1, 3} stay 1 and 3).
 * Branches are listed by index, `assignedBy: 'user'`, with no candidates.
 *
 * @example
 * // labels [1, 1, 1, null, 3, 3, 3], the unlabelled pick lying on branch 1's line
 * segmentByUserBranches(side, 'least-squares')
 * // → branches 1 (positions 0–3) and 3 (positions 4–6), one user-branch-gap note for branch 2
 */
import { branchFromMembers, fitBranchMembers, sideName } from './branch-fit.js';
import type { Branch, FitMethod, LineFit, SegmentationNote, SideSegmentation, SidePicks } from './types.js';

export function segmentByUserBranches(side: SidePicks, fitMethod: FitMethod): SideSegmentation {
  const notes: SegmentationNote[] = [];
  const labelled = new Map<number, number[]>();
  side.userBranches.forEach((branch, position) => {
    if (branch === null) return;
    const list = labelled.get(branch);
    if (list) list.push(position);
    else labelled.set(branch, [position]);
  });
  const indices = [...labelled.keys()].sort((left, right) => left - right);
  const highest = indices[indices.length - 1] ?? 0;
  for (let index = 1; index < highest; index += 1) {
    if (!labelled.has(index)) {
      notes.push({
        code: 'user-branch-gap',
        branch: index,
        message: `${sideName(side)}: the user-assigned branches skip branch ${index}; the layer it stands for is taken from other shots or left out — assign it if its picks are there`,
      });
    }
  }

  const lines = new Map<number, LineFit>();
  for (const index of indices) {
    const outcome = fitBranchMembers(side, labelled.get(index) as number[], {
      method: fitMethod,
      throughOrigin: index === 1 && side.surfaceShot,
    });
    if (outcome.ok) lines.set(index, outcome.fit);
    else {
      notes.push({
        code: 'fit-refused',
        branch: index,
        message: `${sideName(side)}, branch ${index} (user-assigned): ${outcome.message}`,
      });
    }
  }

  const members = new Map<number, number[]>([...lines.keys()].map((index) => [index, [...(labelled.get(index) as number[])]]));
  side.userBranches.forEach((branch, position) => {
    if (branch !== null) return;
    let nearest: number | null = null;
    let nearestMisfit = Number.POSITIVE_INFINITY;
    for (const [index, line] of lines) {
      const misfit = Math.abs((side.times[position] as number) - line.intercept - line.slope * (side.offsets[position] as number));
      if (misfit < nearestMisfit) {
        nearestMisfit = misfit;
        nearest = index;
      }
    }
    if (nearest !== null) members.get(nearest)?.push(position);
  });

  const branches: Branch[] = [];
  for (const [index, positions] of members) {
    positions.sort((left, right) => left - right);
    const outcome = branchFromMembers(side, index, positions, fitMethod, 'user');
    if (outcome.ok) branches.push(outcome.branch);
    else notes.push(outcome.note);
  }
  return { sidePicks: side, branches, excluded: [], assignedBy: 'user', candidates: [], notes };
}
