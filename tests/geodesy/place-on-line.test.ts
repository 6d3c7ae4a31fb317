/**
 * Geographic picks onto a line (lib/geodesy/place-on-line.ts) against surveys synthesised along
 * known geodesics with geodesicDirect (checked against Karney's GeodTest set in
 * geodesic.test.ts): shots at 0 and 300 km, stations every 10 km, so positions and shot–station
 * distances are known from the generation, not from the code under test. Off-line effects are
 * checked against planar right-triangle oracles written here (a station d off the line, a and b
 * along it from the two shots: its receiverX differ by √(a² + d²) − a + √(b² + d²) − b).
 * The off-line limit min(5 % of the line, 10 km) is common practice, not a published rule.
 */
import { describe, expect, it } from 'vitest';
import { geodesicDirect, geodesicInverse } from '../../lib/geodesy/geodesic.js';
import { OFF_LINE_MAXIMUM, placeOnLine } from '../../lib/geodesy/place-on-line.js';
import type { GeographicPoint } from '../../lib/geodesy/profile-line.js';
import { readPickTable } from '../../lib/picks/read-pick-table.js';
import type { Pick, PickSet } from '../../lib/picks/types.js';
import { seededRandom } from '../../lib/random.js';
import { expectWithin } from '../helpers/expect-within.js';

/** The project's asked accuracy for offsets: 1 mm. */
const OFFSET_TOLERANCE = 1e-3;
/**
 * Along-line positions of stations scattered ≤ 30 m off the line: the error is second order,
 * |p|·d²/(3R²) + d·tilt ≈ 1e-6 m + 3e-6 m (profile-line.test.ts quantifies it); 1 mm.
 */
const POSITION_TOLERANCE = 1e-3;
const START = { lat: 47, lon: 10 } as const;
const AZIMUTH = 60;
const STATION_DISTANCES = Array.from({ length: 31 }, (_, index) => index * 10_000);

interface Station {
  readonly id: string | null;
  readonly point: GeographicPoint;
}
interface Shot {
  readonly id: string;
  readonly point: GeographicPoint;
}

function besideLine(start: GeographicPoint, azimuth: number, distance: number, offset: number): GeographicPoint {
  const foot = geodesicDirect(start.lat, start.lon, azimuth, distance);
  if (offset === 0) return { lat: foot.lat, lon: foot.lon };
  const { lat, lon } = geodesicDirect(foot.lat, foot.lon, foot.azimuth2 + 90, offset);
  return { lat, lon };
}

function pick(shot: Shot, station: Station, line: number): Pick {
  return {
    shot: shot.id, receiver: station.id, sourceX: 0, receiverX: 0, time: 1 + line / 1000, sigma: 0.05, branch: null, excluded: line % 7 === 0,
    sourceElevation: 120, receiverElevation: 100 + line, sourceDepth: null, uphole: null,
    sourceLat: shot.point.lat, sourceLon: shot.point.lon, receiverLat: station.point.lat, receiverLon: station.point.lon, line,
  };
}

/** Every shot records every station, in shot order. */
function pickSet(shots: readonly Shot[], stations: readonly Station[]): PickSet {
  const picks: Pick[] = [];
  for (const shot of shots) for (const station of stations) picks.push(pick(shot, station, picks.length + 2));
  return {
    picks,
    shotIds: shots.map((shot) => shot.id),
    coordinateSystem: 'geographic',
    columns: { receiver: true, sigma: true, branch: false, sourceElevation: true, receiverElevation: true, sourceDepth: false, uphole: false },
    suggestedScale: 'crustal',
  };
}

const stationId = (index: number) => `R${String(index).padStart(2, '0')}`;

