/**
 * Time terms to depth (METHODS §7 "To depth"; the time-term method of ScheideggerWillmore1957,
 * WillmoreBancroft1960 and BerryWest1966): the thickness of the deepest layer above the refractor
 * and the depth to the refractor (the Moho, for Pn time terms) under one station or shot, from its
 * time term, a velocity model of the layers above and the refractor velocity.
 *
 * A time term is a one-way delay: for refractor n under layers 1…n−1 (velocities V_i, thicknesses
 * h_i),
 * ```
 * a = Σ_{i<n} h_i·q_{i,n},   q_{i,n} = √(1/V_i² − 1/V_n²)
 * h_{n−1} = (a − Σ_{i<n−1} h_i·q_{i,n}) / q_{n−1,n},    H = h_1 + … + h_{n−1}  (below the station)
 * depth below sea level = H − elevation   (elevation of the station above sea level, m)
 * ```
 * The arithmetic is `delayToDepth` (lib/depth/delay-depth.ts), shared with the delay-time methods,
 * so there is one implementation of the stripping; this module adds the time term's correlation
 * with the refractor slowness and the elevation.
 *
 * Standard errors are first order (the delta method): the time term, every overburden velocity,
 * every upper thickness and the refractor velocity are independent except for Cov(a, s) between
 * the time term and the refractor slowness of the same inversion, which enters through
 * Cov(a, V_n) = −V_n²·Cov(a, s):
 * ```
 * Var h = Σ_k (∂h/∂θ_k)²·Var θ_k + 2·(∂h/∂a)·(∂h/∂V_n)·Cov(a, V_n)
 * Var(H − elevation) = Var H + Var elevation
 * ```
 * A time term from `timeTerms` carries that covariance (`slownessCovariance`); it is null when the
 * inversion's SEs are LSQR's estimate, and then the term is taken as independent of s.
 *
 * Assumptions and cautions: plane layers under the station, the time term already corrected to
 * the datum (METHODS §8), and the layer velocities known. The delay belongs to where the rays cross
 * the interface, offset towards the shots by about h·tan θ (≈ 45 km for a 35 km crust, METHODS
 * §7), so crustal depths are smoothed regional values, not point depths under the station.
 *
 * Edges (refusals are values, as in `delayToDepth`; each has a test):
 * - `no-head-wave`: the refractor is not faster than some layer above (no critical refraction).
 * - `delay-below-upper-layers`: the time term is smaller than the upper layers take (for one layer:
 *   a negative time term) — the layer would have a negative thickness.
 * - No elevation: `depthBelowSeaLevel` is null.
 * Misuse throws a RangeError naming the field and the fix: what `delayToDepth` refuses (values or
 * SEs not finite, a negative SE, a velocity not positive, no overburden layer, a number of upper
 * thicknesses other than one less than the velocities), an elevation or its SE not finite or the
 * SE negative, and a covariance that is not finite or implies |correlation| > 1.
 *
 * @example
 * // METHODS check case 7.2: time term 3.3 s, crust 6.3 km/s over Pn 8.0 km/s.
 * timeTermDepth({ value: 3.3, standardError: 0.05 },
 *   { velocities: [{ value: 6300, standardError: 0 }], upperThicknesses: [] },
 *   { value: 8000, standardError: 0 });
 * // → { ok: true, thickness: { value: 33733, standardError: 511 }, depth: { value: 33733, … }, depthBelowSeaLevel: null, … }
 */
import { delayToDepth, type DelayDepth, type Overburden } from './delay-depth.js';
import type { Estimate } from './dipping-layer.js';
import type { TimeTermEstimate, TimeTermResult } from './time-term.js';

export type { Overburden } from './delay-depth.js';

export interface TimeTermDepthOptions {
  /** Elevation of the station (or shot) above sea level, m; a number has SE 0. */
  readonly elevation?: number | Estimate;
  /** Cov(a, s) of the time term and the refractor slowness, s²/m (from `timeTerms`). Default 0. */
  readonly timeTermSlownessCovariance?: number;
}

export type TimeTermDepth =
  | {
      readonly ok: true;
      /** h_{n−1}: thickness of the deepest layer above the refractor, m. */
      readonly thickness: Estimate;
      /** H = h_1 + … + h_{n−1}: depth to the refractor below the station, m. */
      readonly depth: Estimate;
      /** H − elevation, m (positive below sea level); null without an elevation. */
      readonly depthBelowSeaLevel: Estimate | null;
      /** 1/q_{n−1,n}, m/s. */
      readonly depthConversionFactor: Estimate;
    }
  | { readonly ok: false; readonly code: Extract<DelayDepth, { ok: false }>['code']; readonly message: string };

