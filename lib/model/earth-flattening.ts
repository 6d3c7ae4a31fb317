/**
 * Earth-flattening transformation (Muller1971; Chapman1973): maps a sphere of radius R with
 * velocity v(r) onto a flat half-space so that ray travel times and distances are preserved
 * exactly, letting the flat-layer formulas of METHODS §1–2 work at crustal scale (METHODS §10).
 *
 * ```
 * depth below the surface  z   = R − r                 (r = radius of the point)
 * flattened depth          z_f = R·ln(R/r)             inverse  r = R·exp(−z_f/R)
 * flattened velocity       v_f = v·R/r                 inverse  v = v_f·r/R = v_f·exp(−z_f/R)
 * flattened distance       x_f = R·Δ                   (Δ = angular distance, rad; = arc length on the surface)
 * ```
 *
 * Exact for kinematic ray quantities (times, distances, ray parameters p_flat = p_sphere/R), not
 * for amplitudes; densities are not transformed (Biswas1972 treats those for surface waves, not
 * needed for travel times). A shell of constant velocity becomes a flat layer whose velocity grows
 * with depth as v·exp(z_f/R); a flat layer of constant velocity maps back to a shell whose velocity
 * falls with depth as v_f·exp(−z_f/R). The centre (r = 0) maps to z_f = ∞.
 *
 * Edges (each throws `RangeError` naming the argument and the fix): a radius not positive and
 * finite; a depth negative, not finite, or at or below the centre (depth ≥ R); a flattened depth
 * negative or not finite; a velocity not positive and finite; an angular distance outside [0, π].
 * Depth 0 maps to z_f = 0 and leaves velocities unchanged.
 *
 * @example
 * // METHODS §10 / check case 10.2 (computed from the stated model): the Moho at 35 km.
 * flattenDepth(35_000); // 35 096.5 m
 * flattenVelocity(8040, 35_000); // 8084.41 m/s
 * unflattenDepth(35_096.49); // 35 000.0 m
 */
import type { LayeredModel } from './layered-model.js';

/**
 * Mean Earth radius R = 6 371 008.8 m, the GRS80 mean radius R₁ = (2a + b)/3 (Moritz2000; digits
 * as METHODS §10 states them). The default sphere of the flattening and of the spherical model.
 */
export const EARTH_MEAN_RADIUS = 6_371_008.8;

function assertRadius(radius: number, caller: string): void {
  if (!(radius > 0) || !Number.isFinite(radius)) {
    throw new RangeError(`${caller}: radius must be positive and finite (metres; the default is EARTH_MEAN_RADIUS = 6 371 008.8 m), got ${radius}`);
  }
}

function assertDepth(depth: number, radius: number, caller: string): void {
  if (!(depth >= 0) || !Number.isFinite(depth)) {
    throw new RangeError(`${caller}: depth must be zero or positive and finite (metres below the surface), got ${depth}`);
  }
  if (!(depth < radius)) {
    throw new RangeError(`${caller}: depth ${depth} m reaches the centre of a sphere of radius ${radius} m, which flattens to infinite depth; give a depth below the radius`);
  }
}

function assertFlatDepth(flatDepth: number, caller: string): void {
  if (!(flatDepth >= 0) || !Number.isFinite(flatDepth)) {
    throw new RangeError(`${caller}: flattened depth must be zero or positive and finite (metres), got ${flatDepth}`);
  }
}

function assertVelocity(velocity: number, caller: string, name = 'velocity'): void {
  if (!(velocity > 0) || !Number.isFinite(velocity)) {
    throw new RangeError(`${caller}: ${name} must be positive and finite (m/s), got ${velocity}`);
  }
}

/**
 * Flattened depth z_f = R·ln(R/r), r = R − depth, m (Muller1971). Grows faster than the depth:
 * z_f ≈ z + z²/(2R). Edges: depth 0 gives 0; throws for a depth < 0, ≥ R or not finite.
 */
export function flattenDepth(depth: number, radius: number = EARTH_MEAN_RADIUS): number {
  assertRadius(radius, 'flattenDepth');
  assertDepth(depth, radius, 'flattenDepth');
  // ln(R/r) = −log1p(−z/R): keeps its digits at depths far smaller than R.
  return -radius * Math.log1p(-depth / radius);
}

/**
 * Flattened velocity v_f = v·R/r at a point `depth` below the surface, m/s (Muller1971).
 * Edges: unchanged at depth 0; throws for a velocity not positive and finite or a bad depth.
 */
export function flattenVelocity(velocity: number, depth: number, radius: number = EARTH_MEAN_RADIUS): number {
  assertRadius(radius, 'flattenVelocity');
  assertVelocity(velocity, 'flattenVelocity');
  assertDepth(depth, radius, 'flattenVelocity');
  return (velocity * radius) / (radius - depth);
}

/**
 * Flattened distance x_f = R·Δ for an angular distance Δ (rad), m: the arc length along the
 * surface (Chapman1973). Edges: throws for Δ outside [0, π] (beyond π the shorter arc is the other
 * way round) or not finite.
 */
export function flattenedDistance(angularDistance: number, radius: number = EARTH_MEAN_RADIUS): number {
  assertRadius(radius, 'flattenedDistance');
  if (!(angularDistance >= 0 && angularDistance <= Math.PI)) {
    throw new RangeError(`flattenedDistance: angular distance must be within [0, π] rad (the shorter great-circle arc), got ${angularDistance}`);
  }
  return radius * angularDistance;
}

