/**
 * linearLeastSquares (lib/stats/linear-least-squares.ts) against numpy (Debian python3-numpy):
 * `numpy.linalg.lstsq` on the rows scaled by √w for the coefficients, `numpy.linalg.inv(XᵀWX)` for
 * the unscaled covariance, and the weighted residual sum of squares from numpy's own residuals;
 * `numpy.linalg.matrix_rank` says which designs are singular. Designs are seeded random.
 */
import { describe, expect, it } from 'vitest';
import { linearLeastSquares } from '../../lib/stats/linear-least-squares.js';
import { seededNormal, seededRandom } from '../../lib/random.js';
import { runPythonJson } from '../helpers/python.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';

/** Normal equations with pivoting on well-scaled designs of ≤ 5 columns against numpy's SVD route: ~1e-13 found, 1e-9 leaves room. */
const NUMPY_RELATIVE = 1e-9;
/** Covariance entries can be near zero off the diagonal: compare those absolutely against the diagonal's size. */
const NUMPY_ABSOLUTE_OF_DIAGONAL = 1e-9;

interface Problem {
  readonly design: number[][];
  readonly responses: number[];
  readonly weights: number[];
}

interface NumpySolution {
  readonly coefficients: number[];
  readonly covariance: number[][];
  readonly rss: number;
  readonly rank: number;
}

const NUMPY_LSTSQ = `import sys, json, numpy as np
out = []
for p in json.load(sys.stdin):
    X = np.array(p['design'], dtype=float); y = np.array(p['responses'], dtype=float); w = np.array(p['weights'], dtype=float)
    root = np.sqrt(w)
    beta = np.linalg.lstsq(X * root[:, None], y * root, rcond=None)[0]
    normal = X.T @ (w[:, None] * X)
    rank = int(np.linalg.matrix_rank(X * root[:, None]))
    cov = np.linalg.inv(normal).tolist() if rank == X.shape[1] else []
    r = y - X @ beta
    out.append({'coefficients': beta.tolist(), 'covariance': cov, 'rss': float(np.sum(w * r * r)), 'rank': rank})
print(json.dumps(out))`;

/** Seeded random designs: an intercept column and p − 1 columns of centred, unit-scale regressors. */
function randomProblems(seed: number): Problem[] {
  const normal = seededNormal(seed);
  const uniform = seededRandom(seed + 1);
  const problems: Problem[] = [];
  for (let parameters = 1; parameters <= 5; parameters += 1) {
    for (const count of [parameters + 1, 12, 40]) {
      const design = Array.from({ length: count }, () => [1, ...Array.from({ length: parameters - 1 }, () => normal())]);
      const truth = Array.from({ length: parameters }, () => 3 * normal());
      const responses = design.map((row) => row.reduce((sum, value, k) => sum + value * truth[k]!, 0) + 0.1 * normal());
      const weights = design.map(() => 0.2 + 5 * uniform());
      problems.push({ design, responses, weights });
    }
  }
  return problems;
}

