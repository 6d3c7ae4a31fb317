/**
 * The segment cost table of branch segmentation: C(i, j) = the residual sum of squares (χ² when
 * the picks carry sigmas) of one least-squares line through picks i…j of a side, for every
 * i ≤ j, in O(n²) time (METHODS §4; Bellman 1961, `Bellman1961`; Jackson et al. 2005,
 * `Jackson2005`).
 *
 * Each column j is built by extending the segment one pick at a time (backwards from pick j) with a
 * running regression on centred data: weighted means and co-moments by Welford-style updates
 * (the first pick sets them exactly), and the residual sum of squares by the recursive
 * least-squares update, which only ever adds non-negative terms
 * (Press et al. 2007 §15.2 for the centred sums, `Press2007`):
 *   e = (t − t̄) − b·(x − x̄)            (the new pick's residual from the line so far)
 *   RSS ← RSS + w·e² / (1 + w/W + w·(x − x̄)²/S_xx)
 * with W = Σw, S_xx = Σw(x − x̄)², b = S_xt/S_xx before the pick is added. No raw sums Σx² are
 * formed, so crustal offsets (x ~ 5e5 m, x² ~ 1e11 m²) keep their digits, and the subtraction
 * S_tt − S_xt²/S_xx (which loses them for a good fit) is never made.
 *
 * A separate row C₀(j) holds the cost of a line through the origin for picks 0…j (the first
 * segment of a surface shot), by the same update with one parameter:
 *   RSS₀ ← RSS₀ + w·(t − b₀·x)² / (1 + w·x²/Σwx²),  b₀ = Σwxt/Σwx².
 *
 * Edges: segments shorter than `minPicks`, and segments whose offsets are all equal (all zero for
 * the origin row), cost +∞, so the partition never uses them. Entries with j < i are not used and
 * hold 0. `minPicks` must be an integer ≥ 2 and the arrays must have the same length (misuse
 * throws). Storage: n² + n doubles (n = 1000: 8 MB).
 *
 * @example
 * const table = segmentCostTable([2.5, 5, 7.5, 10], [0.00625, 0.0125, 0.01875, 0.025], null, 3);
 * segmentCost(table, 0, 3) // 0 (one exact line); segmentCost(table, 1, 2) // +∞ (2 picks < 3)
 */

/** The cost table of one side. */
export interface SegmentCostTable {
  /** Number of picks n. */
  readonly count: number;
  readonly minPicks: number;
  /** True when the costs are χ² (sigmas given) rather than RSS. */
  readonly weighted: boolean;
  /** C(i, j) at index j·n + i (column-major, so the partition's inner loop over i is contiguous). */
  readonly costs: Float64Array;
  /** C₀(j): cost of a line through the origin for picks 0…j. */
  readonly originCosts: Float64Array;
}

export function segmentCostTable(
  offsets: readonly number[],
  times: readonly number[],
  sigmas: readonly number[] | null,
  minPicks: number,
): SegmentCostTable {
  const count = offsets.length;
  if (times.length !== count || (sigmas !== null && sigmas.length !== count)) {
    throw new RangeError(`segmentCostTable: offsets (${count}), times (${times.length}) and sigmas must have the same length`);
  }
  if (!Number.isInteger(minPicks) || minPicks < 2) {
    throw new RangeError(`segmentCostTable: minPicks must be an integer of at least 2, got ${minPicks}`);
  }
  const offsetValues = Float64Array.from(offsets);
  const timeValues = Float64Array.from(times);
  const weightValues = new Float64Array(count);
  for (let position = 0; position < count; position += 1) {
    weightValues[position] = sigmas === null ? 1 : 1 / ((sigmas[position] as number) * (sigmas[position] as number));
  }

  const costs = new Float64Array(count * count);
  // Column j holds every segment ending at pick j; it is filled by growing the segment backwards
  // from j (the running regression does not care in which order picks join), so the writes are
  // contiguous.
  for (let end = 0; end < count; end += 1) {
    const column = end * count;
    let weightSum = weightValues[end] as number;
    let meanOffset = offsetValues[end] as number;
    let meanTime = timeValues[end] as number;
    let offsetSquares = 0; // Σw(x − x̄)²
    let crossProducts = 0; // Σw(x − x̄)(t − t̄)
    let timeSquares = 0; // Σw(t − t̄)²
    let residualSquares = 0;
    costs[column + end] = Number.POSITIVE_INFINITY;
    for (let start = end - 1; start >= 0; start -= 1) {
      const offset = offsetValues[start] as number;
      const time = timeValues[start] as number;
      const weight = weightValues[start] as number;
      const offsetDeviation = offset - meanOffset;
      const timeDeviation = time - meanTime;
      if (offsetSquares > 0) {
        const prediction = timeDeviation - (crossProducts / offsetSquares) * offsetDeviation;
        residualSquares +=
          (weight * prediction * prediction) /
          (1 + weight / weightSum + (weight * offsetDeviation * offsetDeviation) / offsetSquares);
      } else if (offsetDeviation !== 0) {
        // Every pick so far shares one offset: the best line passes through their mean and
        // through the new pick, leaving their scatter about the mean.
        residualSquares = timeSquares;
      }
      weightSum += weight;
      meanOffset += (weight * offsetDeviation) / weightSum;
      meanTime += (weight * timeDeviation) / weightSum;
      offsetSquares += weight * offsetDeviation * (offset - meanOffset);
      crossProducts += weight * offsetDeviation * (time - meanTime);
      timeSquares += weight * timeDeviation * (time - meanTime);
      const long = end - start + 1 >= minPicks;
      costs[column + start] = long && offsetSquares > 0 ? residualSquares : Number.POSITIVE_INFINITY;
    }
  }

  const originCosts = new Float64Array(count);
  let squares = 0; // Σwx²
  let products = 0; // Σwxt
  let originResidualSquares = 0;
  for (let end = 0; end < count; end += 1) {
    const offset = offsetValues[end] as number;
    const time = timeValues[end] as number;
    const weight = weightValues[end] as number;
    if (squares > 0) {
      const prediction = time - (products / squares) * offset;
      originResidualSquares += (weight * prediction * prediction) / (1 + (weight * offset * offset) / squares);
    } else if (offset === 0) {
      // A pick at zero offset is fitted by t = 0 whatever the slope.
      originResidualSquares += weight * time * time;
    }
    squares += weight * offset * offset;
    products += weight * offset * time;
    originCosts[end] = end + 1 >= minPicks && squares > 0 ? originResidualSquares : Number.POSITIVE_INFINITY;
  }
  return { count, minPicks, weighted: sigmas !== null, costs, originCosts };
}

/** C(start, end) of the table (0-based, inclusive); misuse (end < start, out of range) throws. */
export function segmentCost(table: SegmentCostTable, start: number, end: number): number {
  if (!(Number.isInteger(start) && Number.isInteger(end) && start >= 0 && start <= end && end < table.count)) {
    throw new RangeError(`segmentCost: need 0 ≤ start ≤ end < ${table.count}, got start ${start}, end ${end}`);
  }
  return table.costs[end * table.count + start] as number;
}
