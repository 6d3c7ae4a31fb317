/**
 * Geographic picks onto one profile line: turn a pick set whose shots and stations are given by
 * latitude and longitude into one with along-line positions, such that every offset the
 * interpretation computes, |receiverX − sourceX|, is the true geodesic shot–station distance
 * (METHODS §10: "offset = shot–station geodesic distance s₁₂; along-profile position by
 * projection, warning when a station lies far off the line").
 *
 * - The line is `profileLine` through every shot and every station (shots first, in `shotIds`
 *   order, then stations in order of first appearance), oriented `from-first-point` by default: it
 *   points away from the first shot (option `orientation`; see `profileLine`).
 * - Each shot's `sourceX` is its along-line position.
 * - Each pick's `receiverX` = sourceX ± s₁₂, with s₁₂ the geodesic distance from the pick's shot to
 *   its station (`geodesicInverse`, `Karney2013`) and the sign + when the station's along-line
 *   position is beyond, at or abreast of (within 1 µm) the shot's, − when behind it. So offsets are geodesic to rounding
 *   (≈ 1e-10 m), while a station off the line gets a slightly different `receiverX` from each
 *   shot: it is not one point on the line. The report gives that difference per station and the
 *   largest one.
 * - Everything else in the pick set is kept (lat/lon, elevations, times, branches, exclusions,
 *   `columns`, `shotIds`, `suggestedScale`); `coordinateSystem` becomes `line`.
 * - Stations are told apart by position (latitude and longitude, the longitude taken modulo 360°),
 *   as the pick-table reader does; a station is named by the receiver identifier of its first pick,
 *   or by its coordinates when the table has none.
 *
 * Warnings `station-off-line` (shape of `InterpretationWarning`, level `warning`), one per shot or
 * station lying further off the line than the limit min(5 % of the line length, 10 km) — common
 * practice, not a published rule: beyond it the line is crooked enough that positions along it
 * misrepresent the geometry. The message names the point, its distance and side, the limit, the
 * price (how far a station's receiver positions differ between shots; for a shot, or a station
 * only one shot recorded, that its along-line position is not where it is) and the fix: split the
 * line into straighter parts, or treat the survey as a 2-D/fan geometry with the time-term method,
 * which uses the true shot–station distances.
 *
 * Edges:
 * - a pick set whose `coordinateSystem` is not `geographic`, an empty pick set, a pick without
 *   source or receiver latitude/longitude, or a shot whose picks give two source positions →
 *   RangeError naming the pick's line and the fix (the pick-table reader never produces these);
 * - a station at its shot's position: receiverX = sourceX (a zero-offset pick);
 * - a station abreast of its shot (along-line positions within 1 µm, off the line): receiverX =
 *   sourceX + s₁₂, the forward side by convention;
 * - every shot and station at one point: a line of length 0, all positions 0, no warning.
 *
 * @example
 * // shots at 0 and 300 km, stations every 10 km on one geodesic from (47° N, 10° E), azimuth 60°:
 * placeOnLine(pickSet);
 * // → { pickSet: { coordinateSystem: 'line', picks: [{ sourceX: 0, receiverX: 10000.000, … }, …] },
 * //     line: { length: 300000.000, originAzimuth: 60, … }, largestReceiverXSpread: { spread: 0, … },
 * //     warnings: [] }
 */
import type { InterpretationWarning } from '../checks/warning.js';
import { formatQuantity } from '../checks/wording.js';
import type { Pick, PickSet } from '../picks/types.js';
import { geodesicInverse, normaliseLongitude } from './geodesic.js';
import { profileLine, type GeographicPoint, type LineOrientation, type ProfileLine } from './profile-line.js';

/** Off-line limit as a fraction of the line length (common practice). */
export const OFF_LINE_FRACTION = 0.05;
/** Off-line limit in metres, whatever the line length (common practice). */
export const OFF_LINE_MAXIMUM = 10_000;
/**
 * A station whose along-line position is within this of its shot's (metres) counts as abreast of
 * it: rounding alone moves a station exactly abreast by ~1e-10 m either way.
 */
const ABREAST_TOLERANCE = 1e-6;

/**
 * A warning of the proposed code `station-off-line`: the shape of `InterpretationWarning` with a
 * code the warning registry does not list yet.
 */
export type StationOffLineWarning = Omit<InterpretationWarning, 'code'> & { readonly code: 'station-off-line' };

export interface PlaceOnLineOptions {
  /** Which way the line points; default `from-first-point` (away from the first shot). */
  readonly orientation?: LineOrientation;
}

/** The line itself, without its per-point table. */
export type LineSummary = Omit<ProfileLine, 'points'>;

export interface ShotPlacement {
  readonly shot: string;
  readonly lat: number;
  readonly lon: number;
  /** Along-line position, metres: the shot's `sourceX`. */
  readonly position: number;
  /** Signed distance off the line, metres, + to the right looking along it. */
  readonly offLineDistance: number;
}

