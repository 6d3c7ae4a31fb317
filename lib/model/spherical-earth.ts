/**
 * First-arrival travel times in a sphere of concentric constant-velocity shells: the spherical
 * counterpart of `layered-model.ts`, for crustal-scale profiles where the flat formulas of
 * METHODS §1 are late by tenths of a second (METHODS §10, check case 10.2).
 *
 * Model: shells k = 1…N from the surface, velocity v_k (the last, the half-space, fills the sphere
 * down to the centre), thicknesses h_1…h_{N−1}, radius R (default `EARTH_MEAN_RADIUS`). Interface
 * radii r_0 = R, r_j = R − (h_1 + … + h_j); shell k lies between r_k (bottom; 0 for the half-space)
 * and r_{k−1} (top). Source and receivers on the surface; an offset is the arc length x along the
 * surface, Δ = x/R the angular distance.
 *
 * Rays are straight chords within each shell; across interfaces Snell's law for spheres keeps the
 * ray parameter p = r·sin(i)/v (s/rad) constant. In shell k a ray of parameter p has impact
 * parameter (closest approach to the centre) b_k = p·v_k, and between radii r_bot < r_top
 * (both > b_k) it covers
 * ```
 * leg length     L_k = √(r_top² − b_k²) − √(r_bot² − b_k²)
 * angle          θ_k = acos(b_k/r_top) − acos(b_k/r_bot)            (> 0: the larger radius subtends more)
 * ```
 * Branch 1, the direct wave: the chord t_1 = 2R·sin(Δ/2)/v_1, which stays in the top shell while
 * its closest approach R·cos(Δ/2) ≥ r_1; beyond that arc the top shell brings no direct arrival
 * (the chord would cut into shell 2): `null` is returned, never a NaN.
 *
 * Branch n ≥ 2, the refracted wave of shell n, with p_n = r_{n−1}/v_n (the ray grazing the top of
 * shell n). It exists only when b_k = p_n·v_k < r_k for every shell k < n (Snell's law for
 * spheres; weaker than the flat condition v_k < v_n for the shells above the last one). Its
 * critical arc is Δ*_n = Σ_{k<n} 2θ_k(p_n). Two rays are offered (`refractedRay`):
 *
 * - `'turning-chord'` (default): the ray transmitted into shell n below the critical angle that
 *   turns within it as a straight chord, p < p_n, b_n = p·v_n ≥ r_n:
 *   ```
 *   Δ = Σ_{k<n} 2θ_k(p) + 2·acos(b_n/r_{n−1}),   t = Σ_{k<n} 2L_k(p)/v_k + 2·√(r_{n−1}² − b_n²)/v_n
 *   ```
 *   solved for p by bisection on b_n, the time evaluated as t = p·Δ + Σ 2τ_k(p) with
 *   τ_k = L_k/v_k − p·θ_k (stationary in p, so the bisection's rounding is second order). This is
 *   the true first arrival of constant-velocity shells (by Fermat's principle it beats the
 *   interface path below, which it contains as a limit), the
 *   ray METHODS 10.2 computes, and the image under earth flattening of the flat diving wave in the
 *   gradient v·exp(z_f/R) (`earth-flattening.ts`). It exists for Δ*_n ≤ Δ ≤ Δ_max,n, where Δ_max,n
 *   is the arc of the ray grazing the bottom of shell n (b_n = r_n; the half-space has no bottom,
 *   so Δ_max,N = π). Beyond Δ_max,n the shell brings no arrival: `null`.
 * - `'interface-arc'`: the kinematic head wave critically refracted along the interface at v_n,
 *   ```
 *   t = Σ_{k<n} 2·L_k(p_n)/v_k + r_{n−1}·(Δ − Σ_{k<n} 2θ_k(p_n))/v_n     for Δ*_n ≤ Δ ≤ π
 *   ```
 *   Earth flattening maps it exactly onto the flat head wave along the flattened interface. In a
 *   constant-velocity shell it is never a first arrival: the turning chord beats it by a time
 *   growing roughly like the cube of the arc travelled in shell n (0.017 s at 600 km in METHODS 10.2).
 *
 * Assumptions: the angular distance of the turning chord decreases monotonically with p, so that
 * each Δ has one ray (no triplication). This holds unless a shell above is nearly as fast as the
 * refractor after the R/r scaling (b_k close to r_k); with a triplication the ray found is one of
 * them, not necessarily the earliest. Kinematics only: no amplitudes, no reflections, no rays that
 * cross shell n into a deeper shell (those belong to branch n + 1).
 *
 * Misuse throws `RangeError` with a message: as `layered-model.ts` (velocities, thicknesses,
 * branch, offset), and in addition a radius not positive and finite, layers reaching the centre
 * (Σh ≥ R), an offset beyond half the circumference π·R (the shorter arc is the other way round).
 * A zero-thickness shell is allowed: it still bars slower shells below it, and as a refractor it
 * carries its turning-chord branch at its critical arc only.
 *
 * Sources: Muller1971 and Chapman1973 (spherical ray geometry and its flat image); the ray
 * formulas are written out above and checked in the tests against METHODS 10.2 and against
 * scipy minimisations of the travel time over the crossing points (Fermat's principle).
 *
 * @example
 * // METHODS check case 10.2 (computed from the stated model): 35 km of 6.3 km/s over 8.0 km/s, R = 6371 km.
 * const model = { velocities: [6300, 8000], thicknesses: [35_000], radius: 6_371_000 };
 * sphericalBranchTime(model, 2, 300_000); // 44.1714 s (turning chord)
 * sphericalFirstArrival(model, 300_000); // { time: 44.1714, branch: 2 }
 * flatEarthError(model, [300_000])[1]?.differences; // [0.1766] s: the flat formula is late
 */
