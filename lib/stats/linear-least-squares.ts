/**
 * Weighted linear least squares for a handful of parameters, by the normal equations solved with
 * Gaussian elimination and partial pivoting (Draper1998 ch. 5): minimise Σ w_i (y_i − x_iᵀβ)².
 * Fit for small designs only (p ≤ 5, well-scaled columns); the callers centre their abscissae.
 *
 * Returns null when XᵀWX is singular (fewer distinct rows than parameters), so data-driven callers
 * can say why instead of catching. Misuse throws: rows of different lengths, lengths that disagree.
 */
export interface LinearLeastSquares {
  readonly coefficients: readonly number[];
  /** (XᵀWX)⁻¹: the coefficient covariance when the weights are 1/σ². */
  readonly unscaledCovariance: readonly (readonly number[])[];
  /** Σ w_i r_i². */
  readonly weightedResidualSumOfSquares: number;
}

export function linearLeastSquares(
  design: readonly (readonly number[])[],
  responses: readonly number[],
  weights: readonly number[] | null = null,
): LinearLeastSquares | null {
  const count = design.length;
  const parameters = design[0]?.length ?? 0;
  if (responses.length !== count || (weights !== null && weights.length !== count)) {
    throw new RangeError(`linearLeastSquares: ${count} design rows need as many responses and weights, got ${responses.length} and ${weights?.length ?? count}`);
  }
  if (design.some((row) => row.length !== parameters)) throw new RangeError('linearLeastSquares: every design row must have the same length');
  if (count < parameters || parameters === 0) return null;
  // Augmented [XᵀWX | I].
  const normal: number[][] = Array.from({ length: parameters }, () => new Array<number>(2 * parameters).fill(0));
  const right = new Array<number>(parameters).fill(0);
  design.forEach((row, i) => {
    const weight = weights === null ? 1 : (weights[i] as number);
    for (let a = 0; a < parameters; a += 1) {
      right[a]! += weight * (row[a] as number) * (responses[i] as number);
      for (let b = 0; b < parameters; b += 1) normal[a]![b]! += weight * (row[a] as number) * (row[b] as number);
    }
  });
  const scale = Math.max(...normal.map((row, a) => Math.abs(row[a] as number)));
  for (let a = 0; a < parameters; a += 1) normal[a]![parameters + a] = 1;
  for (let column = 0; column < parameters; column += 1) {
    let pivot = column;
    for (let row = column + 1; row < parameters; row += 1) {
      if (Math.abs(normal[row]![column]!) > Math.abs(normal[pivot]![column]!)) pivot = row;
    }
    if (!(Math.abs(normal[pivot]![column]!) > 1e-12 * scale)) return null;
    [normal[column], normal[pivot]] = [normal[pivot]!, normal[column]!];
    const lead = normal[column]![column]!;
    for (let k = 0; k < 2 * parameters; k += 1) normal[column]![k]! /= lead;
    for (let row = 0; row < parameters; row += 1) {
      if (row === column) continue;
      const factor = normal[row]![column]!;
      if (factor === 0) continue;
      for (let k = 0; k < 2 * parameters; k += 1) normal[row]![k]! -= factor * normal[column]![k]!;
    }
  }
  const inverse = normal.map((row) => row.slice(parameters));
  const coefficients = inverse.map((row) => row.reduce((sum, value, b) => sum + value * (right[b] as number), 0));
  let weightedResidualSumOfSquares = 0;
  design.forEach((row, i) => {
    const fitted = row.reduce((sum, value, a) => sum + value * (coefficients[a] as number), 0);
    weightedResidualSumOfSquares += (weights === null ? 1 : (weights[i] as number)) * ((responses[i] as number) - fitted) ** 2;
  });
  return { coefficients, unscaledCovariance: inverse, weightedResidualSumOfSquares };
}
