/**
 * Residual bootstrap of layer depths (Efron 1979; Efron & Tibshirani 1993, regression chapter).
 *
 * For every branch of one shot side, new times are made as fitted + a residual drawn with
 * replacement from that branch's own residuals, inflated by √(n/(n−p)) so their spread matches the
 * error variance; every branch is refitted with the same method and the depths recomputed by the
 * intercept-time method. The spread of the replicate depths is the bootstrap standard error, and
 * the 2.5 and 97.5 percentiles the 95 % interval. When picks carry sigmas, the residuals are
 * standardised by their own sigma before resampling and rescaled by the sigma of the pick they are
 * added to (heteroscedastic picks). Residuals of a line through the origin are centred first.
 *
 * Assumptions: the branch assignment is held fixed (breakpoint uncertainty is not included); the
 * residuals of a branch are exchangeable. Where it fails: a branch with 2 picks has no residual
 * freedom (n − p = 0) and is refitted unchanged, so it adds no spread; replicates whose refit
 * fails or whose depths cannot be computed (velocities no longer increasing) are dropped and
 * counted in `droppedReplicates`; if every replicate is dropped the result holds NaN statistics
 * and `replicates` 0.
 *
 * @example
 * // METHODS.md check case 3.1 (500/2000 m/s, h = 8 m): SE(h) ≈ 0.084 m, 95 % ≈ [7.845, 8.170] m.
 * bootstrapInterceptTimeDepths(branches, { replicates: 2000, seed: 1 });
 */
import type { FitMethod, LineFit } from '../branches/types.js';
import { fitLine } from '../branches/line-fit.js';
import { seededRandom } from '../random.js';
import { interceptTimeDepths } from './intercept-time.js';
import { branchParameters } from '../interpretation/branch-parameters.js';

export interface BootstrapBranch {
  readonly offsets: readonly number[];
  readonly times: readonly number[];
  readonly sigmas: readonly number[] | null;
  readonly fit: LineFit;
}

export interface BootstrapOptions {
  /** Number of replicates; ≥ 2000 for 95 % percentile intervals (Efron & Tibshirani 1993). */
  readonly replicates: number;
  readonly seed: number;
  /** Defaults to the method of each branch's original fit. */
  readonly fitMethod?: FitMethod;
}

export interface BootstrapInterfaceDepth {
  /** Interface k is the top of layer k+1. */
  readonly interface: number;
  readonly depthSE: number;
  readonly low95: number;
  readonly high95: number;
}

export interface BootstrapDepths {
  readonly interfaces: readonly BootstrapInterfaceDepth[];
  readonly replicates: number;
  readonly droppedReplicates: number;
}

export function bootstrapInterceptTimeDepths(
  branches: readonly BootstrapBranch[],
  options: BootstrapOptions,
): BootstrapDepths {
  if (!Number.isInteger(options.replicates) || options.replicates < 1) {
    throw new RangeError(`bootstrapInterceptTimeDepths: replicates must be a positive integer, got ${options.replicates}`);
  }
  const interfaceCount = branches.length - 1;
  if (interfaceCount < 1) return { interfaces: [], replicates: 0, droppedReplicates: 0 };

  const uniform = seededRandom(options.seed);
  const prepared = branches.map((branch) => prepareBranch(branch));
  const samples: number[][] = Array.from({ length: interfaceCount }, () => []);
  let dropped = 0;

  for (let replicate = 0; replicate < options.replicates; replicate += 1) {
    const parameters = [];
    let failed = false;
    for (const branch of prepared) {
      const times = branch.fitted.map((fittedTime, k) => {
        const draw = branch.scaledResiduals[Math.floor(uniform() * branch.scaledResiduals.length)] ?? 0;
        return fittedTime + draw * (branch.sigmas ? (branch.sigmas[k] ?? 1) : 1);
      });
      const outcome = fitLine(branch.offsets, times, branch.sigmas, {
        method: options.fitMethod ?? branch.fit.method,
        throughOrigin: branch.fit.throughOrigin,
      });
      if (!outcome.ok) {
        failed = true;
        break;
      }
      parameters.push(branchParameters(outcome.fit));
    }
    if (failed) {
      dropped += 1;
      continue;
    }
    const depths = interceptTimeDepths(parameters);
    if (depths.depths.length !== interfaceCount || depths.depths.some((depth) => !Number.isFinite(depth))) {
      dropped += 1;
      continue;
    }
    depths.depths.forEach((depth, k) => samples[k]?.push(depth));
  }

  return {
    interfaces: samples.map((values, k) => ({ interface: k + 1, ...summarise(values) })),
    replicates: options.replicates - dropped,
    droppedReplicates: dropped,
  };
}

interface PreparedBranch {
  readonly offsets: readonly number[];
  readonly sigmas: readonly number[] | null;
  readonly fit: LineFit;
  readonly fitted: readonly number[];
  /** Residuals (standardised by sigma when weighted) times √(n/(n−p)). */
  readonly scaledResiduals: readonly number[];
}

function prepareBranch(branch: BootstrapBranch): PreparedBranch {
  const { fit, offsets, sigmas } = branch;
  const count = offsets.length;
  const parameterCount = fit.throughOrigin ? 1 : 2;
  const freedom = count - parameterCount;
  const inflation = freedom > 0 ? Math.sqrt(count / freedom) : 0;
  const fitted = offsets.map((offset) => fit.intercept + fit.slope * offset);
  const standardised = fit.residuals.map((residual, k) => (sigmas ? residual / (sigmas[k] ?? 1) : residual));
  // A line through the origin leaves residuals that need not average zero: centre them, so the
  // resampled errors have mean zero as the model assumes (Efron & Tibshirani 1993, regression chapter).
  const centre = fit.throughOrigin && standardised.length > 0 ? standardised.reduce((sum, value) => sum + value, 0) / standardised.length : 0;
  const scaledResiduals = standardised.map((value) => (value - centre) * inflation);
  return { offsets, sigmas, fit, fitted, scaledResiduals };
}

function summarise(values: number[]): { depthSE: number; low95: number; high95: number } {
  if (values.length === 0) return { depthSE: Number.NaN, low95: Number.NaN, high95: Number.NaN };
  const sorted = [...values].sort((a, b) => a - b);
  const mean = sorted.reduce((sum, value) => sum + value, 0) / sorted.length;
  const variance =
    sorted.length > 1 ? sorted.reduce((sum, value) => sum + (value - mean) ** 2, 0) / (sorted.length - 1) : 0;
  return { depthSE: Math.sqrt(variance), low95: percentile(sorted, 0.025), high95: percentile(sorted, 0.975) };
}

/** Linear interpolation between order statistics (the "type 7" definition, numpy's default). */
function percentile(sorted: readonly number[], fraction: number): number {
  const position = fraction * (sorted.length - 1);
  const below = Math.floor(position);
  const above = Math.min(below + 1, sorted.length - 1);
  const lower = sorted[below] ?? Number.NaN;
  const upper = sorted[above] ?? Number.NaN;
  return lower + (upper - lower) * (position - below);
}
