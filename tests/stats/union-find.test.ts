/** Disjoint sets (Tarjan 1975; common practice): unions join, finds agree within a set and differ across sets. */
import { expect, it } from 'vitest';
import { unionFind } from '../../lib/stats/union-find.js';

it('unionFind joins sets, reports whether a union joined anything, and keeps separate sets apart', () => {
  const sets = unionFind(6);
  expect(sets.union(0, 1)).toBe(true);
  expect(sets.union(1, 2)).toBe(true);
  expect(sets.union(0, 2)).toBe(false);
  expect(sets.union(3, 4)).toBe(true);
  expect(sets.find(0)).toBe(sets.find(2));
  expect(sets.find(3)).toBe(sets.find(4));
  expect(sets.find(0)).not.toBe(sets.find(3));
  expect(sets.find(5)).toBe(5);
});
