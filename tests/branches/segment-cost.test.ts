/**
 * segmentCostTable: every running-regression entry against a direct refit of the same picks
 * (the two-pass centred formulas in ./oracle.ts), at engineering and crustal scale, and its edges.
 */
import { describe, expect, it } from 'vitest';
import { segmentCost, segmentCostTable } from '../../lib/branches/segment-cost.js';
import { seededNormal } from '../../lib/random.js';
import { expectRelative } from '../helpers/expect-within.js';
import { directRefitCost } from './oracle.js';

/**
 * The brief's target. Running updates add one rounding per pick; measured agreement with the
 * direct refits is ~2e-13 at engineering and ~1e-12 at crustal scale.
 */
const REFIT_AGREEMENT = 1e-9;

interface Side {
  offsets: number[];
  times: number[];
  sigmas: number[];
}

function side(seed: number, count: number, firstOffset: number, spacing: number, slownesses: number[], intercepts: number[], noise: number): Side {
  const normal = seededNormal(seed);
  const offsets = Array.from({ length: count }, (_, index) => firstOffset + spacing * index);
  const sigmas = offsets.map((_, index) => noise * (1 + (index % 3)));
  const times = offsets.map((offset, index) => {
    const arrivals = slownesses.map((slowness, branch) => (intercepts[branch] as number) + slowness * offset);
    return Math.min(...arrivals) + (sigmas[index] as number) * normal();
  });
  return { offsets, times, sigmas };
}

const SIDES = {
  'engineering (2–80 m, ms noise)': side(31, 40, 2, 2, [1 / 400, 1 / 1600, 1 / 3500], [0, 0.0194, 0.031], 0.3e-3),
  // Crustal: 100–590 km, Pg/Pn-like branches, 50 ms noise: x² ~ 1e11 m².
  'crustal (100–590 km, 50 ms noise)': side(32, 50, 1e5, 1e4, [1 / 6300, 1 / 8000], [0, 6.848], 0.05),
};

describe.each(Object.entries(SIDES))('segmentCostTable equals direct refits: %s', (_, data) => {
  for (const weighted of [false, true]) {
    const label = weighted ? 'χ² with sigmas' : 'RSS without sigmas';
    it(`${label}: every C(i, j) with at least 3 picks, to 1e-9 relative`, () => {
      const table = segmentCostTable(data.offsets, data.times, weighted ? data.sigmas : null, 3);
      const weights = weighted ? data.sigmas.map((sigma) => 1 / sigma ** 2) : null;
      expect(table.weighted).toBe(weighted);
      for (let start = 0; start < data.offsets.length; start += 1) {
        for (let end = start + 2; end < data.offsets.length; end += 1) {
          const slice = (values: readonly number[] | null): number[] | null => (values ? values.slice(start, end + 1) : null);
          const direct = directRefitCost(slice(data.offsets) as number[], slice(data.times) as number[], slice(weights));
          expectRelative(segmentCost(table, start, end), direct, REFIT_AGREEMENT, `direct two-pass refit of picks ${start}…${end}`);
        }
      }
    });

    it(`${label}: the origin row C₀(j) equals a direct refit through the origin`, () => {
      const table = segmentCostTable(data.offsets, data.times, weighted ? data.sigmas : null, 3);
      const weights = weighted ? data.sigmas.map((sigma) => 1 / sigma ** 2) : null;
      for (let end = 2; end < data.offsets.length; end += 1) {
        const direct = directRefitCost(data.offsets.slice(0, end + 1), data.times.slice(0, end + 1), weights ? weights.slice(0, end + 1) : null, true);
        expectRelative(table.originCosts[end] as number, direct, REFIT_AGREEMENT, `direct refit through the origin of picks 0…${end}`);
      }
    });
  }
});

describe('segmentCostTable edges', () => {
  const offsets = [2.5, 5, 7.5, 10, 12.5];
  const times = [0.00625, 0.0125, 0.01875, 0.025, 0.0313];

  it('costs +∞ for segments shorter than minPicks, in the main table and the origin row', () => {
    const table = segmentCostTable(offsets, times, null, 3);
    expect(segmentCost(table, 1, 2)).toBe(Number.POSITIVE_INFINITY);
    expect(segmentCost(table, 2, 2)).toBe(Number.POSITIVE_INFINITY);
    expect(table.originCosts[1]).toBe(Number.POSITIVE_INFINITY);
    expect(Number.isFinite(segmentCost(table, 1, 3))).toBe(true);
    expect(segmentCost(table, 0, 3)).toBeLessThan(1e-30); // four picks on one line
  });

  it('costs +∞ for a segment whose offsets are all equal, and the exact cost once a second offset joins', () => {
    const tiedOffsets = [10, 10, 10, 20, 30];
    const tiedTimes = [0.01, 0.012, 0.011, 0.02, 0.031];
    const table = segmentCostTable(tiedOffsets, tiedTimes, null, 2);
    expect(segmentCost(table, 0, 2)).toBe(Number.POSITIVE_INFINITY);
    expectRelative(segmentCost(table, 0, 3), directRefitCost(tiedOffsets.slice(0, 4), tiedTimes.slice(0, 4), null), 1e-12, 'direct refit');
    expectRelative(segmentCost(table, 0, 4), directRefitCost(tiedOffsets, tiedTimes, null), 1e-12, 'direct refit');
  });

  it('costs +∞ through the origin while every offset is zero, then counts each zero-offset pick as t²', () => {
    const table = segmentCostTable([0, 0, 10, 20], [0.001, 0.002, 0.01, 0.021], null, 2);
    expect(table.originCosts[1]).toBe(Number.POSITIVE_INFINITY);
    expectRelative(table.originCosts[3] as number, directRefitCost([0, 0, 10, 20], [0.001, 0.002, 0.01, 0.021], null, true), 1e-12, 'direct refit');
  });

  it('holds 0 in the unused entries j < i, and the accessor refuses them', () => {
    const table = segmentCostTable(offsets, times, null, 3);
    expect(table.costs[0 * offsets.length + 3]).toBe(0); // (start 3, end 0)
    expect(() => segmentCost(table, 3, 0)).toThrow(/start ≤ end/);
    expect(() => segmentCost(table, 0, 5)).toThrow(/end < 5/);
  });

  it('throws for minPicks below 2 or not an integer, and for arrays of different lengths', () => {
    expect(() => segmentCostTable(offsets, times, null, 1)).toThrow(/at least 2/);
    expect(() => segmentCostTable(offsets, times, null, 2.5)).toThrow(/integer/);
    expect(() => segmentCostTable(offsets, times.slice(1), null, 3)).toThrow(/same length/);
  });
});
