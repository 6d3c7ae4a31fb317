/**
 * One refractor or two? Automatic segmentation splits a shot side where the apparent velocity
 * changes, and an undulating or dipping refractor changes the apparent velocity along one side
 * without any deeper layer: the split then invents a layer. Reversed shots tell the two apart.
 *
 * Hagedoorn's minus time (Hagedoorn1959), at a receiver G between shots A and B on the same
 * refractor n,
 *
 *     T−(G) = t_AG − t_BG = (2·x_G − x_A − x_B)·s_n + (δ_A − δ_B),
 *
 * is a straight line in x_G whatever the refractor's shape (the receiver's delay cancels), as long
 * as the refractor's velocity is constant. If instead the picks of one side cross onto a deeper,
 * faster refractor n + 1 at some receiver, T− bends there by s_n − s_{n+1} (the crossover is
 * continuous, so it is a hinge, not a step).
 *
 * Rule, for n = 2, 3, …: over every reversed pair of automatic sides (shot A's forward side and
 * shot B's reverse side, x_A < x_B) with at least `MIN_COMMON_RECEIVERS` common receivers between
 * the shots on branch n or n + 1, where the branch labels of the two picks change along the line
 * (at least 3 receivers of each of two label patterns), fit T− by a line and by the best continuous
 * hinged line (break between receivers, at least 3 receivers each side), weighted by 1/(σ_A² + σ_B²)
 * when the picks carry sigmas. The hinge is a *bend* when it wins by BIC (Schwarz 1978, as in
 * METHODS §4, the break counted as a parameter, the RSS floored at the picks' rounding) and its
 * slope change exceeds `MATERIAL_BEND` of the refractor slowness (T− slope / 2): an 11 % velocity
 * contrast, our threshold. Branches n and n + 1 are merged, on every automatic side, when at least
 * one pair is *straight* and none bends; the merged branch is refitted, deeper branches move up.
 *
 * Edges: sides the user assigned are never changed, and no merge of n and n + 1 happens while a
 * user-assigned side has a branch n + 1 (the user has said the layer is there). Without reversed
 * evidence (single-ended lines, no label change over common receivers) nothing is merged. Mixed
 * evidence (one pair straight, another bent) keeps the split, and the merge record says so.
 */
import type { Branch, FitMethod, SideSegmentation } from '../branches/types.js';
import { branchFromMembers } from '../branches/branch-fit.js';
import { linearLeastSquares } from '../stats/linear-least-squares.js';

export const MIN_COMMON_RECEIVERS = 8;
export const MATERIAL_BEND = 0.1;
/** Largest XY separation tried, in receivers. */
export const MAX_SEPARATION_RECEIVERS = 8;
/** Reverse shots tested per forward side, nearest first. */
export const EVIDENCE_PARTNERS = 3;

/** What the minus times of one reversed pair say about branches n and n + 1. */
export interface MinusTimeEvidence {
  readonly forwardShot: string;
  readonly reverseShot: string;
  readonly commonReceivers: number;
  /** XY separation used, in receivers (the straightest minus-time line). */
  readonly separation: number;
  /** `bend`: a material, significant bend; `straight`: a bend materially excluded (2 SE); else `unclear`. */
  readonly verdict: 'straight' | 'bend' | 'unclear';
  /** Slope change at the split's hinge over the refractor slowness (T− slope / 2), and its SE. */
  readonly relativeBend: number;
  readonly relativeBendSE: number;
  /** x of the hinge (where the labels change), m. */
  readonly hingeX: number;
}

export interface RefractorMerge {
  /** Branch n that branch n + 1 was merged into (or, when kept, the pair tested). */
  readonly branch: number;
  readonly merged: boolean;
  readonly evidence: readonly MinusTimeEvidence[];
}

export interface RefractorIdentity {
  readonly segmentations: readonly SideSegmentation[];
  /** Every n tested, merged or not, in order. */
  readonly tests: readonly RefractorMerge[];
}

const receiverKey = (x: number): string => x.toFixed(6);

function receiverX(segmentation: SideSegmentation, position: number): number {
  const { sidePicks } = segmentation;
  const offset = sidePicks.offsets[position] as number;
  return sidePicks.side === 'forward' ? sidePicks.sourceX + offset : sidePicks.sourceX - offset;
}

type BranchPicks = Map<string, { x: number; label: number; time: number; sigma: number | null }>;

/** Each side's picks on branches n and n + 1, read once per side and n (a side meets several partners). */
const branchPicksCache = new WeakMap<SideSegmentation, Map<number, BranchPicks>>();

