/**
 * Fit of one branch from its members (positions in a side's arrays): the final, reported fit of
 * every branch, automatic or user-assigned, made the same way.
 *
 * `fitBranchMembers` fits the members with any `FitOptions`; it is also how a check refits a
 * branch differently, e.g. the direct branch of a surface shot with a free intercept to test that
 * the line passes through the origin within 3 SE:
 *   fitBranchMembers(segmentation.sidePicks, directBranch.members, { method, throughOrigin: false })
 * `branchFromMembers` makes a `Branch` with the reported fit: the chosen method, through the origin
 * for branch 1 of a surface shot, free otherwise; weighted least squares when the side has sigmas.
 *
 * Edges: a fit that is refused (too few picks, all offsets equal, see `refuseFitInput`) gives a
 * `fit-refused` note naming the branch instead of a branch. Members must be valid positions,
 * ascending (misuse throws).
 */
import { describeShotSide } from '../checks/wording.js';
import { fitLine } from './line-fit.js';
import type { Branch, FitMethod, FitOptions, FitOutcome, SegmentationNote, SidePicks } from './types.js';

export function fitBranchMembers(side: SidePicks, members: readonly number[], options: FitOptions = {}): FitOutcome {
  members.forEach((position, order) => {
    if (!Number.isInteger(position) || position < 0 || position >= side.offsets.length || (order > 0 && position <= (members[order - 1] as number))) {
      throw new RangeError(`fitBranchMembers: members must be ascending positions below ${side.offsets.length}, got ${members.join(', ')}`);
    }
  });
  const offsets = members.map((position) => side.offsets[position] as number);
  const times = members.map((position) => side.times[position] as number);
  const sigmas = side.sigmas === null ? null : members.map((position) => (side.sigmas as readonly number[])[position] as number);
  return fitLine(offsets, times, sigmas, options);
}

export type BranchOutcome = { readonly ok: true; readonly branch: Branch } | { readonly ok: false; readonly note: SegmentationNote };

export function branchFromMembers(
  side: SidePicks,
  index: number,
  members: readonly number[],
  method: FitMethod,
  assignedBy: Branch['assignedBy'],
): BranchOutcome {
  const outcome = fitBranchMembers(side, members, { method, throughOrigin: index === 1 && side.surfaceShot });
  if (!outcome.ok) {
    return {
      ok: false,
      note: {
        code: 'fit-refused',
        branch: index,
        message: `${sideName(side)}, branch ${index}: ${outcome.message}`,
      },
    };
  }
  return {
    ok: true,
    branch: {
      index,
      members,
      fit: outcome.fit,
      firstOffset: side.offsets[members[0] as number] as number,
      lastOffset: side.offsets[members[members.length - 1] as number] as number,
      assignedBy,
    },
  };
}

/** "shot S3, forward side" — how messages name a side: the one wording of `describeShotSide`. */
export function sideName(side: SidePicks): string {
  return describeShotSide({ shot: side.shot, side: side.side });
}