/**
 * Depth below the spherical surface of the point at flattened depth z_f: R − r = R·(1 − exp(−z_f/R)),
 * m (inverse of `flattenDepth`). Below R, approaching it as z_f → ∞ (the centre); beyond z_f ≈ 37·R
 * it rounds to R itself. Edges: 0 gives 0; throws for z_f negative or not finite.
 */
export function unflattenDepth(flatDepth: number, radius: number = EARTH_MEAN_RADIUS): number {
  assertRadius(radius, 'unflattenDepth');
  assertFlatDepth(flatDepth, 'unflattenDepth');
  return -radius * Math.expm1(-flatDepth / radius);
}

/**
 * Spherical velocity v = v_f·r/R = v_f·exp(−z_f/R) of a point at flattened depth z_f, m/s (inverse
 * of `flattenVelocity`). Edges: unchanged at z_f = 0; throws for a velocity not positive and finite
 * or z_f negative or not finite.
 */
export function unflattenVelocity(flatVelocity: number, flatDepth: number, radius: number = EARTH_MEAN_RADIUS): number {
  assertRadius(radius, 'unflattenVelocity');
  assertVelocity(flatVelocity, 'unflattenVelocity', 'flattened velocity');
  assertFlatDepth(flatDepth, 'unflattenVelocity');
  return flatVelocity * Math.exp(-flatDepth / radius);
}

/** One flat layer mapped back into the sphere: where it lies and its velocity at its top and bottom. */
export interface UnflattenedLayer {
  /** 1-based index in the flat stack. */
  readonly layer: number;
  /** The flat layer's constant velocity v_f, m/s. */
  readonly flatVelocity: number;
  /** Flattened depths of its top and bottom, m; bottom null for the half-space. */
  readonly flatTop: number;
  readonly flatBottom: number | null;
  /** Depths below the spherical surface of its top and bottom, m; bottom null for the half-space. */
  readonly topDepth: number;
  readonly bottomDepth: number | null;
  /** bottomDepth − topDepth, m; null for the half-space. Always less than the flat thickness. */
  readonly thickness: number | null;
  /** Spherical velocity v_f·exp(−z_f/R) just below its top and just above its bottom, m/s; bottom null for the half-space. */
  readonly topVelocity: number;
  readonly bottomVelocity: number | null;
}

/**
 * A flat layer stack, as found by flat formulas in flattened coordinates (velocities v_f and
 * thicknesses in z_f), mapped back into the sphere (Muller1971; Chapman1973): each layer's top and
 * bottom depth R·(1 − exp(−z_f/R)) and its velocity v_f·exp(−z_f/R) there. A constant flat layer
 * is a shell whose velocity decreases with depth, so the top and bottom velocities differ; the
 * half-space has only a top.
 *
 * Edges: a single velocity (a half-space alone) gives one layer with top 0; a zero thickness
 * gives a layer whose top and bottom coincide. Throws for velocities not positive and finite,
 * thicknesses negative or not finite, or a thickness count other than N − 1.
 *
 * @example
 * // METHODS 10.2 flattened: 6.3 km/s crust over a Moho at z_f = 35 096.5 m, mantle v_f = 8084.4 m/s.
 * unflattenLayers({ velocities: [6300, 8084.41], thicknesses: [35_096.49] })[1];
 * // { topDepth: 35 000.0, topVelocity: 8040.0, bottomDepth: null, … }
 */
export function unflattenLayers(flat: LayeredModel, radius: number = EARTH_MEAN_RADIUS): UnflattenedLayer[] {
  assertRadius(radius, 'unflattenLayers');
  const { velocities, thicknesses } = flat;
  if (velocities.length < 1) throw new RangeError('unflattenLayers: the flat stack needs at least one velocity (the half-space)');
  velocities.forEach((velocity, index) => assertVelocity(velocity, 'unflattenLayers', `flattened velocity of layer ${index + 1}`));
  if (thicknesses.length !== velocities.length - 1) {
    throw new RangeError(
      `unflattenLayers: ${velocities.length} velocities need ${velocities.length - 1} thicknesses (the last layer is the half-space), got ${thicknesses.length}`,
    );
  }
  thicknesses.forEach((thickness, index) => {
    if (!(thickness >= 0) || !Number.isFinite(thickness)) {
      throw new RangeError(`unflattenLayers: flattened thickness of layer ${index + 1} must be zero or positive and finite (metres), got ${thickness}`);
    }
  });
  const layers: UnflattenedLayer[] = [];
  let flatTop = 0;
  velocities.forEach((flatVelocity, index) => {
    const flatThickness = thicknesses[index];
    const flatBottom = flatThickness === undefined ? null : flatTop + flatThickness;
    const topDepth = unflattenDepth(flatTop, radius);
    const bottomDepth = flatBottom === null ? null : unflattenDepth(flatBottom, radius);
    layers.push({
      layer: index + 1,
      flatVelocity,
      flatTop,
      flatBottom,
      topDepth,
      bottomDepth,
      thickness: bottomDepth === null ? null : bottomDepth - topDepth,
      topVelocity: unflattenVelocity(flatVelocity, flatTop, radius),
      bottomVelocity: flatBottom === null ? null : unflattenVelocity(flatVelocity, flatBottom, radius),
    });
    if (flatBottom !== null) flatTop = flatBottom;
  });
  return layers;
}
