/**
 * LSQR: the sparse least-squares solver of Paige and Saunders (PaigeSaunders1982). It minimises
 * ‖A·x − b‖² + damp²·‖x‖² by Golub–Kahan bidiagonalisation of A started from b, one product with
 * A and one with Aᵀ per iteration, and never forms AᵀA; so it suits large sparse systems (a
 * time-term inversion has three or four non-zeros per row).
 *
 * ```
 * β₁u₁ = b,  α₁v₁ = Aᵀu₁;   β_{k+1}u_{k+1} = A·v_k − α_k·u_k,   α_{k+1}v_{k+1} = Aᵀu_{k+1} − β_{k+1}·v_k
 * the lower-bidiagonal B_k is reduced to upper-bidiagonal form by plane rotations (after a first
 * rotation that absorbs damp), and x_k = x_{k−1} + (φ_k/ρ_k)·w_k,  w_{k+1} = v_{k+1} − (θ_{k+1}/ρ_k)·w_k
 * var ≈ Σ_k d_k²,  d_k = w_k/ρ_k   (an estimate of diag((AᵀA + damp²·I)⁻¹))
 * ```
 *
 * The recurrences, the stopping tests and the outputs follow the published algorithm as scipy
 * 1.10's `scipy.sparse.linalg.lsqr` states it, so its results can be compared number for number
 * (the tests do): the same `istop` codes, `r1norm`, `r2norm`, `anorm`, `acond`, `arnorm`, `xnorm`
 * and `var`.
 *
 * | istop | meaning |
 * |---|---|
 * | 0 | x = 0 is the exact solution (b = 0, or Aᵀb = 0) — no iteration is done |
 * | 1 | A·x − b is small enough, given atol and btol (a compatible system) |
 * | 2 | the least-squares solution is good enough, given atol |
 * | 3 | the estimate of cond(Ā) has exceeded conlim |
 * | 4 | A·x − b is small enough for this machine |
 * | 5 | the least-squares solution is good enough for this machine |
 * | 6 | cond(Ā) seems too large for this machine |
 * | 7 | the iteration limit was reached |
 *
 * Assumptions and where it fails: convergence depends on the spread of A's singular values, so
 * scale the columns to unit norm first when they differ in size (a distance column in metres next
 * to columns of ones); an ill-conditioned A needs many iterations, and `conlim` stops it early.
 * Edges: on a rank-deficient A started from zero, every iterate lies in the range of Aᵀ, so x is
 * the minimum-norm least-squares solution — a gauge the caller did not choose; add the
 * constraints explicitly. `var` is the diagonal of the inverse restricted to the Krylov subspace
 * searched so far: a lower bound that equals diag((AᵀA + damp²I)⁻¹) only when the iterations have
 * spanned the whole space (about as many iterations as columns, in exact arithmetic); a
 * well-conditioned large system converges in far fewer iterations, and then `var` is far too small
 * to serve as a variance (lib/depth/time-term.ts measures this and does not use it where it can
 * do better).
 *
 * Speed: all vectors are Float64Array, allocated once before the loop; the loop allocates nothing.
 *
 * Misuse throws a RangeError naming the field and the fix: a right-hand side of the wrong length
 * or not finite, a malformed CSR matrix (row pointers of the wrong length, not starting at 0, not
 * non-decreasing, or not ending at the number of values; a column index out of range; a value not
 * finite), a tolerance or damp that is negative or not finite, an iteration limit that is not a
 * positive integer, or an initial guess of the wrong length.
 *
 * @example
 * // A = [[1, 0], [1, 1], [1, 2]], b = [1, 2, 2]: the line through three points, x = (7/6, 1/2).
 * const A = { rows: 3, columns: 2, rowPointers: Int32Array.from([0, 1, 3, 5]),
 *   columnIndices: Int32Array.from([0, 0, 1, 0, 1]), values: Float64Array.from([1, 1, 1, 1, 2]) };
 * lsqr(A, Float64Array.from([1, 2, 2]), { atol: 1e-12, btol: 1e-12 });
 * // → { x: [1.16667, 0.5], istop: 2, iterations: 2, r1norm: 0.40825, … }
 */

