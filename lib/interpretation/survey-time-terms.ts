/**
 * The time-term method over the whole survey (ScheideggerWillmore1957; WillmoreBancroft1960;
 * BerryWest1966): the picks of the deepest head-wave branch of every shot side, t_ij = a_i + b_j +
 * Δ_ij·s, solved by `timeTerms` (dense or LSQR, PaigeSaunders1982), and each station's time term
 * turned into the depth of that refractor under it (`timeTermDepths`) through the layers above.
 *
 * Stations: a pick's `receiver` id when the table has one, else its position along the line
 * (geographic tables always have a position key: the placement keeps latitude and longitude).
 * Offsets: the engine's |receiverX − sourceX|, which for geographic tables is the geodesic distance.
 *
 * The constraint that splits a_i + b_j between shot and station: where shots stand at stations
 * (within CO_LOCATED_DISTANCE, or a quarter of the median station spacing if smaller), each such
 * shot shares its unknown with that station — a physical statement (the same ground under both),
 * so time terms and depths are absolute; otherwise equal sums Σa = Σb per component, stated, and the
 * depths then carry that choice (a `time-term-note` says so).
 *
 * Earth curvature: where the layers were refit in a sphere (`earth-curvature.ts`), the line's
 * velocity is the refractor velocity seen along the surface arc; the head wave runs along the
 * refractor at radius r = R − H, so V = V_line·r/R (the flattening relation v = v_f·r/R,
 * Muller1971), and the depths use the sphere's crust. Otherwise the plane layers above.
 *
 * Edges: null when the survey model has fewer than two layers, or the deepest branch is seen by
 * fewer than 2 shots or 3 stations (nothing to separate); a station whose time term does not allow
 * a positive thickness gets a depth of null with the reason.
 */
import type { SideSegmentation } from '../branches/types.js';
import type { PickSet } from '../picks/types.js';
import type { InterpretationWarning } from '../checks/warning.js';
import type { LayeredModel } from '../model/layered-model.js';
import type { Estimate } from '../depth/dipping-layer.js';
import { timeTerms, type CoLocatedPair, type TimeTermResult } from '../depth/time-term.js';
import { timeTermDepths, type TimeTermDepth } from '../depth/time-term-depth.js';
import { median } from '../branches/median.js';
import { unionFind } from '../stats/union-find.js';
import type { EarthCurvature } from './earth-curvature.js';
import type { CombinedLayers } from './survey-layers.js';

/** A shot this close to a station (m) stands at it, at most (common practice: within a few hundred metres at crustal scale). */
export const CO_LOCATED_DISTANCE = 500;

export interface StationDepth {
  readonly station: string;
  /** Along-line position, m (the mean receiverX of its picks). */
  readonly position: number;
  readonly elevation: number | null;
  readonly depth: TimeTermDepth;
}

export interface SurveyTimeTerms {
  /** The refractor: branch n, the top of layer n. */
  readonly branch: number;
  readonly result: TimeTermResult;
  /** The refractor velocity: the line's, or corrected to the refractor's radius in a sphere. */
  readonly velocity: Estimate;
  /** The velocity the line itself gives (equal to `velocity` on a flat earth). */
  readonly lineVelocity: Estimate;
  readonly sphere: boolean;
  readonly coLocated: readonly CoLocatedPair[];
  readonly stations: readonly StationDepth[];
  readonly warnings: readonly InterpretationWarning[];
}

const stationKey = (receiver: string | null, x: number) => receiver ?? `x=${x.toFixed(3)}`;