/** Receiver → (branch label, time, sigma) of the picks on branches n and n + 1 of a side. */
function picksOnBranches(segmentation: SideSegmentation, n: number): BranchPicks {
  const cached = branchPicksCache.get(segmentation)?.get(n);
  if (cached) return cached;
  const found = readBranchPicks(segmentation, n);
  const perSide = branchPicksCache.get(segmentation) ?? new Map<number, BranchPicks>();
  perSide.set(n, found);
  branchPicksCache.set(segmentation, perSide);
  return found;
}

function readBranchPicks(segmentation: SideSegmentation, n: number): BranchPicks {
  const found = new Map<string, { x: number; label: number; time: number; sigma: number | null }>();
  for (const branch of segmentation.branches) {
    if (branch.index !== n && branch.index !== n + 1) continue;
    for (const position of branch.members) {
      const x = receiverX(segmentation, position);
      found.set(receiverKey(x), {
        x,
        label: branch.index,
        time: segmentation.sidePicks.times[position] as number,
        sigma: segmentation.sidePicks.sigmas?.[position] ?? null,
      });
    }
  }
  return found;
}

/** The minus-time test of one pair, or null when the pair gives no evidence on n and n + 1. */
export function minusTimeEvidence(
  forward: SideSegmentation,
  reverse: SideSegmentation,
  n: number,
  timeResolution: number,
): MinusTimeEvidence | null {
  const a = forward.sidePicks.sourceX;
  const b = reverse.sidePicks.sourceX;
  if (!(a < b)) return null;
  const reversePicks = picksOnBranches(reverse, n);
  const forwardPicks = [...picksOnBranches(forward, n).values()].sort((left, right) => left.x - right.x);
  let chosen: { rows: { x: number; minus: number; weight: number; pattern: string }[]; rss: number; separation: number } | null = null;
  // Separations XY = 0, 1, 2, … receivers: the minus time of the forward pick at Y = G + XY/2 and the
  // reverse pick at X = G − XY/2 (Palmer1980's velocity-analysis function, twice) is straightest
  // near the optimum XY, where both rays leave the refractor at the same point.
  for (let separation = 0; separation <= MAX_SEPARATION_RECEIVERS; separation += 1) {
    const rows: { x: number; minus: number; weight: number; pattern: string }[] = [];
    forwardPicks.forEach((pick, k) => {
      const far = forwardPicks[k + separation];
      if (!far || !(pick.x > a && far.x < b)) return;
      const other = reversePicks.get(receiverKey(pick.x));
      if (!other) return;
      const variance = far.sigma !== null && other.sigma !== null ? far.sigma ** 2 + other.sigma ** 2 : null;
      rows.push({ x: (pick.x + far.x) / 2, minus: far.time - other.time, weight: variance === null ? 1 : 1 / variance, pattern: `${far.label}/${other.label}` });
    });
    if (rows.length < MIN_COMMON_RECEIVERS) continue;
    const mean = rows.reduce((sum, row) => sum + row.x, 0) / rows.length;
    const line = linearLeastSquares(rows.map((row) => [1, row.x - mean]), rows.map((row) => row.minus), rows.map((row) => row.weight));
    if (!line) continue;
    const rss = line.weightedResidualSumOfSquares / (rows.length - 2);
    if (chosen === null || rss < chosen.rss) chosen = { rows, rss, separation };
  }
  if (chosen === null) return null;
  const rows = chosen.rows;
  const patternCounts = new Map<string, number>();
  for (const row of rows) patternCounts.set(row.pattern, (patternCounts.get(row.pattern) ?? 0) + 1);
  if ([...patternCounts.values()].filter((count) => count >= 3).length < 2) return null;

  rows.sort((left, right) => left.x - right.x);
  const mean = rows.reduce((sum, row) => sum + row.x, 0) / rows.length;
  const minus = rows.map((row) => row.minus);
  const weights = rows.map((row) => row.weight);
  const line = linearLeastSquares(rows.map((row) => [1, row.x - mean]), minus, weights);
  if (!line) return null;
  // Rounding floor on the residual variance: each T− is the difference of two rounded times.
  const weightedFloor = (2 * timeResolution ** 2) / 12;
  // The hinge where the split says the deeper refractor begins: each change of label pattern.
  let best: { rss: number; hinge: number; bend: number; bendSE: number } | null = null;
  for (let split = 3; split <= rows.length - 3; split += 1) {
    if ((rows[split - 1] as { pattern: string }).pattern === (rows[split] as { pattern: string }).pattern) continue;
    const hinge = ((rows[split - 1] as { x: number }).x + (rows[split] as { x: number }).x) / 2;
    const fit = linearLeastSquares(rows.map((row) => [1, row.x - mean, Math.max(0, row.x - hinge)]), minus, weights);
    if (!fit || (best !== null && fit.weightedResidualSumOfSquares >= best.rss)) continue;
    const weighted = rows.some((row) => row.weight !== 1);
    const scale = weighted ? 1 : Math.max(fit.weightedResidualSumOfSquares / (rows.length - 3), weightedFloor);
    best = {
      rss: fit.weightedResidualSumOfSquares,
      hinge,
      bend: fit.coefficients[2] as number,
      bendSE: Math.sqrt(scale * ((fit.unscaledCovariance[2] as readonly number[])[2] as number)),
    };
  }
  if (!best) return null;
  const refractorSlowness = Math.abs(line.coefficients[1] as number) / 2;
  if (!(refractorSlowness > 0)) return null;
  const relativeBend = Math.abs(best.bend) / refractorSlowness;
  const relativeBendSE = best.bendSE / refractorSlowness;
  const verdict: MinusTimeEvidence['verdict'] =
    relativeBend > MATERIAL_BEND && relativeBend > 3 * relativeBendSE ? 'bend' : relativeBend + 2 * relativeBendSE < MATERIAL_BEND ? 'straight' : 'unclear';
  return {
    forwardShot: forward.sidePicks.shot,
    reverseShot: reverse.sidePicks.shot,
    commonReceivers: rows.length,
    separation: chosen.separation,
    verdict,
    relativeBend,
    relativeBendSE,
    hingeX: best.hinge,
  };
}