/** A sparse matrix in compressed sparse row form (zero-based, as scipy's `csr_matrix`). */
export interface CsrMatrix {
  readonly rows: number;
  readonly columns: number;
  /** rows + 1 offsets into `columnIndices` and `values`; row r holds entries rowPointers[r] … rowPointers[r + 1] − 1. */
  readonly rowPointers: Int32Array;
  readonly columnIndices: Int32Array;
  readonly values: Float64Array;
}

/**
 * A matrix given by its two products. Both callbacks accumulate into their output (they must add,
 * not overwrite) and must not keep or resize the arrays they are given.
 */
export interface LinearOperator {
  readonly rows: number;
  readonly columns: number;
  /** output (length rows) += A·input (length columns). */
  readonly multiplyAdd: (input: Float64Array, output: Float64Array) => void;
  /** output (length columns) += Aᵀ·input (length rows). */
  readonly multiplyTransposeAdd: (input: Float64Array, output: Float64Array) => void;
}

export interface LsqrOptions {
  /** damp ≥ 0: minimise ‖Ax − b‖² + damp²‖x‖². Default 0. */
  readonly damp?: number;
  /** Relative error in A; stopping test on ‖Aᵀr‖/(‖A‖‖r‖). Default 1e-6 (scipy's default). */
  readonly atol?: number;
  /** Relative error in b; stopping test on ‖r‖/‖b‖. Default 1e-6. */
  readonly btol?: number;
  /** Stop when the estimated cond(Ā) exceeds this (0: no limit). Default 1e8. */
  readonly conlim?: number;
  /** Default 2·columns (scipy's default). */
  readonly iterationLimit?: number;
  /** Accumulate the `variance` estimate. Default true (one more vector update per iteration). */
  readonly computeVariance?: boolean;
  /** Initial guess (length columns). Default zero. */
  readonly initialGuess?: Float64Array | readonly number[];
}

/** scipy's messages for istop 0…7, in the same order. */
export const LSQR_STOP_REASONS = [
  'the exact solution is x = 0',
  'A·x − b is small enough, given atol and btol',
  'the least-squares solution is good enough, given atol',
  'the estimate of cond(Ā) has exceeded conlim',
  'A·x − b is small enough for this machine',
  'the least-squares solution is good enough for this machine',
  'cond(Ā) seems to be too large for this machine',
  'the iteration limit has been reached',
] as const;

export type LsqrStop = 0 | 1 | 2 | 3 | 4 | 5 | 6 | 7;

export interface LsqrResult {
  readonly x: Float64Array;
  readonly istop: LsqrStop;
  /** LSQR_STOP_REASONS[istop]. */
  readonly stopReason: string;
  readonly iterations: number;
  /** ‖b − A·x‖. */
  readonly r1norm: number;
  /** √(‖b − A·x‖² + damp²‖x − x₀‖²). */
  readonly r2norm: number;
  /** Frobenius-norm estimate of Ā = [A; damp·I]. */
  readonly anorm: number;
  /** Condition-number estimate of Ā. */
  readonly acond: number;
  /** ‖Āᵀ·r̄‖ estimate (zero at a least-squares solution). */
  readonly arnorm: number;
  /** ‖x‖ estimate. */
  readonly xnorm: number;
  /** Estimate of diag((AᵀA + damp²I)⁻¹), a lower bound (module comment); null when not asked for. */
  readonly variance: Float64Array | null;
}

function assertTolerance(value: number, name: string): void {
  if (!Number.isFinite(value) || value < 0) {
    throw new RangeError(`lsqr: options.${name} must be a finite number ≥ 0, got ${value}; pass e.g. 1e-8, or 0 to stop only at machine precision`);
  }
}