/** Shots S1 at 0 km and S2 at 300 km, stations every 10 km, interior ones `offsets[i]` m off the line. */
function survey(offsets: readonly number[] = STATION_DISTANCES.map(() => 0), start: GeographicPoint = START, azimuth = AZIMUTH) {
  const stations = STATION_DISTANCES.map((distance, index) => ({ id: stationId(index), point: besideLine(start, azimuth, distance, offsets[index] ?? 0) }));
  const shots = [
    { id: 'S1', point: besideLine(start, azimuth, 0, 0) },
    { id: 'S2', point: besideLine(start, azimuth, 300_000, 0) },
  ];
  return { shots, stations, set: pickSet(shots, stations) };
}

function scatter(seed: number, size: number): number[] {
  const random = seededRandom(seed);
  return STATION_DISTANCES.map((_, index) => (index === 0 || index === 30 ? 0 : (random() - 0.5) * 2 * size));
}

describe('placeOnLine on a straight survey', () => {
  const { set } = survey();
  const placed = placeOnLine(set);

  it('placeOnLine puts shots S1 and S2 at their generating positions 0 and 300 km', () => {
    expectWithin(placed.shots[0]?.position, 0, OFFSET_TOLERANCE, 'S1 generated at 0 km');
    expectWithin(placed.shots[1]?.position, 300_000, OFFSET_TOLERANCE, 'S2 generated at 300 km');
    expectWithin(placed.line.length, 300_000, OFFSET_TOLERANCE, 'generated line length');
    expectWithin(placed.line.originAzimuth, AZIMUTH, 1e-9, 'generated azimuth (away from S1)');
  });

  it('placeOnLine gives each pick |receiverX − sourceX| = the generating shot–station distance, to 1 mm', () => {
    for (const placedPick of placed.pickSet.picks) {
      const stationIndex = Number(placedPick.receiver?.slice(1));
      const generating = Math.abs((STATION_DISTANCES[stationIndex] as number) - (placedPick.shot === 'S1' ? 0 : 300_000));
      expectWithin(Math.abs(placedPick.receiverX - placedPick.sourceX), generating, OFFSET_TOLERANCE, `generating distance ${placedPick.shot}–${placedPick.receiver}`);
    }
  });

  it('placeOnLine puts stations behind a shot on its negative side and the co-located station at its zero offset', () => {
    const fromS2 = placed.pickSet.picks.filter((placedPick) => placedPick.shot === 'S2');
    expect(fromS2.filter((placedPick) => placedPick.receiver !== 'R30').every((placedPick) => placedPick.receiverX < placedPick.sourceX)).toBe(true);
    const atS1 = placed.pickSet.picks.find((placedPick) => placedPick.shot === 'S1' && placedPick.receiver === 'R00');
    expect(atS1?.receiverX).toBe(atS1?.sourceX);
  });

  it('placeOnLine makes the set a line set and keeps every other field of the picks and the set', () => {
    expect(placed.pickSet.coordinateSystem).toBe('line');
    expect(placed.pickSet.shotIds).toEqual(set.shotIds);
    expect(placed.pickSet.columns).toEqual(set.columns);
    expect(placed.pickSet.suggestedScale).toBe(set.suggestedScale);
    placed.pickSet.picks.forEach((placedPick, index) => {
      const { sourceX: _s, receiverX: _r, ...kept } = placedPick;
      const { sourceX: _s0, receiverX: _r0, ...original } = set.picks[index] as Pick;
      expect(kept).toEqual(original);
    });
    expect(set.picks[5]?.receiverX).toBe(0); // the input is not mutated
  });

  it('placeOnLine reports no warning and no receiverX spread on a straight line', () => {
    expect(placed.warnings).toEqual([]);
    expect(placed.offLineLimit).toBe(OFF_LINE_MAXIMUM);
    expect(placed.largestReceiverXSpread.spread).toBeLessThan(1e-6);
    expect(placed.stations).toHaveLength(31);
  });
});

