/**
 * identifyRefractors and minusTimeEvidence (lib/interpretation/refractor-identity.ts): a split that
 * reversed minus times run straight across is one refractor; a genuine deeper layer bends them.
 *
 * The data come from outside the method:
 * - a genuine three-layer plane model (500/1500/4000 m/s under 4 and 10 m): head-wave times by
 *   Fermat minimisation (tests/oracles/dipping-refractor.ts), the direct wave x/V_1; the crossover
 *   between the two head waves from the closed form t = x/V_n + τ_n (METHODS §1, Telford et al. 1990);
 * - an undulating refractor (10 ± 3 m, λ = 120 m, 600/3000 m/s, one layer over a half-space): first
 *   arrivals on a 0.25 m grid by the shortest-path solver (tests/oracles/grid-first-arrivals.ts,
 *   checked in tests/model/ against closed forms and scipy).
 * Side segmentations are made as lib/interpret.ts makes them: readPickTable → splitShotSides →
 * segmentSide, renumbered by firstBranchIndices (off-end shots start on a head wave).
 */
import { describe, expect, it } from 'vitest';
import { readPickTable, type PickSet } from '../../lib/picks/index.js';
import { splitShotSides } from '../../lib/branches/sides.js';
import { segmentSide } from '../../lib/branches/segment.js';
import type { SideSegmentation } from '../../lib/branches/types.js';
import { firstBranchIndices } from '../../lib/interpretation/branch-identity.js';
import { identifyRefractors, MATERIAL_BEND, minusTimeEvidence, type RefractorIdentity } from '../../lib/interpretation/refractor-identity.js';
import { gridFirstArrivals } from '../oracles/grid-first-arrivals.js';
import { dippingHeadWaveTime, type DippingModel } from '../oracles/dipping-refractor.js';
import { branchFromMembers } from '../../lib/branches/branch-fit.js';
import { seededNormal } from '../../lib/random.js';
import { range } from '../helpers/synthetic-survey.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';

/** The engineering time resolution the pipeline uses (lib/interpret.ts TIME_RESOLUTION). */
const TIME_RESOLUTION = 1e-4;
const OPTIONS = { timeResolution: TIME_RESOLUTION, fitMethod: 'least-squares' } as const;

interface Row {
  readonly shot: string;
  readonly sourceX: number;
  readonly receiverX: number;
  readonly time: number;
  /** User-assigned branch, or undefined for automatic. */
  readonly branch?: number;
}

function pickSetOf(rows: readonly Row[]): PickSet {
  const withBranch = rows.some((row) => row.branch !== undefined);
  const header = ['shot', 'source_x_m', 'receiver_x_m', 'time_ms', ...(withBranch ? ['branch'] : [])].join(',');
  const lines = rows.map((row) => [row.shot, row.sourceX, row.receiverX, (row.time * 1000).toFixed(4), ...(withBranch ? [row.branch ?? ''] : [])].join(','));
  const outcome = readPickTable([header, ...lines].join('\n'));
  if (!outcome.ok) throw new Error(outcome.problems.map((problem) => problem.message).join('; '));
  return outcome.value;
}

/** The pipeline's segmentation before the refractor identity (lib/interpret.ts, least squares). */
function segmentations(pickSet: PickSet): SideSegmentation[] {
  const options = { timeResolution: TIME_RESOLUTION };
  const first = splitShotSides(pickSet).map((side) => segmentSide(side, options));
  const indices = firstBranchIndices(first, TIME_RESOLUTION);
  return first.map((segmentation, k) =>
    (indices[k] ?? 1) === (segmentation.branches[0]?.index ?? 1) ? segmentation : segmentSide(segmentation.sidePicks, { ...options, firstBranchIndex: indices[k] ?? 1 }),
  );
}

const sideOf = (list: readonly SideSegmentation[], shot: string, side: 'forward' | 'reverse'): SideSegmentation => {
  const found = list.find((entry) => entry.sidePicks.shot === shot && entry.sidePicks.side === side);
  if (!found) throw new Error(`no ${side} side of shot ${shot}`);
  return found;
};
const branchIndices = (segmentation: SideSegmentation) => segmentation.branches.map((branch) => branch.index);
const bends = (identity: RefractorIdentity) => identity.tests.flatMap((test) => test.evidence.map((entry) => `${entry.forwardShot}–${entry.reverseShot} ${entry.verdict} ${entry.relativeBend.toFixed(3)} ± ${entry.relativeBendSE.toFixed(3)}`));

