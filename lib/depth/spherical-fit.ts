/**
 * Curvature-corrected layer fit: the velocities and thicknesses of a sphere of constant-velocity
 * shells (`lib/model/spherical-earth.ts`) fitted to all picks of all branches jointly by
 * Levenberg–Marquardt least squares (Press2007 §15.5), with standard errors and the full
 * covariance; and `predictedFlatBias`, the bias a flat-earth interpretation (straight lines per
 * branch, then the intercept-time depths of METHODS §2) carries on the same data (METHODS §10).
 *
 * Model and parameters: θ = (v_1, …, v_N, h_1, …, h_{N−1}) in m/s and m, the radius R fixed
 * (default `EARTH_MEAN_RADIUS`, Moritz2000). Pick i, on branch n_i (1 = direct wave, n ≥ 2 = the
 * refracted wave of shell n, i.e. along interface n − 1), predicts t_i(θ) by the ray chosen in
 * `refractedRay` (default the turning chord, the true first arrival; Muller1971, Chapman1973).
 *
 * ```
 * minimise   χ²(θ) = Σ_i w_i·(t_obs,i − t_i(θ))²,   w_i = 1/σ_i² (all sigmas given) or 1 (none given)
 * step       (JᵀWJ + λ·diag(JᵀWJ))·δ = JᵀW·r,   J_ij = ∂t_i/∂θ_j (analytic: `sphericalTimeDerivatives`)
 *            accepted when χ² falls (then λ ← λ/10), else λ ← 10λ and the step is re-solved
 * σ̂²         χ²/(n − p),   p = 2N − 1
 * covariance C_θ = σ̂²·(JᵀWJ)⁻¹ at the solution;  depths z_k = h_1 + … + h_k, C_z = L·C_h·Lᵀ
 * ```
 * The covariance is scaled by σ̂² (the reduced χ² when sigmas are given) as the brief of this
 * method asks, so the SEs reflect the scatter actually seen; `unscaledCovariance` = (JᵀWJ)⁻¹ is
 * returned too (the covariance for absolute sigmas, as the line fits of lib/branches use).
 *
 * Convergence: the fit stops, `converged: true`, when a proposed step changes no parameter by more
 * than `stepTolerance` relative to max(|θ_j|, 1) (default 1e-10: 1 µm in 10 km); `converged:
 * false` with a note when `maxIterations` accepted steps (default 50) pass without that
 * (`iteration-limit`), or when λ passes 1e16 with no solvable step (`stalled`: JᵀWJ not positive
 * definite). Steps are projected onto h ≥ 0 (a thickness the step would make negative is set to 0);
 * a step that would make a velocity ≤ 0, or would leave some pick outside its branch (short of the
 * critical distance or past the branch's end), is rejected like one that raises χ². When the fit
 * converges with its last step projected or right after such rejections, it is pressed against that
 * edge and says so (`at-bound`: its SEs then do not describe the uncertainty).
 *
 * Edges: zero residual degrees of freedom (n = p) gives `residualVariance`, `covariance` and every
 * SE `null` with a `no-degrees-of-freedom` note; a JᵀWJ that is not positive definite at the
 * solution gives them `null` with `covariance-singular`; exact data give SEs near zero.
 * Misuse throws `RangeError` naming the field and the fix: no picks; an offset, time or sigma not
 * finite (or sigma ≤ 0); sigmas given for some picks and not others; a branch outside 1…N; a
 * branch without enough picks to fix its line (branch 1: one pick at a non-zero offset; others two
 * distinct offsets — so n ≥ p always); a starting model that is not a valid layered model, reaches
 * the centre, or whose spherical branches do not reach some pick; maxIterations not a whole number
 * ≥ 0; stepTolerance or radius not positive and finite.
 *
 * @example
 * // METHODS check case 10.2 (computed from the stated model): exact spherical times of Pg at
 * // 10–150 km and Pn at 200–600 km every 10 km, started from a flat guess.
 * const fit = fitSphericalLayers(picks, { velocities: [6000, 7800], thicknesses: [30_000] }, { radius: 6_371_000 });
 * // → model { velocities: [6300, 8000], thicknesses: [35 000] }, converged: true
 * predictedFlatBias(fit.model, picks).velocityBias; // [0.093, 46.80] m/s: flat Pn reads 8046.8 m/s
 */