import type { FirstArrival, LayeredModel } from './layered-model.js';
import { branchTime as flatBranchTime, criticalDistance as flatCriticalDistance } from './layered-model.js';
import { EARTH_MEAN_RADIUS } from './earth-flattening.js';

/** A layered model in a sphere: V_1…V_N (m/s), h_1…h_{N−1} (m), and the radius R (m, default `EARTH_MEAN_RADIUS`). */
export interface SphericalModel extends LayeredModel {
  readonly radius?: number;
}

/** Which ray stands for a refracted branch n ≥ 2 (see the module comment). */
export type RefractedRay = 'turning-chord' | 'interface-arc';

export interface SphericalOptions {
  /** Default `'turning-chord'`, the first arrival of constant-velocity shells. */
  readonly refractedRay?: RefractedRay;
}

/** Travel time of one branch at one offset with its derivatives over the model parameters. */
export interface SphericalTimeDerivatives {
  /** t, s. */
  readonly time: number;
  /** Ray parameter p = r·sin(i)/v, s/rad (dt/dΔ); dt/dx = p/R. */
  readonly rayParameter: number;
  /** ∂t/∂v_k, s per m/s, k = 1…N. */
  readonly velocityDerivatives: readonly number[];
  /** ∂t/∂h_k, s/m, k = 1…N − 1 (at fixed radius R: thickening a shell lowers every interface below it). */
  readonly thicknessDerivatives: readonly number[];
}

/** One branch's difference flat − spherical, aligned with the offsets asked for. */
export interface FlatEarthError {
  readonly branch: number;
  /** t_flat − t_sphere, s; null where either branch does not exist at that offset. */
  readonly differences: readonly (number | null)[];
}

/** Options of `flatErrorOffset`. */
export interface FlatErrorOffsetOptions extends SphericalOptions {
  /** Largest offset searched, m. Default: the farthest offset at which the spherical branch exists (≤ π·R). */
  readonly maxOffset?: number;
  /** Bisection stops when the bracket is this narrow, m. Default 1 m. */
  readonly offsetTolerance?: number;
}

/** Geometry shared by every branch of one model. */
interface Shells {
  readonly velocities: readonly number[];
  readonly thicknesses: readonly number[];
  readonly radius: number;
  /** r_0 = R, r_1, …, r_{N−1}, r_N = 0. */
  readonly radii: readonly number[];
}

/** One shell crossed by a ray: its leg length L, its angle θ and f(r) = √(r² − b²)/(v·r) at both ends. */
interface Leg {
  readonly length: number;
  readonly angle: number;
  readonly topSlowness: number;
  readonly bottomSlowness: number;
}