/** Branch n + 1 joined to branch n and deeper branches moved up one, refitted; the side unchanged if the merged branch cannot be fitted. */
function mergeBranches(segmentation: SideSegmentation, n: number, fitMethod: FitMethod): SideSegmentation {
  const lower = segmentation.branches.find((branch) => branch.index === n);
  const upper = segmentation.branches.find((branch) => branch.index === n + 1);
  if (!upper) return segmentation;
  const branches: Branch[] = [];
  for (const branch of segmentation.branches) {
    if (branch.index < n) branches.push(branch);
    else if (branch.index === n || (branch.index === n + 1 && !lower)) {
      const members = [...(lower?.members ?? []), ...upper.members].sort((left, right) => left - right);
      const refit = branchFromMembers(segmentation.sidePicks, n, members, fitMethod, 'automatic');
      if (!refit.ok) return segmentation;
      branches.push(refit.branch);
    } else if (branch.index > n + 1) branches.push({ ...branch, index: branch.index - 1 });
  }
  // A note on the split that was chosen no longer describes the branches (the survey-level
  // `branches-one-refractor` note says what happened instead).
  const notes = segmentation.notes.filter((note) => note.code !== 'segmentation-constraint-failed');
  return { ...segmentation, branches, notes };
}

/** Merge branches that reversed minus times show to be one refractor (see the module comment). */
export function identifyRefractors(
  segmentations: readonly SideSegmentation[],
  options: { readonly timeResolution: number; readonly fitMethod: FitMethod },
): RefractorIdentity {
  let current = [...segmentations];
  const tests: RefractorMerge[] = [];
  const highest = (): number => Math.max(0, ...current.flatMap((segmentation) => segmentation.branches.map((branch) => branch.index)));
  for (let n = 2; n < highest(); ) {
    const userSaysLayer = current.some((segmentation) => segmentation.assignedBy === 'user' && segmentation.branches.some((branch) => branch.index === n + 1));
    if (userSaysLayer) {
      n += 1;
      continue;
    }
    const evidence: MinusTimeEvidence[] = [];
    const reverses = current.filter((side) => side.sidePicks.side === 'reverse' && side.assignedBy !== 'user');
    for (const forward of current) {
      if (forward.sidePicks.side !== 'forward' || forward.assignedBy === 'user') continue;
      // The nearest reverse shots beyond this one: enough evidence, bounded work on long lines.
      const partners = reverses
        .filter((reverse) => reverse.sidePicks.sourceX > forward.sidePicks.sourceX)
        .sort((left, right) => left.sidePicks.sourceX - right.sidePicks.sourceX);
      let found = 0;
      for (const reverse of partners) {
        if (found >= EVIDENCE_PARTNERS) break;
        const entry = minusTimeEvidence(forward, reverse, n, options.timeResolution);
        if (!entry) continue;
        evidence.push(entry);
        found += 1;
      }
    }
    if (evidence.length === 0) {
      n += 1;
      continue;
    }
    const merged = evidence.some((entry) => entry.verdict === 'straight') && !evidence.some((entry) => entry.verdict === 'bend');
    tests.push({ branch: n, merged, evidence });
    if (merged) current = current.map((segmentation) => (segmentation.assignedBy === 'user' ? segmentation : mergeBranches(segmentation, n, options.fitMethod)));
    else n += 1;
  }
  return { segmentations: current, tests };
}
