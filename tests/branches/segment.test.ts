/**
 * segmentSide and optimalPartitions: METHODS check case 4.1, the brute-force oracle twin, the
 * physical constraints, options and edges. User-assigned sides are in user-branches.test.ts.
 */
import { describe, expect, it } from 'vitest';
import { describePhysicalConstraint, failedPhysicalConstraint, type SegmentLine } from '../../lib/branches/branch-constraints.js';
import { fitBranchMembers, sideName } from '../../lib/branches/branch-fit.js';
import { describeShotSide } from '../../lib/checks/wording.js';
import { optimalPartitions } from '../../lib/branches/optimal-partition.js';
import { segmentCostTable } from '../../lib/branches/segment-cost.js';
import { segmentationBic, segmentSide } from '../../lib/branches/segment.js';
import type { FitOutcome, LineFit } from '../../lib/branches/types.js';
import { seededNormal, seededRandom } from '../../lib/random.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';
import { runPythonJson } from '../helpers/python.js';
import { makeSide } from './build.js';
import { directRefitCost } from './oracle.js';
import { CASE_1_1 } from '../model/check-case-1-1.js';
import { firstArrivalByRays } from '../oracles/ray-geometry.js';

const CASE_4_1 = 'METHODS.md check case 4.1 (computed from the stated model, not a published value)';

/** First arrival of METHODS check case 1.1's model by explicit ray geometry (tests/oracles). */
function arrival(offset: number): number {
  return firstArrivalByRays(CASE_1_1.velocities, CASE_1_1.thicknesses, offset).time;
}

function fitted(outcome: FitOutcome): LineFit {
  if (!outcome.ok) throw new Error(outcome.message);
  return outcome.fit;
}