function assertModel(model: SphericalModel, caller: string): Shells {
  const { velocities, thicknesses } = model;
  const radius = model.radius ?? EARTH_MEAN_RADIUS;
  if (!(radius > 0) || !Number.isFinite(radius)) {
    throw new RangeError(`${caller}: radius must be positive and finite (metres; omit it for EARTH_MEAN_RADIUS), got ${radius}`);
  }
  if (velocities.length < 1) throw new RangeError(`${caller}: a spherical model needs at least one velocity`);
  velocities.forEach((velocity, index) => {
    if (!(velocity > 0) || !Number.isFinite(velocity)) {
      throw new RangeError(`${caller}: velocity of shell ${index + 1} must be positive and finite, got ${velocity}`);
    }
  });
  if (thicknesses.length !== velocities.length - 1) {
    throw new RangeError(
      `${caller}: ${velocities.length} velocities need ${velocities.length - 1} thicknesses (the last shell is the half-space), got ${thicknesses.length}`,
    );
  }
  const radii = [radius];
  let depth = 0;
  thicknesses.forEach((thickness, index) => {
    if (!(thickness >= 0) || !Number.isFinite(thickness)) {
      throw new RangeError(`${caller}: thickness of shell ${index + 1} must be zero or positive and finite, got ${thickness}`);
    }
    depth += thickness;
    radii.push(radius - depth);
  });
  if (!(depth < radius)) {
    throw new RangeError(`${caller}: the shells above the half-space are ${depth} m thick, reaching the centre of a sphere of radius ${radius} m; make them thinner or the radius larger`);
  }
  radii.push(0);
  return { velocities, thicknesses, radius, radii };
}

function assertBranch(shells: Shells, branch: number, caller: string): void {
  if (!Number.isInteger(branch) || branch < 1 || branch > shells.velocities.length) {
    throw new RangeError(`${caller}: branch must be an integer from 1 to ${shells.velocities.length}, got ${branch}`);
  }
}

function assertOffset(shells: Shells, offset: number, caller: string): void {
  if (!(offset >= 0) || !Number.isFinite(offset)) {
    throw new RangeError(`${caller}: offset must be zero or positive and finite (arc length along the surface, m), got ${offset}`);
  }
  if (offset > Math.PI * shells.radius) {
    throw new RangeError(
      `${caller}: offset ${offset} m exceeds half the circumference π·R = ${Math.PI * shells.radius} m; the shorter great-circle arc is the other way round — give that one`,
    );
  }
}

const velocityOf = (shells: Shells, shell: number): number => shells.velocities[shell - 1] ?? Number.NaN;
const radiusAt = (shells: Shells, index: number): number => shells.radii[index] ?? Number.NaN;

/** √(r² − b²) = √((r − b)(r + b)), keeping its digits when b is close to r. */
function halfChord(radius: number, impact: number): number {
  return Math.sqrt(Math.max(0, (radius - impact) * (radius + impact)));
}

/** acos(b/r) written as atan2(√(r² − b²), b): accurate near grazing, where acos loses half its digits. */
function angleFromClosestApproach(radius: number, impact: number): number {
  return Math.atan2(halfChord(radius, impact), impact);
}

/** Leg of a ray of parameter p through shell `shell` from its top to its bottom (b < r_bot assumed). */
function legThrough(shells: Shells, shell: number, rayParameter: number): Leg {
  const velocity = velocityOf(shells, shell);
  const impact = rayParameter * velocity;
  const top = radiusAt(shells, shell - 1);
  const bottom = radiusAt(shells, shell);
  const topHalf = halfChord(top, impact);
  const bottomHalf = halfChord(bottom, impact);
  // L = (r_top² − r_bot²)/(√(r_top² − b²) + √(r_bot² − b²)) and θ from sin θ = b·L/(r_top·r_bot),
  // cos θ = (b² + √(r_top² − b²)·√(r_bot² − b²))/(r_top·r_bot): no cancellation in thin shells.
  const sum = topHalf + bottomHalf;
  const length = sum > 0 ? ((top - bottom) * (top + bottom)) / sum : 0;
  const angle = Math.atan2(impact * length, impact * impact + topHalf * bottomHalf);
  return { length, angle, topSlowness: topHalf / (velocity * top), bottomSlowness: bottom > 0 ? bottomHalf / (velocity * bottom) : 0 };
}