describe('placeOnLine with tiny off-line scatter', () => {
  const offsets = scatter(7, 30);
  const { set } = survey(offsets);
  const placed = placeOnLine(set);

  it('placeOnLine gives offsets equal to the geodesic inverse distances, to 1 mm', () => {
    for (const placedPick of placed.pickSet.picks) {
      const distance = geodesicInverse(placedPick.sourceLat as number, placedPick.sourceLon as number, placedPick.receiverLat as number, placedPick.receiverLon as number).distance;
      expectWithin(Math.abs(placedPick.receiverX - placedPick.sourceX), distance, OFFSET_TOLERANCE, `Karney inverse distance ${placedPick.shot}–${placedPick.receiver}`);
    }
  });

  it('placeOnLine puts stations at their generating along-line distances within 1 mm', () => {
    placed.stations.forEach((station, index) => {
      expectWithin(station.position, STATION_DISTANCES[index] as number, POSITION_TOLERANCE, `generating position of ${station.station}`);
    });
  });

  it('placeOnLine reports each station\'s receiverX spread as the right-triangle excess √(a²+d²) − a + √(b²+d²) − b, within 1 %', () => {
    const [s1, s2] = placed.shots as [(typeof placed.shots)[number], (typeof placed.shots)[number]];
    placed.stations.slice(1, 30).forEach((station) => {
      // The shots lie off the fitted line too (it runs through the mean of all points): d is relative.
      const a = station.position - s1.position;
      const b = s2.position - station.position;
      const expected = Math.hypot(a, station.offLineDistance - s1.offLineDistance) - a + Math.hypot(b, station.offLineDistance - s2.offLineDistance) - b;
      expectWithin(station.receiverXSpread, expected, 0.01 * expected + 1e-6, `planar excess of ${station.station}`);
      expect(station.receiverXMax - station.receiverXMin).toBe(station.receiverXSpread);
    });
    const largest = placed.stations.reduce((best, station) => (station.receiverXSpread > best.receiverXSpread ? station : best));
    expect(placed.largestReceiverXSpread).toEqual({ spread: largest.receiverXSpread, station: largest.station });
    expect(placed.largestReceiverXSpread.spread).toBeGreaterThan(0.005);
    expect(placed.warnings).toEqual([]);
  });
});

