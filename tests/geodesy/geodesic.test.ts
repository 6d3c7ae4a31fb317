/**
 * Geodesics on WGS84 (lib/geodesy/geodesic.ts) against:
 * - 20 lines of Karney's published geodesic test set (GeodTest), copied from the npm package
 *   geographiclib-geodesic 2.2.0 into tests/fixtures/geodesy/geodtest-20.txt (provenance in that
 *   folder's README);
 * - METHODS.md §10 check case 10.3 — values computed with GeographicLib-Python 2.0 for the
 *   method notes, not published;
 * - the definition of the mean radius R₁ = (2a + b)/3 (Moritz 2000, from memory) and the WGS84
 *   defining constants a = 6378137 m, f = 1/298.257223563 (as METHODS §10 states them);
 * - a great-circle (haversine) twin written here for the sphere comparison of case 10.3.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  arcDistance, geodesicDirect, geodesicInverse, MEAN_EARTH_RADIUS, normaliseLongitude, WGS84_EQUATORIAL_RADIUS, WGS84_FLATTENING,
} from '../../lib/geodesy/geodesic.js';
import { expectWithin } from '../helpers/expect-within.js';

/** The project's asked accuracy for distances: 1 mm (the package's own test asks 1e-8 m). */
const DISTANCE_TOLERANCE = 1e-3;
/** The project's asked accuracy for angles: 1e-9° (≈ 0.1 mm on the Earth's surface). */
const ANGLE_TOLERANCE = 1e-9;
const GEODTEST_SOURCE = "Karney's GeodTest line (geographiclib-geodesic 2.2.0 test/geodesictest.js, copied to tests/fixtures/geodesy/geodtest-20.txt)";

interface GeodTestCase {
  readonly lat1: number;
  readonly lon1: number;
  readonly azi1: number;
  readonly lat2: number;
  readonly lon2: number;
  readonly azi2: number;
  readonly s12: number;
}

function readGeodTest(): GeodTestCase[] {
  const text = readFileSync(new URL('../fixtures/geodesy/geodtest-20.txt', import.meta.url), 'utf8');
  return text
    .split('\n')
    .filter((line) => line.trim() !== '' && !line.startsWith('#'))
    .map((line) => {
      const fields = line.trim().split(/\s+/).map(Number);
      expect(fields.length, `GeodTest line "${line}" should have 12 fields`).toBe(12);
      const [lat1, lon1, azi1, lat2, lon2, azi2, s12] = fields as [number, number, number, number, number, number, number];
      return { lat1, lon1, azi1, lat2, lon2, azi2, s12 };
    });
}

/** Difference of two angles in degrees, reduced to [−180, 180] (so 180 and −180 agree). */
function angleDifference(left: number, right: number): number {
  const difference = (((left - right) % 360) + 540) % 360 - 180;
  return difference;
}

function expectAngle(actual: number, expected: number, tolerance: number, source: string): void {
  expectWithin(angleDifference(actual, expected), 0, tolerance, `${source} (angle ${actual} vs ${expected})`);
}

/** Great-circle distance on a sphere of radius `radius` (haversine), the twin of case 10.3's sphere. */
function haversine(lat1: number, lon1: number, lat2: number, lon2: number, radius: number): number {
  const degree = Math.PI / 180;
  const half = Math.sin(((lat2 - lat1) * degree) / 2) ** 2 + Math.cos(lat1 * degree) * Math.cos(lat2 * degree) * Math.sin(((lon2 - lon1) * degree) / 2) ** 2;
  return 2 * radius * Math.asin(Math.sqrt(half));
}

