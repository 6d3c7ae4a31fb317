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
import { MIN_PICKS_PER_SHOT } from '../picks/read-pick-table.js';
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
  // Rounded as a pick table is written (0.1 µs for times, 1 µs for sigmas): far below any sample
  // interval, and a table of picks reads as numbers, not as binary fractions.
  const firstBreaks = pickFirstBreaks(traces, options).map((pick) => ({
    ...pick,
    time: pick.time === null ? null : roundTo(pick.time, TIME_STEP),
    sigma: pick.sigma === null ? null : Math.max(SIGMA_STEP, roundTo(pick.sigma, SIGMA_STEP)),
  }));
  return { gather, firstBreaks };
}

const TIME_STEP = 1e-7;
const SIGMA_STEP = 1e-6;
/** `value` to the nearest multiple of `step` (step a power of ten), without binary fraction noise. */
function roundTo(value: number, step: number): number {
  const digits = Math.round(-Math.log10(step));
  return Number(value.toFixed(digits));
}

/**
 * Pick one shot gather, or say why its options cannot pick it: the picker throws a RangeError on
 * options it cannot use with a trace (a band-pass at or above the trace's Nyquist frequency, say),
 * which for a user's options is a problem with the input, not a bug.
 */
export function pickShotOutcome(gather: ShotGather, options: Partial<PickingOptions> = {}): { ok: true; value: PickedShot } | { ok: false; problems: Problem[] } {
  try {
    return { ok: true, value: pickShot(gather, options) };
  } catch (error) {
    if (!(error instanceof RangeError)) throw error;
    return {
      ok: false,
      problems: [{
        code: 'picking-options-invalid', severity: 'error', line: 0, column: null,
        message: `shot ${JSON.stringify(gather.shot)} cannot be picked with these options: ${error.message}`,
        fix: 'choose filter corners below the Nyquist frequency (half the sampling rate) and windows longer than the sample interval',
      }],
    };
  }
}

/** Split a gather read from a file into shots (see `shotGathers`) and pick each. */
export function pickGather(gather: Gather, fileStem: string, correction: GeometryCorrection = {}, options: Partial<PickingOptions> = {}): PickedGatherOutcome {
  const shots = shotGathers(gather, fileStem, correction);
  if (!shots.ok) return shots;
  const picked: PickedShot[] = [];
  for (const shot of shots.value) {
    const outcome = pickShotOutcome(shot, options);
    if (!outcome.ok) return outcome;
    picked.push(outcome.value);
  }
  return { ok: true, shots: picked, warnings: shots.warnings };
}

/** The picks of picked shots, in shot and trace order. */
export function picksOfShots(shots: readonly PickedShot[]): Pick[] {
  return shots.flatMap((shot) => shotPicks(shot.gather, shot.firstBreaks));
}

/**
 * The pick set of freshly picked shots added to earlier picks: every earlier pick of a shot that
 * was not picked again is kept; the shots picked now replace any earlier picks of the same name.
 */
export function mergeShotPicks(earlier: readonly Pick[], shots: readonly PickedShot[]): { pickSet: PickSet; warnings: Problem[]; usable: ReadonlySet<string> } {
  const fresh = picksOfShots(shots);
  const counts = new Map<string, number>();
  for (const pick of fresh) counts.set(pick.shot, (counts.get(pick.shot) ?? 0) + 1);
  // A shot whose new gather gives too few picks keeps its earlier picks (with a warning), rather
  // than losing them to a dead or mis-recorded file.
  const usable = new Set(shots.map((shot) => shot.gather.shot).filter((shot) => (counts.get(shot) ?? 0) >= MIN_PICKS_PER_SHOT));
  const kept = earlier.filter((pick) => !usable.has(pick.shot));
  const keptShots = new Set(kept.map((pick) => pick.shot));
  const warnings: Problem[] = [];
  for (const shot of shots) {
    const name = shot.gather.shot;
    if (usable.has(name)) continue;
    warnings.push({
      code: 'gather-shot-too-few-picks', severity: 'warning', line: 0, column: null,
      message: `shot ${JSON.stringify(name)} gave ${counts.get(name) ?? 0} usable pick${counts.get(name) === 1 ? '' : 's'}, fewer than the ${MIN_PICKS_PER_SHOT} a shot needs${keptShots.has(name) ? '; its earlier picks were kept' : ', and was left out'}`,
      fix: 'look at the gather: pick its first breaks by hand, or change the filter and pick again',
    });
  }
  const merged = pickSetOf([...kept, ...fresh.filter((pick) => usable.has(pick.shot))]);
  return { pickSet: merged.pickSet, warnings: [...warnings, ...merged.warnings], usable };
}

/** File name without folders and without its last extension: a lone shot's default name. */
export function fileStemOf(fileName: string): string {
  const base = fileName.split(/[\\/]/).pop() ?? fileName;
  const dot = base.lastIndexOf('.');
  const stem = dot > 0 ? base.slice(0, dot) : base;
  return stem.trim() === '' ? 'shot' : stem.trim();
}
