/**
 * Automatic segmentation that tolerates outlier picks: screen the suspects out
 * (`screenOutlierPicks`), split the remaining picks (`segmentSide`), then give every suspect back
 * to a branch — the one whose offset range holds it, or, in a gap between branches, the one whose
 * line predicts its time best — and refit every branch from all its members with the robust method
 * chosen, which down-weights the suspects (Huber) or ignores them (Theil–Sen median).
 *
 * Edges: a side with no suspects is segmented as `segmentSide` does; user-assigned sides are left
 * to `segmentSide` (the user's labels decide); a suspect beyond every branch joins the nearest
 * one. Candidates report the split of the screened picks, with breakpoints mapped back to the
 * side's positions. A note names how many picks were screened.
 */
import type { Branch, SegmentationCandidate, SideSegmentation, SidePicks } from './types.js';
import { segmentSide, type SegmentSideOptions } from './segment.js';
import { screenOutlierPicks } from './outlier-screen.js';
import { branchFromMembers, sideName } from './branch-fit.js';

export function segmentSideRobustly(side: SidePicks, options: SegmentSideOptions = {}): SideSegmentation {
  if (side.userBranches.some((branch) => branch !== null)) return segmentSide(side, options);
  const suspects = screenOutlierPicks(side, options.timeResolution ?? 1e-4);
  if (suspects.length === 0) return segmentSide(side, options);

  const suspectSet = new Set(suspects);
  const kept = side.offsets.map((_, position) => position).filter((position) => !suspectSet.has(position));
  const screened = subsetOfSide(side, kept);
  const split = segmentSide(screened, options);
  if (split.branches.length === 0) return segmentSide(side, options);

  const membersByBranch = split.branches.map((branch) => branch.members.map((position) => kept[position] as number));
  for (const suspect of suspects) {
    const offset = side.offsets[suspect] as number;
    const time = side.times[suspect] as number;
    membersByBranch[branchForSuspect(split.branches, offset, time)]!.push(suspect);
  }

  const branches: Branch[] = [];
  const notes = [...split.notes];
  split.branches.forEach((branch, k) => {
    const members = [...membersByBranch[k]!].sort((a, b) => a - b);
    const outcome = branchFromMembers(side, branch.index, members, options.fitMethod ?? 'least-squares', 'automatic');
    if (outcome.ok) branches.push(outcome.branch);
    else notes.push(outcome.note);
  });
  notes.push({
    code: 'outliers-screened',
    message: `${sideName(side)}: ${suspects.length} pick(s) far off their neighbours' line were set aside while the branches were found, then given back to the nearest branch and down-weighted by the robust fit`,
  });
  const candidates: SegmentationCandidate[] = split.candidates.map((candidate) => ({
    ...candidate,
    starts: candidate.starts.map((start) => kept[start] as number),
  }));
  return { ...split, sidePicks: side, branches, candidates, notes };
}

/**
 * The branch a set-aside pick rejoins: the one whose offset range holds it; in a gap, whichever of
 * the two branches bordering the gap predicts its time better; beyond the last (or before the
 * first) branch, that branch.
 */
function branchForSuspect(branches: readonly Branch[], offset: number, time: number): number {
  const holding = branches.findIndex((branch) => offset >= branch.firstOffset && offset <= branch.lastOffset);
  if (holding >= 0) return holding;
  const after = branches.findIndex((branch) => branch.firstOffset > offset);
  if (after === 0) return 0;
  if (after < 0) return branches.length - 1;
  const miss = (k: number) => Math.abs(time - branches[k]!.fit.intercept - branches[k]!.fit.slope * offset);
  return miss(after - 1) <= miss(after) ? after - 1 : after;
}

/** The side restricted to `positions` (ascending). */
export function subsetOfSide(side: SidePicks, positions: readonly number[]): SidePicks {
  const pick = <T>(values: readonly T[]): T[] => positions.map((position) => values[position] as T);
  return {
    ...side,
    offsets: pick(side.offsets),
    times: pick(side.times),
    sigmas: side.sigmas === null ? null : pick(side.sigmas),
    userBranches: pick(side.userBranches),
    pickIndices: pick(side.pickIndices),
  };
}