export function surveyTimeTerms(
  pickSet: PickSet,
  segmentations: readonly SideSegmentation[],
  model: LayeredModel | null,
  combined: CombinedLayers,
  curvature: EarthCurvature | null,
  skipped?: InterpretationWarning[],
  gradient = false,
): SurveyTimeTerms | null {
  if (model === null || model.velocities.length < 2) return null;
  const branch = model.velocities.length;
  const rows: { shot: string; station: string; distance: number; time: number; sigma: number | null }[] = [];
  const positions = new Map<string, number[]>();
  const elevations = new Map<string, number>();
  for (const { sidePicks, branches } of segmentations) {
    const deepest = branches.find((entry) => entry.index === branch);
    if (!deepest) continue;
    for (const member of deepest.members) {
      const pick = pickSet.picks[sidePicks.pickIndices[member]!]!;
      const station = stationKey(pick.receiver, pick.receiverX);
      rows.push({ shot: pick.shot, station, distance: sidePicks.offsets[member]!, time: sidePicks.times[member]!, sigma: pick.sigma });
      const xs = positions.get(station);
      if (xs) xs.push(pick.receiverX);
      else positions.set(station, [pick.receiverX]);
      if (pick.receiverElevation !== null) elevations.set(station, pick.receiverElevation);
    }
  }
  const shots = new Set(rows.map((row) => row.shot));
  if (shots.size < 2 || positions.size < 3) return null;

  // Shots standing at stations share their unknown with them.
  const stationAt = [...positions.entries()].map(([station, xs]) => ({ station, x: xs.reduce((sum, x) => sum + x, 0) / xs.length }));
  const ordered = [...stationAt].sort((left, right) => left.x - right.x);
  const gaps = ordered.slice(1).map((entry, k) => entry.x - ordered[k]!.x).filter((gap) => gap > 0);
  const reach = Math.min(CO_LOCATED_DISTANCE, gaps.length > 0 ? median(gaps) / 4 : CO_LOCATED_DISTANCE);
  const shotX = new Map(pickSet.picks.map((pick) => [pick.shot, pick.sourceX]));
  const coLocated: CoLocatedPair[] = [];
  for (const shot of shots) {
    const x = shotX.get(shot)!;
    const nearest = stationAt.reduce<{ station: string; gap: number } | null>((best, entry) => {
      const gap = Math.abs(entry.x - x);
      return best === null || gap < best.gap ? { station: entry.station, gap } : best;
    }, null);
    if (nearest !== null && nearest.gap <= reach) coLocated.push({ shot, station: nearest.station });
  }
  // A pair only ties shot and station within one component of the shot–station graph; every
  // component needs one, else the split rests on equal sums everywhere.
  const component = components(rows);
  const tied = coLocated.filter((pair) => component.get(`shot:${pair.shot}`) === component.get(`station:${pair.station}`));
  const everyComponentTied = new Set(component.values()).size === new Set(tied.map((pair) => component.get(`shot:${pair.shot}`))).size;
  let shared = everyComponentTied ? tied : [];
  // Geometry the data cannot resolve (all stations on one side of all shots, a shared term the picks
  // cannot separate) is a property of the survey, not a bug: the tie is dropped first, then the
  // inversion is left out with a note.
  let solved: { result: TimeTermResult; shared: CoLocatedPair[] } | null = null;
  let refusal = '';
  for (const pairs of shared.length > 0 ? [shared, []] : [[]]) {
    try {
      solved = { result: timeTerms(rows, { constraint: pairs.length > 0 ? { kind: 'co-located', pairs } : { kind: 'equal-sums' }, gradient }), shared: pairs };
      break;
    } catch (error) {
      if (!(error instanceof RangeError)) throw error;
      refusal = error.message.replace(/^timeTerms: /, '');
    }
  }
  if (solved === null) {
    skipped?.push({ code: 'time-term-note', level: 'info', message: `time terms, branch ${branch}: not solved — ${refusal}`, layer: branch });
    return null;
  }
  const { result } = solved;
  shared = solved.shared;

  const sphere = curvature?.applied === true && curvature.fit !== null;
  const fit = sphere ? curvature!.fit! : null;
  const radius = fit?.model.radius ?? 1;
  const refractorDepth = fit ? fit.depths[branch - 2]! : 0;
  const scale = fit ? (radius - refractorDepth) / radius : 1;
  const velocity = { value: result.velocity.value * scale, standardError: result.velocity.standardError * scale };
  const overburdenVelocities: Estimate[] = fit
    ? fit.model.velocities.slice(0, branch - 1).map((value, k) => ({ value, standardError: fit.velocitySE?.[k] ?? 0 }))
    : model.velocities.slice(0, branch - 1).map((value, k) => {
        const entry = combined.slownesses[k];
        return { value, standardError: entry ? entry.standardError / (entry.value * entry.value) : 0 };
      });
  const upperThicknesses: Estimate[] = (fit ? fit.model.thicknesses : model.thicknesses).slice(0, branch - 2).map((value, k) => ({
    value,
    standardError: fit?.thicknessSE?.[k] ?? 0,
  }));
  const corrected: TimeTermResult = { ...result, velocity };
  const depths = timeTermDepths(corrected, { velocities: overburdenVelocities, upperThicknesses }, { elevations });
  const stations: StationDepth[] = depths.map((entry) => {
    const xs = positions.get(entry.id) ?? [];
    const { id, ...depth } = entry;
    return { station: id, position: xs.reduce((sum, x) => sum + x, 0) / Math.max(1, xs.length), elevation: elevations.get(id) ?? null, depth: depth as TimeTermDepth };
  });
  stations.sort((left, right) => left.position - right.position);

  const warnings: InterpretationWarning[] = [];
  const notes = [...result.notes.map((note) => note.message)];
  if (shared.length === 0) {
    notes.push(`${coLocated.length === 0 ? 'no shot stands at a station' : 'the shots that stand at stations do not tie every part of the shot–station graph'}, so the split of each delay between shot and station rests on the constraint Σa = Σb: the depths under the stations carry that choice — add a station at a shot point, or a borehole depth, to tie them down`);
  }
  if (result.rejectedRows.length > 0) {
    const largest = result.rejectedRows.reduce((worst, row) => (Math.abs(row.residual) > Math.abs(worst.residual) ? row : worst));
    notes.push(`${result.rejectedRows.length} pick${result.rejectedRows.length === 1 ? '' : 's'} left out as more than 3 robust SDs off the time-term model (the largest: shot ${largest.shot} at ${largest.station}, ${(largest.residual * 1000).toFixed(0)} ms)`);
  }
  const refused = stations.filter((entry) => !entry.depth.ok);
  if (refused.length > 0) notes.push(`${refused.length} station${refused.length === 1 ? '' : 's'} got no depth: ${refused[0]!.depth.ok ? '' : refused[0]!.depth.message}`);
  for (const note of notes) {
    warnings.push({ code: 'time-term-note', level: 'caution', message: `time terms, branch ${branch}: ${note}`, layer: branch });
  }
  return { branch, result, velocity, lineVelocity: result.velocity, sphere, coLocated: shared, stations, warnings };
}

/** Connected components of the shot–station graph: a label per `shot:id` and `station:id`. */
function components(rows: readonly { shot: string; station: string }[]): Map<string, number> {
  const index = new Map<string, number>();
  const node = (key: string) => {
    let found = index.get(key);
    if (found === undefined) index.set(key, (found = index.size));
    return found;
  };
  const pairs = rows.map((row) => [node(`shot:${row.shot}`), node(`station:${row.station}`)] as const);
  const sets = unionFind(index.size);
  for (const [shot, station] of pairs) sets.union(shot, station);
  return new Map([...index.entries()].map(([key, at]) => [key, sets.find(at)]));
}