describe('geodesicInverse and geodesicDirect against GeodTest', () => {
  const cases = readGeodTest();

  it('the fixture holds the 20 cases of the package test', () => {
    expect(cases).toHaveLength(20);
  });

  it('geodesicInverse gives GeodTest s12 to 1 mm and azi1, azi2 to 1e-9°', () => {
    cases.forEach((testCase, index) => {
      const result = geodesicInverse(testCase.lat1, testCase.lon1, testCase.lat2, testCase.lon2);
      expectWithin(result.distance, testCase.s12, DISTANCE_TOLERANCE, `${GEODTEST_SOURCE} #${index + 1}, s12`);
      expectAngle(result.azimuth1, testCase.azi1, ANGLE_TOLERANCE, `${GEODTEST_SOURCE} #${index + 1}, azi1`);
      expectAngle(result.azimuth2, testCase.azi2, ANGLE_TOLERANCE, `${GEODTEST_SOURCE} #${index + 1}, azi2`);
    });
  });

  it('geodesicDirect reaches GeodTest lat2, lon2 (modulo 360°) and azi2 to 1e-9°', () => {
    cases.forEach((testCase, index) => {
      const result = geodesicDirect(testCase.lat1, testCase.lon1, testCase.azi1, testCase.s12);
      expectWithin(result.lat, testCase.lat2, ANGLE_TOLERANCE, `${GEODTEST_SOURCE} #${index + 1}, lat2`);
      expectAngle(result.lon, testCase.lon2, ANGLE_TOLERANCE, `${GEODTEST_SOURCE} #${index + 1}, lon2`);
      expectAngle(result.azimuth2, testCase.azi2, ANGLE_TOLERANCE, `${GEODTEST_SOURCE} #${index + 1}, azi2`);
      expect(result.lon >= -180 && result.lon <= 180, `lon ${result.lon} normalised`).toBe(true);
    });
  });
});

describe('geodesicInverse against METHODS check case 10.3 (computed with GeographicLib-Python 2.0, not published)', () => {
  /** Printed to 1e-4 m: half a unit of the last digit. */
  const PRINTED_METRES = 0.5e-4;
  const SOURCE = 'METHODS 10.3 (computed, not published)';
  const CASES = [
    { from: [47.0, 10.0], to: [48.5, 12.5], distance: 250888.305, sphereErrorPercent: -0.16 },
    { from: [46.0, 8.0], to: [46.0, 8.5], distance: 38731.586, sphereErrorPercent: -0.28 },
    { from: [60.0, 20.0], to: [62.0, 30.0], distance: 584413.5741, sphereErrorPercent: -0.34 },
  ] as const;

  it('geodesicInverse gives the three distances to their printed 0.1 mm', () => {
    for (const testCase of CASES) {
      const result = geodesicInverse(testCase.from[0], testCase.from[1], testCase.to[0], testCase.to[1]);
      expectWithin(result.distance, testCase.distance, PRINTED_METRES, `${SOURCE}, ${testCase.from} → ${testCase.to}`);
    }
  });

  it('geodesicInverse gives azi1 = 47.421694° for (47° N, 10° E) → (48.5° N, 12.5° E), to its printed digits', () => {
    const result = geodesicInverse(47, 10, 48.5, 12.5);
    expectWithin(result.azimuth1, 47.421694, 0.5e-6, `${SOURCE}, azi1`);
  });

  it('a sphere of MEAN_EARTH_RADIUS is off by −0.16 %, −0.28 %, −0.34 % (printed to 0.01 %)', () => {
    for (const testCase of CASES) {
      const sphere = haversine(testCase.from[0], testCase.from[1], testCase.to[0], testCase.to[1], MEAN_EARTH_RADIUS);
      const ellipsoid = geodesicInverse(testCase.from[0], testCase.from[1], testCase.to[0], testCase.to[1]).distance;
      const errorPercent = ((sphere - ellipsoid) / ellipsoid) * 100;
      expectWithin(errorPercent, testCase.sphereErrorPercent, 0.005, `${SOURCE}, sphere error ${testCase.from} → ${testCase.to}`);
    }
  });
});

