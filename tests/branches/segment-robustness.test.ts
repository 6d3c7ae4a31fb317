/**
 * The parts of segmentation that keep it honest on real, noisy picks: soft constraints with a
 * decisive-BIC rule, distinct slopes, the crossover's own uncertainty, off-end sides starting on a
 * head wave, and outlier screening. Picks come from explicit ray geometry
 * (tests/oracles/ray-geometry.ts) on the METHODS.md check case 2.2 model (500/2000 m/s over 8 m).
 */
import { describe, expect, it } from 'vitest';
import { crossoverStandardError, failedPhysicalConstraint, type SegmentLine } from '../../lib/branches/branch-constraints.js';
import { DECISIVE_BIC, segmentSide } from '../../lib/branches/segment.js';
import { screenOutlierPicks } from '../../lib/branches/outlier-screen.js';
import { segmentSideRobustly, subsetOfSide } from '../../lib/branches/robust-segment.js';
import { firstBranchIndices, startsWithDirectWave } from '../../lib/interpretation/branch-identity.js';
import { firstArrivalByRays } from '../oracles/ray-geometry.js';
import { seededNormal } from '../../lib/random.js';
import { makeSide } from './build.js';

const VELOCITIES = [500, 2000];
const THICKNESSES = [8];
const arrival = (offset: number) => firstArrivalByRays(VELOCITIES, THICKNESSES, offset).time;
const OFFSETS = Array.from({ length: 48 }, (_, k) => 2 * (k + 1));
const noise = seededNormal(77);
const NOISY = OFFSETS.map((offset) => arrival(offset) + 0.3e-3 * noise());

describe('failedPhysicalConstraint: distinct slopes and the crossover uncertainty', () => {
  const line = (slope: number, intercept: number, first: number, last: number, variance = 0): SegmentLine => ({
    slope,
    intercept,
    firstOffset: first,
    lastOffset: last,
    slopeVariance: variance,
    interceptVariance: 0,
    covariance: 0,
  });

  it('rejects a break between slopes closer than 3 SE of their difference (slopes-distinct)', () => {
    // Lines crossing at 31 m, in the gap [30, 32]; slope difference 3.03e-5 s/m against 3·√2·2e-5 = 8.5e-5.
    const slownessGap = 1 / 3000 - 1 / 3300;
    const lines = [line(1 / 3000, 0.02, 10, 30, (2e-5) ** 2), line(1 / 3300, 0.02 + 31 * slownessGap, 32, 50, (2e-5) ** 2)];
    expect(failedPhysicalConstraint(lines, 2)).toBe('slopes-distinct');
    expect(failedPhysicalConstraint(lines.map((entry) => ({ ...entry, slopeVariance: 0 })), 2)).toBeNull();
  });

  it('crossoverStandardError is √(Va₁+Va₂)/Δs for intercept errors alone and σ_t/Δs for scatter alone (by hand)', () => {
    const earlier = { slope: 0.002, intercept: 0, firstOffset: 0, lastOffset: 20 };
    const later = { slope: 0.0005, intercept: 0.031, firstOffset: 22, lastOffset: 96 };
    expect(crossoverStandardError({ ...earlier, interceptVariance: 1e-8 }, { ...later, interceptVariance: 3e-8 })).toBeCloseTo(Math.sqrt(4e-8) / 0.0015, 10);
    expect(crossoverStandardError({ ...earlier, residualSD: 3e-4 }, { ...later, residualSD: 3e-4 })).toBeCloseTo(3e-4 / 0.0015, 10);
    expect(crossoverStandardError(earlier, later)).toBe(0);
  });

  it('widens the crossover gap by 3 crossover SE: a noisy intersection 3 m inside a segment passes', () => {
    // Intersection of these lines: (0.031 − 0)/(0.002 − 0.0005) = 20.667 m, 3.33 m before the gap [24, 26].
    const earlier = { slope: 0.002, intercept: 0, firstOffset: 2, lastOffset: 24 };
    const later = { slope: 0.0005, intercept: 0.031, firstOffset: 26, lastOffset: 96 };
    expect(failedPhysicalConstraint([earlier, later], 2)).toBe('crossovers-in-gaps');
    // Scatter 2 ms: the lines differ by less than that over ±1.33 m, so the tolerance is 4 m.
    expect(failedPhysicalConstraint([{ ...earlier, residualSD: 2e-3 }, { ...later, residualSD: 2e-3 }], 2)).toBeNull();
  });
});

