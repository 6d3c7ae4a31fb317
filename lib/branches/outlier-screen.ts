/**
 * Screening of outlier picks before automatic segmentation, for robust interpretation.
 *
 * The dynamic-programming split minimises squared residuals, so a few wild picks (a mistimed
 * trace, a noise burst picked as the break) can pull breakpoints or cost a branch. Before the split
 * each pick is predicted twice: by the line through its `SCREEN_NEIGHBOURS` nearest picks at
 * smaller offsets, and by the line through its nearest picks at larger offsets, each line a
 * Theil–Sen fit (median of pairwise slopes, Theil 1950; Sen 1968; intercept median(t − b·x)), so
 * one outlier among the neighbours does not drag it. A branch kink spoils only the prediction from
 * one side, so a pick's deviation is the smaller of the two. The side's robust scale is
 * σ̂ = 1.4826·median|deviation| (normal consistency of the MAD, Huber 1981), floored at the time
 * resolution; a pick deviating by more than `SCREEN_THRESHOLD`·σ̂ is suspect.
 * For a surface shot the time origin (0, 0) stands as one more neighbour at smaller offsets.
 *
 * Edges: a side with fewer than 2·`SCREEN_NEIGHBOURS` + 1 picks is not screened (too few picks to
 * tell an outlier from a branch); a pick with fewer than 2 neighbours on either side uses the other
 * side alone; at most a quarter of the side is ever called suspect (the worst ones), so the split
 * still has the majority of the picks.
 *
 * @example
 * screenOutlierPicks(side, 1e-4) // → [17] — position of the one mistimed pick
 */
import type { SidePicks } from './types.js';
import { median } from './median.js';

/** Neighbours on each side of a pick that predict it (5 keeps a median slope safe from one outlier). */
export const SCREEN_NEIGHBOURS = 5;
/** Robust SDs beyond which a pick is suspect (well past normal noise: P(|z| > 5) ≈ 6e-7). */
export const SCREEN_THRESHOLD = 5;
/** Largest share of a side that may be called suspect. */
export const SCREEN_MAX_FRACTION = 0.25;

export function screenOutlierPicks(side: SidePicks, timeResolution: number): number[] {
  const count = side.offsets.length;
  if (count < 2 * SCREEN_NEIGHBOURS + 1) return [];
  const deviations = side.offsets.map((offset, position) => {
    const near = neighbourLine(side, position, -1);
    const far = neighbourLine(side, position, +1);
    const time = side.times[position] as number;
    const candidates = [near, far]
      .filter((line): line is { slope: number; intercept: number } => line !== null)
      .map((line) => Math.abs(time - line.intercept - line.slope * offset));
    return candidates.length === 0 ? 0 : Math.min(...candidates);
  });
  const scale = Math.max(1.4826 * median(deviations), timeResolution);
  const suspects = deviations
    .map((deviation, position) => ({ deviation, position }))
    .filter((entry) => entry.deviation > SCREEN_THRESHOLD * scale)
    .sort((a, b) => b.deviation - a.deviation)
    .slice(0, Math.floor(SCREEN_MAX_FRACTION * count));
  return suspects.map((entry) => entry.position).sort((a, b) => a - b);
}

/** Theil–Sen line through the nearest neighbours of `position` in `direction` (−1 smaller offsets), or null. */
function neighbourLine(side: SidePicks, position: number, direction: -1 | 1): { slope: number; intercept: number } | null {
  const offsets: number[] = [];
  const times: number[] = [];
  for (let step = 1; offsets.length < SCREEN_NEIGHBOURS; step += 1) {
    const neighbour = position + direction * step;
    if (neighbour < 0 || neighbour >= side.offsets.length) break;
    offsets.push(side.offsets[neighbour] as number);
    times.push(side.times[neighbour] as number);
  }
  if (direction < 0 && side.surfaceShot && offsets.length < SCREEN_NEIGHBOURS) {
    offsets.push(0);
    times.push(0);
  }
  if (offsets.length < 2) return null;
  const slopes: number[] = [];
  for (let i = 0; i < offsets.length; i += 1) {
    for (let j = i + 1; j < offsets.length; j += 1) {
      const run = (offsets[j] as number) - (offsets[i] as number);
      if (run !== 0) slopes.push(((times[j] as number) - (times[i] as number)) / run);
    }
  }
  if (slopes.length === 0) return null;
  const slope = median(slopes);
  const intercept = median(times.map((time, k) => time - slope * (offsets[k] as number)));
  return { slope, intercept };
}
