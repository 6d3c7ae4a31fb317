/**
 * Geodesics on the WGS84 ellipsoid: a thin typed wrapper over the `geographiclib-geodesic`
 * package (Karney's algorithms, `Karney2013`), plus the mean Earth radius used to flatten
 * crustal-scale distances (METHODS §10).
 *
 * - `geodesicInverse`: the inverse problem — shortest distance and the azimuths at both ends
 *   between two points;
 * - `geodesicDirect`: the direct problem — where a geodesic of given start, azimuth and length ends;
 * - `MEAN_EARTH_RADIUS` and `arcDistance`: the angular distance Δ = s₁₂/R of the flattening
 *   transformation x_f = R·Δ.
 *
 * Angles are in decimal degrees, azimuths clockwise from north, lengths in metres. The ellipsoid
 * is WGS84, a = 6 378 137 m, f = 1/298.257223563. Karney's solution is accurate to about 15 nm
 * for any pair of points, antipodal ones included; the older Vincenty (1975) iteration agrees to
 * 0.1 mm on survey-scale lines but can fail to converge near antipodes (METHODS §10), which is why
 * this one is used.
 *
 * Edges (shared by both problems):
 * - a latitude must be finite and within [−90°, 90°] and a longitude, azimuth or distance must be
 *   finite, else `RangeError` naming the argument and the fix;
 * - any finite longitude is accepted (so the pick table's 0–360° style works) and results are
 *   normalised to [−180°, 180°]; an azimuth is normalised likewise;
 * - at a pole (latitude ±90°) azimuths follow Karney's convention: the pole is the limit of a point
 *   approached along its own meridian `lon`, so an azimuth there is measured from that meridian.
 */
import geographiclib from 'geographiclib-geodesic';
import { EARTH_MEAN_RADIUS } from '../model/earth-flattening.js';

const WGS84 = geographiclib.Geodesic.WGS84;

/** WGS84 equatorial radius a, metres (the package's own constant, `Karney2013`). */
export const WGS84_EQUATORIAL_RADIUS: number = WGS84.a;
/** WGS84 flattening f = 1/298.257223563 (the package's own constant). */
export const WGS84_FLATTENING: number = WGS84.f;

/**
 * Mean Earth radius R = 6 371 008.8 m: the GRS80 mean radius R₁ = (2a + b)/3 = 6 371 008.7714 m
 * (`Moritz2000`; digits from memory, checked in the tests against (2a + b)/3 of WGS84, which
 * differs from GRS80 by 0.1 mm in b), rounded to 0.1 m as METHODS §10 states it. The radius of the
 * sphere the Earth-flattening transformation assumes.
 */
export const MEAN_EARTH_RADIUS = EARTH_MEAN_RADIUS;

/** Solution of the inverse problem between point 1 and point 2. */
export interface GeodesicInverse {
  /** Geodesic (shortest) distance s₁₂, metres, ≥ 0. */
  readonly distance: number;
  /** Azimuth of the geodesic at point 1, degrees clockwise from north, in [−180, 180] (α₁). */
  readonly azimuth1: number;
  /** Forward azimuth of the geodesic at point 2, degrees, in [−180, 180] (α₂). */
  readonly azimuth2: number;
}

/** Solution of the direct problem: the end point and the forward azimuth there. */
export interface GeodesicDirect {
  /** Latitude of the end point, degrees, in [−90, 90]. */
  readonly lat: number;
  /** Longitude of the end point, degrees, normalised to [−180, 180]. */
  readonly lon: number;
  /** Forward azimuth at the end point, degrees, in [−180, 180] (α₂). */
  readonly azimuth2: number;
}

function requireLatitude(where: string, name: string, value: number): void {
  if (!Number.isFinite(value) || value < -90 || value > 90) {
    throw new RangeError(
      `${where}: ${name} must be a latitude in decimal degrees from -90 to 90, got ${value}; check that latitude and longitude are not swapped and are not in radians or degrees-minutes`,
    );
  }
}

function requireFinite(where: string, name: string, value: number, what: string): void {
  if (!Number.isFinite(value)) {
    throw new RangeError(`${where}: ${name} must be a finite ${what}, got ${value}; pass a number, not NaN or an unset value`);
  }
}

/**
 * The inverse geodesic problem on WGS84 (`Karney2013`): the shortest distance between two points
 * and the azimuths of that geodesic at both ends.
 *
 * Edges: coincident points give distance 0 and the azimuths of a meridian (0° or 180° by
 * Karney's convention), never NaN; for antipodal or nearly antipodal points the distance is right
 * but the shortest geodesic is not unique, and the azimuths are one of the solutions. Inputs as in
 * the module comment (RangeError on a bad latitude or a non-finite value).
 *
 * @example
 * // METHODS check case 10.3 (computed, not published)
 * geodesicInverse(47, 10, 48.5, 12.5);
 * // → { distance: 250888.3050, azimuth1: 47.421694, azimuth2: 49.272531 }
 */
