/**
 * The reversed-profile stage of the pipeline: from the shot sides' branches to true velocities and
 * dips under each shot pair (`dipping-layer.ts`, METHODS §5), and the depth of each refractor under
 * every receiver by the plus-minus method (Hagedoorn1959) and the generalized reciprocal method
 * (Palmer1980), merged along the whole line, then checked forward on a grid (Moser1991).
 *
 *   sides ─> corrected refractor arrivals (`refractor-arrivals.ts`) ─> reversed pairs and reciprocal
 *   times (`reversed-pairs.ts`) ─> per pair: dipping layers, plus-minus, GRM ─> one section per
 *   method and refractor ─> forward check of the GRM section (plus-minus when GRM has none).
 *
 * Overburden: V_1…V_{n−1} are the survey's layer velocities (the mean of the sides' branches);
 * the thickness of every layer but the deepest above refractor n is taken, at each receiver, from
 * the same method's section of the shallower refractors, and where that has no point, from the
 * survey's plane-layer thicknesses.
 *
 * Merging (several spreads, several pairs): at each receiver the section takes the pair of least
 * span x_B − x_A that covers it (the most local pair, with the shortest extrapolation of the
 * overburden and the shortest paths), so one pair's result is never averaged with another's: each
 * point names its pair, and a seam is reported wherever the pair changes, with the depth step
 * between the two pairs measured at the receivers both cover. A step larger than the depths' SEs is
 * the honest sign that the pairs disagree there (a time-zero error, a velocity change, a refractor
 * the overburden model misses).
 *
 * Reference surface: the ground at each receiver, or a flat datum when one is given (times are then
 * corrected to it, `refractor-arrivals.ts`). Each point gives the depth below that reference, the
 * refractor's elevation (when elevations are known), and the depth below the ground.
 */
import type { PickSet } from '../picks/types.js';
import type { SideSegmentation } from '../branches/types.js';
import type { Estimate } from '../depth/dipping-layer.js';
import { dippingLayers, type DippingLayers } from '../depth/dipping-layer.js';
import type { Overburden, ReversedArrivals } from '../depth/delay-depth.js';
import { plusMinus, type PlusMinusResult } from '../depth/plus-minus.js';
import { generalizedReciprocal, type GrmResult } from '../depth/generalized-reciprocal.js';
import { forwardCheck, DEFAULT_FORWARD_CHECK_MAX_NODES, type ForwardCheck } from '../model/forward-check.js';
import type { InterpretationWarning } from '../checks/warning.js';
import { reciprocalTimeWarnings } from '../checks/reciprocal-checks.js';
import { buriedShotPlacement, datumDepthWarnings, datumWarnings, elevationGaps } from '../checks/datum-checks.js';
import { formatQuantity } from '../checks/wording.js';
import type { CombinedLayers } from './survey-layers.js';
import { thicknessesFromDepths } from './survey-layers.js';
import { refractorArrivals, type SideRefractorArrivals } from './refractor-arrivals.js';
import { carryToShots, type ReferenceInterface } from './section-ends.js';
import { reversedPairs, type PairChoice, type RefusedPair, type ReversedPair } from './reversed-pairs.js';

export type DelayMethod = 'plus-minus' | 'generalized-reciprocal';
export const DELAY_METHODS: readonly DelayMethod[] = ['plus-minus', 'generalized-reciprocal'];

export interface ReversedProfileSettings {
  /** The user's pairs, or null for automatic pairing. */
  readonly pairs: readonly PairChoice[] | null;
  /** Datum elevation, m, or null to refer depths to the ground. */
  readonly datumElevation: number | null;
  readonly timeResolution: number;
  /** Run the forward check on a grid (default true). */
  readonly forwardCheck?: boolean;
}

export interface SectionPoint {
  readonly x: number;
  /** Depth of the refractor below the reference surface (the ground at x, or the datum), m. */
  readonly depth: number;
  readonly depthSE: number;
  readonly groundElevation: number | null;
  /** Refractor elevation, m: the reference's elevation minus the depth; null when it is not known. */
  readonly elevation: number | null;
  /** Depth below the ground at x, m; null with a datum but no ground elevation here. */
  readonly depthBelowGround: number | null;
  /** Index of the pair (in `ReversedProfile.pairs`) this point comes from. */
  readonly pair: number;
}

