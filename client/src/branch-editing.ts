/**
 * Branch edits the user makes on the travel-time plot, turned into the list the service takes
 * (`{pickIndex, assign}`), and their inverse for undo. Pure functions of the current
 * interpretation and the stored picks: no DOM, no requests.
 *
 * Why sides are "frozen": the service lets the user's labels decide a side's split as soon as any
 * pick of that side carries one, and every unlabelled pick then joins the nearest labelled branch
 * line. Moving one pick of an automatically split side would therefore pull the side's other
 * branches into the one the user named. So an edit on a side also labels every unlabelled pick of
 * that side with the branch it is on now; the user's change is applied on top.
 *
 * Picks are matched between the interpretation (which names picks by table line) and the stored
 * pick set (whose order gives `pickIndex`) by their line in the pick table.
 */
import type { BranchEdit, Interpretation, Side, StoredPick } from './api-types.js';

export type Assignment = number | 'exclude' | 'automatic';

/** Where a pick sits in an interpretation. */
export interface PickPlace {
  readonly shot: string;
  readonly side: Side;
  readonly branch: number;
  readonly offset: number;
}

const sideKey = (shot: string, side: Side) => `${shot}\u0000${side}`;

/** Side of a stored pick from its positions (the service's rule: receiver beyond the source is forward). */
export function sideOfStoredPick(pick: StoredPick): Side | null {
  if (pick.receiverX > pick.sourceX) return 'forward';
  if (pick.receiverX < pick.sourceX) return 'reverse';
  return null;
}

/** Each table line on a branch of the interpretation, with its shot, side, branch and offset. */
export function placesByLine(result: Interpretation): Map<number, PickPlace> {
  const places = new Map<number, PickPlace>();
  for (const shot of result.shots) {
    for (const side of shot.sides) {
      for (const branch of side.branches) {
        for (const pick of branch.picks) places.set(pick.line, { shot: shot.id, side: side.side, branch: branch.index, offset: pick.offset });
      }
    }
  }
  return places;
}

/** Index into the stored pick set of each table line. */
export function indexByLine(picks: readonly StoredPick[]): Map<number, number> {
  return new Map(picks.map((pick, index) => [pick.line, index]));
}

/**
 * The edits that label every unlabelled branch pick of the sides in `sides` with the branch it is
 * on now: all picks of an automatically split side, and on a side the user labels already, those
 * picks that follow the nearest line (a partial `branch` column, or picks handed back). Labelled
 * picks are left alone.
 */
function freezeSides(result: Interpretation, picks: readonly StoredPick[], sides: ReadonlySet<string>, index = indexByLine(picks)): BranchEdit[] {
  const edits: BranchEdit[] = [];
  for (const shot of result.shots) {
    for (const side of shot.sides) {
      if (!sides.has(sideKey(shot.id, side.side))) continue;
      for (const branch of side.branches) {
        for (const pick of branch.picks) {
          const pickIndex = index.get(pick.line);
          if (pickIndex !== undefined && picks[pickIndex]!.branch === null) edits.push({ pickIndex, assign: branch.index });
        }
      }
    }
  }
  return edits;
}

/**
 * The edits that give the picks on `lines` the assignment `assign` (a branch number, 'exclude' or
 * 'automatic'), after freezing the automatic sides they are on. Lines not in the stored picks are
 * ignored (they cannot be edited); an empty selection gives no edits.
 */
export function assignmentEdits(result: Interpretation, picks: readonly StoredPick[], lines: Iterable<number>, assign: Assignment): BranchEdit[] {
  const index = indexByLine(picks);
  const chosen = [...new Set(lines)].filter((line) => index.has(line));
  if (chosen.length === 0) return [];
  const sides = new Set<string>();
  for (const line of chosen) {
    const pick = picks[index.get(line)!]!;
    const side = sideOfStoredPick(pick);
    if (side !== null) sides.add(sideKey(pick.shot, side));
  }
  // 'automatic' hands picks back to the segmentation: freezing their side first would undo that.
  const frozen = assign === 'automatic' ? [] : freezeSides(result, picks, sides, index);
  return [...frozen, ...chosen.map((line) => ({ pickIndex: index.get(line)!, assign }))];
}

/** A breakpoint of one shot side: the boundary between two consecutive branches. */
export interface Breakpoint {
  readonly shot: string;
  readonly side: Side;
  readonly lowerBranch: number;
  readonly upperBranch: number;
  /** Offsets of the last pick of the lower branch and the first of the upper. */
  readonly lastLowerOffset: number;
  readonly firstUpperOffset: number;
}