describe('segmentSide: a decisive BIC overrides a soft constraint', () => {
  it('keeps two branches when two mispicks on the direct line push the crossover out of the gap, and notes it', () => {
    // Picks at 22 and 24 m read on the direct-wave line (late by 1.5 and 2.5 ms): the fitted lines
    // still cross at 20.66 m, outside the observed gap [24, 26] m, but one line fits far worse.
    const times = OFFSETS.map((offset) => (offset === 22 || offset === 24 ? offset / 500 : arrival(offset)));
    const segmentation = segmentSide(makeSide(OFFSETS, times));
    expect(segmentation.branches.map((branch) => [branch.index, branch.firstOffset, branch.lastOffset])).toEqual([
      [1, 2, 24],
      [2, 26, 96],
    ]);
    const chosen = segmentation.candidates.find((candidate) => candidate.branchCount === 2)!;
    const single = segmentation.candidates.find((candidate) => candidate.branchCount === 1)!;
    expect(chosen.failedConstraint).toBe('crossovers-in-gaps');
    expect(single.bic - chosen.bic).toBeGreaterThan(DECISIVE_BIC);
    expect(segmentation.notes.map((note) => note.code)).toEqual(['segmentation-constraint-failed']);
    expect(segmentation.notes[0]!.message).toBe(
      'shot S1, forward side: the statistically best split (2 branches, breaking between 24\u00a0m and 26\u00a0m) fails only a soft ' +
        'constraint — it has lines that cross outside the gap between their picks — but it is used because it fits so much better (BIC lower by more than 10) ' +
        'than the best split that passes every constraint (1 branch); a mispick near a crossover is the usual cause — check the picks ' +
        'near the breaks, or assign branches by hand',
    );
  });

  it('when the split used fails a soft constraint but is not the BIC-best, says so (not that it passes), naming both splits', () => {
    // The same mispicks, and beyond 70 m the times bend up to 1500 m/s: the 3-branch split is the
    // BIC-best but its velocity falls (a hard constraint); the 2-branch split wins over 1 branch decisively.
    const times = OFFSETS.map((offset) => {
      const base = offset === 22 || offset === 24 ? offset / 500 : arrival(offset);
      return offset > 70 ? base + (offset - 70) * (1 / 1500 - 1 / 2000) : base;
    });
    const segmentation = segmentSide(makeSide(OFFSETS, times));
    const byBic = [...segmentation.candidates].sort((left, right) => left.bic - right.bic);
    expect(byBic.map((candidate) => [candidate.branchCount, candidate.failedConstraint]).slice(0, 1)).toEqual([[3, 'slopes-decreasing']]);
    expect(segmentation.candidates.find((candidate) => candidate.branchCount === 2)?.failedConstraint).toBe('crossovers-in-gaps');
    expect(segmentation.branches).toHaveLength(2);
    expect(segmentation.notes.map((note) => note.code)).toEqual(['segmentation-constraint-failed']);
    expect(segmentation.notes[0]!.message).toBe(
      'shot S1, forward side: the statistically best split (3 branches, breaking between 24\u00a0m and 26\u00a0m and between 68\u00a0m and 70\u00a0m) ' +
        'has apparent velocity falling with offset; the split used (2 branches, breaking between 24\u00a0m and 26\u00a0m) fails only a soft ' +
        'constraint — it has lines that cross outside the gap between their picks — and is used because it fits so much better (BIC lower by more than 10) than ' +
        'the best split that passes every constraint (1 branch); a mispick near a crossover is the usual cause — check the picks near the ' +
        'breaks, or assign branches by hand',
    );
    expect(segmentation.notes[0]!.message).not.toMatch(/split that passes every constraint \(2 branches/);
  });

  it('when no split passes but one fails only a soft constraint, uses it and says that no split passes every constraint', () => {
    // Times step down at 20 m: one line through all has a falling slope (hard); two lines never
    // meet near the gap (soft). Only K = 1 and 2 are tried.
    const offsets = Array.from({ length: 20 }, (_, k) => 2 * (k + 1));
    const times = offsets.map((offset, k) => (offset <= 20 ? 0.05 + offset / 2000 : 0.02 + offset / 3000) + 0.05e-3 * Math.sin(1.9 * k));
    const segmentation = segmentSide(makeSide(offsets, times), { maxBranches: 2 });
    expect(segmentation.candidates.map((candidate) => candidate.failedConstraint)).toEqual(['slopes-positive', 'crossovers-in-gaps']);
    expect(segmentation.branches).toHaveLength(2);
    expect(segmentation.notes[0]!.message).toBe(
      'shot S1, forward side: the statistically best split (2 branches, breaking between 20\u00a0m and 22\u00a0m) fails only a soft ' +
        'constraint — it has lines that cross outside the gap between their picks — but it is used because no split passes every constraint; a mispick near ' +
        'a crossover is the usual cause — check the picks near the breaks, or assign branches by hand',
    );
  });
});

describe('segmentSide with firstBranchIndex: an off-end side that starts on the head wave', () => {
  const farOffsets = OFFSETS.map((offset) => offset + 24);
  const farTimes = farOffsets.map(arrival);
  it('numbers the branches from the index given and fits the first one with a free intercept', () => {
    const segmentation = segmentSide(makeSide(farOffsets, farTimes), { firstBranchIndex: 2 });
    expect(segmentation.branches.map((branch) => branch.index)).toEqual([2]);
    expect(segmentation.branches[0]!.fit.throughOrigin).toBe(false);
    // Intercept of the head wave: 2h·√(1/V1² − 1/V2²) = 30.984 ms (METHODS.md check case 2.2).
    expect(segmentation.branches[0]!.fit.intercept).toBeCloseTo(0.0309839, 6);
  });

  it('firstBranchIndices gives such a side the layer whose reference velocity it matches', () => {
    const direct = segmentSide(makeSide(OFFSETS, NOISY));
    const offEnd = segmentSide(makeSide(farOffsets, farTimes));
    expect(startsWithDirectWave(direct, 1e-4)).toBe(true);
    expect(startsWithDirectWave(offEnd, 1e-4)).toBe(false);
    expect(firstBranchIndices([direct, offEnd], 1e-4)).toEqual([1, 2]);
    // With no side through the origin there is no reference: the side starts on a head wave (2),
    // so nothing is forced through the origin and the top-layer velocity stays unknown.
    expect(firstBranchIndices([offEnd], 1e-4)).toEqual([2]);
  });

  it('refuses a first branch index below 1', () => {
    expect(() => segmentSide(makeSide(OFFSETS, NOISY), { firstBranchIndex: 0 })).toThrow(/firstBranchIndex/);
  });
});

describe('screenOutlierPicks and segmentSideRobustly', () => {
  const spoiled = NOISY.map((time, k) => (k === 5 ? time + 6e-3 : k === 30 ? time - 4e-3 : time));

  it('finds exactly the mistimed picks and nothing on clean picks', () => {
    expect(screenOutlierPicks(makeSide(OFFSETS, spoiled), 1e-4)).toEqual([5, 30]);
    expect(screenOutlierPicks(makeSide(OFFSETS, NOISY), 1e-4)).toEqual([]);
  });

  it('does not screen a side too short to tell an outlier from a branch', () => {
    expect(screenOutlierPicks(makeSide(OFFSETS.slice(0, 10), spoiled.slice(0, 10)), 1e-4)).toEqual([]);
  });

  it('splits as if the outliers were not there, then gives them back to their branch for the robust fit', () => {
    const clean = segmentSide(subsetOfSide(makeSide(OFFSETS, spoiled), OFFSETS.map((_, k) => k).filter((k) => k !== 5 && k !== 30)));
    const robust = segmentSideRobustly(makeSide(OFFSETS, spoiled), { fitMethod: 'huber' });
    expect(robust.branches.map((branch) => [branch.firstOffset, branch.lastOffset])).toEqual(
      clean.branches.map((branch) => [branch.firstOffset, branch.lastOffset]),
    );
    expect(robust.branches[0]!.members).toContain(5);
    expect(robust.branches[1]!.members).toContain(30);
    expect(robust.branches.reduce((sum, branch) => sum + branch.members.length, 0)).toBe(OFFSETS.length);
    expect(robust.notes.map((note) => note.code)).toContain('outliers-screened');
    // The Huber fit gives the 6 ms outlier almost no weight.
    const weight = robust.branches[0]!.fit.robustWeights![robust.branches[0]!.members.indexOf(5)]!;
    expect(weight).toBeLessThan(0.2);
  });

  it('leaves a user-assigned side to the user', () => {
    const labelled = makeSide(OFFSETS, spoiled, { userBranches: OFFSETS.map((offset) => (offset < 21 ? 1 : 2)) });
    expect(segmentSideRobustly(labelled).assignedBy).toBe('user');
  });
});