export interface Seam {
  /** Midway between the last receiver of one pair and the first of the next, m. */
  readonly x: number;
  readonly fromPair: number;
  readonly toPair: number;
  /** Mean depth of the new pair minus the old one's at the receivers both cover, m (null: none in common). */
  readonly step: number | null;
  readonly stepSE: number | null;
  readonly commonReceivers: number;
}

export interface DelaySection {
  readonly method: DelayMethod;
  readonly refractor: number;
  /** Inverse-variance mean of the pairs' refractor velocities V_n′, m/s. */
  readonly velocity: Estimate | null;
  readonly points: readonly SectionPoint[];
  readonly seams: readonly Seam[];
}

export interface PairAnalysis {
  readonly pair: ReversedPair;
  readonly plusMinus: PlusMinusResult;
  readonly generalizedReciprocal: GrmResult;
}

export interface ShotPairDipping {
  readonly forwardShot: string;
  readonly reverseShot: string;
  readonly spreadLength: number;
  readonly result: DippingLayers;
}

export interface ReversedProfile {
  readonly pairs: readonly PairAnalysis[];
  readonly refused: readonly RefusedPair[];
  readonly dipping: readonly ShotPairDipping[];
  readonly sections: readonly DelaySection[];
  readonly forwardCheck: { readonly method: DelayMethod; readonly result: ForwardCheck } | null;
  readonly referenceSurface: 'ground' | 'datum';
  readonly warnings: readonly InterpretationWarning[];
}

/** Grid nodes solved over all shots of one forward check (about 1 s per 10^6 here), and the fewest per shot. */
export const FORWARD_CHECK_NODE_BUDGET = 1_500_000;
export const MIN_FORWARD_CHECK_NODES = 5_000;

/**
 * The forward check's default grid refined this many times where the node budget allows (half the
 * grid lateness to allow for; 4× cost about 1 s more on a 1,000-pick line, too slow for an edit).
 */
export const FORWARD_CHECK_FINENESS = 2;

/** Mean sigma of the corrected head-wave arrivals of every side (0 when there are none). */
function meanArrivalSigma(arrivals: readonly SideRefractorArrivals[]): number {
  let sum = 0;
  let count = 0;
  for (const side of arrivals) for (const sigma of side.sigmas) { sum += sigma; count += 1; }
  return count > 0 ? sum / count : 0;
}

/** Fewest receivers under which a section's own refractor velocity is used in the forward check (common practice). */
export const MIN_SECTION_POINTS_FOR_VELOCITY = 8;

/** Misfit of the forward check beyond this many times the picks' sigma is warned about (common practice, METHODS §12). */
export const FORWARD_MISFIT_SIGMAS = 2;

/**
 * The RMS misfit a correct section may show: FORWARD_MISFIT_SIGMAS × the picks' sigma (at least
 * the time resolution), plus the grid's own lateness for head waves, up to about
 * h·√(s_k² − s_{k+1}²) for each interface between node rows (`forward-check.ts`, METHODS §12).
 */
export function forwardMisfitAllowance(pickSigma: number, spacing: number, velocities: readonly number[]): number {
  let grid = 0;
  for (let k = 0; k + 1 < velocities.length; k += 1) grid += spacing * Math.sqrt(Math.max(0, velocities[k]! ** -2 - velocities[k + 1]! ** -2));
  return FORWARD_MISFIT_SIGMAS * pickSigma + grid;
}

const ms = (seconds: number) => formatQuantity(seconds * 1000, 'ms', 3);