/** p_n = r_{n−1}/v_n, or null when some shell above has b_k ≥ r_k (no critical refraction into shell n). */
function criticalRayParameter(shells: Shells, branch: number): number | null {
  const rayParameter = radiusAt(shells, branch - 1) / velocityOf(shells, branch);
  for (let shell = 1; shell < branch; shell += 1) {
    if (!(rayParameter * velocityOf(shells, shell) < radiusAt(shells, shell))) return null;
  }
  return rayParameter;
}

/** Σ_{k<n} of legs for parameter p. */
function legsAbove(shells: Shells, branch: number, rayParameter: number): Leg[] {
  const legs: Leg[] = [];
  for (let shell = 1; shell < branch; shell += 1) legs.push(legThrough(shells, shell, rayParameter));
  return legs;
}

/** Angular distance of the turning chord of branch n whose impact parameter in shell n is `impact`. */
function turningDistance(shells: Shells, branch: number, impact: number): number {
  const rayParameter = impact / velocityOf(shells, branch);
  let distance = 2 * angleFromClosestApproach(radiusAt(shells, branch - 1), impact);
  for (let shell = 1; shell < branch; shell += 1) distance += 2 * legThrough(shells, shell, rayParameter).angle;
  return distance;
}

interface Ray {
  readonly rayParameter: number;
  readonly legs: readonly Leg[];
  /** Half-chord √(r_{n−1}² − b_n²) in the turning shell (turning chord), or 0. */
  readonly turningHalfChord: number;
  /** Angle travelled along the interface (interface arc), or 0. */
  readonly interfaceAngle: number;
  readonly time: number;
}

/**
 * An angular distance this close (relative) below the critical arc counts as critical: offset/R of
 * an offset computed as R·Δ* may round to just below Δ*. 1e-12 is a few thousand ulps, far below
 * any physical meaning (6 µm at 6000 km).
 */
const CRITICAL_ROUNDING = 1e-12;

/** Bisection steps on b_n: each halves the bracket; 200 reach the spacing of doubles from any start. */
const MAX_BISECTION_STEPS = 200;

/** The ray of branch n at angular distance Δ, or null when the branch does not exist there. */
function rayOf(shells: Shells, branch: number, angularDistance: number, kind: RefractedRay): Ray | null {
  const velocity = velocityOf(shells, branch);
  const top = radiusAt(shells, branch - 1);
  if (branch === 1) {
    const impact = shells.radius * Math.cos(angularDistance / 2);
    if (impact < radiusAt(shells, 1)) return null;
    const turningHalfChord = shells.radius * Math.sin(angularDistance / 2);
    return { rayParameter: impact / velocity, legs: [], turningHalfChord, interfaceAngle: 0, time: (2 * turningHalfChord) / velocity };
  }
  const critical = criticalRayParameter(shells, branch);
  if (critical === null) return null;
  const criticalLegs = legsAbove(shells, branch, critical);
  const criticalDistance = criticalLegs.reduce((sum, leg) => sum + 2 * leg.angle, 0);
  if (angularDistance < criticalDistance * (1 - CRITICAL_ROUNDING)) return null;
  const legTime = (legs: readonly Leg[]): number => legs.reduce((sum, leg, index) => sum + (2 * leg.length) / velocityOf(shells, index + 1), 0);

  if (kind === 'interface-arc') {
    const interfaceAngle = Math.max(0, angularDistance - criticalDistance);
    return { rayParameter: critical, legs: criticalLegs, turningHalfChord: 0, interfaceAngle, time: legTime(criticalLegs) + (top * interfaceAngle) / velocity };
  }

  // Turning chord: b_n from r_n (grazing the bottom of shell n; 0 in the half-space) up to r_{n−1} (critical).
  const lowestImpact = radiusAt(shells, branch);
  if (angularDistance > turningDistance(shells, branch, lowestImpact) * (1 + CRITICAL_ROUNDING)) return null;
  let deep = lowestImpact; // Δ(deep) ≥ Δ
  let shallow = top; // Δ(shallow) = Δ*_n ≤ Δ
  for (let step = 0; step < MAX_BISECTION_STEPS; step += 1) {
    const middle = 0.5 * (deep + shallow);
    if (middle <= deep || middle >= shallow) break;
    if (turningDistance(shells, branch, middle) > angularDistance) deep = middle;
    else shallow = middle;
  }
  const impact = 0.5 * (deep + shallow);
  const rayParameter = impact / velocity;
  const legs = legsAbove(shells, branch, rayParameter);
  const turningHalfChord = halfChord(top, impact);
  // t = p·Δ + Σ 2τ_k(p), τ_k = L_k/v_k − p·θ_k: stationary in p, so the rounding left in p by the
  // bisection enters the time only to second order (Σ 2L_k/v_k alone would carry it to first order).
  const turningAngle = 2 * angleFromClosestApproach(top, impact);
  const tauSum =
    legs.reduce((sum, leg, index) => sum + 2 * (leg.length / velocityOf(shells, index + 1) - rayParameter * leg.angle), 0) +
    (2 * turningHalfChord) / velocity -
    rayParameter * turningAngle;
  return { rayParameter, legs, turningHalfChord, interfaceAngle: 0, time: rayParameter * angularDistance + tauSum };
}