import type { ReferenceKey } from '../references.js';
import type { LayeredModel } from '../model/layered-model.js';
import { EARTH_MEAN_RADIUS } from '../model/earth-flattening.js';
import {
  sphericalBranchTime,
  sphericalTimeDerivatives,
  type RefractedRay,
  type SphericalModel,
  type SphericalOptions,
} from '../model/spherical-earth.js';
import { invertSymmetricPositiveDefinite, sandwich } from '../stats/small-matrix.js';
import { cumulativeRows } from './propagate.js';
import { leastSquaresLine } from '../branches/least-squares.js';
import { interceptTimeDepths } from './intercept-time.js';
import type { BranchParameters, DepthNote } from './types.js';

/** One first-arrival pick assigned to a branch. */
export interface SphericalPick {
  /** Arc length along the surface from the source, m. */
  readonly offset: number;
  /** Travel time, s. */
  readonly time: number;
  /** One-SD pick uncertainty, s; null when unknown (then all picks must be null). */
  readonly sigma: number | null;
  /** 1 = direct wave; n ≥ 2 = refracted wave of shell n (along interface n − 1). */
  readonly branch: number;
}

export interface SphericalFitOptions extends SphericalOptions {
  /** Sphere radius, m. Default `EARTH_MEAN_RADIUS`. */
  readonly radius?: number;
  /** Most accepted Levenberg–Marquardt steps. Default 50. */
  readonly maxIterations?: number;
  /** Relative step size below which the fit has converged. Default 1e-10. */
  readonly stepTolerance?: number;
}

export interface SphericalFitNote {
  readonly code: 'iteration-limit' | 'stalled' | 'at-bound' | 'no-degrees-of-freedom' | 'covariance-singular';
  readonly message: string;
}

export interface SphericalFit {
  /** The fitted shells, radius included. */
  readonly model: Required<SphericalModel>;
  /** SE of v_1…v_N, m/s; null with a note when no covariance can be formed. */
  readonly velocitySE: readonly number[] | null;
  /** SE of h_1…h_{N−1}, m. */
  readonly thicknessSE: readonly number[] | null;
  /** z_k = h_1 + … + h_k, m: depth of interface k below the surface. */
  readonly depths: readonly number[];
  readonly depthSE: readonly number[] | null;
  /** C_θ = σ̂²·(JᵀWJ)⁻¹ over θ = (v_1…v_N, h_1…h_{N−1}). */
  readonly covariance: readonly (readonly number[])[] | null;
  /** (JᵀWJ)⁻¹: the covariance if the sigmas are taken as absolute; null when JᵀWJ is not positive definite. */
  readonly unscaledCovariance: readonly (readonly number[])[] | null;
  /** σ̂² = χ²/(n − p): s² unweighted, dimensionless (reduced χ²) weighted. */
  readonly residualVariance: number | null;
  /** Σ w_i r_i². */
  readonly chiSquare: number;
  readonly degreesOfFreedom: number;
  /** √(Σ r_i²/n), s, unweighted. */
  readonly rms: number;
  /** t_obs − t_fit, s, aligned with the picks. */
  readonly residuals: readonly number[];
  readonly weighted: boolean;
  /** Accepted Levenberg–Marquardt steps. */
  readonly iterations: number;
  readonly converged: boolean;
  readonly refractedRay: RefractedRay;
  readonly notes: readonly SphericalFitNote[];
  readonly references: readonly ReferenceKey[];
}