/** V_1 … V_N of the survey while defined and increasing (a head wave needs a faster layer below). */
function surveyVelocities(combined: CombinedLayers): Estimate[] {
  const velocities: Estimate[] = [];
  for (const entry of combined.slownesses) {
    if (entry === null || !(entry.value > 0)) break;
    const velocity = { value: 1 / entry.value, standardError: entry.standardError / entry.value ** 2 };
    if (velocities.length > 0 && !(velocity.value > velocities[velocities.length - 1]!.value)) break;
    velocities.push(velocity);
  }
  return velocities;
}

/** Linear interpolation of a section's depth at x; null outside its points (never extrapolated). */
function depthAt(section: DelaySection | undefined, x: number): number | null {
  if (!section || section.points.length === 0) return null;
  const points = section.points;
  if (x < points[0]!.x || x > points[points.length - 1]!.x) return null;
  let k = 0;
  while (k < points.length - 1 && points[k + 1]!.x < x) k += 1;
  const left = points[k]!;
  const right = points[Math.min(k + 1, points.length - 1)]!;
  if (right.x === left.x) return left.depth;
  return left.depth + ((x - left.x) / (right.x - left.x)) * (right.depth - left.depth);
}

function groundElevations(pickSet: PickSet): Map<string, number> {
  const found = new Map<string, number>();
  for (const pick of pickSet.picks) {
    if (pick.receiverElevation !== null) found.set(pick.receiverX.toFixed(6), pick.receiverElevation);
    if (pick.sourceElevation !== null && !found.has(pick.sourceX.toFixed(6))) found.set(pick.sourceX.toFixed(6), pick.sourceElevation);
  }
  return found;
}

interface PairPoint {
  readonly x: number;
  readonly depth: number;
  readonly depthSE: number;
}

function pairPoints(analysis: PairAnalysis, method: DelayMethod): PairPoint[] {
  const receivers = method === 'plus-minus' ? analysis.plusMinus.receivers : analysis.generalizedReciprocal.receivers;
  return receivers.map((receiver) => ({ x: receiver.x, depth: receiver.depth, depthSE: receiver.depthSE }));
}

function pairVelocity(analysis: PairAnalysis, method: DelayMethod): Estimate | null {
  return method === 'plus-minus' ? analysis.plusMinus.velocity : analysis.generalizedReciprocal.velocity;
}

function meanVelocity(estimates: readonly Estimate[]): Estimate | null {
  const usable = estimates.filter((estimate) => estimate.standardError > 0 && Number.isFinite(estimate.value));
  if (usable.length === 0) return estimates[0] ?? null;
  const weights = usable.map((estimate) => 1 / estimate.standardError ** 2);
  const total = weights.reduce((sum, weight) => sum + weight, 0);
  return { value: usable.reduce((sum, estimate, k) => sum + weights[k]! * estimate.value, 0) / total, standardError: Math.sqrt(1 / total) };
}