export function geodesicInverse(lat1: number, lon1: number, lat2: number, lon2: number): GeodesicInverse {
  requireLatitude('geodesicInverse', 'lat1', lat1);
  requireFinite('geodesicInverse', 'lon1', lon1, 'longitude in decimal degrees');
  requireLatitude('geodesicInverse', 'lat2', lat2);
  requireFinite('geodesicInverse', 'lon2', lon2, 'longitude in decimal degrees');
  const solution = WGS84.Inverse(lat1, lon1, lat2, lon2, geographiclib.Geodesic.STANDARD);
  const { s12, azi1, azi2 } = solution;
  if (s12 === undefined || azi1 === undefined || azi2 === undefined) {
    throw new RangeError('geodesicInverse: the geodesic library returned no distance or azimuth; the STANDARD output mask must ask for them');
  }
  return { distance: s12, azimuth1: azi1, azimuth2: azi2 };
}

/**
 * The direct geodesic problem on WGS84 (`Karney2013`): the point reached by following the
 * geodesic that leaves (lat, lon) at `azimuth` for `distance` metres.
 *
 * Edges: distance 0 returns the start point (longitude normalised) and its azimuth; a negative
 * distance walks backwards along the same geodesic; a distance beyond half the meridian
 * (≈ 20 004 km) carries on past the antipode, so the geodesic is then no longer the shortest path
 * to its end. Inputs as in the module comment.
 *
 * @example
 * geodesicDirect(47, 10, 47.421694, 250888.3050);
 * // → { lat: 48.5, lon: 12.5, azimuth2: 49.272531 } (to about 1e-8°)
 */
export function geodesicDirect(lat: number, lon: number, azimuth: number, distance: number): GeodesicDirect {
  requireLatitude('geodesicDirect', 'lat', lat);
  requireFinite('geodesicDirect', 'lon', lon, 'longitude in decimal degrees');
  requireFinite('geodesicDirect', 'azimuth', azimuth, 'azimuth in degrees clockwise from north');
  requireFinite('geodesicDirect', 'distance', distance, 'distance in metres');
  const solution = WGS84.Direct(lat, lon, azimuth, distance, geographiclib.Geodesic.STANDARD);
  const { lat2, lon2, azi2 } = solution;
  if (lat2 === undefined || lon2 === undefined || azi2 === undefined) {
    throw new RangeError('geodesicDirect: the geodesic library returned no end point; the STANDARD output mask must ask for it');
  }
  return { lat: lat2, lon: lon2, azimuth2: azi2 };
}

/**
 * A longitude reduced to (−180°, 180°]: 190 → −170, −180 → 180, 360 → 0; a longitude already in
 * that range is returned unchanged. For naming one place one way (keys, output); the geodesic
 * routines themselves accept any finite longitude.
 *
 * Edges: a non-finite longitude → RangeError.
 */
export function normaliseLongitude(lon: number): number {
  requireFinite('normaliseLongitude', 'lon', lon, 'longitude in decimal degrees');
  // Already in range: returned untouched (the arithmetic below would round 179.9 to 179.89999999999998).
  if (lon > -180 && lon <= 180) return lon;
  const wrapped = ((((lon + 180) % 360) + 360) % 360) - 180;
  return wrapped === -180 ? 180 : wrapped;
}

/**
 * Angular distance Δ = s/R, radians, of a geodesic distance `distance` (metres) on the sphere of
 * the mean radius `MEAN_EARTH_RADIUS` — the Δ of the Earth-flattening transformation x_f = R·Δ
 * (METHODS §10; `Muller1971`). With this R, x_f equals the geodesic distance itself; Δ is what
 * the spherical formulas (r = R − depth, v_f = v·R/r) need.
 *
 * Edges: `distance` must be finite and ≥ 0 (a geodesic length), else RangeError; 0 gives 0.
 *
 * @example
 * arcDistance(250888.3050); // → 0.0393796 rad (2.2563°)
 */
export function arcDistance(distance: number): number {
  if (!Number.isFinite(distance) || distance < 0) {
    throw new RangeError(`arcDistance: distance must be a finite geodesic length in metres, ≥ 0, got ${distance}; pass the shot–station distance from geodesicInverse`);
  }
  return distance / MEAN_EARTH_RADIUS;
}