describe('segmentSide on METHODS check case 4.1', () => {
  // Receivers x_i = 2.5·i m, i = 1…48; first arrival + 0.4 ms·sin(2.3·i).
  const offsets = Array.from({ length: 48 }, (_, index) => 2.5 * (index + 1));
  const times = offsets.map((offset, index) => arrival(offset) + 0.4e-3 * Math.sin(2.3 * (index + 1)));
  const side = makeSide(offsets, times);
  // METHODS 4.1 counts one parameter per breakpoint (p = 3K − 1).
  const segmentation = segmentSide(side, { minPicksPerBranch: 3, maxBranches: 5, breakpointParameters: 1 });

  it('RSS per K = 1…5 (7.8922e-4 … 3.3891e-6 s²)', () => {
    const expected = [7.8922e-4, 7.4806e-5, 3.7813e-6, 3.5585e-6, 3.3891e-6];
    expect(segmentation.candidates.map((candidate) => candidate.branchCount)).toEqual([1, 2, 3, 4, 5]);
    // Printed to 5 significant digits.
    segmentation.candidates.forEach((candidate, index) => expectRelative(candidate.residualSumOfSquares, expected[index] as number, 7e-5, CASE_4_1));
  });

  it('BIC per K with p = 3K − 1 (−521.009 … −736.178) and K = 3 chosen', () => {
    const expected = [-521.009, -622.491, -754.15, -745.451, -736.178];
    // Printed to 0.001.
    segmentation.candidates.forEach((candidate, index) => expectWithin(candidate.bic, expected[index] as number, 0.0006, CASE_4_1));
    expect(segmentation.branches.map((branch) => branch.index)).toEqual([1, 2, 3]);
    expect(segmentation.assignedBy).toBe('automatic');
    expect(segmentation.notes).toEqual([]);
  });

  it('with the default heavier breakpoint penalty (3 parameters per break) still chooses K = 3', () => {
    const heavier = segmentSide(side, { minPicksPerBranch: 3, maxBranches: 5 });
    // Same RSS, so each BIC rises by 2(K − 1)·ln 48 over the METHODS value.
    const expected = [-521.009, -622.491, -754.15, -745.451, -736.178];
    heavier.candidates.forEach((candidate, index) =>
      expectWithin(candidate.bic, (expected[index] as number) + 2 * index * Math.log(48), 0.0006, `${CASE_4_1}, plus 2(K−1)·ln n`),
    );
    expect(heavier.branches.map((branch) => branch.index)).toEqual([1, 2, 3]);
  });

  it('segmentationBic defaults to 3 parameters per breakpoint, as segmentSide does; 1 gives the METHODS 4.1 values', () => {
    const expected = [-521.009, -622.491, -754.15, -745.451, -736.178];
    const table = segmentCostTable(offsets, times, null, 3);
    optimalPartitions(table, 5, false).forEach((partition, index) => {
      const byDefault = segmentationBic(partition, 48, false, false, 1e-4);
      expectWithin(segmentationBic(partition, 48, false, false, 1e-4, 1), expected[index] as number, 0.0006, CASE_4_1);
      expectWithin(byDefault, (expected[index] as number) + 2 * index * Math.log(48), 0.0006, `${CASE_4_1}, plus 2(K−1)·ln n`);
      expect(byDefault).toBe(segmentSide(side).candidates[index]?.bic);
    });
  });

  it('segments 2.5–10.0, 12.5–35.0, 37.5–120.0 m (the 35 m pick joins branch 2)', () => {
    expect(segmentation.branches.map((branch) => [branch.firstOffset, branch.lastOffset])).toEqual([
      [2.5, 10],
      [12.5, 35],
      [37.5, 120],
    ]);
    expect(segmentation.branches[1]?.members).toEqual(Array.from({ length: 10 }, (_, index) => 4 + index));
  });

  it('fits 1600.09 m/s, 19.3350 ms and 3498.29 m/s, 30.9729 ms; free direct fit 399.99 m/s, 0.0550 ms', () => {
    const [direct, second, third] = segmentation.branches;
    // Velocities printed to 0.01 m/s, times to 0.0001 ms.
    expectWithin(second?.fit.apparentVelocity ?? Number.NaN, 1600.09, 0.006, CASE_4_1);
    expectWithin(second?.fit.intercept ?? Number.NaN, 19.335e-3, 0.6e-7, CASE_4_1);
    expectWithin(third?.fit.apparentVelocity ?? Number.NaN, 3498.29, 0.006, CASE_4_1);
    expectWithin(third?.fit.intercept ?? Number.NaN, 30.9729e-3, 0.6e-7, CASE_4_1);
    // The reported direct fit goes through the origin (surface shot); the free-intercept refit is 4.1's.
    expect(direct?.fit.throughOrigin).toBe(true);
    const free = fitted(fitBranchMembers(side, direct?.members ?? [], { throughOrigin: false }));
    expectWithin(free.apparentVelocity, 399.99, 0.006, CASE_4_1);
    expectWithin(free.intercept, 0.055e-3, 0.6e-7, CASE_4_1);
    expect(Math.abs(free.intercept)).toBeLessThan(3 * free.interceptSE);
  });

  it('the reported direct fit through the origin matches numpy.linalg.lstsq on the same 4 picks', () => {
    const direct = segmentation.branches[0];
    const members = direct?.members ?? [];
    const reference = runPythonJson<{ slope: number }>(
      `
import json, sys
import numpy as np
d = json.load(sys.stdin)
x = np.array(d['x'])[:, None]; t = np.array(d['t'])
print(json.dumps({'slope': float(np.linalg.lstsq(x, t, rcond=None)[0][0])}))
`,
      { x: members.map((position) => offsets[position]), t: members.map((position) => times[position]) },
    );
    expectRelative(direct?.fit.slope ?? Number.NaN, reference.slope, 1e-12, 'numpy.linalg.lstsq through the origin');
  });

  it('with firstSegmentThroughOrigin the DP uses the origin cost row and one parameter fewer', () => {
    const withOrigin = segmentSide(side, { firstSegmentThroughOrigin: true });
    const one = withOrigin.candidates[0];
    const direct = directRefitCost(offsets, times, null, true);
    expectRelative(one?.residualSumOfSquares ?? Number.NaN, direct, 1e-9, 'direct refit of all 48 picks through the origin');
    // p = 3K − 2 for K = 1: one slope only.
    expectWithin(one?.bic ?? Number.NaN, 48 * Math.log(direct / 48) + 1 * Math.log(48), 1e-9, 'BIC by hand with p = 1');
    expect(withOrigin.branches.map((branch) => [branch.firstOffset, branch.lastOffset])).toEqual([
      [2.5, 10],
      [12.5, 35],
      [37.5, 120],
    ]);
    // A buried shot ignores the option.
    const buried = segmentSide({ ...side, surfaceShot: false }, { firstSegmentThroughOrigin: true });
    expectRelative(buried.candidates[0]?.residualSumOfSquares ?? Number.NaN, directRefitCost(offsets, times, null), 1e-9, 'direct free refit');
    expect(buried.branches[0]?.fit.throughOrigin).toBe(false);
  });
});