describe('placeOnLine off-line warnings (limit min(5 % of the line, 10 km): common practice)', () => {
  it('a station 20 km off a 300 km line at 150 km is warned about, by name, distance and fix', () => {
    const offsets = STATION_DISTANCES.map((_, index) => (index === 15 ? 20_000 : 0));
    const placed = placeOnLine(survey(offsets).set);
    expect(placed.warnings).toHaveLength(1);
    const [warning] = placed.warnings;
    expect(warning?.code).toBe('station-off-line');
    expect(warning?.level).toBe('warning');
    expect(warning?.shot).toBeUndefined();
    // The station pulls the line 20/33 km towards itself (33 points: 2 shots, 31 stations).
    const expectedOffLine = 20_000 * (32 / 33);
    expectWithin(Number(warning?.details?.offLineDistance), expectedOffLine, 5, 'off-line distance after the line moves 1/33 of the way');
    expect(warning?.details?.station).toBe('R15');
    expect(warning?.details?.limit).toBe(10_000);
    expect(warning?.message).toMatch(/^station R15 \(/);
    expect(warning?.message).toMatch(/lies 19\.39\u00a0km to the right of the line/);
    expect(warning?.message).toMatch(/10\u00a0km limit \(5 % of the 300\u00a0km line or 10\u00a0km, whichever is less\)/);
    expect(warning?.message).toMatch(/split the line into straighter parts, or treat the survey as a 2-D \(fan\) geometry .*time-term method/);
    // Its price: receiverX from S1 and S2 differ by the two right-triangle excesses (20 km across
    // from each shot, which lie on the generating line).
    const station = placed.stations[15];
    const excess = 2 * (Math.hypot(150_000, 20_000) - 150_000);
    expectWithin(station?.receiverXSpread, excess, 0.01 * excess, 'right-triangle excess at 150 km from each shot');
    expect(placed.largestReceiverXSpread.station).toBe('R15');
    expect(warning?.message).toMatch(/receiver positions differ by 2654\u00a0m between shots/);
  });

  it('on a long line the 10 km cap binds: 12 km off is warned although under 5 % of 300 km; 8 km off is not', () => {
    const warned = placeOnLine(survey(STATION_DISTANCES.map((_, index) => (index === 10 ? -12_000 : 0))).set);
    expect(warned.warnings.map((warning) => warning.details?.station)).toEqual(['R10']);
    expect(warned.warnings[0]?.message).toMatch(/to the left of the line/);
    const quiet = placeOnLine(survey(STATION_DISTANCES.map((_, index) => (index === 10 ? 8_000 : 0))).set);
    expect(quiet.warnings).toEqual([]);
  });

  it('a station only one shot recorded is warned about without a spread between shots', () => {
    const { stations, shots } = survey(STATION_DISTANCES.map((_, index) => (index === 15 ? 20_000 : 0)));
    const set = pickSet(shots, stations);
    const onlyS1 = { ...set, picks: set.picks.filter((candidate) => !(candidate.shot === 'S2' && candidate.receiver === 'R15')) };
    const placed = placeOnLine(onlyS1);
    expect(placed.stations[15]?.recordedBy).toBe(1);
    expect(placed.stations[15]?.receiverXSpread).toBe(0);
    expect(placed.stations[14]?.recordedBy).toBe(2);
    expect(placed.warnings[0]?.message).toMatch(/its one shot's offset is the true distance, but its position 150(\.\d+)?\u00a0km along the line is not where it stands; split the line/);
    expect(placed.warnings[0]?.message).not.toMatch(/differ by/);
  });

  it('on a short line 5 % binds: on a 20 km line 1.5 km off is warned, 0.7 km is not', () => {
    const short = (offset: number) => {
      const stations = Array.from({ length: 21 }, (_, index) => ({ id: `K${index}`, point: besideLine(START, AZIMUTH, index * 1000, index === 10 ? offset : 0) }));
      const shots = [{ id: 'A', point: besideLine(START, AZIMUTH, 0, 0) }, { id: 'B', point: besideLine(START, AZIMUTH, 20_000, 0) }];
      return placeOnLine(pickSet(shots, stations));
    };
    const warned = short(1500);
    expectWithin(warned.offLineLimit, 1000, 1e-6, '5 % of 20 km');
    expect(warned.warnings.map((warning) => warning.details?.station)).toEqual(['K10']);
    expect(short(700).warnings).toEqual([]);
  });

  it('a shot 15 km off the line is warned about with its shot name', () => {
    const { stations, shots } = survey();
    const offShot = { id: 'S3', point: besideLine(START, AZIMUTH, 150_000, 15_000) };
    const placed = placeOnLine(pickSet([...shots, offShot], stations));
    expect(placed.warnings).toHaveLength(1);
    expect(placed.warnings[0]?.shot).toBe('S3');
    expect(placed.warnings[0]?.details?.point).toBe('shot');
    expect(placed.warnings[0]?.message).toMatch(/^shot S3 \(.*\) lies 14\.\d+\u00a0km to the right/);
    // Its offsets are still the geodesic ones.
    for (const placedPick of placed.pickSet.picks.filter((candidate) => candidate.shot === 'S3')) {
      const distance = geodesicInverse(offShot.point.lat, offShot.point.lon, placedPick.receiverLat as number, placedPick.receiverLon as number).distance;
      expectWithin(Math.abs(placedPick.receiverX - placedPick.sourceX), distance, OFFSET_TOLERANCE, `Karney inverse distance S3–${placedPick.receiver}`);
    }
  });
});

describe('placeOnLine orientation and the antimeridian', () => {
  it('placeOnLine points the line away from the first shot by default, and eastward when asked', () => {
    const { stations, shots } = survey();
    const eastFirst = pickSet([...shots].reverse(), stations);
    const fromFirst = placeOnLine(eastFirst);
    expectWithin(fromFirst.shots.find((shot) => shot.shot === 'S2')?.position, 0, OFFSET_TOLERANCE, 'first shot S2 at the origin');
    expectWithin(fromFirst.shots.find((shot) => shot.shot === 'S1')?.position, 300_000, OFFSET_TOLERANCE, 'S1 at the far end');
    const eastward = placeOnLine(eastFirst, { orientation: 'eastward' });
    expectWithin(eastward.shots.find((shot) => shot.shot === 'S1')?.position, 0, OFFSET_TOLERANCE, 'eastward: the western shot S1 at the origin');
  });

  it('placeOnLine works across the antimeridian: stations from 179.9° E to 179.9° W at their generating positions, geodesic offsets', () => {
    const start = { lat: -17, lon: 179.9 };
    const end = { lat: -17, lon: -179.9 };
    const { distance: length, azimuth1 } = geodesicInverse(start.lat, start.lon, end.lat, end.lon);
    const distances = Array.from({ length: 11 }, (_, index) => (index * length) / 10);
    const stations = distances.map((distance, index) => ({ id: `A${index}`, point: besideLine(start, azimuth1, distance, 0) }));
    const shots = [{ id: 'W', point: start }, { id: 'E', point: end }];
    const placed = placeOnLine(pickSet(shots, stations));
    placed.stations.forEach((station, index) => expectWithin(station.position, distances[index] as number, OFFSET_TOLERANCE, `generating position of ${station.station}`));
    expectWithin(placed.shots[1]?.position, length, OFFSET_TOLERANCE, 'E at the geodesic distance across the antimeridian');
    for (const placedPick of placed.pickSet.picks) {
      const distance = geodesicInverse(placedPick.sourceLat as number, placedPick.sourceLon as number, placedPick.receiverLat as number, placedPick.receiverLon as number).distance;
      expectWithin(Math.abs(placedPick.receiverX - placedPick.sourceX), distance, OFFSET_TOLERANCE, `inverse distance ${placedPick.shot}–${placedPick.receiver}`);
    }
    expect(placed.warnings).toEqual([]);
    expect(placed.stations.some((station) => station.lon < 0) && placed.stations.some((station) => station.lon > 0)).toBe(true);
  });

  it('placeOnLine reads a geographic pick table through readPickTable and places it', () => {
    const rows = ['shot,source_lat,source_lon,receiver_lat,receiver_lon,time_s,receiver'];
    const points = [0, 50_000, 100_000].map((distance) => besideLine(START, AZIMUTH, distance, 0));
    for (const [index, point] of points.entries()) rows.push(`S1,47,10,${point.lat},${point.lon},${5 + index},G${index}`);
    const outcome = readPickTable(`${rows.join('\n')}\n`);
    expect(outcome.ok).toBe(true);
    if (!outcome.ok) return;
    const placed = placeOnLine(outcome.value);
    expect(placed.pickSet.picks.map((placedPick) => placedPick.receiverX - placedPick.sourceX).map((value) => Math.round(value * 1000) / 1000)).toEqual([0, 50_000, 100_000]);
  });
});

describe('placeOnLine edges', () => {
  const { set, shots, stations } = survey();

  it('placeOnLine refuses a pick set that is not geographic', () => {
    expect(() => placeOnLine({ ...set, coordinateSystem: 'line' })).toThrow(/pickSet.coordinateSystem is 'line', not 'geographic'/);
  });

  it('placeOnLine refuses an empty pick set', () => {
    expect(() => placeOnLine({ ...set, picks: [] })).toThrow(/pickSet.picks is empty/);
  });

  it('placeOnLine refuses a pick without receiver or source coordinates, naming its line', () => {
    const noReceiver = set.picks.map((candidate, index) => (index === 3 ? { ...candidate, receiverLon: null } : candidate));
    expect(() => placeOnLine({ ...set, picks: noReceiver })).toThrow(/pick on line 5 \(shot S1\) has no receiverLat\/receiverLon/);
    const noSource = set.picks.map((candidate, index) => (index === 4 ? { ...candidate, sourceLat: null } : candidate));
    expect(() => placeOnLine({ ...set, picks: noSource })).toThrow(/pick on line 6 \(shot S1\) has no sourceLat\/sourceLon/);
  });

  it('placeOnLine refuses a shot whose picks give two source positions', () => {
    const moved = set.picks.map((candidate, index) => (index === 2 ? { ...candidate, sourceLat: 47.5 } : candidate));
    expect(() => placeOnLine({ ...set, picks: moved })).toThrow(/shot S1 on line 4 is at 47\.50000, 10\.00000 but an earlier pick puts it at 47\.00000, 10\.00000/);
  });

  it('a station abreast of its shot (along-line positions within 1 µm, 500 m off) goes on the forward side', () => {
    // A shot at the middle, with a station 500 m either side of it: abreast to rounding (the
    // projection is exact across the line at the centre, and the pair does not tilt the line).
    const middleShot = { id: 'S3', point: besideLine(START, AZIMUTH, 150_000, 0) };
    const pair = [500, -500].map((offset, index) => ({ id: `X${index}`, point: besideLine(START, AZIMUTH, 150_000, offset) }));
    for (const orientation of ['from-first-point', 'eastward'] as const) {
      const placed = placeOnLine(pickSet([...shots, middleShot], [...stations, ...pair]), { orientation });
      const s3 = placed.shots.find((shot) => shot.shot === 'S3');
      for (const id of ['X0', 'X1']) {
        const station = placed.stations.find((candidate) => candidate.station === id);
        expect(Math.abs((station?.position ?? Number.NaN) - (s3?.position ?? Number.NaN))).toBeLessThan(1e-6);
        const fromS3 = placed.pickSet.picks.find((candidate) => candidate.shot === 'S3' && candidate.receiver === id);
        expectWithin((fromS3?.receiverX ?? Number.NaN) - (fromS3?.sourceX ?? Number.NaN), 500, OFFSET_TOLERANCE, `${id} forward by convention, 500 m`);
      }
    }
  });

  it('a station generated abreast of an end shot but 500 m off is placed by the fitted line, which it tilts: behind that shot', () => {
    const abreast = { id: 'X', point: besideLine(START, AZIMUTH, 0, -500) };
    const placed = placeOnLine(pickSet(shots, [...stations, abreast]));
    const station = placed.stations.find((candidate) => candidate.station === 'X');
    // The tilt is about (p·d/N)/var(p) ≈ 3e-4 rad, which moves X ≈ 0.15 m behind S1 along the line.
    expect((station?.position ?? Number.NaN) - (placed.shots[0]?.position ?? Number.NaN)).toBeLessThan(-0.05);
    const fromS1 = placed.pickSet.picks.find((candidate) => candidate.shot === 'S1' && candidate.receiver === 'X');
    expectWithin((fromS1?.receiverX ?? Number.NaN) - (fromS1?.sourceX ?? Number.NaN), -500, OFFSET_TOLERANCE, 'behind S1, 500 m');
  });

  it('every shot and station at one point: a line of length 0, positions 0, no warning', () => {
    const here = { lat: 12, lon: -45 };
    const placed = placeOnLine(pickSet([{ id: 'S', point: here }], [{ id: 'G', point: here }]));
    expect(placed.line.length).toBe(0);
    expect(placed.shots[0]?.position).toBe(0);
    expect(placed.stations[0]?.position).toBe(0);
    expect(placed.pickSet.picks[0]?.receiverX).toBe(0);
    expect(placed.warnings).toEqual([]);
  });

  it('stations are told apart by position (longitude modulo 360°) and named by coordinates without a receiver id', () => {
    const east = { lat: 10, lon: 190 };
    const west = { lat: 10, lon: -170 };
    const shot = { id: 'S', point: { lat: 10, lon: -171 } };
    const placed = placeOnLine(pickSet([shot], [{ id: null, point: east }, { id: null, point: west }]));
    expect(placed.stations).toHaveLength(1);
    expect(placed.stations[0]?.station).toBe('10.00000, 190.00000');
    expect(placed.stations[0]?.receiver).toBeNull();
    expect(placed.pickSet.picks.map((placedPick) => placedPick.receiverLon)).toEqual([190, -170]);
  });
});