// --- a genuine third layer
const THREE_LAYERS: DippingModel = { velocities: [500, 1500, 4000], interfaces: [{ depthAtOrigin: 4, dip: 0 }, { depthAtOrigin: 14, dip: 0 }] };
const LINE = 120;
const STEP = 2;

function threeLayerRows(): Row[] {
  return [['A', 0], ['B', LINE]].flatMap(([shot, sourceX]) =>
    range(LINE / STEP + 1, 0, STEP)
      .filter((receiverX) => receiverX !== sourceX)
      .map((receiverX) => {
        const heads = [1, 2].map((refractor) => dippingHeadWaveTime(THREE_LAYERS, refractor, sourceX as number, receiverX) ?? Number.POSITIVE_INFINITY);
        return { shot: shot as string, sourceX: sourceX as number, receiverX, time: Math.min(Math.abs(receiverX - (sourceX as number)) / 500, ...heads) };
      }),
  );
}

describe('identifyRefractors: a genuine three-layer plane model is not merged', () => {
  const pickSet = pickSetOf(threeLayerRows());
  const input = segmentations(pickSet);
  const identity = identifyRefractors(input, OPTIONS);

  it('identifyRefractors keeps branches 2 and 3 of both end shots: the minus times bend by the slowness contrast (Fermat-oracle times)', () => {
    // Precondition: the automatic segmentation finds the three branches on both sides.
    for (const segmentation of input) expect(branchIndices(segmentation)).toEqual([1, 2, 3]);
    expect(identity.tests).toHaveLength(1);
    const test = identity.tests[0]!;
    expect(test.branch).toBe(2);
    expect(test.merged).toBe(false);
    expect(test.evidence.map((entry) => [entry.forwardShot, entry.reverseShot, entry.verdict])).toEqual([['A', 'B', 'bend']]);
    identity.segmentations.forEach((segmentation, k) => expect(segmentation).toBe(input[k]));
  });

  it('minusTimeEvidence measures the bend near (s_2 − s_3)/s_3 = 1.667 at the crossover where shot B’s picks leave refractor 3 (closed-form crossover)', () => {
    const evidence = identity.tests[0]!.evidence[0]!;
    // T− = t_A(Y) − t_B(X) has slope 2·s_3 where both picks are on refractor 3 and s_3 + s_2 where shot B's is on
    // refractor 2: a bend of s_2 − s_3. Its size is stated against the slope of one line fitted over every row, which
    // the bent part steepens: 10 % allowed.
    expectRelative(evidence.relativeBend, (1 / 1500 - 1 / 4000) / (1 / 4000), 0.1, 'METHODS §1: slowness contrast of refractors 2 and 3 over s_3');
    expect(evidence.relativeBend).toBeGreaterThan(MATERIAL_BEND + 3 * evidence.relativeBendSE);
    // Crossover of branches 2 and 3 from B: x_c = (τ_3 − τ_2)/(s_2 − s_3) (METHODS §1). The hinge is at the midpoint
    // G = X + XY/2 of the reverse receiver X that starts refractor 2, so B − x_c + XY/2 within one receiver.
    const q = (upper: number, lower: number) => Math.sqrt(1 / upper ** 2 - 1 / lower ** 2);
    const tau2 = 2 * 4 * q(500, 1500);
    const tau3 = 2 * 4 * q(500, 4000) + 2 * 10 * q(1500, 4000);
    const crossover = (tau3 - tau2) / (1 / 1500 - 1 / 4000);
    expectWithin(evidence.hingeX, LINE - crossover + (evidence.separation * STEP) / 2, STEP, 'METHODS §1: the 2/3 crossover of shot B, shifted by XY/2');
  });

  it('minusTimeEvidence gives no evidence for a pair whose forward shot is not before the reverse shot', () => {
    const reversedOrder = [sideOf(input, 'A', 'forward'), sideOf(input, 'B', 'reverse')].map((segmentation) => ({
      ...segmentation,
      sidePicks: { ...segmentation.sidePicks, sourceX: LINE - segmentation.sidePicks.sourceX },
    }));
    expect(minusTimeEvidence(reversedOrder[0]!, reversedOrder[1]!, 2, TIME_RESOLUTION)).toBeNull();
  });
});

