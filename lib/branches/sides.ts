/**
 * Split a pick set into shot sides: the picks of one shot on one side of its source, sorted by
 * offset, ready for branch segmentation (METHODS §4: "each shot and side separately").
 *
 * Order: shots in `pickSet.shotIds` order; for each shot the forward side (receiverX > sourceX)
 * and then the reverse side (receiverX < sourceX); a side without picks is left out. Offsets are
 * |receiverX − sourceX| ascending, ties kept in file order.
 *
 * What stays out of the sides (listed by `picksLeftOutOfSides`):
 * - excluded picks (`pick.excluded`): never fitted, so never in `SidePicks` (an excluded pick at
 *   zero offset counts as excluded);
 * - picks at zero offset (receiverX = sourceX): they belong to neither side.
 *
 * Per side: `sigmas` is the list of pick sigmas only when every pick on the side has one, else
 * null; `userBranches` carries each pick's user branch (null = automatic); `pickIndices` maps
 * back into `pickSet.picks`. `surfaceShot` is true unless some pick of the shot gives a source
 * depth above 0.
 *
 * Edges: a shot whose picks disagree on the source position is a contract violation of the pick
 * set (one shot, one source position) and throws, naming the shot and the two lines; a shot id
 * with no picks gives no sides.
 *
 * @example
 * splitShotSides(pickSet)
 * // → [{ shot: 'S1', side: 'forward', sourceX: 0, offsets: [5, 10, …], times: [0.0125, …], … },
 * //    { shot: 'S2', side: 'reverse', sourceX: 120, offsets: [5, 10, …], … }, …]
 */
import type { Pick, PickSet } from '../picks/types.js';
import type { Side, SidePicks } from './types.js';

export function splitShotSides(pickSet: PickSet): SidePicks[] {
  const byShot = picksByShot(pickSet);
  const sides: SidePicks[] = [];
  for (const shot of pickSet.shotIds) {
    const indices = byShot.get(shot) ?? [];
    const first = indices[0];
    if (first === undefined) continue;
    const firstPick = pickSet.picks[first] as Pick;
    const sourceX = firstPick.sourceX;
    for (const index of indices) {
      const pick = pickSet.picks[index] as Pick;
      if (pick.sourceX !== sourceX) {
        throw new RangeError(
          `splitShotSides: shot ${shot} has its source at ${sourceX} m on line ${firstPick.line} but at ${pick.sourceX} m on line ${pick.line}; ` +
            'one shot must have one source position (the pick-table reader should have refused this)',
        );
      }
    }
    const surfaceShot = indices.every((index) => ((pickSet.picks[index] as Pick).sourceDepth ?? 0) <= 0);
    for (const side of ['forward', 'reverse'] as const satisfies readonly Side[]) {
      const members = indices.filter((index) => {
        const pick = pickSet.picks[index] as Pick;
        if (pick.excluded) return false;
        return side === 'forward' ? pick.receiverX > sourceX : pick.receiverX < sourceX;
      });
      if (members.length === 0) continue;
      const offsetOf = (index: number): number => Math.abs((pickSet.picks[index] as Pick).receiverX - sourceX);
      // Array.prototype.sort is stable, so equal offsets keep file order.
      members.sort((left, right) => offsetOf(left) - offsetOf(right));
      const picks = members.map((index) => pickSet.picks[index] as Pick);
      const everySigma = picks.every((pick) => pick.sigma !== null);
      sides.push({
        shot,
        side,
        sourceX,
        offsets: members.map(offsetOf),
        times: picks.map((pick) => pick.time),
        sigmas: everySigma ? picks.map((pick) => pick.sigma as number) : null,
        userBranches: picks.map((pick) => pick.branch),
        pickIndices: members,
        surfaceShot,
      });
    }
  }
  return sides;
}

/** Picks that `splitShotSides` leaves out, as indices into `pickSet.picks`, in file order. */
export interface PicksLeftOut {
  /** Picks the user excluded (wherever they lie). */
  readonly excluded: readonly number[];
  /** Picks not excluded but at zero offset, on neither side. */
  readonly zeroOffset: readonly number[];
}

/**
 * The picks no `SidePicks` holds: excluded picks, and picks at zero offset. Together with the
 * sides' `pickIndices` they account for every pick exactly once.
 */
export function picksLeftOutOfSides(pickSet: PickSet): PicksLeftOut {
  const excluded: number[] = [];
  const zeroOffset: number[] = [];
  pickSet.picks.forEach((pick, index) => {
    if (pick.excluded) excluded.push(index);
    else if (pick.receiverX === pick.sourceX) zeroOffset.push(index);
  });
  return { excluded, zeroOffset };
}

function picksByShot(pickSet: PickSet): Map<string, number[]> {
  const byShot = new Map<string, number[]>();
  pickSet.picks.forEach((pick, index) => {
    const list = byShot.get(pick.shot);
    if (list) list.push(index);
    else byShot.set(pick.shot, [index]);
  });
  return byShot;
}