/** One section from the pairs of one refractor: the least-span covering pair at each receiver, seams where it changes. */
function mergeSection(
  method: DelayMethod,
  refractor: number,
  analyses: readonly { readonly index: number; readonly analysis: PairAnalysis }[],
  reference: { readonly datum: number | null; readonly ground: Map<string, number> },
): DelaySection {
  const byPair = analyses.map(({ index, analysis }) => ({
    index,
    span: analysis.pair.spreadLength,
    points: new Map(pairPoints(analysis, method).map((point) => [point.x.toFixed(6), point])),
  }));
  const positions = [...new Set(byPair.flatMap((entry) => [...entry.points.values()].map((point) => point.x)))].sort((left, right) => left - right);
  const points: SectionPoint[] = [];
  for (const x of positions) {
    const key = x.toFixed(6);
    const covering = byPair.filter((entry) => entry.points.has(key)).sort((left, right) => left.span - right.span || left.index - right.index);
    const chosen = covering[0];
    if (!chosen) continue;
    const point = chosen.points.get(key)!;
    const ground = reference.ground.get(key) ?? null;
    const referenceElevation = reference.datum ?? ground;
    const elevation = referenceElevation === null ? null : referenceElevation - point.depth;
    points.push({
      x,
      depth: point.depth,
      depthSE: point.depthSE,
      groundElevation: ground,
      elevation,
      depthBelowGround: reference.datum === null ? point.depth : ground !== null && elevation !== null ? ground - elevation : null,
      pair: chosen.index,
    });
  }
  const seams: Seam[] = [];
  for (let k = 1; k < points.length; k += 1) {
    const before = points[k - 1]!;
    const after = points[k]!;
    if (before.pair === after.pair) continue;
    const from = byPair.find((entry) => entry.index === before.pair)!;
    const to = byPair.find((entry) => entry.index === after.pair)!;
    const differences: { value: number; variance: number }[] = [];
    for (const [key, point] of to.points) {
      const other = from.points.get(key);
      if (other) differences.push({ value: point.depth - other.depth, variance: point.depthSE ** 2 + other.depthSE ** 2 });
    }
    const count = differences.length;
    seams.push({
      x: (before.x + after.x) / 2,
      fromPair: before.pair,
      toPair: after.pair,
      step: count > 0 ? differences.reduce((sum, entry) => sum + entry.value, 0) / count : null,
      // The pairs' depth errors are largely common along the overlap (velocities, reciprocal times): the SE of one difference, not of the mean.
      stepSE: count > 0 ? Math.sqrt(differences.reduce((sum, entry) => sum + entry.variance, 0) / count) : null,
      commonReceivers: count,
    });
  }
  const velocities = analyses.map(({ analysis }) => pairVelocity(analysis, method)).filter((velocity): velocity is Estimate => velocity !== null);
  return { method, refractor, velocity: meanVelocity(velocities), points, seams };
}

function toReversedArrivals(pair: ReversedPair): ReversedArrivals {
  const arrivals = (side: SideRefractorArrivals) => ({ receiverX: side.receiverX, times: side.times, sigmas: side.sigmas });
  return {
    forwardSourceX: pair.forward.sourceX,
    reverseSourceX: pair.reverse.sourceX,
    forward: arrivals(pair.forward),
    reverse: arrivals(pair.reverse),
    reciprocalTime: pair.reciprocalTime,
  };
}