/** What a flat-earth interpretation of the model's own times reads, and its error. */
export interface FlatBias {
  /** 1/slowness of each branch's least-squares line (branch 1 through the origin), m/s. */
  readonly flatVelocities: readonly number[];
  /** Intercept times of those lines, s (0 for branch 1). */
  readonly flatIntercepts: readonly number[];
  /** Intercept-time thicknesses and depths from those lines, m; shorter than N − 1 when the recursion stops (see notes). */
  readonly flatThicknesses: readonly number[];
  readonly flatDepths: readonly number[];
  /** flat − spherical, m/s, per layer. */
  readonly velocityBias: readonly number[];
  /** flat − spherical, m, per layer above the half-space; null where the flat recursion gave no value. */
  readonly thicknessBias: readonly (number | null)[];
  readonly depthBias: readonly (number | null)[];
  /** The intercept-time method's notes (e.g. a velocity that does not increase). */
  readonly notes: readonly DepthNote[];
}

const DEFAULT_MAX_ITERATIONS = 50;
const DEFAULT_STEP_TOLERANCE = 1e-10;
const INITIAL_DAMPING = 1e-3;
const MIN_DAMPING = 1e-12;
const MAX_DAMPING = 1e16;
const REFERENCES: readonly ReferenceKey[] = ['Muller1971', 'Chapman1973', 'Press2007', 'Moritz2000'];

interface CheckedPicks {
  readonly weights: readonly number[];
  readonly weighted: boolean;
}

function assertPicks(picks: readonly SphericalPick[], layerCount: number, caller: string): CheckedPicks {
  if (picks.length === 0) throw new RangeError(`${caller}: no picks given; give at least the picks of every branch`);
  const withSigma = picks.filter((pick) => pick.sigma !== null).length;
  if (withSigma !== 0 && withSigma !== picks.length) {
    throw new RangeError(
      `${caller}: ${withSigma} of ${picks.length} picks have a sigma and the others none; give a sigma for every pick (weighted fit) or for none (unweighted)`,
    );
  }
  picks.forEach((pick, index) => {
    const label = `${caller}: pick ${index + 1}`;
    if (!(pick.offset >= 0) || !Number.isFinite(pick.offset)) throw new RangeError(`${label}: offset must be zero or positive and finite (m along the surface), got ${pick.offset}`);
    if (!Number.isFinite(pick.time)) throw new RangeError(`${label}: time must be finite (s), got ${pick.time}`);
    if (pick.sigma !== null && (!(pick.sigma > 0) || !Number.isFinite(pick.sigma))) {
      throw new RangeError(`${label}: sigma must be positive and finite (s) or null, got ${pick.sigma}`);
    }
    if (!Number.isInteger(pick.branch) || pick.branch < 1 || pick.branch > layerCount) {
      throw new RangeError(`${label}: branch must be an integer from 1 to ${layerCount} (the model's layer count), got ${pick.branch}; assign the pick to a branch or add a layer`);
    }
  });
  for (let branch = 1; branch <= layerCount; branch += 1) {
    const offsets = new Set(picks.filter((pick) => pick.branch === branch && (branch > 1 || pick.offset > 0)).map((pick) => pick.offset));
    const needed = branch === 1 ? 1 : 2;
    if (offsets.size < needed) {
      throw new RangeError(
        `${caller}: branch ${branch} has picks at ${offsets.size} distinct ${branch === 1 ? 'non-zero ' : ''}offsets, needs ${needed} to fix ${branch === 1 ? 'its velocity' : 'its velocity and the depth above it'}; add picks to it or drop the layer from the model`,
      );
    }
  }
  return { weights: picks.map((pick) => (pick.sigma === null ? 1 : 1 / (pick.sigma * pick.sigma))), weighted: withSigma > 0 };
}

function assertStart(start: LayeredModel, caller: string): void {
  if (start.velocities.length < 1) throw new RangeError(`${caller}: the starting model needs at least one velocity`);
  if (start.thicknesses.length !== start.velocities.length - 1) {
    throw new RangeError(
      `${caller}: the starting model's ${start.velocities.length} velocities need ${start.velocities.length - 1} thicknesses, got ${start.thicknesses.length}`,
    );
  }
  start.velocities.forEach((velocity, index) => {
    if (!(velocity > 0) || !Number.isFinite(velocity)) throw new RangeError(`${caller}: starting velocity of layer ${index + 1} must be positive and finite, got ${velocity}`);
  });
  start.thicknesses.forEach((thickness, index) => {
    if (!(thickness >= 0) || !Number.isFinite(thickness)) throw new RangeError(`${caller}: starting thickness of layer ${index + 1} must be zero or positive and finite, got ${thickness}`);
  });
}