/** Check a CSR matrix and return it as an operator. Misuse throws (module comment). */
export function csrOperator(matrix: CsrMatrix): LinearOperator {
  const { rows, columns, rowPointers, columnIndices, values } = matrix;
  if (!Number.isInteger(rows) || rows < 1 || !Number.isInteger(columns) || columns < 1) {
    throw new RangeError(`lsqr: matrix.rows and matrix.columns must be positive integers, got ${rows} × ${columns}`);
  }
  if (rowPointers.length !== rows + 1) {
    throw new RangeError(`lsqr: matrix.rowPointers must hold rows + 1 = ${rows + 1} offsets, got ${rowPointers.length}; give the start of every row and the end of the last`);
  }
  if (columnIndices.length !== values.length) {
    throw new RangeError(`lsqr: matrix.columnIndices (${columnIndices.length}) and matrix.values (${values.length}) must have the same length, one index per value`);
  }
  if (rowPointers[0] !== 0 || rowPointers[rows] !== values.length) {
    throw new RangeError(`lsqr: matrix.rowPointers must start at 0 and end at the number of values (${values.length}), got ${rowPointers[0]} … ${rowPointers[rows]}`);
  }
  for (let row = 0; row < rows; row += 1) {
    if (rowPointers[row + 1]! < rowPointers[row]!) {
      throw new RangeError(`lsqr: matrix.rowPointers must not decrease, but row ${row} runs from ${rowPointers[row]} to ${rowPointers[row + 1]}; sort the entries by row`);
    }
  }
  for (let entry = 0; entry < values.length; entry += 1) {
    const column = columnIndices[entry]!;
    if (column < 0 || column >= columns) {
      throw new RangeError(`lsqr: matrix.columnIndices[${entry}] = ${column} is outside 0 … ${columns - 1}; give zero-based column indices`);
    }
    if (!Number.isFinite(values[entry]!)) throw new RangeError(`lsqr: matrix.values[${entry}] = ${values[entry]} is not finite; remove or fix the entry`);
  }
  return {
    rows,
    columns,
    multiplyAdd(input, output) {
      for (let row = 0; row < rows; row += 1) {
        let sum = 0;
        const end = rowPointers[row + 1]!;
        for (let entry = rowPointers[row]!; entry < end; entry += 1) sum += values[entry]! * input[columnIndices[entry]!]!;
        output[row] = output[row]! + sum;
      }
    },
    multiplyTransposeAdd(input, output) {
      for (let row = 0; row < rows; row += 1) {
        const factor = input[row]!;
        if (factor === 0) continue;
        const end = rowPointers[row + 1]!;
        for (let entry = rowPointers[row]!; entry < end; entry += 1) {
          const column = columnIndices[entry]!;
          output[column] = output[column]! + values[entry]! * factor;
        }
      }
    },
  };
}

function isOperator(matrix: CsrMatrix | LinearOperator): matrix is LinearOperator {
  return typeof (matrix as LinearOperator).multiplyAdd === 'function';
}

function norm(vector: Float64Array): number {
  // Scaled sum of squares: no overflow for entries near 1e200, as numpy's norm.
  let scale = 0;
  let sum = 1;
  for (let index = 0; index < vector.length; index += 1) {
    const value = vector[index]!;
    if (value === 0) continue;
    const magnitude = Math.abs(value);
    if (scale < magnitude) {
      const ratio = scale / magnitude;
      sum = 1 + sum * ratio * ratio;
      scale = magnitude;
    } else {
      const ratio = magnitude / scale;
      sum += ratio * ratio;
    }
  }
  return scale * Math.sqrt(sum);
}

function scaleInPlace(vector: Float64Array, factor: number): void {
  for (let index = 0; index < vector.length; index += 1) vector[index] = vector[index]! * factor;
}

/** Stable plane rotation [c s; −s c]·[a; b] = [r; 0] (scipy's _sym_ortho). */
function symmetricOrtho(a: number, b: number, out: Float64Array): void {
  if (b === 0) {
    out[0] = Math.sign(a);
    out[1] = 0;
    out[2] = Math.abs(a);
  } else if (a === 0) {
    out[0] = 0;
    out[1] = Math.sign(b);
    out[2] = Math.abs(b);
  } else if (Math.abs(b) > Math.abs(a)) {
    const tau = a / b;
    const s = Math.sign(b) / Math.sqrt(1 + tau * tau);
    out[0] = s * tau;
    out[1] = s;
    out[2] = b / s;
  } else {
    const tau = b / a;
    const c = Math.sign(a) / Math.sqrt(1 + tau * tau);
    out[0] = c;
    out[1] = c * tau;
    out[2] = a / c;
  }
}