describe('linearLeastSquares against numpy', () => {
  const problems = randomProblems(2024);
  const expected = runPythonJson<NumpySolution[]>(NUMPY_LSTSQ, problems, ['numpy']);

  it('linearLeastSquares gives the weighted coefficients, (XᵀWX)⁻¹ and Σ w r² that numpy lstsq and inv give, on 15 random designs of 1–5 columns', () => {
    problems.forEach((problem, index) => {
      const reference = expected[index]!;
      expect(reference.rank, 'numpy matrix_rank: the random design has full column rank').toBe(problem.design[0]!.length);
      const fit = linearLeastSquares(problem.design, problem.responses, problem.weights);
      expect(fit).not.toBeNull();
      reference.coefficients.forEach((value, k) =>
        expectWithin(fit!.coefficients[k], value, NUMPY_RELATIVE * Math.max(1, Math.abs(value)), `numpy lstsq coefficient ${k} of design ${index}`),
      );
      const diagonal = Math.max(...reference.covariance.map((row, a) => Math.abs(row[a]!)));
      reference.covariance.forEach((row, a) =>
        row.forEach((value, b) =>
          expectWithin(fit!.unscaledCovariance[a]![b], value, NUMPY_ABSOLUTE_OF_DIAGONAL * diagonal, `numpy inv(XᵀWX)[${a}][${b}] of design ${index}`),
        ),
      );
      // With as many rows as parameters + 1 the RSS is a single small residual; compare it against the responses' scale.
      expectWithin(fit!.weightedResidualSumOfSquares, reference.rss, NUMPY_RELATIVE * Math.max(reference.rss, 1e-6), `numpy Σ w r² of design ${index}`);
    });
  });

  it('linearLeastSquares without weights is the fit with every weight 1 (numpy lstsq on the plain rows)', () => {
    const plain = problems.map((problem) => ({ ...problem, weights: problem.weights.map(() => 1) }));
    const reference = runPythonJson<NumpySolution[]>(NUMPY_LSTSQ, plain, ['numpy']);
    plain.forEach((problem, index) => {
      const fit = linearLeastSquares(problem.design, problem.responses);
      reference[index]!.coefficients.forEach((value, k) =>
        expectRelative(fit!.coefficients[k], value, NUMPY_RELATIVE, `numpy lstsq unweighted coefficient ${k} of design ${index}`),
      );
      expectWithin(fit!.weightedResidualSumOfSquares, reference[index]!.rss, NUMPY_RELATIVE * Math.max(reference[index]!.rss, 1e-6), `numpy unweighted RSS of design ${index}`);
    });
  });
});

describe('linearLeastSquares at the edges', () => {
  it('linearLeastSquares returns null for a singular XᵀWX: a repeated column, collinear columns, too few distinct rows (numpy matrix_rank < p)', () => {
    const normal = seededNormal(7);
    const u = Array.from({ length: 10 }, () => normal());
    const v = Array.from({ length: 10 }, () => normal());
    const singular: Problem[] = [
      // column 3 repeats column 2
      { design: u.map((value) => [1, value, value]), responses: u.map((value) => 2 + value), weights: u.map(() => 1) },
      // column 3 = 2·column 1 − 3·column 2
      { design: u.map((value, k) => [1, value, v[k]!, 2 - 3 * value]), responses: v, weights: v.map(() => 2) },
      // ten rows, but only two distinct ones, for three parameters
      { design: u.map((_, k) => (k % 2 === 0 ? [1, 0, 1] : [1, 1, 0])), responses: u, weights: u.map(() => 1) },
    ];
    const ranks = runPythonJson<NumpySolution[]>(NUMPY_LSTSQ, singular, ['numpy']).map((entry) => entry.rank);
    expect(ranks, 'numpy matrix_rank of the three designs').toEqual([2, 3, 2]);
    for (const problem of singular) expect(linearLeastSquares(problem.design, problem.responses, problem.weights)).toBeNull();
  });

  it('linearLeastSquares returns null with fewer rows than parameters and for an empty design', () => {
    expect(linearLeastSquares([[1, 0, 0], [1, 1, 1]], [1, 2])).toBeNull();
    expect(linearLeastSquares([], [])).toBeNull();
  });

  it('linearLeastSquares is exact for a line through two points (common practice: n = p leaves no residual)', () => {
    const fit = linearLeastSquares([[1, -1], [1, 1]], [1, 5]);
    expectWithin(fit!.coefficients[0], 3, 1e-15, 'hand: mean of 1 and 5');
    expectWithin(fit!.coefficients[1], 2, 1e-15, 'hand: (5 − 1)/2');
    expectWithin(fit!.weightedResidualSumOfSquares, 0, 1e-28, 'hand: no residual');
    // (XᵀX)⁻¹ = diag(1/2, 1/2) for these orthogonal columns.
    expect(fit!.unscaledCovariance).toEqual([[0.5, 0], [0, 0.5]]);
  });

  it('linearLeastSquares throws, naming the lengths, when responses, weights or design rows disagree in length', () => {
    expect(() => linearLeastSquares([[1, 0], [1, 1]], [1])).toThrow(/2 design rows need as many responses and weights, got 1 and 2/);
    expect(() => linearLeastSquares([[1, 0], [1, 1]], [1, 2], [1])).toThrow(/got 2 and 1/);
    expect(() => linearLeastSquares([[1, 0], [1]], [1, 2])).toThrow(/every design row must have the same length/);
  });
});