function kindOf(options: SphericalOptions): RefractedRay {
  const kind = options.refractedRay ?? 'turning-chord';
  if (kind !== 'turning-chord' && kind !== 'interface-arc') {
    throw new RangeError(`refractedRay must be 'turning-chord' or 'interface-arc', got ${String(kind)}`);
  }
  return kind;
}

/**
 * Whether branch n can exist at all: the direct wave always; branch n ≥ 2 when the ray grazing the
 * top of shell n, p_n = r_{n−1}/v_n, has b_k = p_n·v_k < r_k in every shell above (Snell's law for
 * spheres). Unlike the flat test, a shell above may be slightly faster than the refractor as long
 * as v_k·r_{n−1}/r_k < v_n; the shell right above must still be slower.
 */
export function sphericalBranchExists(model: SphericalModel, branch: number): boolean {
  const shells = assertModel(model, 'sphericalBranchExists');
  assertBranch(shells, branch, 'sphericalBranchExists');
  return branch === 1 || criticalRayParameter(shells, branch) !== null;
}

/**
 * Critical distance R·Δ*_n = R·Σ_{k<n} 2θ_k(p_n): the nearest offset (arc length, m) at which
 * branch n emerges; the same for both ray kinds. Edges: 0 for branch 1; null for an impossible branch.
 */
export function sphericalCriticalDistance(model: SphericalModel, branch: number): number | null {
  const shells = assertModel(model, 'sphericalCriticalDistance');
  assertBranch(shells, branch, 'sphericalCriticalDistance');
  if (branch === 1) return 0;
  const critical = criticalRayParameter(shells, branch);
  if (critical === null) return null;
  return shells.radius * legsAbove(shells, branch, critical).reduce((sum, leg) => sum + 2 * leg.angle, 0);
}

/**
 * Farthest offset (arc length, m) at which branch n exists: for the direct wave and the turning
 * chord of a shell with a bottom, the arc of the ray grazing that bottom (direct wave:
 * 2R·acos(r_1/R)); π·R for the half-space (a single-shell sphere included) and for every
 * interface-arc head wave. Edges: null for an impossible branch.
 */
export function sphericalMaximumDistance(model: SphericalModel, branch: number, options: SphericalOptions = {}): number | null {
  const shells = assertModel(model, 'sphericalMaximumDistance');
  assertBranch(shells, branch, 'sphericalMaximumDistance');
  const kind = kindOf(options);
  if (branch > 1 && criticalRayParameter(shells, branch) === null) return null;
  if (branch === shells.velocities.length || (branch > 1 && kind === 'interface-arc')) return Math.PI * shells.radius;
  return shells.radius * Math.min(Math.PI, turningDistance(shells, branch, radiusAt(shells, branch)));
}

