/**
 * The crustal-profile results as table data: the earth-curvature decision with the layers refit in
 * a sphere beside the bias of a flat reading, and the stations of a geographic table that lie far
 * off the profile line. Pure: builds rows of text that results-view.ts draws, for the workspace and
 * the printable report alike. Meaning is carried by words: a station beyond the off-line limit is
 * marked "off the line" in its row.
 */
import type { Interpretation } from './api-types.js';
import { plain, withError } from './format.js';
import type { Row, Table } from './reversed-results.js';

/** The word that marks a station beyond the off-line limit. */
export const OFF_LINE_MARK = 'off the line';

/** A signed difference with a real minus sign: "+0.0497", "−0.148". */
function signed(value: number | null, digits: number): string {
  if (value === null || !Number.isFinite(value)) return '—';
  const text = Math.abs(value).toFixed(digits);
  return Number(text) === 0 ? text : `${value > 0 ? '+' : '\u2212'}${text}`;
}

/** The earth-curvature block's sentence: what was used and why, with the flat-earth limit. */
export function earthCurvatureSentence(result: Interpretation): string | null {
  const curvature = result.earthCurvature;
  if (!curvature) return null;
  const { units } = result;
  const limit = curvature.flatErrorOffset === null
    ? 'a flat earth stays within the pick sigma at every offset'
    : `a flat earth errs by more than the pick sigma (${plain(curvature.pickSigma, 3)}\u202f${units.time}) beyond ${plain(curvature.flatErrorOffset, 4)}\u202f${units.distance}`;
  return `${curvature.applied ? 'Spherical earth' : 'Flat earth'} (asked: ${curvature.choice}). The offsets reach ${plain(curvature.maxOffset, 4)}\u202f${units.distance}; ${limit}.`;
}

/** The layers refit in a sphere beside the flat reading's bias; empty rows when no fit was run. */
export function sphericalLayerTable(result: Interpretation): Table {
  const { units } = result;
  const curvature = result.earthCurvature;
  const velocityDigits = units.velocity === 'km/s' ? 4 : 1;
  const distanceDigits = units.distance === 'km' ? 3 : 2;
  const rows: Row[] = (curvature?.sphericalLayers ?? []).map((layer, k) => ({
    key: String(layer.index),
    flagged: false,
    notes: [],
    cells: [
      { text: `${layer.index} ${layer.phase}`, chip: layer.index },
      { text: withError(layer.velocity, layer.velocitySE), numeric: true },
      { text: layer.thickness === null ? 'half-space' : withError(layer.thickness, layer.thicknessSE), numeric: true },
      { text: k === 0 ? '0 (surface)' : withError(layer.depthToTop, layer.depthToTopSE), numeric: true },
      { text: signed(curvature?.flatBias?.velocity[k] ?? null, velocityDigits), numeric: true },
      { text: k === 0 ? '—' : signed(curvature?.flatBias?.depth[k - 1] ?? null, distanceDigits), numeric: true },
    ],
  }));
  const fit = curvature?.fit;
  return {
    caption: curvature?.applied
      ? 'Layers refit in a sphere (use these; ± one standard error)'
      : 'Layers refit in a sphere, for comparison (not applied; ± one standard error)',
    columns: ['Layer', `Velocity (${units.velocity})`, `Thickness (${units.distance})`, `Top at depth (${units.distance})`, `Flat − sphere (${units.velocity})`, `Flat − sphere (${units.distance})`],
    rows,
    footnotes: fit
      ? [
          `Sphere of radius ${plain(curvature!.radius, 5)}\u202f${units.distance}, ${fit.pickCount} picks, RMS ${plain(fit.rms, 3)}\u202f${units.time}, ${fit.iterations} iterations${fit.converged ? '' : ' (not converged)'}.`,
          'Flat − sphere: what a flat-earth reading of the same offsets carries (the sphere\u2019s own times read with flat formulas).',
          ...fit.notes,
        ]
      : [],
  };
}