describe('the ellipsoid and the mean radius', () => {
  it('WGS84 constants are a = 6378137 m and f = 1/298.257223563 (METHODS §10)', () => {
    expect(WGS84_EQUATORIAL_RADIUS).toBe(6378137);
    expectWithin(1 / WGS84_FLATTENING, 298.257223563, 1e-9, 'WGS84 inverse flattening (METHODS §10)');
  });

  it('MEAN_EARTH_RADIUS is (2a + b)/3 = 6371008.7714 m rounded to 0.1 m (GRS80 mean radius R1, Moritz 2000, from memory)', () => {
    const polarRadius = WGS84_EQUATORIAL_RADIUS * (1 - WGS84_FLATTENING);
    const meanRadius = (2 * WGS84_EQUATORIAL_RADIUS + polarRadius) / 3;
    expectWithin(meanRadius, 6371008.7714, 1e-3, 'R1 = (2a + b)/3 from WGS84 (GRS80 b differs by 0.1 mm)');
    expectWithin(MEAN_EARTH_RADIUS, meanRadius, 0.05, 'MEAN_EARTH_RADIUS = R1 rounded to 0.1 m (METHODS §10: 6371.0088 km)');
  });

  it('arcDistance is s/R: 250888.3050 m → 0.0393797 rad (METHODS 10.3 distance over 6371.0088 km)', () => {
    expectWithin(arcDistance(250888.305), 250888.305 / 6371008.8, 1e-15, 'Δ = s12/R (METHODS §10)');
    expectWithin(arcDistance(250888.305), 0.0393797, 0.5e-7, 'Δ printed to 1e-7 rad');
    expect(arcDistance(0)).toBe(0);
  });

  it('arcDistance refuses a negative or non-finite distance with a RangeError naming distance', () => {
    expect(() => arcDistance(-1)).toThrow(RangeError);
    expect(() => arcDistance(-1)).toThrow(/distance must be a finite geodesic length/);
    expect(() => arcDistance(Number.NaN)).toThrow(/distance/);
    expect(() => arcDistance(Number.POSITIVE_INFINITY)).toThrow(/distance/);
  });
});