function modelOf(parameters: readonly number[], layerCount: number, radius: number): Required<SphericalModel> {
  return { velocities: parameters.slice(0, layerCount), thicknesses: parameters.slice(layerCount), radius };
}

function admissible(parameters: readonly number[], layerCount: number, radius: number): boolean {
  const velocitiesOk = parameters.slice(0, layerCount).every((velocity) => velocity > 0 && Number.isFinite(velocity));
  const thicknesses = parameters.slice(layerCount);
  const total = thicknesses.reduce((sum, thickness) => sum + thickness, 0);
  return velocitiesOk && thicknesses.every((thickness) => thickness >= 0 && Number.isFinite(thickness)) && total < radius;
}

/** Predicted times and Jacobian rows, or null when some pick is outside its branch. */
function predict(
  model: Required<SphericalModel>,
  picks: readonly SphericalPick[],
  options: SphericalOptions,
): { readonly times: number[]; readonly jacobian: number[][] } | null {
  const times: number[] = [];
  const jacobian: number[][] = [];
  for (const pick of picks) {
    const derivatives = sphericalTimeDerivatives(model, pick.branch, pick.offset, options);
    if (derivatives === null) return null;
    times.push(derivatives.time);
    jacobian.push([...derivatives.velocityDerivatives, ...derivatives.thicknessDerivatives]);
  }
  return { times, jacobian };
}

function chiSquareOf(picks: readonly SphericalPick[], times: readonly number[], weights: readonly number[]): number {
  return picks.reduce((sum, pick, index) => sum + (weights[index] ?? 0) * (pick.time - (times[index] ?? Number.NaN)) ** 2, 0);
}

/** JᵀWJ and JᵀW·r. */
function normalEquations(
  jacobian: readonly (readonly number[])[],
  residuals: readonly number[],
  weights: readonly number[],
  size: number,
): { readonly normal: number[][]; readonly gradient: number[] } {
  const normal = Array.from({ length: size }, () => new Array<number>(size).fill(0));
  const gradient = new Array<number>(size).fill(0);
  jacobian.forEach((row, index) => {
    const weight = weights[index] ?? 0;
    const residual = residuals[index] ?? 0;
    for (let a = 0; a < size; a += 1) {
      const value = row[a] ?? 0;
      gradient[a] = (gradient[a] ?? 0) + weight * value * residual;
      const normalRow = normal[a];
      if (normalRow === undefined) continue;
      for (let b = 0; b < size; b += 1) normalRow[b] = (normalRow[b] ?? 0) + weight * value * (row[b] ?? 0);
    }
  });
  return { normal, gradient };
}

/**
 * (A + λ·diag A)⁻¹ by Cholesky on the unit-diagonal scaling D^{-1/2}·A·D^{-1/2}, which keeps m/s and
 * m columns alike; null when not positive definite.
 */
function dampedInverse(normal: readonly (readonly number[])[], damping: number): number[][] | null {
  const scale = normal.map((row, index) => {
    const diagonal = row[index] ?? 0;
    return diagonal > 0 && Number.isFinite(diagonal) ? 1 / Math.sqrt(diagonal) : Number.NaN;
  });
  if (scale.some((value) => !Number.isFinite(value))) return null;
  const scaled = normal.map((row, a) => row.map((value, b) => (scale[a] ?? 0) * value * (scale[b] ?? 0) + (a === b ? damping : 0)));
  const inverse = invertSymmetricPositiveDefinite(scaled);
  if (inverse === null) return null;
  return inverse.map((row, a) => row.map((value, b) => (scale[a] ?? 0) * value * (scale[b] ?? 0)));
}

