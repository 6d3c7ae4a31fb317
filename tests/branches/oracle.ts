/**
 * The slow, obvious twin of the segmentation costs, for oracle tests: a straight-line
 * least-squares refit by the two-pass centred formulas of METHODS §3, and the residual sum of
 * squares summed from the residuals themselves. No running updates, no shared code with lib/.
 */

/** RSS (χ² when weights are given) of the least-squares line through the picks; +∞ when the offsets are all equal. */
export function directRefitCost(
  offsets: readonly number[],
  times: readonly number[],
  weights: readonly number[] | null,
  throughOrigin = false,
): number {
  const weightOf = (position: number): number => (weights ? (weights[position] as number) : 1);
  // The line as a function: t̂(x) = centreTime + slope·(x − centreOffset).
  let slope: number;
  let centreOffset = 0;
  let centreTime = 0;
  if (throughOrigin) {
    let squares = 0;
    let products = 0;
    offsets.forEach((offset, position) => {
      squares += weightOf(position) * offset * offset;
      products += weightOf(position) * offset * (times[position] as number);
    });
    if (squares === 0) return Number.POSITIVE_INFINITY;
    slope = products / squares;
  } else {
    let total = 0;
    let offsetMean = 0;
    let timeMean = 0;
    offsets.forEach((offset, position) => {
      total += weightOf(position);
      offsetMean += weightOf(position) * offset;
      timeMean += weightOf(position) * (times[position] as number);
    });
    offsetMean /= total;
    timeMean /= total;
    let squares = 0;
    let products = 0;
    offsets.forEach((offset, position) => {
      squares += weightOf(position) * (offset - offsetMean) ** 2;
      products += weightOf(position) * (offset - offsetMean) * ((times[position] as number) - timeMean);
    });
    if (squares === 0) return Number.POSITIVE_INFINITY;
    slope = products / squares;
    centreOffset = offsetMean;
    centreTime = timeMean;
  }
  let cost = 0;
  offsets.forEach((offset, position) => {
    cost += weightOf(position) * ((times[position] as number) - centreTime - slope * (offset - centreOffset)) ** 2;
  });
  return cost;
}