const CALLER = 'timeTermDepth';

function elevationEstimate(elevation: number | Estimate | undefined): Estimate | null {
  if (elevation === undefined) return null;
  const estimate = typeof elevation === 'number' ? { value: elevation, standardError: 0 } : elevation;
  if (!Number.isFinite(estimate.value) || !Number.isFinite(estimate.standardError) || estimate.standardError < 0) {
    throw new RangeError(`${CALLER}: options.elevation must be a finite height in m above sea level with a finite SE ≥ 0, got ${estimate.value} ± ${estimate.standardError}`);
  }
  return estimate;
}

/**
 * Thickness of the deepest overburden layer and depth to the refractor under one station from its
 * time term (module comment: formula, SEs, edges, misuse).
 */
export function timeTermDepth(timeTerm: Estimate, overburden: Overburden, refractorVelocity: Estimate, options: TimeTermDepthOptions = {}): TimeTermDepth {
  const elevation = elevationEstimate(options.elevation);
  const covariance = options.timeTermSlownessCovariance ?? 0;
  if (!Number.isFinite(covariance)) throw new RangeError(`${CALLER}: options.timeTermSlownessCovariance must be finite, got ${covariance}; pass the term's slownessCovariance or omit it`);
  const base = delayToDepth(timeTerm, overburden, refractorVelocity);
  if (!base.ok) return base;
  const velocity = refractorVelocity.value;
  // SE(s) = SE(V)/V²: the bound Cov(a, s)² ≤ Var a·Var s.
  const slownessSE = refractorVelocity.standardError / (velocity * velocity);
  if (Math.abs(covariance) > timeTerm.standardError * slownessSE * (1 + 1e-9) + Number.MIN_VALUE) {
    throw new RangeError(
      `${CALLER}: options.timeTermSlownessCovariance = ${covariance} s²/m exceeds SE(a)·SE(s) = ${timeTerm.standardError * slownessSE} (a correlation beyond ±1); pass the covariance of this term with this slowness, in s²/m`,
    );
  }
  // Cov(a, V) = −V²·Cov(a, s).
  const velocityCovariance = -velocity * velocity * covariance;
  const correlated = (estimate: Estimate, byDelay: number, byVelocity: number): Estimate => ({
    value: estimate.value,
    standardError: Math.sqrt(Math.max(0, estimate.standardError * estimate.standardError + 2 * byDelay * byVelocity * velocityCovariance)),
  });
  const thickness = correlated(base.thickness, base.thicknessSensitivities.delay, base.thicknessSensitivities.refractorVelocity);
  const depth = correlated(base.depth, base.depthSensitivities.delay, base.depthSensitivities.refractorVelocity);
  return {
    ok: true,
    thickness,
    depth,
    depthBelowSeaLevel:
      elevation === null ? null : { value: depth.value - elevation.value, standardError: Math.hypot(depth.standardError, elevation.standardError) },
    depthConversionFactor: base.depthConversionFactor,
  };
}

export interface TimeTermDepthsOptions {
  /** Which terms to convert. Default 'station'. */
  readonly side?: 'station' | 'shot';
  /** Elevations by id, m above sea level (a number has SE 0); ids not listed get no depth below sea level. */
  readonly elevations?: ReadonlyMap<string, number | Estimate>;
}

/**
 * Depths under every station (or shot) of a time-term inversion: each term with its
 * `slownessCovariance` and the inversion's refractor velocity (its SE included), over one
 * overburden model. Terms are returned in the inversion's order, each with its id. With a fixed
 * velocity the refractor velocity's SE is 0.
 */
export function timeTermDepths(result: TimeTermResult, overburden: Overburden, options: TimeTermDepthsOptions = {}): readonly ({ readonly id: string } & TimeTermDepth)[] {
  const side = options.side ?? 'station';
  if (side !== 'station' && side !== 'shot') throw new RangeError(`timeTermDepths: options.side must be 'station' or 'shot', got ${JSON.stringify(side)}`);
  const terms: readonly TimeTermEstimate[] = side === 'station' ? result.stationTerms : result.shotTerms;
  return terms.map((term) => {
    const elevation = options.elevations?.get(term.id);
    const depth = timeTermDepth(term, overburden, result.velocity, {
      ...(elevation === undefined ? {} : { elevation }),
      timeTermSlownessCovariance: term.slownessCovariance ?? 0,
    });
    return { id: term.id, ...depth };
  });
}