/**
 * Travel time of branch n at one offset (arc length along the surface), s; see the module comment
 * for both ray kinds. Edges: `null` when the branch does not exist there — an impossible branch,
 * an offset short of the critical distance (at it exactly the branch exists), or beyond
 * `sphericalMaximumDistance` (the direct wave once its chord leaves the top shell). Throws for a
 * branch outside 1…N, a negative offset or one beyond π·R.
 */
export function sphericalBranchTime(model: SphericalModel, branch: number, offset: number, options: SphericalOptions = {}): number | null {
  const shells = assertModel(model, 'sphericalBranchTime');
  assertBranch(shells, branch, 'sphericalBranchTime');
  assertOffset(shells, offset, 'sphericalBranchTime');
  return rayOf(shells, branch, offset / shells.radius, kindOf(options))?.time ?? null;
}

/**
 * Times of every branch at one offset, s, index 0 = branch 1; `null` where a branch does not
 * exist (as `sphericalBranchTime`).
 */
export function sphericalBranchTimes(model: SphericalModel, offset: number, options: SphericalOptions = {}): (number | null)[] {
  const shells = assertModel(model, 'sphericalBranchTimes');
  assertOffset(shells, offset, 'sphericalBranchTimes');
  const kind = kindOf(options);
  return shells.velocities.map((_, index) => rayOf(shells, index + 1, offset / shells.radius, kind)?.time ?? null);
}

function earliest(times: readonly (number | null)[]): FirstArrival | null {
  let best: FirstArrival | null = null;
  times.forEach((time, index) => {
    if (time !== null && (best === null || time < best.time)) best = { time, branch: index + 1 };
  });
  return best;
}

/**
 * First arrival at one offset: the earliest of the branches that exist there, with its branch
 * index (1 = direct wave). Edges: `null` when no branch exists at this offset —
 * unlike a flat model this can happen, in the gap between the end of the direct wave's chord and
 * the critical distance of a deeper branch, or behind an impossible branch (a shadow zone).
 */
export function sphericalFirstArrival(model: SphericalModel, offset: number, options: SphericalOptions = {}): FirstArrival | null {
  return earliest(sphericalBranchTimes(model, offset, options));
}

/** First-arrival times at many offsets, s, aligned with `offsets`; `null` in a shadow zone (see `sphericalFirstArrival`). */
export function sphericalSyntheticTimes(model: SphericalModel, offsets: readonly number[], options: SphericalOptions = {}): (number | null)[] {
  const shells = assertModel(model, 'sphericalSyntheticTimes');
  offsets.forEach((offset) => assertOffset(shells, offset, 'sphericalSyntheticTimes'));
  return offsets.map((offset) => earliest(sphericalBranchTimes(model, offset, options))?.time ?? null);
}

/**
 * Travel time of branch n with its exact derivatives over the velocities and thicknesses, as a
 * least-squares fit needs them (the Jacobian of `spherical-fit.ts`).
 *
 * Derivation (ours; checked against central differences in the tests). Write a branch as
 * t = p·Δ + 2·Σ_k τ_k(p) with τ_k = ∫ f_k(r) dr over the part of shell k crossed,
 * f_k(r) = √(r²/v_k² − p²)/r = √(r² − b_k²)/(v_k·r), so that ∂τ_k/∂(1/v_k) = L_k and ∂τ_k/∂p = −θ_k.
 * - Direct wave: t = 2R·sin(Δ/2)/v_1, ∂t/∂v_1 = −t/v_1, nothing else.
 * - Turning chord: t is stationary in p (∂t/∂p = Δ − Σ2θ = 0), so the derivatives are partial at
 *   fixed p: ∂t/∂v_k = −2L_k/v_k² (k < n), ∂t/∂v_n = −2√(r_{n−1}² − b_n²)/v_n², and for an
 *   interface r_j (j ≤ n − 1) ∂t/∂r_j = 2·[f_{j+1}(r_j) − f_j(r_j)].
 * - Interface arc: p = r_{n−1}/v_n is set by the model, ∂t/∂p = φ = Δ − Σ2θ_k (the arc along the
 *   interface), so ∂t/∂v_n = −φ·r_{n−1}/v_n², ∂t/∂v_k = −2L_k/v_k² (k < n),
 *   ∂t/∂r_j = 2·[f_{j+1}(r_j) − f_j(r_j)] (j < n − 1) and ∂t/∂r_{n−1} = −2·f_{n−1}(r_{n−1}) + φ/v_n.
 * - Thicknesses at fixed R: r_j = R − Σ_{i≤j} h_i, so ∂t/∂h_i = −Σ_{j=i}^{n−1} ∂t/∂r_j; thicknesses
 *   of shell n and below do not move the ray (zero).
 *
 * Edges: `null` where the branch does not exist (as `sphericalBranchTime`); the derivatives are
 * one-sided in effect at the critical distance and at the maximum distance (the branch ends there).
 */
