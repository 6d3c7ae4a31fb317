/**
 * Median of a list of numbers: the middle value of the sorted copy, or the mean of the two middle
 * values for an even count (the convention of numpy.median, which the robust fits are tested
 * against). The input is not reordered.
 *
 * Edges: an empty list is misuse and throws; NaN is misuse too (callers check finiteness first).
 *
 * @example
 * median([3, 1, 4, 1]) // 2
 */
export function median(values: ArrayLike<number>): number {
  if (values.length === 0) throw new RangeError('median: the list is empty');
  const sorted = Float64Array.from(values).sort();
  if (Number.isNaN(sorted[sorted.length - 1])) throw new RangeError('median: the list holds NaN');
  return medianOfSorted(sorted);
}

/** Median of values already sorted ascending (not checked). */
export function medianOfSorted(sorted: ArrayLike<number>): number {
  const middle = sorted.length >> 1;
  const upper = sorted[middle] as number;
  return sorted.length % 2 === 1 ? upper : 0.5 * ((sorted[middle - 1] as number) + upper);
}
