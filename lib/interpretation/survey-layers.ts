/**
 * Survey-level layers from the per-shot-side results of the horizontal-layer methods.
 *
 * Velocity of layer n: the inverse-variance weighted mean of the slownesses of branch n over every
 * shot side that shows it (Bevington & Robinson 2003, ch. 4), its standard error inflated by the
 * Birge ratio √(χ²/ν) when the sides disagree more than their errors allow.
 *
 * Depths: the generalised-least-squares mean of the per-side depth vectors with their full
 * covariance matrices, z̄ = (Σ Cᵢ⁻¹)⁻¹ Σ Cᵢ⁻¹ zᵢ, Cov z̄ = (Σ Cᵢ⁻¹)⁻¹ (a side that sees fewer
 * interfaces contributes the information of its sub-vector), inflated alike; thicknesses are
 * differences of consecutive depths with their covariance carried through. The χ² of the depths
 * tests whether the layers are the same under every shot (a "lateral variation" warning when not).
 *
 * Edges: a per-side covariance that is not positive definite (exact, noise-free data) gets a ridge
 * of (1e-9·max(|z| over all sides, 1 m))² on its diagonal so the weights stay finite and nearly equal; a layer seen
 * by no side is not returned; with one side the result is that side's, ν = 0 and no inflation.
 */
import { invertSymmetricPositiveDefinite, multiply, transpose, zeros } from '../stats/small-matrix.js';
import { chiSquareSurvival } from '../stats/chi-square.js';

export interface SideLayerInput {
  /** Branch slownesses s_n with variances, indexed by branch (index 0 = branch 1). Missing = null. */
  readonly slownesses: readonly ({ readonly slowness: number; readonly variance: number } | null)[];
  /** Depths z_1…z_K under this side (K may be fewer than the survey's) with their covariance. */
  readonly depths: readonly number[];
  readonly depthCovariance: readonly (readonly number[])[];
}

export interface CombinedValue {
  readonly value: number;
  readonly standardError: number;
  readonly contributors: number;
  readonly chiSquare: number;
  readonly degreesOfFreedom: number;
  /** P(χ²_ν ≥ χ²); 1 when ν = 0. */
  readonly consistencyProbability: number;
}

export interface CombinedLayers {
  /** Per branch index (0 = branch 1): combined slowness, or null when no side shows it. */
  readonly slownesses: readonly (CombinedValue | null)[];
  readonly depths: readonly number[];
  readonly depthCovariance: readonly (readonly number[])[];
  readonly depthSides: readonly number[];
  readonly depthChiSquare: number;
  readonly depthDegreesOfFreedom: number;
  readonly depthConsistencyProbability: number;
}

const RELATIVE_RIDGE = 1e-9;

export function combineSlownesses(values: readonly { slowness: number; variance: number }[]): CombinedValue | null {
  if (values.length === 0) return null;
  const scale = Math.max(...values.map((entry) => Math.abs(entry.slowness)));
  const weights = values.map((entry) => 1 / Math.max(entry.variance, (RELATIVE_RIDGE * scale) ** 2));
  const totalWeight = weights.reduce((sum, weight) => sum + weight, 0);
  const mean = values.reduce((sum, entry, k) => sum + weights[k]! * entry.slowness, 0) / totalWeight;
  const chiSquare = values.reduce((sum, entry, k) => sum + weights[k]! * (entry.slowness - mean) ** 2, 0);
  const freedom = values.length - 1;
  const birge = freedom > 0 ? Math.max(1, Math.sqrt(chiSquare / freedom)) : 1;
  return {
    value: mean,
    standardError: Math.sqrt(1 / totalWeight) * birge,
    contributors: values.length,
    chiSquare,
    degreesOfFreedom: freedom,
    consistencyProbability: freedom > 0 ? chiSquareSurvival(chiSquare, freedom) : 1,
  };
}