// --- one undulating refractor, split by the segmentation
const UNDULATING = (x: number) => 10 + 3 * Math.sin((2 * Math.PI * x) / 120);
const RECEIVERS = range(48, 0, 2.5);
const SHOTS = [
  { id: 'OW', x: -30, receivers: RECEIVERS },
  { id: 'W', x: 0, receivers: RECEIVERS },
  { id: 'E', x: 117.5, receivers: RECEIVERS },
  { id: 'OE', x: 147.5, receivers: RECEIVERS },
];
const GRID_ROWS: Row[] = gridFirstArrivals({ section: { velocities: [600, 3000], interfaces: [UNDULATING] }, shots: SHOTS, depthExtent: 18 });

describe('identifyRefractors: one undulating refractor split by the segmentation is merged (fine-grid first arrivals)', () => {
  const input = segmentations(pickSetOf(GRID_ROWS));
  const identity = identifyRefractors(input, OPTIONS);

  it('identifyRefractors joins branches 2 and 3 on every automatic side: the minus times of the reversed pairs run straight', () => {
    // Precondition: the split to undo. The model has one refractor, yet three sides show a branch 3.
    const split = input.filter((segmentation) => branchIndices(segmentation).includes(3));
    expect(split.map((segmentation) => segmentation.sidePicks.shot).sort()).toEqual(['E', 'OE', 'OW']);
    expect(identity.tests).toHaveLength(1);
    const test = identity.tests[0]!;
    expect(test.branch).toBe(2);
    expect(test.merged, bends(identity).join('; ')).toBe(true);
    // Each forward side tries its nearest reverse partners beyond it until EVIDENCE_PARTNERS give evidence;
    // W–E gives none (no label change over their common receivers, below).
    expect(test.evidence.map((entry) => `${entry.forwardShot}–${entry.reverseShot}`)).toEqual(['OW–E', 'OW–OE', 'W–OE']);
    expect(test.evidence.every((entry) => entry.verdict === 'straight')).toBe(true);
    for (const entry of test.evidence) expect(entry.relativeBend + 2 * entry.relativeBendSE).toBeLessThan(MATERIAL_BEND);
    for (const segmentation of identity.segmentations) expect(Math.max(...branchIndices(segmentation))).toBeLessThanOrEqual(2);
  });

  it('identifyRefractors refits the merged branch from the picks of both, the members of branch 2 then 3, and leaves the direct wave alone', () => {
    const before = sideOf(input, 'E', 'reverse');
    const after = sideOf(identity.segmentations, 'E', 'reverse');
    const members = before.branches.filter((branch) => branch.index >= 2).flatMap((branch) => branch.members);
    const merged = after.branches.find((branch) => branch.index === 2)!;
    expect(merged.members).toEqual([...members].sort((left, right) => left - right));
    expect(merged.assignedBy).toBe('automatic');
    // One line through all of them: its slope lies between the two split branches' slopes.
    const slopes = before.branches.filter((branch) => branch.index >= 2).map((branch) => branch.fit.slope);
    expect(merged.fit.slope).toBeGreaterThan(Math.min(...slopes));
    expect(merged.fit.slope).toBeLessThan(Math.max(...slopes));
    expect(merged.fit.count).toBe(members.length);
    expect(after.branches.find((branch) => branch.index === 1)).toBe(before.branches.find((branch) => branch.index === 1));
  });

  it('identifyRefractors moves deeper branches up after a merge and tests the new pair n, n + 1 again (branch 3 of one side cut in two)', () => {
    const cut = input.map((segmentation) => {
      if (segmentation.sidePicks.shot !== 'OW') return segmentation;
      const third = segmentation.branches.find((branch) => branch.index === 3)!;
      const half = Math.floor(third.members.length / 2);
      const lower = branchFromMembers(segmentation.sidePicks, 3, third.members.slice(0, half), 'least-squares', 'automatic');
      const upper = branchFromMembers(segmentation.sidePicks, 4, third.members.slice(half), 'least-squares', 'automatic');
      if (!lower.ok || !upper.ok) throw new Error('the halves of branch 3 could not be fitted');
      return { ...segmentation, branches: [...segmentation.branches.filter((branch) => branch.index < 3), lower.branch, upper.branch] };
    });
    expect(branchIndices(sideOf(cut, 'OW', 'forward'))).toEqual([2, 3, 4]);
    const identityOfCut = identifyRefractors(cut, OPTIONS);
    expect(identityOfCut.tests.map((test) => [test.branch, test.merged])).toEqual([[2, true], [2, true]]);
    expect(branchIndices(sideOf(identityOfCut.segmentations, 'OW', 'forward'))).toEqual([2]);
    expect(sideOf(identityOfCut.segmentations, 'OW', 'forward').branches[0]!.members).toHaveLength(sideOf(input, 'OW', 'forward').sidePicks.offsets.length);
  });

  it('identifyRefractors keeps the split when pick noise (σ 0.5 ms) leaves every pair unclear: no bend is materially excluded at 2 SE', () => {
    const normal = seededNormal(1);
    const noisy = identifyRefractors(segmentations(pickSetOf(GRID_ROWS.map((row) => ({ ...row, time: row.time + 5e-4 * normal() })))), OPTIONS);
    expect(noisy.tests).toHaveLength(1);
    expect(noisy.tests[0]!.merged, bends(noisy).join('; ')).toBe(false);
    expect(noisy.tests[0]!.evidence.every((entry) => entry.verdict === 'unclear')).toBe(true);
    // Some pair's bend is below MATERIAL_BEND, but not by 2 SE.
    expect(noisy.tests[0]!.evidence.some((entry) => entry.relativeBend < MATERIAL_BEND)).toBe(true);
    expect(Math.max(...noisy.segmentations.map((segmentation) => Math.max(...branchIndices(segmentation))))).toBe(3);
  });

  it('identifyRefractors without the off-end shots finds no label change over the common receivers, so it tests nothing', () => {
    const ends = input.filter((segmentation) => segmentation.sidePicks.shot === 'W' || segmentation.sidePicks.shot === 'E');
    const identityOfEnds = identifyRefractors(ends, OPTIONS);
    expect(identityOfEnds.tests).toEqual([]);
    identityOfEnds.segmentations.forEach((segmentation, k) => expect(segmentation).toBe(ends[k]));
  });
});