export function reversedProfile(
  pickSet: PickSet,
  segmentations: readonly SideSegmentation[],
  combined: CombinedLayers,
  settings: ReversedProfileSettings,
): ReversedProfile {
  const velocities = surveyVelocities(combined);
  const elevationsGiven = pickSet.columns.receiverElevation && pickSet.columns.sourceElevation;
  const datum = settings.datumElevation !== null && elevationsGiven ? settings.datumElevation : null;
  const warnings: InterpretationWarning[] = [];
  if (settings.datumElevation !== null && datum === null) {
    warnings.push({
      code: 'delay-time-note',
      level: 'warning',
      message: `a datum at ${formatQuantity(settings.datumElevation, 'm')} was asked for, but the pick table gives no ${pickSet.columns.sourceElevation ? 'receiver' : pickSet.columns.receiverElevation ? 'source' : 'source and receiver'} elevations; depths are given below the ground instead — add the ${[pickSet.columns.sourceElevation ? null : 'source_elev_m', pickSet.columns.receiverElevation ? null : 'receiver_elev_m'].filter((name) => name !== null).join(' and ')} column${pickSet.columns.sourceElevation || pickSet.columns.receiverElevation ? '' : 's'} (any length unit, e.g. _ft)`,
    });
  }
  if (datum !== null) warnings.push(...datumWarnings(pickSet, datum, elevationGaps(pickSet)));
  const buried = buriedShotPlacement(pickSet, combined.depths);
  warnings.push(...buried.warnings);
  const empty: ReversedProfile = { pairs: [], refused: [], dipping: [], sections: [], forwardCheck: null, referenceSurface: datum === null ? 'ground' : 'datum', warnings };
  if (velocities.length < 2) return empty;

  const arrivals: SideRefractorArrivals[] = [];
  for (let refractor = 2; refractor <= velocities.length; refractor += 1) {
    for (const segmentation of segmentations) {
      const found = refractorArrivals(segmentation, refractor, {
        pickSet,
        nearSurfaceVelocity: velocities[0]!.value,
        refractorVelocity: velocities[refractor - 1]!.value,
        datumElevation: datum,
        timeResolution: settings.timeResolution,
      });
      if (found && !buried.excluded.has(`${found.shot}\u0000${refractor}`)) arrivals.push(found);
    }
  }
  if (datum !== null) warnings.push(...datumDepthWarnings(arrivals, datum));
  for (const refusal of new Set(arrivals.flatMap((entry) => entry.correctionRefusals))) {
    warnings.push({ code: 'delay-time-note', level: 'warning', message: `${refusal}; its head-wave times are used as recorded, so the depths near it are off by about the correction` });
  }
  const shotPositions = new Map<string, number>();
  for (const pick of pickSet.picks) if (!shotPositions.has(pick.shot)) shotPositions.set(pick.shot, pick.sourceX);
  const { pairs, refused } = reversedPairs(arrivals, settings.pairs, settings.timeResolution, shotPositions);
  for (const entry of refused) {
    warnings.push({
      code: 'reversed-pair-refused',
      level: 'warning',
      message: `pair ${entry.choice.forwardShot} → ${entry.choice.reverseShot}: ${entry.reason}`,
      shot: entry.choice.forwardShot,
    });
  }
  warnings.push(...reciprocalTimeWarnings(pairs));
  const bothDirections = segmentations.some((side) => side.sidePicks.side === 'forward') && segmentations.some((side) => side.sidePicks.side === 'reverse');
  if (pairs.length === 0) {
    if (bothDirections && settings.pairs === null) {
      warnings.push({
        code: 'no-reversed-coverage',
        level: 'info',
        message: 'no refractor is recorded from both directions over common receivers with a reciprocal time, so no depth under the receivers is given (plane-layer depths under each shot stand alone); shoot both ends of each spread, with the far shot inside the other shot\'s head-wave branch',
      });
    }
    return { ...empty, refused, warnings };
  }

  const ground = groundElevations(pickSet);
  const { thicknesses: surveyThicknesses, covariance: thicknessCovariance } = thicknessesFromDepths(combined.depths, combined.depthCovariance);
  const surveyThicknessSE = surveyThicknesses.map((_, k) => Math.sqrt(Math.max(0, thicknessCovariance[k]?.[k] ?? 0)));
  const analyses: PairAnalysis[] = [];
  const sections: DelaySection[] = [];
  const refractors = [...new Set(pairs.map((pair) => pair.refractor))].sort((left, right) => left - right);
  for (const refractor of refractors) {
    const overburdenFor = (method: DelayMethod) => (x: number): Overburden => {
      const upperThicknesses: Estimate[] = [];
      for (let layer = 1; layer <= refractor - 2; layer += 1) {
        // Thickness of layer `layer` at x: depth of refractor layer + 1 minus that of refractor layer.
        const lower = depthAt(sections.find((section) => section.method === method && section.refractor === layer + 1), x);
        const upper = layer === 1 ? 0 : depthAt(sections.find((section) => section.method === method && section.refractor === layer), x);
        const fromSection = lower !== null && upper !== null && lower - upper > 0 ? lower - upper : null;
        upperThicknesses.push(
          fromSection !== null
            ? { value: fromSection, standardError: 0 }
            : { value: surveyThicknesses[layer - 1] ?? 0, standardError: surveyThicknessSE[layer - 1] ?? 0 },
        );
      }
      return { velocities: velocities.slice(0, refractor - 1), upperThicknesses };
    };
    const indexed: { index: number; analysis: PairAnalysis }[] = [];
    for (const pair of pairs.filter((entry) => entry.refractor === refractor)) {
      const input = toReversedArrivals(pair);
      const analysis: PairAnalysis = {
        pair,
        plusMinus: plusMinus(input, overburdenFor('plus-minus')),
        generalizedReciprocal: generalizedReciprocal(input, overburdenFor('generalized-reciprocal')),
      };
      indexed.push({ index: analyses.length, analysis });
      analyses.push(analysis);
    }
    for (const method of DELAY_METHODS) {
      const section = mergeSection(method, refractor, indexed, { datum, ground });
      if (section.points.length > 0) sections.push(section);
    }
  }
  warnings.push(...delayNoteWarnings(analyses));

  // Dipping planar layers per pair of shots that forms a reversed pair: refractors 2…k while both
  // shots show the refractor's branch (the formulas need the two branch lines, not common receivers).
  const dipping: ShotPairDipping[] = [];
  const shotPairs = new Map<string, ReversedPair>();
  for (const pair of pairs) shotPairs.set(`${pair.forward.shot}\u0000${pair.reverse.shot}`, pair);
  const direct = { slowness: 1 / velocities[0]!.value, variance: (velocities[0]!.standardError / velocities[0]!.value ** 2) ** 2 };
  for (const pair of shotPairs.values()) {
    const branchPairs = [];
    for (let refractor = 2; ; refractor += 1) {
      const forward = arrivals.find((entry) => entry.side === 'forward' && entry.shot === pair.forward.shot && entry.refractor === refractor);
      const reverse = arrivals.find((entry) => entry.side === 'reverse' && entry.shot === pair.reverse.shot && entry.refractor === refractor);
      if (!forward || !reverse) break;
      branchPairs.push({ forward: forward.line, reverse: reverse.line });
    }
    if (branchPairs.length === 0) continue;
    dipping.push({
      forwardShot: pair.forward.shot,
      reverseShot: pair.reverse.shot,
      spreadLength: pair.spreadLength,
      result: dippingLayers(direct, branchPairs, pair.spreadLength),
    });
  }

  warnings.push(...dippingNoteWarnings(dipping));

  const checked = settings.forwardCheck === false ? null : runForwardCheck(pickSet, sections, arrivals, combined.depths, velocities, datum, warnings, settings.timeResolution);
  return { pairs: analyses, refused, dipping, sections, forwardCheck: checked, referenceSurface: datum === null ? 'ground' : 'datum', warnings };
}

