/** Builders of test inputs (picks, pick sets, sides) with every field spelled out. */
import type { Pick, PickSet } from '../../lib/picks/types.js';
import type { Side, SidePicks } from '../../lib/branches/types.js';

export function makePick(fields: Partial<Pick> = {}): Pick {
  return {
    shot: 'S1',
    receiver: null,
    sourceX: 0,
    receiverX: 10,
    time: 0.01,
    sigma: null,
    branch: null,
    excluded: false,
    sourceElevation: null,
    receiverElevation: null,
    sourceDepth: null,
    uphole: null,
    sourceLat: null,
    sourceLon: null,
    receiverLat: null,
    receiverLon: null,
    line: 2,
    ...fields,
  };
}

/** A pick set from picks; shot ids in order of first appearance; lines numbered from 2 unless given. */
export function makePickSet(picks: readonly Partial<Pick>[]): PickSet {
  const full = picks.map((fields, index) => makePick({ line: index + 2, ...fields }));
  return {
    picks: full,
    shotIds: [...new Set(full.map((pick) => pick.shot))],
    coordinateSystem: 'line',
    columns: {
      receiver: false,
      sigma: full.some((pick) => pick.sigma !== null),
      branch: full.some((pick) => pick.branch !== null),
      sourceElevation: false,
      receiverElevation: false,
      sourceDepth: full.some((pick) => pick.sourceDepth !== null),
      uphole: false,
    },
    suggestedScale: 'engineering',
  };
}

/** A side straight from arrays (offsets ascending), automatic unless user branches are given. */
export function makeSide(
  offsets: readonly number[],
  times: readonly number[],
  extra: { sigmas?: readonly number[] | null; userBranches?: readonly (number | null)[]; surfaceShot?: boolean; side?: Side } = {},
): SidePicks {
  return {
    shot: 'S1',
    side: extra.side ?? 'forward',
    sourceX: 0,
    offsets,
    times,
    sigmas: extra.sigmas ?? null,
    userBranches: extra.userBranches ?? offsets.map(() => null),
    pickIndices: offsets.map((_, position) => position),
    surfaceShot: extra.surfaceShot ?? true,
  };
}

/** Recursively freeze an object graph, so a test can prove a function does not mutate its input. */
export function deepFreeze<T>(value: T): T {
  if (value !== null && typeof value === 'object' && !Object.isFrozen(value)) {
    Object.freeze(value);
    for (const inner of Object.values(value as object)) deepFreeze(inner);
  }
  return value;
}