function standardErrors(covariance: readonly (readonly number[])[]): number[] {
  return covariance.map((row, index) => Math.sqrt(Math.max(0, row[index] ?? Number.NaN)));
}

/**
 * Fit the spherical shell model to picks assigned to branches, from a starting (e.g. flat) model.
 * See the module comment for the method, the convergence test and the edges.
 */
export function fitSphericalLayers(picks: readonly SphericalPick[], start: LayeredModel, options: SphericalFitOptions = {}): SphericalFit {
  const caller = 'fitSphericalLayers';
  assertStart(start, caller);
  const layerCount = start.velocities.length;
  const { weights, weighted } = assertPicks(picks, layerCount, caller);
  const radius = options.radius ?? EARTH_MEAN_RADIUS;
  if (!(radius > 0) || !Number.isFinite(radius)) throw new RangeError(`${caller}: radius must be positive and finite (m), got ${radius}`);
  const maxIterations = options.maxIterations ?? DEFAULT_MAX_ITERATIONS;
  if (!Number.isInteger(maxIterations) || maxIterations < 0) throw new RangeError(`${caller}: maxIterations must be a whole number ≥ 0, got ${maxIterations}`);
  const stepTolerance = options.stepTolerance ?? DEFAULT_STEP_TOLERANCE;
  if (!(stepTolerance > 0) || !Number.isFinite(stepTolerance)) throw new RangeError(`${caller}: stepTolerance must be positive and finite, got ${stepTolerance}`);
  const refractedRay: RefractedRay = options.refractedRay ?? 'turning-chord';
  const rayOptions: SphericalOptions = { refractedRay };
  // The per-branch rule of assertPicks (1 + 2·(N − 1) picks at least) already gives n ≥ p.
  const size = 2 * layerCount - 1;

  let parameters = [...start.velocities, ...start.thicknesses];
  if (!admissible(parameters, layerCount, radius)) {
    throw new RangeError(`${caller}: the starting layers reach the centre of a sphere of radius ${radius} m; start from thinner layers`);
  }
  let current = predict(modelOf(parameters, layerCount, radius), picks, rayOptions);
  if (current === null) {
    const missed = picks.findIndex((pick) => sphericalBranchTime(modelOf(parameters, layerCount, radius), pick.branch, pick.offset, rayOptions) === null);
    const pick = picks[missed];
    throw new RangeError(
      `${caller}: in the starting model, branch ${pick?.branch} does not reach pick ${missed + 1} at ${pick?.offset} m (short of its critical distance, past its end, or impossible); start from thinner layers or a faster refractor, or assign the pick to another branch`,
    );
  }
  let chiSquare = chiSquareOf(picks, current.times, weights);
  let damping = INITIAL_DAMPING;
  let iterations = 0;
  let converged = false;
  let stalled = false;
  // Whether the fit is at the edge of the admissible models: the last accepted step was projected
  // onto h ≥ 0, or a step since was refused for leaving them (a pick outside its branch, v ≤ 0).
  let pressedAgainstBound = false;

  while (!converged && !stalled && iterations < maxIterations) {
    const residuals = picks.map((pick, index) => pick.time - (current?.times[index] ?? Number.NaN));
    const { normal, gradient } = normalEquations(current.jacobian, residuals, weights, size);
    let accepted = false;
    while (!accepted) {
      const inverse = dampedInverse(normal, damping);
      if (inverse === null) {
        damping *= 10;
      } else {
        const step = inverse.map((row) => row.reduce((sum, value, column) => sum + value * (gradient[column] ?? 0), 0));
        // Projected step: a thickness the step would make negative is set to 0 (the bound h ≥ 0).
        let clamped = false;
        const candidate = parameters.map((value, index) => {
          const moved = value + (step[index] ?? 0);
          if (index >= layerCount && moved < 0) {
            clamped = true;
            return 0;
          }
          return moved;
        });
        const relative = Math.max(...candidate.map((value, index) => Math.abs(value - (parameters[index] ?? 0)) / Math.max(Math.abs(parameters[index] ?? 0), 1)));
        if (relative < stepTolerance) {
          converged = true;
          if (clamped) pressedAgainstBound = true;
          break;
        }
        const predicted = admissible(candidate, layerCount, radius) ? predict(modelOf(candidate, layerCount, radius), picks, rayOptions) : null;
        const candidateChiSquare = predicted === null ? Number.POSITIVE_INFINITY : chiSquareOf(picks, predicted.times, weights);
        if (predicted !== null && candidateChiSquare < chiSquare) {
          parameters = candidate;
          current = predicted;
          chiSquare = candidateChiSquare;
          damping = Math.max(damping / 10, MIN_DAMPING);
          accepted = true;
          pressedAgainstBound = false;
          iterations += 1;
        } else {
          if (predicted === null) pressedAgainstBound = true;
          damping *= 10;
        }
        if (accepted && clamped) pressedAgainstBound = true;
      }
      if (damping > MAX_DAMPING) {
        stalled = true;
        break;
      }
    }
  }

  const notes: SphericalFitNote[] = [];
  if (stalled) {
    notes.push({
      code: 'stalled',
      message: `no step lowered the misfit after ${iterations} accepted steps (χ² = ${chiSquare.toPrecision(4)}); the picks may be assigned to the wrong branches or the start is far off — check the branch assignment or start nearer`,
    });
  } else if (converged && pressedAgainstBound) {
    notes.push({
      code: 'at-bound',
      message: `the fit stopped against the edge of the admissible models (a thickness at zero or a pick at the end of its branch), so the misfit might fall further beyond it and the standard errors do not describe the uncertainty; check the branch assignment of the picks near the critical distances, or drop a layer`,
    });
  } else if (!converged) {
    notes.push({
      code: 'iteration-limit',
      message: `the fit stopped after ${iterations} steps without converging (χ² = ${chiSquare.toPrecision(4)}); raise maxIterations or start nearer the solution`,
    });
  }

  const model = modelOf(parameters, layerCount, radius);
  const residuals = picks.map((pick, index) => pick.time - (current?.times[index] ?? Number.NaN));
  const degreesOfFreedom = picks.length - size;
  const { normal } = normalEquations(current.jacobian, residuals, weights, size);
  const unscaledCovariance = dampedInverse(normal, 0);
  let residualVariance: number | null = null;
  let covariance: number[][] | null = null;
  if (degreesOfFreedom === 0) {
    notes.push({
      code: 'no-degrees-of-freedom',
      message: `${picks.length} picks for ${size} parameters leave no residual degree of freedom, so no standard error can be estimated; add picks`,
    });
  } else if (unscaledCovariance === null) {
    notes.push({
      code: 'covariance-singular',
      message: 'JᵀWJ is not positive definite at the solution, so the parameters are not all determined by the picks; add picks to every branch or drop a layer',
    });
  } else {
    residualVariance = chiSquare / degreesOfFreedom;
    const variance = residualVariance;
    covariance = unscaledCovariance.map((row) => row.map((value) => value * variance));
  }
  const depths = cumulativeRows(model.thicknesses.map((thickness) => [thickness])).map((row) => row[0] ?? Number.NaN);
  let depthSE: number[] | null = null;
  if (covariance !== null && layerCount > 1) {
    const depthRows = cumulativeRows(model.thicknesses.map((_, row) => Array.from({ length: size }, (__, column) => (column === layerCount + row ? 1 : 0))));
    depthSE = standardErrors(sandwich(depthRows, covariance));
  } else if (covariance !== null) {
    depthSE = [];
  }
  const parameterSE = covariance === null ? null : standardErrors(covariance);
  return {
    model,
    velocitySE: parameterSE === null ? null : parameterSE.slice(0, layerCount),
    thicknessSE: parameterSE === null ? null : parameterSE.slice(layerCount),
    depths,
    depthSE,
    covariance,
    unscaledCovariance,
    residualVariance,
    chiSquare,
    degreesOfFreedom,
    rms: Math.sqrt(residuals.reduce((sum, residual) => sum + residual * residual, 0) / residuals.length),
    residuals,
    weighted,
    iterations,
    converged,
    refractedRay,
    notes,
    references: REFERENCES,
  };
}

