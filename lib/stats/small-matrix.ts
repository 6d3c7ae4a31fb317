/**
 * Dense operations on the small matrices of layer stacks (a handful of rows): products,
 * transposes, and the inverse of a symmetric positive-definite matrix by Cholesky factorisation.
 * Matrices are arrays of rows. Misuse (mismatched shapes) throws with the shapes named.
 */
export type Matrix = readonly (readonly number[])[];

export function zeros(rows: number, columns: number): number[][] {
  return Array.from({ length: rows }, () => new Array<number>(columns).fill(0));
}

export function transpose(matrix: Matrix): number[][] {
  const columns = matrix[0]?.length ?? 0;
  return Array.from({ length: columns }, (_, column) => matrix.map((row) => row[column] ?? 0));
}

export function multiply(left: Matrix, right: Matrix): number[][] {
  const inner = right.length;
  if ((left[0]?.length ?? 0) !== inner && left.length > 0) {
    throw new RangeError(`multiply: ${left.length}×${left[0]?.length} by ${right.length}×${right[0]?.length}`);
  }
  const columns = right[0]?.length ?? 0;
  return left.map((row) =>
    Array.from({ length: columns }, (_, column) => {
      let sum = 0;
      for (let k = 0; k < inner; k += 1) sum += (row[k] ?? 0) * (right[k]?.[column] ?? 0);
      return sum;
    }),
  );
}

/** J·Σ·Jᵀ: the covariance of a linear(ised) function with Jacobian J of inputs with covariance Σ. */
export function sandwich(jacobian: Matrix, covariance: Matrix): number[][] {
  return multiply(multiply(jacobian, covariance), transpose(jacobian));
}

/**
 * Inverse of a symmetric positive-definite matrix, or null when it is not positive definite
 * (a pivot ≤ 1e-300 or not finite).
 */
export function invertSymmetricPositiveDefinite(matrix: Matrix): number[][] | null {
  const size = matrix.length;
  const lower = zeros(size, size);
  for (let row = 0; row < size; row += 1) {
    for (let column = 0; column <= row; column += 1) {
      let sum = matrix[row]?.[column] ?? Number.NaN;
      for (let k = 0; k < column; k += 1) sum -= lower[row]![k]! * lower[column]![k]!;
      if (row === column) {
        if (!(sum > 1e-300) || !Number.isFinite(sum)) return null;
        lower[row]![row] = Math.sqrt(sum);
      } else {
        lower[row]![column] = sum / lower[column]![column]!;
      }
    }
  }
  // Invert the triangular factor, then A⁻¹ = L⁻ᵀ·L⁻¹.
  const lowerInverse = zeros(size, size);
  for (let column = 0; column < size; column += 1) {
    lowerInverse[column]![column] = 1 / lower[column]![column]!;
    for (let row = column + 1; row < size; row += 1) {
      let sum = 0;
      for (let k = column; k < row; k += 1) sum -= lower[row]![k]! * lowerInverse[k]![column]!;
      lowerInverse[row]![column] = sum / lower[row]![row]!;
    }
  }
  return multiply(transpose(lowerInverse), lowerInverse);
}