/** Every breakpoint of the interpretation, side by side, in offset order. */
export function breakpointsOf(result: Interpretation): Breakpoint[] {
  const breakpoints: Breakpoint[] = [];
  for (const shot of result.shots) {
    for (const side of shot.sides) {
      const branches = [...side.branches].sort((left, right) => left.firstOffset - right.firstOffset);
      for (let k = 0; k + 1 < branches.length; k += 1) {
        const lower = branches[k]!;
        const upper = branches[k + 1]!;
        breakpoints.push({
          shot: shot.id, side: side.side, lowerBranch: lower.index, upperBranch: upper.index,
          lastLowerOffset: lower.lastOffset, firstUpperOffset: upper.firstOffset,
        });
      }
    }
  }
  return breakpoints;
}

/**
 * The edits that move a breakpoint to `offset`: every pick of the two branches either side of it
 * nearer the source than `offset` goes to the lower branch, the rest to the upper; the side's
 * other branches are frozen as they are. Offsets are in the interpretation's display units.
 */
export function breakpointEdits(result: Interpretation, picks: readonly StoredPick[], breakpoint: Breakpoint, offset: number): BranchEdit[] {
  const index = indexByLine(picks);
  const shot = result.shots.find((candidate) => candidate.id === breakpoint.shot);
  const side = shot?.sides.find((candidate) => candidate.side === breakpoint.side);
  if (!side) return [];
  const edits = freezeSides(result, picks, new Set([sideKey(breakpoint.shot, breakpoint.side)]), index);
  for (const branch of side.branches) {
    if (branch.index !== breakpoint.lowerBranch && branch.index !== breakpoint.upperBranch) continue;
    for (const pick of branch.picks) {
      const pickIndex = index.get(pick.line);
      if (pickIndex === undefined) continue;
      edits.push({ pickIndex, assign: pick.offset < offset ? breakpoint.lowerBranch : breakpoint.upperBranch });
    }
  }
  return edits;
}

/**
 * The edits that put every pick touched by `edits` back as it is in `picks` (the stored state
 * before the edits): its user branch or 'automatic', then 'exclude' again if it was excluded.
 */
export function inverseEdits(picks: readonly StoredPick[], edits: readonly BranchEdit[]): BranchEdit[] {
  const touched = [...new Set(edits.map((edit) => edit.pickIndex))].sort((left, right) => left - right);
  return touched.flatMap((pickIndex) => {
    const pick = picks[pickIndex];
    if (!pick) return [];
    const restore: BranchEdit = { pickIndex, assign: pick.branch ?? 'automatic' };
    return pick.excluded ? [restore, { pickIndex, assign: 'exclude' }] : [restore];
  });
}

/** The branch and exclusion of a pick after `edits` (in order) are applied, as the service applies them. */
function stateAfter(pick: StoredPick, edits: readonly BranchEdit[]): { branch: number | null; excluded: boolean } {
  let branch = pick.branch;
  let excluded = pick.excluded;
  for (const edit of edits) {
    if (edit.assign === 'exclude') excluded = true;
    else {
      branch = edit.assign === 'automatic' ? null : edit.assign;
      excluded = false;
    }
  }
  return { branch, excluded };
}

/**
 * The same change as `edits`, written as at most two edits per pick and leaving out picks that
 * end as they were (a pick given the branch it already has): fewer edits stored, same result.
 */
export function effectiveEdits(picks: readonly StoredPick[], edits: readonly BranchEdit[]): BranchEdit[] {
  const byPick = new Map<number, BranchEdit[]>();
  for (const edit of edits) byPick.set(edit.pickIndex, [...(byPick.get(edit.pickIndex) ?? []), edit]);
  const kept: BranchEdit[] = [];
  for (const [pickIndex, list] of [...byPick].sort((left, right) => left[0] - right[0])) {
    const pick = picks[pickIndex];
    if (!pick) {
      kept.push(...list); // the service names the bad index; the client does not hide it
      continue;
    }
    const after = stateAfter(pick, list);
    if (after.branch === pick.branch && after.excluded === pick.excluded) continue;
    kept.push({ pickIndex, assign: after.branch ?? 'automatic' });
    if (after.excluded) kept.push({ pickIndex, assign: 'exclude' });
  }
  return kept;
}
