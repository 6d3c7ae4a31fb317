/**
 * Optimal partition of a side's picks into K contiguous straight segments, for every K up to a
 * maximum, by dynamic programming over all split positions (Bellman 1961, `Bellman1961`; optimal
 * partitioning, Jackson et al. 2005, `Jackson2005`; METHODS §4):
 *   F(1, j) = C(0, j)   (or C₀(j), the line through the origin, when asked)
 *   F(k, j) = min over i of [ F(k−1, i−1) + C(i, j) ]
 * with C from `segmentCostTable`, so every segment holds at least `minPicks` picks and has two
 * distinct offsets. The total cost is exact: no split is skipped (no pruning). Cost O(K·n²) time in
 * typed arrays, no allocation inside the loops; n = 500, K = 5 takes a few milliseconds.
 *
 * Ties between equal-cost splits go to the earliest start. Edges: a K with no feasible partition
 * (n < K·minPicks, or every split needs an infinite-cost segment) is left out of the result, so the
 * result can be empty; `maxBranches` must be a positive integer (misuse throws).
 *
 * @example
 * optimalPartitions(segmentCostTable(offsets, times, null, 3), 3, false)
 * // → [{ branchCount: 1, starts: [], cost: 7.89e-4 }, { branchCount: 2, starts: [6], … },
 * //    { branchCount: 3, starts: [4, 14], cost: 3.78e-6 }]   (METHODS check case 4.1)
 */
import type { SegmentCostTable } from './segment-cost.js';

export interface Partition {
  readonly branchCount: number;
  /** Position of the first pick of segments 2…K (segment 1 starts at 0). */
  readonly starts: readonly number[];
  /** Sum of the segment costs (RSS, or χ² when weighted). */
  readonly cost: number;
}

export function optimalPartitions(
  table: SegmentCostTable,
  maxBranches: number,
  firstThroughOrigin: boolean,
): Partition[] {
  if (!Number.isInteger(maxBranches) || maxBranches < 1) {
    throw new RangeError(`optimalPartitions: maxBranches must be a positive integer, got ${maxBranches}`);
  }
  const { count, minPicks, costs, originCosts } = table;
  const best = new Float64Array(maxBranches * count).fill(Number.POSITIVE_INFINITY);
  const choice = new Int32Array(maxBranches * count).fill(-1);
  for (let end = 0; end < count; end += 1) {
    best[end] = firstThroughOrigin ? (originCosts[end] as number) : (costs[end * count] as number);
  }
  for (let branch = 1; branch < maxBranches; branch += 1) {
    const previousRow = (branch - 1) * count;
    const row = branch * count;
    for (let end = (branch + 1) * minPicks - 1; end < count; end += 1) {
      const column = end * count;
      let lowest = Number.POSITIVE_INFINITY;
      let lowestStart = -1;
      for (let start = branch * minPicks; start <= end - minPicks + 1; start += 1) {
        const candidate = (best[previousRow + start - 1] as number) + (costs[column + start] as number);
        if (candidate < lowest) {
          lowest = candidate;
          lowestStart = start;
        }
      }
      best[row + end] = lowest;
      choice[row + end] = lowestStart;
    }
  }

  const partitions: Partition[] = [];
  for (let branchCount = 1; branchCount <= maxBranches; branchCount += 1) {
    const cost = best[(branchCount - 1) * count + count - 1];
    if (cost === undefined || !Number.isFinite(cost)) continue;
    const starts: number[] = [];
    let end = count - 1;
    for (let branch = branchCount - 1; branch >= 1; branch -= 1) {
      const start = choice[branch * count + end] as number;
      starts.unshift(start);
      end = start - 1;
    }
    partitions.push({ branchCount, starts, cost });
  }
  return partitions;
}