/** Delay-method notes left out of the warnings: a routine step of the XY choice, and pairs the pairing already dropped. */
const QUIET_DELAY_NOTES = new Set(['xy-interpolated', 'too-few-common-receivers']);

const pairName = (pair: ReversedPair) => `${pair.forward.shot} → ${pair.reverse.shot}`;

/** Up to `shown` names and how many more. */
function listedPairs(names: readonly string[], shown = 4): string {
  return names.length <= shown ? names.join(', ') : `${names.slice(0, shown).join(', ')} and ${names.length - shown} more`;
}

/**
 * The delay-method notes a practitioner must see, one warning per method and note code over the
 * whole survey (a long line has hundreds of pairs): the first pair's message, and the pairs and
 * receivers it concerns counted and named.
 */
function delayNoteWarnings(analyses: readonly PairAnalysis[]): InterpretationWarning[] {
  const groups = new Map<string, { method: string; code: string; first: string; pair: ReversedPair; pairs: string[]; notes: number }>();
  for (const { pair, plusMinus: pm, generalizedReciprocal: grm } of analyses) {
    for (const [method, notes] of [['plus-minus', pm.notes], ['GRM', grm.notes]] as const) {
      const seen = new Set<string>();
      for (const note of notes) {
        if (QUIET_DELAY_NOTES.has(note.code)) continue;
        const key = `${method}\u0000${note.code}`;
        const group = groups.get(key) ?? { method, code: note.code, first: note.message, pair, pairs: [], notes: 0 };
        group.notes += 1;
        if (!seen.has(note.code)) group.pairs.push(pairName(pair));
        seen.add(note.code);
        groups.set(key, group);
      }
    }
  }
  return [...groups.values()].map((group) => ({
    code: 'delay-time-note' as const,
    level: 'caution' as const,
    message:
      group.pairs.length === 1
        ? `pair ${pairName(group.pair)}, refractor ${group.pair.refractor}, ${group.method}: ${group.first}${group.notes > 1 ? ` (and ${group.notes - 1} more such note${group.notes > 2 ? 's' : ''} on this pair)` : ''}`
        : `${group.method}: the same note on ${group.pairs.length} pairs (${listedPairs(group.pairs)}); on pair ${pairName(group.pair)}, refractor ${group.pair.refractor}: ${group.first}`,
    shot: group.pair.forward.shot,
    layer: group.pair.refractor,
    details: { note: group.code, method: group.method, pairs: group.pairs.length, notes: group.notes, reverseShot: group.pair.reverse.shot },
  }));
}