describe('optimalPartitions equals brute force over all splits (oracle twin)', () => {
  /** Every way to cut n picks into K contiguous segments of at least m, each costed by a direct refit. */
  function bruteForce(offsets: number[], times: number[], weights: number[] | null, branchCount: number, minPicks: number): { cost: number; starts: number[] } {
    let best = { cost: Number.POSITIVE_INFINITY, starts: [] as number[] };
    const count = offsets.length;
    const visit = (starts: number[]): void => {
      if (starts.length === branchCount - 1) {
        const bounds = [0, ...starts, count];
        let cost = 0;
        for (let segment = 0; segment < branchCount; segment += 1) {
          const [first, end] = [bounds[segment] as number, bounds[segment + 1] as number];
          if (end - first < minPicks) return;
          cost += directRefitCost(offsets.slice(first, end), times.slice(first, end), weights ? weights.slice(first, end) : null);
        }
        if (cost < best.cost) best = { cost, starts: [...starts] };
        return;
      }
      const from = starts.length === 0 ? 1 : (starts[starts.length - 1] as number) + 1;
      for (let start = from; start < count; start += 1) visit([...starts, start]);
    };
    visit([]);
    return best;
  }

  const uniform = seededRandom(4242);
  const normal = seededNormal(4243);
  const trials = Array.from({ length: 60 }, (_, trial) => {
    const count = 6 + Math.floor(uniform() * 9); // 6…14 picks
    const offsets = Array.from({ length: count }, (_, index) => 3 * (index + 1) + uniform());
    // Alternate between branch-like data (three lines) and pure noise.
    const times = offsets.map((offset) =>
      trial % 2 === 0 ? Math.min(offset / 500, 0.01 + offset / 1500, 0.02 + offset / 3000) + 0.3e-3 * normal() : 0.01 * normal(),
    );
    const weights = trial % 3 === 0 ? offsets.map(() => 1 / (0.2e-3 + 0.5e-3 * uniform()) ** 2) : null;
    const minPicks = trial % 4 === 0 ? 2 : 3;
    return { offsets, times, weights, minPicks };
  });

  it('for 60 seeded sides (n = 6…14, K ≤ 3, m = 2 or 3, with and without weights): same optimal cost and breakpoints', () => {
    let compared = 0;
    for (const { offsets, times, weights, minPicks } of trials) {
      const sigmas = weights ? weights.map((weight) => 1 / Math.sqrt(weight)) : null;
      const partitions = optimalPartitions(segmentCostTable(offsets, times, sigmas, minPicks), 3, false);
      for (let branchCount = 1; branchCount <= 3; branchCount += 1) {
        const oracle = bruteForce(offsets, times, weights, branchCount, minPicks);
        const found = partitions.find((partition) => partition.branchCount === branchCount);
        if (!Number.isFinite(oracle.cost)) {
          expect(found).toBeUndefined();
          continue;
        }
        const source = `brute force over all splits, n = ${offsets.length}, K = ${branchCount}, m = ${minPicks}`;
        // 2-pick segments cost exactly 0 in the table and ~1e-29 in a refit: an absolute floor.
        const tolerance = 1e-9 * oracle.cost + 1e-20;
        expectWithin(found?.cost ?? Number.NaN, oracle.cost, tolerance, source);
        expect(found?.starts, source).toEqual(oracle.starts);
        compared += 1;
      }
    }
    // 60 sides × 3 branch counts, less the K that do not fit (n < K·m).
    expect(compared).toBeGreaterThan(150);
  });

  it('leaves out a K with no feasible partition and throws for maxBranches below 1', () => {
    const table = segmentCostTable([1, 2, 3, 4, 5, 6, 7], [1, 2, 3, 4, 5, 6, 7.5], null, 3);
    expect(optimalPartitions(table, 5, false).map((partition) => partition.branchCount)).toEqual([1, 2]);
    expect(optimalPartitions(segmentCostTable([1, 2], [1, 2], null, 3), 2, false)).toEqual([]);
    expect(() => optimalPartitions(table, 0, false)).toThrow(/positive integer/);
  });

  it('gives ties between equal-cost splits to the earliest start', () => {
    // Picks exactly on one line: every split into two costs 0.
    const table = segmentCostTable([1, 2, 3, 4, 5, 6, 7, 8], [1, 2, 3, 4, 5, 6, 7, 8], null, 3);
    expect(optimalPartitions(table, 2, false)[1]?.starts).toEqual([3]);
  });
});

