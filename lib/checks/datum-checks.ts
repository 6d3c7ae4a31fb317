/**
 * Checks of the reference surface and the shot depths before the delay-time methods use them
 * (METHODS §8; Telford1990 ch. 4):
 *
 * - `elevation-missing`: with a datum, a shot or receiver without a ground elevation cannot be
 *   lowered to it; its picks are left out of the datum-referred depths (never a silent 0 m lowering);
 * - `datum-above-ground`: the datum should lie below every source and receiver end (a source end
 *   is its ground elevation minus its depth); above one, that end is raised through the near-surface
 *   layer, which the correction only approximates;
 * - `datum-too-low`: a side's total correction exceeds half its corrected intercept time
 *   (`datumTooLow`): the datum reaches into or below the near-surface layer and needs a replacement
 *   velocity, or a higher datum;
 * - `shot-below-layer`: a buried shot deeper than the base of layer 1 (its brought-up time assumes
 *   layer 1 above it, METHODS §8: the correction needs the layers above the shot), and a shot at or
 *   below refractor n, which has no head wave of refractor n in the usual sense: that side is left
 *   out of refractor n.
 *
 * Depths of the layer bases are the survey's plane-layer depths (the deeper the check, the rougher
 * this is over an undulating refractor; the message says so).
 */
import type { PickSet } from '../picks/types.js';
import { datumTooLow } from '../depth/near-surface-corrections.js';
import type { SideRefractorArrivals } from '../interpretation/refractor-arrivals.js';
import type { InterpretationWarning } from './warning.js';
import { formatQuantity } from './wording.js';

const m = (metres: number) => formatQuantity(metres, 'm', 4);

/** Up to `shown` items and how many more. */
function listed(items: readonly string[], shown = 6): string {
  return items.length <= shown ? items.join(', ') : `${items.slice(0, shown).join(', ')} and ${items.length - shown} more`;
}

export interface ElevationGaps {
  /** Shots without a source elevation. */
  readonly shots: ReadonlySet<string>;
  /** Receiver positions (m, keyed by toFixed(6)) without an elevation in some pick. */
  readonly receivers: ReadonlySet<string>;
}

export function elevationGaps(pickSet: PickSet): ElevationGaps {
  const shots = new Set<string>();
  const receivers = new Set<string>();
  for (const pick of pickSet.picks) {
    if (pick.sourceElevation === null) shots.add(pick.shot);
    if (pick.receiverElevation === null) receivers.add(pick.receiverX.toFixed(6));
  }
  return { shots, receivers };
}

/** Warnings about the datum itself, before any correction: missing elevations, a datum above an end. */
export function datumWarnings(pickSet: PickSet, datum: number, gaps: ElevationGaps): InterpretationWarning[] {
  const warnings: InterpretationWarning[] = [];
  if (gaps.shots.size > 0 || gaps.receivers.size > 0) {
    const parts: string[] = [];
    if (gaps.shots.size > 0) parts.push(`shot${gaps.shots.size > 1 ? 's' : ''} ${listed([...gaps.shots])} (source elevation blank)`);
    if (gaps.receivers.size > 0) {
      const positions = [...gaps.receivers].map(Number).sort((left, right) => left - right);
      parts.push(`${positions.length} receiver position${positions.length > 1 ? 's' : ''} at x = ${listed(positions.map((x) => m(x)))} (receiver elevation blank)`);
    }
    warnings.push({
      code: 'elevation-missing',
      level: 'warning',
      message: `datum at ${m(datum)}: ${parts.join(' and ')} ${parts.length === 1 && /^(1 |shot )/.test(parts[0]!) ? 'has' : 'have'} no ground elevation, so their picks cannot be lowered to the datum and are left out of the delay-time depths; fill in the elevation cells (any length unit, e.g. source_elev_m, receiver_elev_ft) or drop the datum to refer depths to the ground`,
      details: { shots: gaps.shots.size, receivers: gaps.receivers.size },
    });
  }
  const ends: { what: string; elevation: number }[] = [];
  const seenShots = new Set<string>();
  const seenReceivers = new Set<string>();
  for (const pick of pickSet.picks) {
    if (pick.sourceElevation !== null && !seenShots.has(pick.shot)) {
      seenShots.add(pick.shot);
      const depth = pick.sourceDepth ?? 0;
      ends.push({ what: depth > 0 ? `shot ${pick.shot} (${m(depth)} deep)` : `shot ${pick.shot}`, elevation: pick.sourceElevation - depth });
    }
    const key = pick.receiverX.toFixed(6);
    if (pick.receiverElevation !== null && !seenReceivers.has(key)) {
      seenReceivers.add(key);
      ends.push({ what: `the receiver at x = ${m(pick.receiverX)}`, elevation: pick.receiverElevation });
    }
  }
  const above = ends.filter((end) => end.elevation < datum).sort((left, right) => left.elevation - right.elevation);
  if (above.length > 0) {
    const lowest = above[0]!;
    warnings.push({
      code: 'datum-above-ground',
      level: 'warning',
      message: `the datum at ${m(datum)} lies above ${above.length} source or receiver end${above.length > 1 ? 's' : ''} (lowest: ${lowest.what} at ${m(lowest.elevation)}); those ends are raised to the datum through the near-surface velocity, which the correction only approximates — choose a datum at or below ${m(lowest.elevation)}`,
      details: { datum, lowestEnd: lowest.elevation, endsBelowDatum: above.length },
    });
  }
  return warnings;
}