/**
 * The bias of a flat-earth interpretation of data from a spherical model: the times of `model` at
 * the picks' offsets and branches (noise-free, the observed times are not used), fitted as a flat
 * interpreter would — one least-squares straight line per branch (branch 1 through the origin;
 * weighted by 1/σ² when the picks carry sigmas), V_n = 1/slowness, then the intercept-time
 * thicknesses of METHODS §2 (`interceptTimeDepths`) — minus the model's own values.
 *
 * In METHODS 10.2 the flat reading of Pn is fast (8046.8 against 8000 m/s, since the apparent
 * velocity along the surface is ≈ v·R/r and grows further as the turning ray dips into the shell)
 * and the Moho shallow (≈ 34.88 against 35 km).
 *
 * The flat velocities always increase with the branch for picks inside their branches (derived:
 * along branch n the slope dt/dx = p/R lies between r_n/(R·v_n) and r_{n−1}/(R·v_n), so every
 * chord of branch n is steeper than every chord of branch n + 1, whose p < r_n/v_{n+1}), so the
 * intercept-time recursion runs to the bottom and the biases are numbers; `null` in them is kept
 * only for the recursion's general contract (it stops at a velocity that does not increase).
 * Its notes (e.g. `thickness-not-positive`) are passed on.
 *
 * Edges: throws as `fitSphericalLayers` for bad picks (mixed sigmas, a branch without enough picks,
 * a branch outside 1…N), and when the model's branch does not reach a pick (name and fix in the
 * message).
 */