/** The dipping-layer notes (`dip-steep`, `depth-not-positive`, `dip-inconsistent`, …), one warning per code over the survey. */
function dippingNoteWarnings(dipping: readonly ShotPairDipping[]): InterpretationWarning[] {
  const groups = new Map<string, { code: string; first: string; entry: ShotPairDipping; pairs: string[] }>();
  for (const entry of dipping) {
    const seen = new Set<string>();
    for (const note of entry.result.notes) {
      const group = groups.get(note.code) ?? { code: note.code, first: note.message, entry, pairs: [] };
      if (!seen.has(note.code)) group.pairs.push(`${entry.forwardShot} → ${entry.reverseShot}`);
      seen.add(note.code);
      groups.set(note.code, group);
    }
  }
  return [...groups.values()].map((group) => ({
    code: 'dipping-layer-note' as const,
    level: 'caution' as const,
    message: `dipping layers under ${group.pairs.length === 1 ? `shots ${group.pairs[0]}` : `${group.pairs.length} pairs of shots (${listedPairs(group.pairs)}); the first, ${group.entry.forwardShot} → ${group.entry.reverseShot}`}: ${group.first}`,
    shot: group.entry.forwardShot,
    details: { note: group.code, pairs: group.pairs.length, reverseShot: group.entry.reverseShot },
  }));
}

