import { describe, expect, it } from 'vitest';
import { maximum, minimum } from '../../lib/stats/extent.js';

describe('maximum and minimum', () => {
  it('agree with Math.max/Math.min on small lists and skip NaN', () => {
    expect(maximum([3, 9, 2])).toBe(Math.max(3, 9, 2));
    expect(minimum([3, 9, 2])).toBe(Math.min(3, 9, 2));
    expect(maximum([1, Number.NaN, 4])).toBe(4);
  });
  it('give the stated value for an empty list (−∞ / +∞ by default, as Math.max() and Math.min() do)', () => {
    expect(maximum([])).toBe(Math.max());
    expect(minimum([])).toBe(Math.min());
    expect(maximum([], 0)).toBe(0);
  });
  it('handle a million values, where spreading them into Math.max overflows the call stack', () => {
    const values = Array.from({ length: 1_000_000 }, (_, k) => (k * 7919) % 1_000_003);
    expect(() => Math.max(...values)).toThrow(RangeError);
    expect(maximum(values)).toBe(values.reduce((a, b) => (b > a ? b : a)));
    expect(minimum(values)).toBe(0);
  });
});
