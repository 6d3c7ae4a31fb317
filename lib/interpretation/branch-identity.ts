/**
 * Which layer the nearest branch of each shot side belongs to.
 *
 * Automatic segmentation numbers a side's branches 1, 2, … from the shot outwards, which is right
 * when the nearest picks are the direct wave. An off-end shot whose nearest receiver lies beyond
 * the direct wave's crossover starts on a head wave instead, and numbering it 1 would fit a
 * refractor through the origin and average it into the top layer.
 *
 * Rule (METHODS §4, constraint 4, used to identify rather than to reject): a side starts with the
 * direct wave when the free-intercept line through its first branch passes `directInterceptTest`
 * (the same test the `direct-not-through-origin` check uses). Those sides are the
 * reference: their branch n is layer n, and the layer's reference slowness is the mean of theirs.
 * Any other side's first branch is the layer whose reference slowness is nearest in ratio; when
 * that is layer 1, the branch stays the direct wave (a time-zero or source-position error, which
 * the `direct-not-through-origin` check reports).
 *
 * Edges: user-assigned sides keep their numbers; when no side starts with the direct wave (only
 * off-end shots, or every shot with the same time-zero error) every automatic side starts at
 * branch 2, so no head wave is forced through the origin and the top-layer velocity is left
 * unknown; a side with no branch keeps index 1.
 */
import type { SideSegmentation } from '../branches/types.js';
import { directInterceptTest, type DirectInterceptTest } from '../checks/branch-checks.js';

/** The origin test of the side's first branch when it is numbered 1 (null: no such branch, or its free line cannot be fitted). */
function firstBranchTest(segmentation: SideSegmentation, timeResolution: number): { readonly numberedDirect: boolean; readonly test: DirectInterceptTest | null } {
  const first = segmentation.branches[0];
  if (!first || first.index !== 1) return { numberedDirect: false, test: null };
  return { numberedDirect: true, test: directInterceptTest(segmentation.sidePicks, first.members, timeResolution) };
}

/** True when the first branch of the side passes through the time origin (`directInterceptTest`). */
export function startsWithDirectWave(segmentation: SideSegmentation, timeResolution: number): boolean {
  const { numberedDirect, test } = firstBranchTest(segmentation, timeResolution);
  return numberedDirect && (test?.passes ?? true);
}

/** The index the first branch of each side should carry, in input order. */
export function firstBranchIndices(segmentations: readonly SideSegmentation[], timeResolution: number): number[] {
  // One free-line fit per side serves both the origin test and, for a side that fails it, its slope.
  const tests = segmentations.map((segmentation) => firstBranchTest(segmentation, timeResolution));
  const direct = segmentations.map(
    (segmentation, k) => segmentation.assignedBy === 'user' || (tests[k]!.numberedDirect && (tests[k]!.test?.passes ?? true)),
  );
  const referenceSums: number[] = [];
  const referenceCounts: number[] = [];
  segmentations.forEach((segmentation, k) => {
    if (!direct[k] || segmentation.assignedBy === 'user') return;
    for (const branch of segmentation.branches) {
      const slot = branch.index - 1;
      referenceSums[slot] = (referenceSums[slot] ?? 0) + branch.fit.slope;
      referenceCounts[slot] = (referenceCounts[slot] ?? 0) + 1;
    }
  });
  const reference = referenceSums.map((sum, slot) => sum / (referenceCounts[slot] ?? 1));
  return segmentations.map((segmentation, k) => {
    const first = segmentation.branches[0];
    if (direct[k] || !first) return first?.index ?? 1;
    if (reference.length === 0) return segmentation.assignedBy === 'user' ? first.index : 2;
    // The reported fit of a branch numbered 1 went through the origin; judge the free line instead.
    const slope = tests[k]!.test?.slope ?? first.fit.slope;
    if (!(slope > 0)) return first.index;
    let best = 1;
    let bestDistance = Number.POSITIVE_INFINITY;
    reference.forEach((slowness, slot) => {
      if (!(slowness > 0)) return;
      const distance = Math.abs(Math.log(slope / slowness));
      if (distance < bestDistance) {
        bestDistance = distance;
        best = slot + 1;
      }
    });
    return best;
  });
}
