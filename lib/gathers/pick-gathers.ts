/**
 * Gather files to first-break picks: read (any format in the registry), split into shots, place
 * every trace on the line, pick every trace, and gather the picks into one pick set in the
 * pick-table contract. The command line and the service both go through `pickGatherFile`, so a
 * gather gives the same picks whichever way it arrives.
 */
import type { Problem } from '../problems.js';
import type { Pick, PickSet } from '../picks/types.js';
import { pickFirstBreaks, type PickingOptions, type TracePick } from '../picking/index.js';
import { pickSetOf, shotPicks } from './gather-picks.js';
import type { Gather } from './gather.js';
import { shotGathers, type GeometryCorrection, type ShotGather } from './shot-gathers.js';

/** One shot with what the picker made of each of its traces (in trace order). */
export interface PickedShot {
  readonly gather: ShotGather;
  readonly firstBreaks: readonly TracePick[];
}

export type PickedGatherOutcome =
  | { readonly ok: true; readonly shots: readonly PickedShot[]; readonly warnings: readonly Problem[] }
  | { readonly ok: false; readonly problems: readonly Problem[] };

/** Pick one shot gather's traces. */
export function pickShot(gather: ShotGather, options: Partial<PickingOptions> = {}): PickedShot {
  const traces = gather.traces.map((placed) => ({
    samples: placed.trace.samples,
    sampleInterval: placed.trace.sampleInterval,
    delay: placed.trace.delay,
    offset: placed.offset,
  }));
  return { gather, firstBreaks: pickFirstBreaks(traces, options) };
}

/** Split a gather read from a file into shots (see `shotGathers`) and pick each. */
export function pickGather(gather: Gather, fileStem: string, correction: GeometryCorrection = {}, options: Partial<PickingOptions> = {}): PickedGatherOutcome {
  const shots = shotGathers(gather, fileStem, correction);
  if (!shots.ok) return shots;
  return { ok: true, shots: shots.value.map((shot) => pickShot(shot, options)), warnings: shots.warnings };
}

/** The picks of picked shots, in shot and trace order. */
export function picksOfShots(shots: readonly PickedShot[]): Pick[] {
  return shots.flatMap((shot) => shotPicks(shot.gather, shot.firstBreaks));
}

/**
 * The pick set of freshly picked shots added to earlier picks: every earlier pick of a shot that
 * was not picked again is kept; the shots picked now replace any earlier picks of the same name.
 */
export function mergeShotPicks(earlier: readonly Pick[], shots: readonly PickedShot[]): { pickSet: PickSet; warnings: Problem[] } {
  const replaced = new Set(shots.map((shot) => shot.gather.shot));
  return pickSetOf([...earlier.filter((pick) => !replaced.has(pick.shot)), ...picksOfShots(shots)]);
}

/** File name without folders and without its last extension: a lone shot's default name. */
export function fileStemOf(fileName: string): string {
  const base = fileName.split(/[\\/]/).pop() ?? fileName;
  const dot = base.lastIndexOf('.');
  const stem = dot > 0 ? base.slice(0, dot) : base;
  return stem.trim() === '' ? 'shot' : stem.trim();
}
