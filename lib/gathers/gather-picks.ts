/**
 * First breaks picked on shot gathers, as a pick set in the pick-table contract — the same
 * contract a CSV pick table is read into — so the interpretation cannot tell where picks came
 * from. Every pick carries its picker's sigma, which the branch fits use as a weight.
 *
 * A trace whose pick the picker rejected (or found none on) gives no pick; a shot left with fewer
 * than three picks (the pick-table reader's minimum) gives none at all and a warning naming it.
 */
import type { Problem } from '../problems.js';
import type { Pick, PickSet } from '../picks/types.js';
import { MIN_PICKS_PER_SHOT } from '../picks/read-pick-table.js';
import type { ShotGather } from './shot-gathers.js';

/** What a picker gives for one trace (the fields of lib/picking's TracePick this needs). */
export interface TraceFirstBreak {
  /** Seconds after the shot, or null when none was found. */
  readonly time: number | null;
  readonly sigma: number | null;
  /** True when the pick is to be kept out of the pick set. */
  readonly rejected: boolean;
}

/** Offsets at or beyond which a gather is a crustal profile (km units): 20 km, common practice. */
export const CRUSTAL_OFFSET_METRES = 20_000;

/** The picks of one shot gather, in trace order; `firstLine` numbers them as rows of a table. */
export function shotPicks(shot: ShotGather, firstBreaks: readonly TraceFirstBreak[], firstLine = 1): Pick[] {
  if (firstBreaks.length !== shot.traces.length) {
    throw new Error(`shotPicks: ${firstBreaks.length} first breaks for ${shot.traces.length} traces of shot ${shot.shot}`);
  }
  const picks: Pick[] = [];
  shot.traces.forEach((placed, index) => {
    const pick = firstBreaks[index]!;
    if (pick.rejected || pick.time === null || pick.time < 0) return;
    picks.push({
      shot: shot.shot,
      receiver: placed.receiver,
      sourceX: shot.sourceX,
      receiverX: placed.receiverX,
      time: pick.time,
      sigma: pick.sigma !== null && pick.sigma > 0 ? pick.sigma : null,
      branch: null,
      excluded: false,
      sourceElevation: shot.sourceElevation,
      receiverElevation: placed.receiverElevation,
      sourceDepth: shot.sourceDepth,
      uphole: null,
      sourceLat: null, sourceLon: null, receiverLat: null, receiverLon: null,
      line: firstLine + picks.length,
    });
  });
  return picks;
}

export interface PickSetOptions {
  /** The pick set these picks were edited from: its coordinate system and scale are kept. */
  readonly base?: PickSet;
  /** Shots that were picked, so that one left with no pick at all is warned about too. */
  readonly shots?: readonly string[];
}

/** A pick set from picks already made; picks of shots with too few are dropped with a warning. */
export function pickSetOf(picks: readonly Pick[], options: PickSetOptions = {}): { pickSet: PickSet; warnings: Problem[] } {
  const byShot = new Map<string, number>();
  for (const shot of options.shots ?? []) byShot.set(shot, 0);
  for (const pick of picks) byShot.set(pick.shot, (byShot.get(pick.shot) ?? 0) + 1);
  const warnings: Problem[] = [];
  for (const [shot, count] of byShot) {
    if (count >= MIN_PICKS_PER_SHOT) continue;
    warnings.push({
      code: 'gather-shot-too-few-picks', severity: 'warning', line: 0, column: null,
      message: `shot ${JSON.stringify(shot)} kept ${count} pick${count === 1 ? '' : 's'}, fewer than the ${MIN_PICKS_PER_SHOT} a shot needs, and was left out`,
      fix: 'look at the gather: pick its first breaks by hand, or change the filter and re-pick',
    });
  }
  const kept = picks.filter((pick) => (byShot.get(pick.shot) ?? 0) >= MIN_PICKS_PER_SHOT).map((pick, index) => ({ ...pick, line: index + 1 }));
  const shotIds = [...new Set(kept.map((pick) => pick.shot))];
  const longest = kept.reduce((most, pick) => Math.max(most, Math.abs(pick.receiverX - pick.sourceX)), 0);
  const has = (value: (pick: Pick) => unknown) => kept.some((pick) => value(pick) !== null);
  return {
    pickSet: {
      picks: kept,
      shotIds,
      coordinateSystem: options.base?.coordinateSystem ?? 'line',
      columns: {
        receiver: has((pick) => pick.receiver),
        sigma: has((pick) => pick.sigma),
        branch: has((pick) => pick.branch),
        sourceElevation: has((pick) => pick.sourceElevation),
        receiverElevation: has((pick) => pick.receiverElevation),
        sourceDepth: has((pick) => pick.sourceDepth),
        uphole: has((pick) => pick.uphole),
      },
      suggestedScale: options.base?.suggestedScale ?? (longest >= CRUSTAL_OFFSET_METRES ? 'crustal' : 'engineering'),
    },
    warnings,
  };
}