function runForwardCheck(
  pickSet: PickSet,
  sections: readonly DelaySection[],
  arrivals: readonly SideRefractorArrivals[],
  plane: readonly number[],
  velocities: readonly Estimate[],
  datum: number | null,
  warnings: InterpretationWarning[],
  timeResolution: number,
): ReversedProfile['forwardCheck'] {
  // Shots, their positions and the picks, read once for whichever section is checked.
  const firstPicks = new Map<string, PickSet['picks'][number]>();
  for (const pick of pickSet.picks) if (!firstPicks.has(pick.shot)) firstPicks.set(pick.shot, pick);
  const shots = pickSet.shotIds.map((id) => {
    const pick = firstPicks.get(id)!;
    return { id, x: pick.sourceX, depth: pick.sourceDepth ?? 0, elevation: pick.sourceElevation };
  });
  const shotElevation = new Map(shots.map((shot) => [shot.x.toFixed(6), shot.elevation]));
  const picks = pickSet.picks.map((pick) => ({ shot: pick.shot, receiverX: pick.receiverX, time: pick.time, excluded: pick.excluded }));
  for (const method of ['generalized-reciprocal', 'plus-minus'] as const) {
    const own = sections.filter((entry) => entry.method === method);
    if (own.length === 0) continue;
    const deepest = Math.max(velocities.length, ...own.map((section) => section.refractor));
    // Refractors without a section of their own (no reversed coverage) stand at the survey's plane depth.
    const interfaces: { x: number[]; depth: number[] }[] = [];
    const referenceInterfaces: ReferenceInterface[] = [];
    const modelVelocities = [velocities[0]!.value];
    let complete = true;
    for (let refractor = 2; refractor <= deepest; refractor += 1) {
      const section = own.find((entry) => entry.refractor === refractor);
      const points = section?.points.filter((point) => point.depthBelowGround !== null) ?? [];
      const planeDepth = plane[refractor - 2];
      // The section's own refractor velocity when it rests on enough receivers, else the survey layer's.
      const ownVelocity = section !== undefined && section.points.length >= MIN_SECTION_POINTS_FOR_VELOCITY ? section.velocity?.value : undefined;
      const velocity = ownVelocity ?? velocities[refractor - 1]?.value;
      if (points.length > 0 && velocity !== undefined) {
        // Beyond the section's ends, to each shot outside it, by that shot's own delay time.
        const carried = carryToShots(
          { x: points.map((point) => point.x), depth: points.map((point) => point.depth) },
          referenceInterfaces,
          [...modelVelocities, velocity],
          arrivals.filter((entry) => entry.refractor === refractor),
        );
        referenceInterfaces.push(carried.interface);
        const belowGround = new Map(points.map((point) => [point.x.toFixed(6), point.depthBelowGround as number]));
        const kept: { x: number; depth: number }[] = [];
        carried.interface.x.forEach((x, k) => {
          const key = x.toFixed(6);
          const fromSection = belowGround.get(key);
          if (fromSection !== undefined) kept.push({ x, depth: fromSection });
          else if (datum === null) kept.push({ x, depth: carried.interface.depth[k]! });
          else {
            const elevation = shotElevation.get(key);
            if (elevation !== null && elevation !== undefined) kept.push({ x, depth: carried.interface.depth[k]! + (elevation - datum) });
          }
        });
        interfaces.push({ x: kept.map((entry) => entry.x), depth: kept.map((entry) => entry.depth) });
      } else if (planeDepth !== undefined && planeDepth > 0) {
        interfaces.push({ x: [0], depth: [planeDepth] });
        referenceInterfaces.push({ x: [0], depth: [planeDepth] });
      } else if (refractor > 2 && interfaces.length > 0) break; // deeper layers unresolved: the section stops here
      else {
        complete = false;
        break;
      }
      modelVelocities.push(velocity ?? velocities[refractor - 1]!.value);
    }
    if (!complete) continue;
    // Bounded work on long lines: about FORWARD_CHECK_NODE_BUDGET node visits over all shots.
    const maxNodes = Math.max(MIN_FORWARD_CHECK_NODES, Math.min(DEFAULT_FORWARD_CHECK_MAX_NODES, Math.floor(FORWARD_CHECK_NODE_BUDGET / Math.max(1, shots.length))));
    // The grid's top is flat and the section hangs from it by its depths below the ground: relief
    // enters through the depths (a plane-wave argument, as for the delays), which keeps head-wave
    // times within 0.5 % for ground slopes up to 10 % (tests/model/forward-check.test.ts).
    const result = forwardCheck({ velocities: modelVelocities, interfaces }, shots, picks, { maxNodes, fineness: FORWARD_CHECK_FINENESS });
    const sigmas = pickSet.picks.map((pick) => pick.sigma).filter((sigma): sigma is number => sigma !== null);
    // Picks with sigmas are judged by them; a table without sigmas by the scatter of the head-wave
    // picks about their neighbours' chords (the arrivals' sigmas, refractor-arrivals.ts), which an
    // undulating refractor does not inflate as it does a straight branch line; at least the resolution.
    const pickSigma = Math.max(sigmas.length > 0 ? sigmas.reduce((sum, sigma) => sum + sigma, 0) / sigmas.length : meanArrivalSigma(arrivals), timeResolution);
    const allowed = forwardMisfitAllowance(pickSigma, result.grid.spacing, modelVelocities);
    for (const entry of result.perShot) {
      if (entry.rms === null || !(entry.rms > allowed)) continue;
      warnings.push({
        code: 'forward-check-misfit',
        level: 'warning',
        message: `shot ${entry.shot}: times computed through the ${method === 'plus-minus' ? 'plus-minus' : 'GRM'} depth section miss its picks by ${ms(entry.rms)} RMS (mean ${ms(entry.mean ?? 0)}), more than the ${ms(allowed)} allowed; the section is wrong near this shot (a layer it misses, or the refractor beyond the reversed coverage) or its picks have a timing error — check the shot's time zero, position and reciprocal times first; if they hold, add a shot that reverses the line there`,
        shot: entry.shot,
        details: { rms: entry.rms, mean: entry.mean ?? 0, allowed },
      });
    }
    return { method, result };
  }
  return null;
}