/**
 * `datum-too-low` for each side where one end's datum correction (the shot's, or the largest
 * receiver's) exceeds half its corrected intercept time (METHODS §8: "warn if a correction exceeds
 * half the corrected intercept"): on flat ground, a datum below the middle of the top layer. A
 * corrected intercept at or below zero means the datum lies at or below the refractor itself.
 */
export function datumDepthWarnings(arrivals: readonly SideRefractorArrivals[], datum: number): InterpretationWarning[] {
  const warnings: InterpretationWarning[] = [];
  for (const side of arrivals) {
    const largest = Math.max(Math.abs(side.sourceCorrection), side.largestReceiverCorrection);
    if (!datumTooLow(largest, side.line.intercept)) continue;
    const below = !(side.line.intercept > 0);
    warnings.push({
      code: 'datum-too-low',
      level: 'warning',
      message: below
        ? `shot ${side.shot}, ${side.side} side, refractor ${side.refractor}: the datum at ${m(datum)} lies at or below the refractor (the intercept time corrected to it is ${formatQuantity(side.line.intercept * 1000, 'ms', 3)}) — choose a datum within the top layer, or refer depths to the ground`
        : `shot ${side.shot}, ${side.side} side, refractor ${side.refractor}: lowering one end to the datum at ${m(datum)} removes up to ${formatQuantity(largest * 1000, 'ms', 3)}, more than half the corrected intercept time (${formatQuantity(side.line.intercept * 1000, 'ms', 3)}); the datum lies deep in the near-surface layer, where its velocity matters most — choose a higher datum or refer depths to the ground`,
      shot: side.shot,
      side: side.side,
      layer: side.refractor,
      details: { correction: largest, correctedIntercept: side.line.intercept },
    });
  }
  return warnings;
}

export interface BuriedShotPlacement {
  /** Sides left out of refractor n: "shot\u0000n". */
  readonly excluded: ReadonlySet<string>;
  readonly warnings: readonly InterpretationWarning[];
}

/**
 * Buried shots against the plane-layer depths z_2…z_N of the survey (below ground): deeper than
 * layer 1 is warned about; at or below refractor n, that shot's sides are left out of refractor n.
 */
export function buriedShotPlacement(pickSet: PickSet, planeDepths: readonly number[]): BuriedShotPlacement {
  const depths = new Map<string, number>();
  for (const pick of pickSet.picks) if ((pick.sourceDepth ?? 0) > 0 && !depths.has(pick.shot)) depths.set(pick.shot, pick.sourceDepth!);
  const excluded = new Set<string>();
  const warnings: InterpretationWarning[] = [];
  const base = planeDepths[0];
  for (const [shot, depth] of depths) {
    if (base === undefined || !(base > 0) || depth <= base) continue;
    const under = planeDepths.map((z, k) => ({ refractor: k + 2, z })).filter((entry) => entry.z > 0 && depth >= entry.z).map((entry) => entry.refractor);
    for (const refractor of under) excluded.add(`${shot}\u0000${refractor}`);
    warnings.push({
      code: 'shot-below-layer',
      level: 'warning',
      message: `shot ${shot} is ${m(depth)} deep, below the base of layer 1 (${m(base)} by the survey's plane layers, rougher where the refractor undulates); its times are brought up through layer 1 alone, which is wrong by the part of the deeper layers above it${under.length > 0 ? `, and it lies at or below refractor${under.length > 1 ? 's' : ''} ${under.join(', ')}, whose head wave it cannot record in the usual sense, so that shot is left out of ${under.length > 1 ? 'those refractors' : 'that refractor'}` : ''} — check the shot depth, or treat the shot as a down-hole source`,
      shot,
      details: { shotDepth: depth, layerOneBase: base },
    });
  }
  return { excluded, warnings };
}
