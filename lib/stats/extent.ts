/**
 * Largest and smallest of a list of numbers by a plain loop. `Math.max(...values)` passes every
 * value as an argument and overflows the call stack from about 10^5 values — a crustal survey or a
 * long spread easily has more picks than that.
 *
 * Edges: an empty list gives `empty` (default −∞ for the maximum, +∞ for the minimum, as Math.max
 * and Math.min do); NaN values are skipped.
 *
 * @example
 * maximum([3, 9, 2]) // 9
 */
export function maximum(values: Iterable<number>, empty = Number.NEGATIVE_INFINITY): number {
  let largest = Number.NEGATIVE_INFINITY;
  let seen = false;
  for (const value of values) {
    if (Number.isNaN(value)) continue;
    seen = true;
    if (value > largest) largest = value;
  }
  return seen ? largest : empty;
}

export function minimum(values: Iterable<number>, empty = Number.POSITIVE_INFINITY): number {
  let smallest = Number.POSITIVE_INFINITY;
  let seen = false;
  for (const value of values) {
    if (Number.isNaN(value)) continue;
    seen = true;
    if (value < smallest) smallest = value;
  }
  return seen ? smallest : empty;
}