describe('identifyRefractors: what is never changed', () => {
  const automatic = segmentations(pickSetOf(GRID_ROWS));
  /** The grid rows with shot E's picks labelled by the user: `label(n)` for the picks the automatic split put on branch n. */
  const userRows = (label: (branch: number) => number): Row[] => {
    const side = sideOf(automatic, 'E', 'reverse');
    const branchOf = new Map<number, number>();
    for (const branch of side.branches) for (const position of branch.members) branchOf.set(side.sidePicks.pickIndices[position]!, label(branch.index));
    return GRID_ROWS.map((row, index) => (row.shot === 'E' ? { ...row, branch: branchOf.get(index) ?? 1 } : row));
  };

  it('identifyRefractors never changes a side the user assigned, and still merges the automatic sides on the others’ evidence', () => {
    // The user says E has one head wave (the split's branch 3 labelled 2): E is left out of the evidence and kept as given.
    const input = segmentations(pickSetOf(userRows((branch) => Math.min(branch, 2))));
    const user = sideOf(input, 'E', 'reverse');
    expect(user.assignedBy).toBe('user');
    const identity = identifyRefractors(input, OPTIONS);
    expect(identity.tests[0]?.merged).toBe(true);
    expect(identity.tests[0]!.evidence.some((entry) => entry.reverseShot === 'E')).toBe(false);
    expect(sideOf(identity.segmentations, 'E', 'reverse')).toBe(user);
    expect(branchIndices(sideOf(identity.segmentations, 'OW', 'forward'))).toEqual([2]);
  });

  it('identifyRefractors merges nothing while a user-assigned side has branch n + 1 (the user has said the layer is there)', () => {
    const input = segmentations(pickSetOf(userRows((branch) => branch)));
    expect(branchIndices(sideOf(input, 'E', 'reverse'))).toEqual([1, 2, 3]);
    const identity = identifyRefractors(input, OPTIONS);
    expect(identity.tests).toEqual([]);
    identity.segmentations.forEach((segmentation, k) => expect(segmentation).toBe(input[k]));
  });

  it('identifyRefractors on a single-ended line (shots at the west end only) has no reversed evidence and merges nothing, split or not', () => {
    const input = segmentations(pickSetOf(GRID_ROWS.filter((row) => row.shot === 'OW' || row.shot === 'W')));
    expect(branchIndices(sideOf(input, 'OW', 'forward'))).toEqual([2, 3]);
    const identity = identifyRefractors(input, OPTIONS);
    expect(identity.tests).toEqual([]);
    identity.segmentations.forEach((segmentation, k) => expect(segmentation).toBe(input[k]));
  });
});