export function sphericalTimeDerivatives(
  model: SphericalModel,
  branch: number,
  offset: number,
  options: SphericalOptions = {},
): SphericalTimeDerivatives | null {
  const shells = assertModel(model, 'sphericalTimeDerivatives');
  assertBranch(shells, branch, 'sphericalTimeDerivatives');
  assertOffset(shells, offset, 'sphericalTimeDerivatives');
  const kind = kindOf(options);
  const ray = rayOf(shells, branch, offset / shells.radius, kind);
  if (ray === null) return null;
  const count = shells.velocities.length;
  const velocityDerivatives = new Array<number>(count).fill(0);
  const thicknessDerivatives = new Array<number>(count - 1).fill(0);
  const velocity = velocityOf(shells, branch);
  if (branch === 1) {
    velocityDerivatives[0] = -ray.time / velocity;
    return { time: ray.time, rayParameter: ray.rayParameter, velocityDerivatives, thicknessDerivatives };
  }
  ray.legs.forEach((leg, index) => {
    velocityDerivatives[index] = (-2 * leg.length) / velocityOf(shells, index + 1) ** 2;
  });
  const top = radiusAt(shells, branch - 1);
  // ∂t/∂r_j for j = 1…n−1: the bottom of shell j and the top of shell j + 1.
  const radiusDerivatives: number[] = [];
  for (let interfaceIndex = 1; interfaceIndex < branch; interfaceIndex += 1) {
    const above = ray.legs[interfaceIndex - 1];
    const belowLeg = ray.legs[interfaceIndex];
    const aboveSlowness = above?.bottomSlowness ?? 0;
    let belowSlowness: number;
    if (belowLeg !== undefined) belowSlowness = belowLeg.topSlowness;
    else if (kind === 'turning-chord') belowSlowness = ray.turningHalfChord / (velocity * top);
    else belowSlowness = ray.interfaceAngle / (2 * velocity);
    radiusDerivatives.push(2 * (belowSlowness - aboveSlowness));
  }
  if (kind === 'turning-chord') velocityDerivatives[branch - 1] = (-2 * ray.turningHalfChord) / velocity ** 2;
  else velocityDerivatives[branch - 1] = (-ray.interfaceAngle * top) / velocity ** 2;
  for (let layer = 1; layer < branch; layer += 1) {
    let sum = 0;
    for (let interfaceIndex = layer; interfaceIndex < branch; interfaceIndex += 1) sum += radiusDerivatives[interfaceIndex - 1] ?? 0;
    thicknessDerivatives[layer - 1] = -sum;
  }
  return { time: ray.time, rayParameter: ray.rayParameter, velocityDerivatives, thicknessDerivatives };
}

/**
 * Flat-earth error t_flat − t_sphere of every branch at each offset, s: the flat formulas of
 * METHODS §1 (`layered-model.ts`) with the same velocities and thicknesses and the arc length as
 * the offset, against the spherical times (METHODS 10.2: the flat formula is late for Pn by
 * 0.072 s at 150 km and 0.398 s at 600 km). Index 0 = branch 1. Edges: null where either branch does not exist
 * at that offset (short of its critical distance in either geometry, an impossible branch, or past
 * the end of the spherical branch); an empty offset list gives empty arrays.
 */