export interface StationPlacement {
  /** Receiver identifier of the station's first pick, or its coordinates ("47.10000, 10.20000"). */
  readonly station: string;
  /** Receiver identifier, when the table had one. */
  readonly receiver: string | null;
  readonly lat: number;
  readonly lon: number;
  /** Along-line position of the station (its projection), metres. */
  readonly position: number;
  /** Signed distance off the line, metres, + to the right looking along it. */
  readonly offLineDistance: number;
  /** Smallest and largest `receiverX` the station received over its picks, metres. */
  readonly receiverXMin: number;
  readonly receiverXMax: number;
  /** receiverXMax − receiverXMin: the price of the station not being one point on the line. */
  readonly receiverXSpread: number;
  /** How many shots recorded the station (its spread is 0 when only one did). */
  readonly recordedBy: number;
}

export interface LinePlacement {
  /** The picks with along-line positions; `coordinateSystem` is `line`. */
  readonly pickSet: PickSet;
  readonly line: LineSummary;
  /** Per shot, in `shotIds` order. */
  readonly shots: readonly ShotPlacement[];
  /** Per station, in order of first appearance. */
  readonly stations: readonly StationPlacement[];
  /** The largest `receiverXSpread` of any station and that station (the first one on ties). */
  readonly largestReceiverXSpread: { readonly spread: number; readonly station: string };
  /** The off-line distance beyond which a warning is given, metres. */
  readonly offLineLimit: number;
  readonly warnings: readonly StationOffLineWarning[];
}

interface Located {
  readonly lat: number;
  readonly lon: number;
}

function positionKey(lat: number, lon: number): string {
  return `${lat} ${normaliseLongitude(lon)}`;
}

function coordinates(point: Located): string {
  return `${point.lat.toFixed(5)}, ${point.lon.toFixed(5)}`;
}

function sourceOf(pick: Pick): Located {
  if (pick.sourceLat === null || pick.sourceLon === null) {
    throw new RangeError(
      `placeOnLine: the pick on line ${pick.line} (shot ${pick.shot}) has no sourceLat/sourceLon; a geographic pick set needs source_lat and source_lon on every row`,
    );
  }
  return { lat: pick.sourceLat, lon: pick.sourceLon };
}

function receiverOf(pick: Pick): Located {
  if (pick.receiverLat === null || pick.receiverLon === null) {
    throw new RangeError(
      `placeOnLine: the pick on line ${pick.line} (shot ${pick.shot}) has no receiverLat/receiverLon; a geographic pick set needs receiver_lat and receiver_lon on every row`,
    );
  }
  return { lat: pick.receiverLat, lon: pick.receiverLon };
}

interface StationEntry {
  readonly point: Located;
  readonly receiver: string | null;
  readonly index: number;
}

/**
 * Geographic picks onto their best-fitting profile line, with geodesic offsets and a placement
 * report (module comment: rules, warnings, edges).
 */