describe('geodesicInverse and geodesicDirect edges', () => {
  it('geodesicInverse refuses a latitude beyond ±90° or a non-finite value, naming the argument', () => {
    expect(() => geodesicInverse(91, 0, 0, 0)).toThrow(/lat1 must be a latitude .* got 91; check that latitude and longitude are not swapped/);
    expect(() => geodesicInverse(0, 0, -90.5, 0)).toThrow(/lat2/);
    expect(() => geodesicInverse(Number.NaN, 0, 0, 0)).toThrow(/lat1/);
    expect(() => geodesicInverse(0, Number.NaN, 0, 0)).toThrow(/lon1 must be a finite longitude/);
    expect(() => geodesicInverse(0, 0, 0, Number.POSITIVE_INFINITY)).toThrow(/lon2/);
    expect(() => geodesicInverse(0, 0, 0, Number.NaN)).toThrow(RangeError);
  });

  it('geodesicDirect refuses a bad latitude or a non-finite longitude, azimuth or distance, naming it', () => {
    expect(() => geodesicDirect(-91, 0, 0, 0)).toThrow(/geodesicDirect: lat must be a latitude/);
    expect(() => geodesicDirect(0, Number.NaN, 0, 0)).toThrow(/lon must be a finite longitude/);
    expect(() => geodesicDirect(0, 0, Number.POSITIVE_INFINITY, 0)).toThrow(/azimuth must be a finite azimuth/);
    expect(() => geodesicDirect(0, 0, 0, Number.NaN)).toThrow(/distance must be a finite distance/);
  });

  it('geodesicInverse of coincident points gives distance 0 and meridian azimuths (0° or ±180°), never NaN', () => {
    const result = geodesicInverse(47, 10, 47, 10);
    expect(result.distance).toBe(0);
    for (const azimuth of [result.azimuth1, result.azimuth2]) {
      expect([0, 180].includes(Math.abs(azimuth)), `azimuth ${azimuth} of a meridian`).toBe(true);
    }
  });

  it('geodesicInverse of antipodal equator points gives half the meridian, 20003931.4586 m (WGS84 quarter meridian 10001965.7293 m, from memory), and azimuths that lead there', () => {
    const result = geodesicInverse(0, 0, 0, 180);
    expectWithin(result.distance, 2 * 10001965.7293, DISTANCE_TOLERANCE, 'twice the WGS84 quarter meridian (from memory)');
    const reached = geodesicDirect(0, 0, result.azimuth1, result.distance);
    expectWithin(reached.lat, 0, ANGLE_TOLERANCE, 'one of the antipodal geodesics ends on the equator');
    expectAngle(reached.lon, 180, ANGLE_TOLERANCE, 'one of the antipodal geodesics ends at 180°');
  });

  it('geodesicInverse accepts any finite longitude (0–360° style): 370° is 10°', () => {
    const unrolled = geodesicInverse(47, 370, 48.5, 12.5 - 360);
    const plain = geodesicInverse(47, 10, 48.5, 12.5);
    expectWithin(unrolled.distance, plain.distance, 1e-9, 'same points, longitudes ±360°');
    expectAngle(unrolled.azimuth1, plain.azimuth1, 1e-12, 'same azimuth');
  });

  it('geodesicDirect normalises the end longitude to [−180°, 180°] and returns the start for distance 0', () => {
    const start = geodesicDirect(10, 350, 33, 0);
    expectWithin(start.lat, 10, 1e-12, 'distance 0 stays at the start');
    expectWithin(start.lon, -10, 1e-12, '350° normalised to −10°');
    expectAngle(start.azimuth2, 33, 1e-12, 'azimuth kept');
  });

  it('geodesicDirect with a negative distance walks backwards along the same geodesic', () => {
    const backwards = geodesicDirect(47, 10, 60, -100_000);
    const turned = geodesicDirect(47, 10, 240, 100_000);
    expectWithin(backwards.lat, turned.lat, 1e-12, 'same end latitude');
    expectWithin(backwards.lon, turned.lon, 1e-12, 'same end longitude');
    expectAngle(backwards.azimuth2, turned.azimuth2 + 180, 1e-9, 'the forward azimuth of the same geodesic');
  });

  it('geodesicDirect beyond half the meridian carries on past the antipode, so its end is nearer than its length', () => {
    const length = 30_000_000;
    const end = geodesicDirect(0, 0, 0, length);
    // Up the meridian over the North Pole, down the 180° meridian, past the equator: about 9996 km into the south.
    expect(end.lat).toBeLessThan(-89);
    expect(geodesicInverse(0, 0, end.lat, end.lon).distance).toBeLessThan(length / 2);
  });

  it('at a pole, azimuths are measured from the meridian of the given longitude (Karney\'s convention, from memory)', () => {
    const fromMeridian0 = geodesicInverse(90, 0, 89, 50).azimuth1;
    const fromMeridian30 = geodesicInverse(90, 30, 89, 50).azimuth1;
    expectAngle(fromMeridian30 - fromMeridian0, 30, 1e-9, 'azimuth at the pole shifts with the pole point\'s longitude');
    expectWithin(geodesicInverse(90, 0, 89, 50).distance, geodesicInverse(90, 30, 89, 50).distance, 1e-9, 'the distance does not depend on it');
  });

  it('normaliseLongitude reduces to (−180°, 180°] and leaves in-range values untouched', () => {
    expect(normaliseLongitude(190)).toBeCloseTo(-170, 12);
    expect(normaliseLongitude(-180)).toBe(180);
    expect(normaliseLongitude(360)).toBe(0);
    expect(normaliseLongitude(-540)).toBe(180);
    expect(normaliseLongitude(179.9)).toBe(179.9);
    expect(normaliseLongitude(-179.9)).toBe(-179.9);
    expect(() => normaliseLongitude(Number.NaN)).toThrow(/normaliseLongitude: lon must be a finite longitude/);
  });
});