export function flatEarthError(model: SphericalModel, offsets: readonly number[], options: SphericalOptions = {}): FlatEarthError[] {
  const shells = assertModel(model, 'flatEarthError');
  offsets.forEach((offset) => assertOffset(shells, offset, 'flatEarthError'));
  const kind = kindOf(options);
  const flat: LayeredModel = { velocities: shells.velocities, thicknesses: shells.thicknesses };
  return shells.velocities.map((_, index) => {
    const branch = index + 1;
    return {
      branch,
      differences: offsets.map((offset) => {
        const flatTime = flatBranchTime(flat, branch, offset);
        const sphericalTime = rayOf(shells, branch, offset / shells.radius, kind)?.time ?? null;
        return flatTime === null || sphericalTime === null ? null : flatTime - sphericalTime;
      }),
    };
  });
}

/**
 * Smallest offset (m) at which the flat-earth error |t_flat − t_sphere| of branch n (default the
 * deepest, N) exceeds `sigma` (s): the offset beyond which flat formulas misread these data by more
 * than their pick uncertainty (METHODS §10 suggests warning beyond ~150 km).
 *
 * Method: bisection on g(x) = t_flat − t_sphere over the offsets where both branches exist,
 * [max(flat critical distance, spherical critical distance), min(maxOffset, spherical maximum
 * distance)]. g increases with x (derived here: dt_sphere/dx = p/R ≤ r_{n−1}/(R·v_n) < 1/v_n =
 * dt_flat/dx, and for the direct wave p ≤ R/v_1), so |g| ≤ σ holds on one interval starting at
 * the left end and the answer is that end if |g| > σ there already (g < −σ), otherwise the point
 * where g rises through σ, found to within `offsetTolerance`; the offset returned is the right end
 * of the final bracket (one where |g| > σ holds).
 *
 * Edges: `null` when |g| ≤ σ over the whole range, when the range is empty (maxOffset short of the
 * critical distance), or when the branch is impossible in either geometry. Throws for σ not positive
 * and finite, a branch outside 1…N, a maxOffset or tolerance not positive and finite, a maxOffset
 * beyond π·R.
 */
export function flatErrorOffset(
  model: SphericalModel,
  sigma: number,
  branch: number = model.velocities.length,
  options: FlatErrorOffsetOptions = {},
): number | null {
  const shells = assertModel(model, 'flatErrorOffset');
  assertBranch(shells, branch, 'flatErrorOffset');
  if (!(sigma > 0) || !Number.isFinite(sigma)) throw new RangeError(`flatErrorOffset: sigma must be positive and finite (the pick uncertainty, s), got ${sigma}`);
  const tolerance = options.offsetTolerance ?? 1;
  if (!(tolerance > 0) || !Number.isFinite(tolerance)) throw new RangeError(`flatErrorOffset: offsetTolerance must be positive and finite (m), got ${tolerance}`);
  if (options.maxOffset !== undefined) {
    if (!(options.maxOffset > 0) || !Number.isFinite(options.maxOffset)) {
      throw new RangeError(`flatErrorOffset: maxOffset must be positive and finite (m), got ${options.maxOffset}`);
    }
    assertOffset(shells, options.maxOffset, 'flatErrorOffset');
  }
  const kind = kindOf(options);
  const flat: LayeredModel = { velocities: shells.velocities, thicknesses: shells.thicknesses };
  const flatStart = flatCriticalDistance(flat, branch);
  const sphericalStart = sphericalCriticalDistance(model, branch);
  const sphericalEnd = sphericalMaximumDistance(model, branch, { refractedRay: kind });
  if (flatStart === null || sphericalStart === null || sphericalEnd === null) return null;
  const start = Math.max(flatStart, sphericalStart);
  const end = Math.min(options.maxOffset ?? sphericalEnd, sphericalEnd);
  if (start > end) return null;
  const error = (offset: number): number =>
    (flatBranchTime(flat, branch, offset) ?? Number.NaN) - (rayOf(shells, branch, offset / shells.radius, kind)?.time ?? Number.NaN);
  if (Math.abs(error(start)) > sigma) return start;
  if (!(error(end) > sigma)) return null;
  let within = start;
  let beyond = end;
  while (beyond - within > tolerance) {
    const middle = 0.5 * (within + beyond);
    if (middle <= within || middle >= beyond) break;
    if (error(middle) > sigma) beyond = middle;
    else within = middle;
  }
  return beyond;
}