export function placeOnLine(pickSet: PickSet, options: PlaceOnLineOptions = {}): LinePlacement {
  if (pickSet.coordinateSystem !== 'geographic') {
    throw new RangeError(
      `placeOnLine: pickSet.coordinateSystem is '${pickSet.coordinateSystem}', not 'geographic'; only a table with source_lat/source_lon and receiver_lat/receiver_lon needs placing on a line — a line table already has its positions`,
    );
  }
  if (pickSet.picks.length === 0) {
    throw new RangeError('placeOnLine: pickSet.picks is empty; read a pick table with at least one pick first');
  }

  // Shots in shotIds order (then any shot only the picks name), each with its one source position.
  const shotOrder = [...pickSet.shotIds];
  const shotSources = new Map<string, Located>();
  const stationIndex = new Map<string, StationEntry>();
  const stationOrder: StationEntry[] = [];
  for (const pick of pickSet.picks) {
    const source = sourceOf(pick);
    const known = shotSources.get(pick.shot);
    if (known === undefined) {
      shotSources.set(pick.shot, source);
      if (!shotOrder.includes(pick.shot)) shotOrder.push(pick.shot);
    } else if (positionKey(known.lat, known.lon) !== positionKey(source.lat, source.lon)) {
      throw new RangeError(
        `placeOnLine: shot ${pick.shot} on line ${pick.line} is at ${coordinates(source)} but an earlier pick puts it at ${coordinates(known)}; give each shot one source position or split it into two shots`,
      );
    }
    const receiver = receiverOf(pick);
    const key = positionKey(receiver.lat, receiver.lon);
    if (!stationIndex.has(key)) {
      const entry = { point: receiver, receiver: pick.receiver, index: stationOrder.length };
      stationIndex.set(key, entry);
      stationOrder.push(entry);
    }
  }
  const shots = shotOrder.filter((shot) => shotSources.has(shot));

  const points: GeographicPoint[] = [
    ...shots.map((shot) => shotSources.get(shot) as Located),
    ...stationOrder.map((entry) => entry.point),
  ];
  const fitted = profileLine(points, { orientation: options.orientation ?? 'from-first-point' });
  const { points: table, ...line } = fitted;
  const placeOf = (index: number) => table[index] as { position: number; offLineDistance: number };
  const shotPosition = new Map(shots.map((shot, index) => [shot, placeOf(index).position]));
  const stationPlace = (entry: StationEntry) => placeOf(shots.length + entry.index);

  const receiverXMin = new Array<number>(stationOrder.length).fill(Number.POSITIVE_INFINITY);
  const receiverXMax = new Array<number>(stationOrder.length).fill(Number.NEGATIVE_INFINITY);
  const recordingShots = stationOrder.map(() => new Set<string>());
  const picks = pickSet.picks.map((pick): Pick => {
    const source = shotSources.get(pick.shot) as Located;
    const receiver = receiverOf(pick);
    const entry = stationIndex.get(positionKey(receiver.lat, receiver.lon)) as StationEntry;
    const sourceX = shotPosition.get(pick.shot) as number;
    const { distance } = geodesicInverse(source.lat, source.lon, receiver.lat, receiver.lon);
    // Behind the shot along the line → negative side; at, abreast of (within 1 µm) or beyond it → positive.
    const sign = stationPlace(entry).position < sourceX - ABREAST_TOLERANCE ? -1 : 1;
    const receiverX = sourceX + sign * distance;
    receiverXMin[entry.index] = Math.min(receiverXMin[entry.index] as number, receiverX);
    receiverXMax[entry.index] = Math.max(receiverXMax[entry.index] as number, receiverX);
    recordingShots[entry.index]?.add(pick.shot);
    return { ...pick, sourceX, receiverX };
  });

  const shotPlacements: ShotPlacement[] = shots.map((shot, index) => {
    const source = shotSources.get(shot) as Located;
    return { shot, lat: source.lat, lon: source.lon, ...placeOf(index) };
  });
  const stationPlacements: StationPlacement[] = stationOrder.map((entry) => {
    const min = receiverXMin[entry.index] as number;
    const max = receiverXMax[entry.index] as number;
    return {
      station: entry.receiver ?? coordinates(entry.point),
      receiver: entry.receiver,
      lat: entry.point.lat,
      lon: entry.point.lon,
      ...stationPlace(entry),
      receiverXMin: min,
      receiverXMax: max,
      receiverXSpread: max - min,
      recordedBy: recordingShots[entry.index]?.size ?? 0,
    };
  });

  let largest = { spread: 0, station: stationPlacements[0]?.station ?? '' };
  for (const station of stationPlacements) {
    if (station.receiverXSpread > largest.spread) largest = { spread: station.receiverXSpread, station: station.station };
  }

  const offLineLimit = Math.min(OFF_LINE_FRACTION * line.length, OFF_LINE_MAXIMUM);
  const warnings: StationOffLineWarning[] = [];
  const metres = (value: number) => formatQuantity(value, 'm', 4);
  const limitText = `${metres(offLineLimit)} limit (${OFF_LINE_FRACTION * 100} % of the ${metres(line.length)} line or ${metres(OFF_LINE_MAXIMUM)}, whichever is less)`;
  const fix =
    'split the line into straighter parts, or treat the survey as a 2-D (fan) geometry and interpret it with the time-term method, which uses the true shot–station distances';
  const side = (offLine: number) => `${offLine > 0 ? 'right' : 'left'} of the line looking along azimuth ${`${line.azimuth.toFixed(1)}°`}`;
  for (const shot of shotPlacements) {
    if (Math.abs(shot.offLineDistance) <= offLineLimit) continue;
    warnings.push({
      code: 'station-off-line',
      level: 'warning',
      shot: shot.shot,
      message:
        `shot ${shot.shot} (${coordinates(shot)}) lies ${metres(Math.abs(shot.offLineDistance))} to the ${side(shot.offLineDistance)}, beyond the ${limitText}: ` +
        `its offsets are the true distances but its position ${metres(shot.position)} along the line is not where it fired; ${fix}`,
      details: { point: 'shot', offLineDistance: shot.offLineDistance, position: shot.position, limit: offLineLimit, lat: shot.lat, lon: shot.lon },
    });
  }
  for (const station of stationPlacements) {
    if (Math.abs(station.offLineDistance) <= offLineLimit) continue;
    warnings.push({
      code: 'station-off-line',
      level: 'warning',
      message:
        `station ${station.station} (${coordinates(station)}) lies ${metres(Math.abs(station.offLineDistance))} to the ${side(station.offLineDistance)}, beyond the ${limitText}: ` +
        (station.recordedBy > 1
          ? `it is not one point on the line — its receiver positions differ by ${metres(station.receiverXSpread)} between shots; `
          : `its one shot's offset is the true distance, but its position ${metres(station.position)} along the line is not where it stands; `) +
        fix,
      details: {
        point: 'station',
        station: station.station,
        offLineDistance: station.offLineDistance,
        position: station.position,
        receiverXSpread: station.receiverXSpread,
        recordedBy: station.recordedBy,
        limit: offLineLimit,
        lat: station.lat,
        lon: station.lon,
      },
    });
  }

  return {
    pickSet: { ...pickSet, picks, coordinateSystem: 'line' },
    line,
    shots: shotPlacements,
    stations: stationPlacements,
    largestReceiverXSpread: largest,
    offLineLimit,
    warnings,
  };
}