/** Stations and shots of a geographic table beyond the off-line limit, farthest first. */
export function offLineTable(result: Interpretation): Table {
  const { units } = result;
  const geometry = result.geometry;
  const limit = geometry?.offLineLimit ?? Number.POSITIVE_INFINITY;
  const points = [
    ...(geometry?.shots ?? []).map((shot) => ({ name: `shot ${shot.shot}`, key: `shot ${shot.shot}`, ...shot, spread: null as number | null })),
    ...(geometry?.stations ?? []).map((station) => ({ name: station.station, key: `station ${station.station}`, ...station, spread: station.receiverXSpread })),
  ].filter((point) => Math.abs(point.offLineDistance) > limit);
  points.sort((left, right) => Math.abs(right.offLineDistance) - Math.abs(left.offLineDistance));
  return {
    caption: 'Shots and stations off the profile line',
    columns: ['Shot or station', 'Latitude, longitude (°)', `Along the line (${units.distance})`, `Off the line (${units.distance})`, `Position spread over the shots (${units.distance})`],
    rows: points.map((point) => ({
      key: point.key,
      flagged: true,
      notes: [],
      cells: [
        { text: point.name },
        { text: `${point.lat.toFixed(5)}, ${point.lon.toFixed(5)}`, numeric: true },
        { text: plain(point.position, 4), numeric: true },
        { text: `${plain(Math.abs(point.offLineDistance), 3)} ${point.offLineDistance >= 0 ? 'right' : 'left'}`, numeric: true, mark: OFF_LINE_MARK },
        { text: point.spread === null ? '—' : plain(point.spread, 3), numeric: true },
      ],
    })),
    footnotes: geometry
      ? [`Line from ${geometry.line.origin.lat.toFixed(4)}, ${geometry.line.origin.lon.toFixed(4)} to ${geometry.line.end.lat.toFixed(4)}, ${geometry.line.end.lon.toFixed(4)}, azimuth ${geometry.line.azimuth.toFixed(1)}°, ${plain(geometry.line.length, 4)}\u202f${units.distance}; offsets are the geodesic shot–station distances; off the line means more than ${plain(limit, 3)}\u202f${units.distance}.`]
      : [],
  };
}

/** The time-term block's sentence: refractor, velocity, constraint and fit. */
export function timeTermSentence(result: Interpretation): string | null {
  const terms = result.timeTerms;
  if (!terms) return null;
  const { units } = result;
  const surface = terms.velocity !== terms.lineVelocity ? ` (at the refractor\u2019s radius; ${plain(terms.lineVelocity, 5)} along the surface)` : '';
  return `Time terms of ${terms.phase} (branch ${terms.branch}): velocity ${withError(terms.velocity, terms.velocitySE)}\u202f${units.velocity}${surface}, from ${terms.pickCount} picks (${terms.rejectedCount} left out), RMS ${plain(terms.rms, 3)}\u202f${units.time}. Constraint: ${terms.constraint}`;
}

/** Every station's time term and the depth of the refractor under it, along the line. */
export function stationDepthTable(result: Interpretation): Table {
  const { units } = result;
  const terms = result.timeTerms;
  return {
    caption: `Depth of ${terms?.phase ?? 'the refractor'}\u2019s refractor under each station (time-term method, ± one standard error)`,
    columns: ['Station', `Along the line (${units.distance})`, `Time term (${units.time})`, 'Picks', `Depth (${units.distance})`],
    rows: (terms?.stations ?? []).map((station) => ({
      key: station.id,
      flagged: false,
      notes: station.depthNote === null ? [] : [station.depthNote],
      cells: [
        { text: station.id, details: station.sharedWith === null ? [] : [`shares its term with shot ${station.sharedWith}`] },
        { text: plain(station.position + 0, 4), numeric: true },
        { text: withError(station.term, station.termSE), numeric: true },
        { text: String(station.picks), numeric: true },
        { text: station.depth === null ? '—' : withError(station.depth, station.depthSE), numeric: true },
      ],
    })),
    footnotes: terms
      ? ['A time term belongs to where the rays cross the refractor, offset towards the shots by about h·tan θ: read the depths as a smoothed regional profile, not point depths under each station.']
      : [],
  };
}