export function combineSideLayers(sides: readonly SideLayerInput[]): CombinedLayers {
  const branchCount = Math.max(0, ...sides.map((side) => side.slownesses.length));
  const slownesses = Array.from({ length: branchCount }, (_, index) =>
    combineSlownesses(sides.flatMap((side) => (side.slownesses[index] ? [side.slownesses[index]!] : []))),
  );

  const interfaceCount = Math.max(0, ...sides.map((side) => side.depths.length));
  const information = zeros(interfaceCount, interfaceCount);
  const weightedSum = new Array<number>(interfaceCount).fill(0);
  const depthSides = new Array<number>(interfaceCount).fill(0);
  const depthScale = Math.max(1, ...sides.flatMap((side) => side.depths.map(Math.abs)));
  const inverses = sides.map((side) => regularisedInverse(side.depthCovariance, depthScale));
  sides.forEach((side, s) => {
    const inverse = inverses[s]!;
    side.depths.forEach((_, row) => {
      depthSides[row]! += 1;
      side.depths.forEach((depth, column) => {
        information[row]![column]! += inverse[row]![column]!;
        weightedSum[row]! += inverse[row]![column]! * depth;
      });
    });
  });
  const covariance = interfaceCount > 0 ? invertSymmetricPositiveDefinite(information) : [];
  if (covariance === null) throw new Error('combineSideLayers: the depth information matrix is singular (a programming error: every side adds a positive-definite block)');
  const mean = multiply(covariance, weightedSum.map((value) => [value])).map((row) => row[0]!);

  let chiSquare = 0;
  let observations = 0;
  sides.forEach((side, s) => {
    const inverse = inverses[s]!;
    const difference = side.depths.map((depth, k) => depth - mean[k]!);
    observations += side.depths.length;
    difference.forEach((left, row) => {
      difference.forEach((right, column) => {
        chiSquare += left * inverse[row]![column]! * right;
      });
    });
  });
  const freedom = observations - interfaceCount;
  const birge = freedom > 0 ? Math.max(1, Math.sqrt(chiSquare / freedom)) : 1;
  return {
    slownesses,
    depths: mean,
    depthCovariance: covariance.map((row) => row.map((value) => value * birge * birge)),
    depthSides,
    depthChiSquare: chiSquare,
    depthDegreesOfFreedom: freedom,
    depthConsistencyProbability: freedom > 0 ? chiSquareSurvival(chiSquare, freedom) : 1,
  };
}

function regularisedInverse(covariance: readonly (readonly number[])[], depthScale: number): number[][] {
  const direct = invertSymmetricPositiveDefinite(covariance);
  if (direct !== null && direct.every((row) => row.every(Number.isFinite))) return direct;
  const ridge = (RELATIVE_RIDGE * depthScale) ** 2;
  const padded = covariance.map((row, i) => row.map((value, j) => (i === j ? value + ridge : value)));
  const inverse = invertSymmetricPositiveDefinite(padded);
  if (inverse === null) {
    // Not positive semi-definite even with the ridge: fall back to the diagonal alone.
    return padded.map((row, i) => row.map((value, j) => (i === j ? 1 / Math.max(value, ridge) : 0)));
  }
  return inverse;
}

/** Thicknesses h_k = z_k − z_{k−1} (z_0 = 0) and their covariance D·C·Dᵀ. */
export function thicknessesFromDepths(
  depths: readonly number[],
  covariance: readonly (readonly number[])[],
): { thicknesses: number[]; covariance: number[][] } {
  const size = depths.length;
  const difference = Array.from({ length: size }, (_, row) =>
    Array.from({ length: size }, (_, column) => (column === row ? 1 : column === row - 1 ? -1 : 0)),
  );
  return {
    thicknesses: depths.map((depth, k) => depth - (k > 0 ? depths[k - 1]! : 0)),
    covariance: multiply(multiply(difference, covariance), transpose(difference)),
  };
}