describe('failedPhysicalConstraint', () => {
  // METHODS check case 1.1 lines with picks every 2.5 m split at the true crossovers.
  const good: SegmentLine[] = [
    { slope: 1 / 400, intercept: 0, firstOffset: 2.5, lastOffset: 10 },
    { slope: 1 / 1600, intercept: 0.0193649, firstOffset: 12.5, lastOffset: 32.5 },
    { slope: 1 / 3500, intercept: 0.0309864, firstOffset: 35, lastOffset: 120 },
  ];
  const change = (index: number, fields: Partial<SegmentLine>): SegmentLine[] =>
    good.map((line, position) => (position === index ? { ...line, ...fields } : line));

  it('describePhysicalConstraint names each constraint in plain words and throws for an unknown code', () => {
    expect(
      ['slopes-positive', 'slopes-decreasing', 'intercepts-increasing', 'crossovers-in-gaps', 'slopes-distinct'].map(describePhysicalConstraint),
    ).toEqual([
      'a branch whose times do not increase with offset',
      'apparent velocity falling with offset',
      'intercept times out of order',
      'lines that cross outside the gap between their picks',
      'neighbouring branches whose velocities cannot be told apart',
    ]);
    expect(() => describePhysicalConstraint('toString')).toThrow(/unknown constraint toString/);
  });

  it('passes METHODS check case 1.1 branches (crossovers 10.33 and 34.25 m inside the gaps)', () => {
    expect(failedPhysicalConstraint(good, 0)).toBeNull();
    expect(failedPhysicalConstraint([], 0)).toBeNull();
  });

  it('fails slopes-positive for a zero or negative slope, even for one branch', () => {
    expect(failedPhysicalConstraint([{ ...(good[0] as SegmentLine), slope: 0 }], 0)).toBe('slopes-positive');
    expect(failedPhysicalConstraint(change(2, { slope: -1e-4 }), 0)).toBe('slopes-positive');
  });

  it('fails slopes-decreasing when a later branch is slower', () => {
    expect(failedPhysicalConstraint(change(2, { slope: 1 / 1000 }), 0)).toBe('slopes-decreasing');
  });

  it('fails intercepts-increasing for a refracted intercept ≤ 0 or one below the previous', () => {
    expect(failedPhysicalConstraint(change(1, { intercept: -0.001 }), 100)).toBe('intercepts-increasing');
    expect(failedPhysicalConstraint(change(2, { intercept: 0.015 }), 100)).toBe('intercepts-increasing');
    // A negative direct-wave intercept is not a segmentation constraint.
    expect(failedPhysicalConstraint(change(0, { intercept: -0.0005 }), 100)).toBeNull();
  });

  it('fails crossovers-in-gaps when lines meet outside the gap widened by the tolerance', () => {
    // Crossover of branches 2 and 3 is 34.25 m; split late, at 37.5 | 40 m, the gap is [37.5, 40].
    const late = good.map((line, position) => (position === 1 ? { ...line, lastOffset: 37.5 } : position === 2 ? { ...line, firstOffset: 40 } : line));
    expect(failedPhysicalConstraint(late, 3)).toBe('crossovers-in-gaps');
    expect(failedPhysicalConstraint(late, 3.3)).toBeNull();
    expect(() => failedPhysicalConstraint(good, -1)).toThrow(/≥ 0/);
  });
});

