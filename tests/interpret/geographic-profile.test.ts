/**
 * A crustal profile given in latitude and longitude, through the whole pipeline: shots and
 * stations placed on the best-fitting line, every offset the WGS84 geodesic distance (Karney 2013,
 * through geographiclib-geodesic, itself held to Karney's geodesic test set in
 * tests/geodesy/geodesic.test.ts), a station far off the line warned about, and the layers read
 * from first arrivals in a sphere (the check case 10.2 model: 35 km of 6.3 km/s crust over 8.0
 * km/s; times by lib/model/spherical-earth.ts, checked against that case and scipy).
 */
import { describe, expect, it } from 'vitest';
import { readPickTable } from '../../lib/picks/index.js';
import { interpret } from '../../lib/interpret.js';
import { InterpretationSchema } from '../../lib/interpretation/shape.js';
import { geodesicDirect, geodesicInverse } from '../../lib/geodesy/geodesic.js';
import { sphericalFirstArrival } from '../../lib/model/spherical-earth.js';
import { seededNormal } from '../../lib/random.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';

const MODEL = { velocities: [6300, 8000], thicknesses: [35_000], radius: 6_371_008.8 };
const START = { lat: 47.0, lon: 10.0 };
const AZIMUTH = 47.42;
const OFF_LINE_STATION = 'ST21';

function survey(offLineKm: number) {
  const normal = seededNormal(47);
  const along = (distance: number) => geodesicDirect(START.lat, START.lon, AZIMUTH, distance);
  const shots = [
    { id: 'SW', ...along(0) },
    { id: 'NE', ...along(400_000) },
  ];
  const stations = Array.from({ length: 41 }, (_, k) => {
    const point = along(k * 10_000);
    const id = `ST${String(k).padStart(2, '0')}`;
    const moved = id === OFF_LINE_STATION ? geodesicDirect(point.lat, point.lon, point.azimuth2 + 90, offLineKm * 1000) : point;
    return { id, along: k * 10_000, lat: moved.lat, lon: moved.lon };
  });
  const rows = ['shot,source_lat,source_lon,receiver,receiver_lat,receiver_lon,time_s,sigma_s'];
  for (const shot of shots) {
    for (const station of stations) {
      const { distance } = geodesicInverse(shot.lat, shot.lon, station.lat, station.lon);
      if (distance < 1) continue;
      const time = sphericalFirstArrival(MODEL, distance)!.time + 0.03 * normal();
      rows.push([shot.id, shot.lat.toFixed(7), shot.lon.toFixed(7), station.id, station.lat.toFixed(7), station.lon.toFixed(7), time.toFixed(3), '0.03'].join(','));
    }
  }
  const outcome = readPickTable(rows.join('\n'));
  if (!outcome.ok) throw new Error(outcome.problems.map((problem) => problem.message).join('; '));
  return { pickSet: outcome.value, stations, shots, result: InterpretationSchema.parse(interpret(outcome.value)) };
}

describe('a geographic crustal profile', () => {
  const straight = survey(0);

  it('is read at crustal scale with its line, shots and stations placed along it', () => {
    const { result, stations } = straight;
    expect(result.units.scale).toBe('crustal');
    const geometry = result.geometry!;
    expectWithin(geometry.line.length, 400, 1e-3, 'line length, km (stations generated over 400 km)');
    // Along-line positions equal the generating geodesic distances: the stations lie on one geodesic, written to
    // 1e-7° (about 1 cm), so to 2 cm.
    for (const station of stations) {
      const placed = geometry.stations.find((entry) => entry.station === station.id)!;
      expectWithin(placed.position, station.along / 1000, 2e-5, `position of ${station.id}, km`);
      expect(Math.abs(placed.offLineDistance)).toBeLessThan(2e-5);
    }
    expect(result.warnings.filter((warning) => warning.code === 'station-off-line')).toEqual([]);
    expect(result.references.map((entry) => entry.key)).toContain('Karney2013');
  });

  it('uses the geodesic shot–station distance as every pick\'s offset, to 1 mm', () => {
    const { result, pickSet } = straight;
    for (const shot of result.shots) {
      for (const side of shot.sides) {
        for (const branch of side.branches) {
          for (const pick of branch.picks) {
            const row = pickSet.picks[pick.line - 2]!;
            const { distance } = geodesicInverse(row.sourceLat!, row.sourceLon!, row.receiverLat!, row.receiverLon!);
            expectWithin(pick.offset * 1000, distance, 1e-3, `offset of line ${pick.line}, m`);
          }
        }
      }
    }
  });

  it('reads the crust and mantle through the sphere: Moho within 1 km, Pn within 0.5 %', () => {
    const curvature = straight.result.earthCurvature!;
    expect(curvature.applied).toBe(true);
    expectWithin(curvature.sphericalLayers[1]!.depthToTop, 35, 1, 'Moho (check case 10.2 model: 35 km)');
    expectRelative(curvature.sphericalLayers[1]!.velocity, 8.0, 0.005, 'Pn (8.0 km/s)');
  });

  it('warns about a station 20 km off the line, naming it, and still measures its offsets by the geodesic', () => {
    const { result, pickSet } = survey(20);
    const warnings = result.warnings.filter((warning) => warning.code === 'station-off-line');
    expect(warnings).toHaveLength(1);
    expect(warnings[0]!.message).toContain(OFF_LINE_STATION);
    const station = result.geometry!.stations.find((entry) => entry.station === OFF_LINE_STATION)!;
    // The station pulls the fitted line a little towards itself: about 20·40/41 km off it (common practice to expect a bit less).
    expect(Math.abs(station.offLineDistance)).toBeGreaterThan(18);
    expect(station.receiverXSpread).toBeGreaterThan(0);
    const picks = pickSet.picks.filter((pick) => pick.receiver === OFF_LINE_STATION);
    for (const shot of result.shots) {
      for (const side of shot.sides) {
        for (const pick of side.branches.flatMap((branch) => branch.picks).filter((entry) => entry.receiver === OFF_LINE_STATION)) {
          const row = picks.find((entry) => entry.line === pick.line)!;
          expectWithin(pick.offset * 1000, geodesicInverse(row.sourceLat!, row.sourceLon!, row.receiverLat!, row.receiverLon!).distance, 1e-3, 'off-line offset, m');
        }
      }
    }
  });
});