/**
 * Solve min ‖A·x − b‖² + damp²‖x‖² by LSQR (module comment: the method, istop, the edges and
 * the misuse that throws). `matrix` is a CSR matrix or a pair of product callbacks.
 */
export function lsqr(matrix: CsrMatrix | LinearOperator, rightHandSide: Float64Array | readonly number[], options: LsqrOptions = {}): LsqrResult {
  const operator = isOperator(matrix) ? matrix : csrOperator(matrix);
  const rows = operator.rows;
  const columns = operator.columns;
  if (!Number.isInteger(rows) || rows < 1 || !Number.isInteger(columns) || columns < 1) {
    throw new RangeError(`lsqr: the operator's rows and columns must be positive integers, got ${rows} × ${columns}`);
  }
  if (rightHandSide.length !== rows) {
    throw new RangeError(`lsqr: the right-hand side has ${rightHandSide.length} entries but A has ${rows} rows; give one value per row`);
  }
  const damp = options.damp ?? 0;
  const atol = options.atol ?? 1e-6;
  const btol = options.btol ?? 1e-6;
  const conlim = options.conlim ?? 1e8;
  assertTolerance(damp, 'damp');
  assertTolerance(atol, 'atol');
  assertTolerance(btol, 'btol');
  assertTolerance(conlim, 'conlim');
  const iterationLimit = options.iterationLimit ?? 2 * columns;
  if (!Number.isInteger(iterationLimit) || iterationLimit < 1) {
    throw new RangeError(`lsqr: options.iterationLimit must be a positive integer, got ${iterationLimit}; the default is 2 × columns = ${2 * columns}`);
  }
  const computeVariance = options.computeVariance ?? true;

  const u = new Float64Array(rows);
  for (let row = 0; row < rows; row += 1) {
    const value = rightHandSide[row]!;
    if (!Number.isFinite(value)) throw new RangeError(`lsqr: right-hand side entry ${row} is ${value}; every entry must be finite`);
    u[row] = value;
  }
  const x = new Float64Array(columns);
  const v = new Float64Array(columns);
  const w = new Float64Array(columns);
  const variance = computeVariance ? new Float64Array(columns) : null;
  const rotation = new Float64Array(3);

  const bnorm = norm(u);
  let beta: number;
  if (options.initialGuess !== undefined) {
    if (options.initialGuess.length !== columns) {
      throw new RangeError(`lsqr: options.initialGuess has ${options.initialGuess.length} entries but A has ${columns} columns`);
    }
    for (let column = 0; column < columns; column += 1) {
      const value = options.initialGuess[column]!;
      if (!Number.isFinite(value)) throw new RangeError(`lsqr: options.initialGuess[${column}] = ${value} is not finite`);
      x[column] = value;
    }
    // u = b − A·x₀
    scaleInPlace(u, -1);
    operator.multiplyAdd(x, u);
    scaleInPlace(u, -1);
    beta = norm(u);
  } else {
    beta = bnorm;
  }

  let alfa = 0;
  if (beta > 0) {
    scaleInPlace(u, 1 / beta);
    operator.multiplyTransposeAdd(u, v);
    alfa = norm(v);
  }
  if (alfa > 0) scaleInPlace(v, 1 / alfa);
  w.set(v);

  const dampSquared = damp * damp;
  const ctol = conlim > 0 ? 1 / conlim : 0;
  const eps = Number.EPSILON;
  let iterations = 0;
  let istop: LsqrStop = 0;
  let anorm = 0;
  let acond = 0;
  let ddnorm = 0;
  let res2 = 0;
  let xnorm = 0;
  let xxnorm = 0;
  let z = 0;
  let cs2 = -1;
  let sn2 = 0;
  let rhobar = alfa;
  let phibar = beta;
  let rnorm = beta;
  let r1norm = rnorm;
  let r2norm = rnorm;
  let arnorm = alfa * beta;

  const result = (): LsqrResult => ({
    x,
    istop,
    stopReason: LSQR_STOP_REASONS[istop],
    iterations,
    r1norm,
    r2norm,
    anorm,
    acond,
    arnorm,
    xnorm,
    variance,
  });
  if (arnorm === 0) return result();

  while (iterations < iterationLimit) {
    iterations += 1;
    // β·u = A·v − α·u
    scaleInPlace(u, -alfa);
    operator.multiplyAdd(v, u);
    beta = norm(u);
    if (beta > 0) {
      scaleInPlace(u, 1 / beta);
      anorm = Math.sqrt(anorm * anorm + alfa * alfa + beta * beta + dampSquared);
      // α·v = Aᵀ·u − β·v
      scaleInPlace(v, -beta);
      operator.multiplyTransposeAdd(u, v);
      alfa = norm(v);
      if (alfa > 0) scaleInPlace(v, 1 / alfa);
    }

    let rhobar1: number;
    let psi: number;
    if (damp > 0) {
      rhobar1 = Math.sqrt(rhobar * rhobar + dampSquared);
      const cs1 = rhobar / rhobar1;
      const sn1 = damp / rhobar1;
      psi = sn1 * phibar;
      phibar = cs1 * phibar;
    } else {
      rhobar1 = rhobar;
      psi = 0;
    }

    symmetricOrtho(rhobar1, beta, rotation);
    const cs = rotation[0]!;
    const sn = rotation[1]!;
    const rho = rotation[2]!;
    const theta = sn * alfa;
    rhobar = -cs * alfa;
    const phi = cs * phibar;
    phibar = sn * phibar;
    const tau = sn * phi;

    const step = phi / rho;
    const carry = -theta / rho;
    const inverseRho = 1 / rho;
    let dkSquared = 0;
    for (let column = 0; column < columns; column += 1) {
      const wk = w[column]!;
      const dk = inverseRho * wk;
      dkSquared += dk * dk;
      if (variance !== null) variance[column] = variance[column]! + dk * dk;
      x[column] = x[column]! + step * wk;
      w[column] = v[column]! + carry * wk;
    }
    ddnorm += dkSquared;

    const delta = sn2 * rho;
    const gambar = -cs2 * rho;
    const rhs = phi - delta * z;
    const zbar = rhs / gambar;
    xnorm = Math.sqrt(xxnorm + zbar * zbar);
    const gamma = Math.sqrt(gambar * gambar + theta * theta);
    cs2 = gambar / gamma;
    sn2 = theta / gamma;
    z = rhs / gamma;
    xxnorm += z * z;

    acond = anorm * Math.sqrt(ddnorm);
    const res1 = phibar * phibar;
    res2 += psi * psi;
    rnorm = Math.sqrt(res1 + res2);
    arnorm = alfa * Math.abs(tau);
    if (damp > 0) {
      const r1sq = rnorm * rnorm - dampSquared * xxnorm;
      r1norm = Math.sqrt(Math.abs(r1sq));
      if (r1sq < 0) r1norm = -r1norm;
    } else {
      r1norm = rnorm;
    }
    r2norm = rnorm;

    const test1 = rnorm / bnorm;
    const test2 = arnorm / (anorm * rnorm + eps);
    const test3 = 1 / (acond + eps);
    const t1 = test1 / (1 + (anorm * xnorm) / bnorm);
    const rtol = btol + (atol * anorm * xnorm) / bnorm;

    if (iterations >= iterationLimit) istop = 7;
    if (1 + test3 <= 1) istop = 6;
    if (1 + test2 <= 1) istop = 5;
    if (1 + t1 <= 1) istop = 4;
    if (test3 <= ctol) istop = 3;
    if (test2 <= atol) istop = 2;
    if (test1 <= rtol) istop = 1;
    if (istop !== 0) break;
  }
  return result();
}