describe('segmentSide constraints in BIC order', () => {
  // A slower layer beyond 50 m: the kinked fit wins the BIC but its slopes increase.
  const offsets = Array.from({ length: 20 }, (_, index) => 5 * (index + 1));
  const times = offsets.map((offset, index) => (offset <= 50 ? offset / 2000 : 0.025 + (offset - 50) / 500) + 0.1e-3 * Math.sin(1.7 * (index + 1)));

  it('when the BIC-best fails a constraint, accepts the best that passes and notes segmentation-constraint-failed', () => {
    const segmentation = segmentSide(makeSide(offsets, times));
    const byBic = [...segmentation.candidates].sort((left, right) => left.bic - right.bic);
    expect(byBic[0]?.branchCount).toBe(2);
    expect(byBic[0]?.failedConstraint).toBe('slopes-decreasing');
    const accepted = byBic.find((candidate) => candidate.failedConstraint === null);
    expect(segmentation.branches).toHaveLength(accepted?.branchCount ?? -1);
    expect(segmentation.notes.map((note) => note.code)).toEqual(['segmentation-constraint-failed']);
    // The kink of the stated times is at 50 m and the 50 m pick lies on both lines; the split puts it
    // on the later one, so it breaks between 45 and 50 m.
    expect(byBic[0]?.starts).toEqual([9]);
    expect(segmentation.notes[0]?.message).toBe(
      'shot S1, forward side: the statistically best split (2 branches, breaking between 45\u00a0m and 50\u00a0m) has apparent velocity ' +
        'falling with offset, so the best split that passes every constraint (1 branch) is used; check the picks near the breaks, or assign branches by hand',
    );
  });

  it('when no candidate passes, uses the BIC-best and says so', () => {
    const falling = offsets.map((offset, index) => 0.05 - offset / 2000 + 0.1e-3 * Math.sin(1.7 * (index + 1)));
    const segmentation = segmentSide(makeSide(offsets, falling));
    expect(segmentation.candidates.every((candidate) => candidate.failedConstraint === 'slopes-positive')).toBe(true);
    const best = [...segmentation.candidates].sort((left, right) => left.bic - right.bic)[0];
    expect(segmentation.branches).toHaveLength(best?.branchCount ?? -1);
    expect(segmentation.notes[0]?.message).toMatch(
      /^shot S1, forward side: no split passes the physical constraints; the statistically best \(\d branch(es)?[^)]*\) has a branch whose times do not increase with offset and is used as it is/,
    );
  });

  it('the crossover tolerance is one median pick spacing: 4.1 passes with it, fails without room', () => {
    // In 4.1 the fitted 2/3 crossover (34.32 m) lies 0.68 m inside branch 2, whose last pick is 35 m.
    const lines: SegmentLine[] = [
      { slope: 1 / 1600.0929, intercept: 0.019335027, firstOffset: 12.5, lastOffset: 35 },
      { slope: 1 / 3498.2918, intercept: 0.030972947, firstOffset: 37.5, lastOffset: 120 },
    ];
    expect(failedPhysicalConstraint(lines, 2.5)).toBeNull();
    expect(failedPhysicalConstraint(lines, 0.5)).toBe('crossovers-in-gaps');
  });
});