export function predictedFlatBias(model: SphericalModel, picks: readonly SphericalPick[], options: SphericalOptions = {}): FlatBias {
  const caller = 'predictedFlatBias';
  const layerCount = model.velocities.length;
  const { weighted } = assertPicks(picks, layerCount, caller);
  const synthetic = picks.map((pick, index) => {
    const time = sphericalBranchTime(model, pick.branch, pick.offset, options);
    if (time === null) {
      throw new RangeError(
        `${caller}: branch ${pick.branch} of the model does not reach pick ${index + 1} at ${pick.offset} m (short of its critical distance or past its end); assign the pick to the branch it belongs to`,
      );
    }
    return time;
  });
  const branches: BranchParameters[] = [];
  for (let branch = 1; branch <= layerCount; branch += 1) {
    const members = picks.map((pick, index) => ({ pick, time: synthetic[index] ?? Number.NaN })).filter((entry) => entry.pick.branch === branch);
    const line = leastSquaresLine(
      members.map((entry) => entry.pick.offset),
      members.map((entry) => entry.time),
      weighted ? members.map((entry) => 1 / (entry.pick.sigma ?? Number.NaN) ** 2) : null,
      branch === 1,
    );
    branches.push({ slowness: line.slope, intercept: line.intercept, slownessVariance: 0, interceptVariance: 0, covariance: 0 });
  }
  const flatVelocities = branches.map((branch) => 1 / branch.slowness);
  const depths = interceptTimeDepths(branches);
  const sphericalDepths = cumulativeRows(model.thicknesses.map((thickness) => [thickness])).map((row) => row[0] ?? Number.NaN);
  return {
    flatVelocities,
    flatIntercepts: branches.map((branch) => branch.intercept),
    flatThicknesses: depths.thicknesses,
    flatDepths: depths.depths,
    velocityBias: flatVelocities.map((velocity, index) => velocity - (model.velocities[index] ?? Number.NaN)),
    thicknessBias: model.thicknesses.map((thickness, index) => {
      const flat = depths.thicknesses[index];
      return flat === undefined ? null : flat - thickness;
    }),
    depthBias: sphericalDepths.map((depth, index) => {
      const flat = depths.depths[index];
      return flat === undefined ? null : flat - depth;
    }),
    notes: depths.notes,
  };
}