describe('segmentSide options and edges', () => {
  const offsets = Array.from({ length: 30 }, (_, index) => 4 * (index + 1));
  const times = offsets.map((offset, index) => arrival(offset) + 0.2e-3 * Math.sin(1.3 * index));

  it('floors the RSS at n·dt²/12 so noise-free picks give a finite BIC', () => {
    // Picks every metre: each true branch holds ≥ 10 picks, so K ≥ 3 fits them to rounding error.
    const dense = Array.from({ length: 60 }, (_, index) => index + 1);
    const exact = dense.map((offset) => arrival(offset));
    const segmentation = segmentSide(makeSide(dense, exact), { timeResolution: 1e-4 });
    const floored = 60 * Math.log((1e-4) ** 2 / 12);
    for (const candidate of segmentation.candidates.filter((entry) => entry.branchCount >= 3)) {
      expect(candidate.residualSumOfSquares).toBeLessThan(60 * (1e-4) ** 2 / 12);
      // Default: each breakpoint counts 3 parameters, p = 2K + 3(K − 1).
      expectWithin(candidate.bic, floored + (5 * candidate.branchCount - 3) * Math.log(60), 1e-9, 'floored BIC by hand');
    }
    expect(segmentation.branches.map((branch) => [branch.firstOffset, branch.lastOffset])).toEqual([
      [1, 10],
      [11, 34],
      [35, 60],
    ]);
  });

  it('with sigmas uses χ² + p·ln n and weighted least-squares branch fits', () => {
    const sigmas = offsets.map(() => 0.2e-3);
    const segmentation = segmentSide(makeSide(offsets, times, { sigmas }));
    for (const candidate of segmentation.candidates) {
      expectWithin(candidate.bic, candidate.residualSumOfSquares + (5 * candidate.branchCount - 3) * Math.log(30), 1e-9, 'χ² + p ln n by hand');
    }
    expect(segmentation.branches.every((branch) => branch.fit.weighted)).toBe(true);
  });

  it('reports fits by the chosen method, branch 1 through the origin only for a surface shot', () => {
    const robust = segmentSide(makeSide(offsets, times), { fitMethod: 'huber' });
    expect(robust.branches.every((branch) => branch.fit.method === 'huber')).toBe(true);
    expect(robust.branches.map((branch) => branch.fit.throughOrigin)).toEqual([true, false, false]);
    const buried = segmentSide(makeSide(offsets, times, { surfaceShot: false }));
    expect(buried.branches[0]?.fit.throughOrigin).toBe(false);
  });

  it('respects minPicksPerBranch and maxBranches', () => {
    const few = segmentSide(makeSide(offsets, times), { maxBranches: 2, minPicksPerBranch: 5 });
    expect(few.candidates.map((candidate) => candidate.branchCount)).toEqual([1, 2]);
    expect(few.branches.every((branch) => branch.members.length >= 5)).toBe(true);
  });

  it('gives no branches, no candidates and a fit-refused note to a side with fewer picks than one branch needs', () => {
    const segmentation = segmentSide(makeSide([5, 10], [0.0125, 0.025]));
    expect(segmentation.branches).toEqual([]);
    expect(segmentation.candidates).toEqual([]);
    expect(segmentation.notes.map((note) => note.code)).toEqual(['fit-refused']);
    expect(segmentation.notes[0]?.message).toMatch(/2 picks, fewer than the 3 one branch needs/);
  });

  it('leaves out a reported fit that is refused (a 2-pick branch without sigmas), with a fit-refused note', () => {
    // Two picks per branch allowed: the reported free fit of a 2-pick branch has no residual freedom.
    const short = [5, 10, 15, 20, 30, 40];
    const shortTimes = [0.0125, 0.025, 0.0375, 0.05, 0.06, 0.0701];
    const segmentation = segmentSide(makeSide(short, shortTimes, { surfaceShot: false }), { minPicksPerBranch: 2, maxBranches: 3 });
    const refusals = segmentation.notes.filter((note) => note.code === 'fit-refused');
    const chosen = [...segmentation.candidates].sort((left, right) => left.bic - right.bic).find((candidate) => candidate.failedConstraint === null);
    const ranges = [0, ...(chosen?.starts ?? []), short.length];
    const twoPick = ranges.slice(1).filter((end, position) => end - (ranges[position] as number) === 2).length;
    expect(twoPick).toBeGreaterThan(0);
    expect(refusals).toHaveLength(twoPick);
    expect(segmentation.branches).toHaveLength((chosen?.branchCount ?? 0) - twoPick);
  });

  it('sideName words a side exactly as describeShotSide does ("shot S7, reverse side")', () => {
    const side = { ...makeSide(offsets, times, { side: 'reverse' }), shot: 'S7' };
    expect(sideName(side)).toBe('shot S7, reverse side');
    expect(sideName(side)).toBe(describeShotSide({ shot: 'S7', side: 'reverse' }));
  });

  it('fitBranchMembers throws for members that are not ascending positions on the side', () => {
    const side = makeSide(offsets, times);
    expect(() => fitBranchMembers(side, [0, 2, 1])).toThrow(/ascending positions below 30/);
    expect(() => fitBranchMembers(side, [0, 1, 30])).toThrow(/ascending positions/);
    expect(() => fitBranchMembers(side, [0, 1, 1.5])).toThrow(/ascending positions/);
  });

  it('keeps excluded empty (excluded picks never reach a side) and never mutates the side', () => {
    const side = makeSide(offsets, times);
    const copy = structuredClone(side);
    const segmentation = segmentSide(Object.freeze(side));
    expect(segmentation.excluded).toEqual([]);
    expect(side).toEqual(copy);
    expect(segmentation.sidePicks).toBe(side);
  });

  it('throws for options out of range', () => {
    const side = makeSide(offsets, times);
    expect(() => segmentSide(side, { minPicksPerBranch: 1 })).toThrow(/minPicksPerBranch/);
    expect(() => segmentSide(side, { maxBranches: 0 })).toThrow(/maxBranches/);
    expect(() => segmentSide(side, { timeResolution: 0 })).toThrow(/timeResolution/);
    expect(() => segmentSide(side, { timeResolution: Number.NaN })).toThrow(/timeResolution/);
  });

  it('segments n = 500 picks with K ≤ 5 (a smoke run of the performance case; timing is in the benchmark)', () => {
    const many = Array.from({ length: 500 }, (_, index) => 0.5 * (index + 1));
    const manyTimes = many.map((offset, index) => arrival(offset) + 0.2e-3 * Math.sin(7.1 * index));
    const segmentation = segmentSide(makeSide(many, manyTimes));
    expect(segmentation.branches).toHaveLength(3);
  });
});
