/**
 * Physics checks on the layering of one shot side: what a practitioner must know before trusting
 * the layer velocities and depths of the horizontal-layer methods (METHODS §1, §2, §9). Each check
 * is a small pure function returning `InterpretationWarning`s in the project's grammar: the shot
 * side and layer, the likely cause, the fix.
 *
 * Levels: `warning` when the result is probably wrong as it stands (velocity inversion suspected,
 * branch before its critical distance, methods disagree, non-positive thickness), `caution` when
 * it may be unreliable (spread short for the depth, ill-conditioned depth).
 */
import type { DepthNote } from '../depth/types.js';
import type { DepthComparison } from '../depth/crossover-distance.js';
import type { LayeredModel } from '../model/layered-model.js';
import { criticalDistance } from '../model/layered-model.js';
import type { InterpretationWarning, WarningCode } from './warning.js';
import { describeShotSide, formatQuantity, placeFields, type ShotSide } from './wording.js';

/** A later branch is called slower when its slowness exceeds the earlier one's by more than this many SEs of the difference (chosen here: about the 95 % level of a normal test). */
export const INVERSION_SEPARATION = 2;
/** Spread length / deepest depth below which the spread is too short (common practice: 3 to 5 times the target depth). */
export const SPREAD_DEPTH_RATIO = 3;

/** A branch's slowness (s/m) and its standard error, as one shot side shows it. */
export interface BranchSlowness {
  /** 1 = direct wave; n ≥ 2 = head wave along layer n. */
  readonly branch: number;
  readonly slowness: number;
  readonly slownessSE: number;
}

/** The nearest pick of a branch, m. */
export interface BranchStart {
  readonly branch: number;
  readonly firstOffset: number;
}

function velocityText(slowness: number): string {
  return formatQuantity(1 / slowness, 'm/s');
}

/**
 * `velocity-inversion-suspected`: on one shot side, a later branch (further offsets) is slower than
 * the branch before it by more than 2 standard errors of the difference,
 * s_{n+1} − s_n > 2·√(SE_n² + SE_{n+1}²). On plane horizontal layers first arrivals can only get
 * faster with offset, so this is dip, a lateral change or a wrong split; and a truly slower layer
 * below a faster one gives no branch at all, so depths below it come out too large (METHODS §9).
 *
 * Edges: branches are compared in the order given (sort them by offset); fewer than two branches
 * give no warning; equal or faster later branches, or a slower one within 2 SE, give none.
 *
 * @example
 * velocityInversionWarnings({ shot: 'S1', side: 'forward' }, [
 *   { branch: 2, slowness: 1 / 1800, slownessSE: 1e-5 }, { branch: 3, slowness: 1 / 1200, slownessSE: 1e-5 },
 * ]); // one warning naming branch 3
 */
export function velocityInversionWarnings(place: ShotSide, branches: readonly BranchSlowness[]): InterpretationWarning[] {
  const warnings: InterpretationWarning[] = [];
  for (let index = 1; index < branches.length; index += 1) {
    const earlier = branches[index - 1]!;
    const later = branches[index]!;
    const separationSE = Math.hypot(earlier.slownessSE, later.slownessSE);
    const excess = later.slowness - earlier.slowness;
    if (!(excess > INVERSION_SEPARATION * separationSE)) continue;
    warnings.push({
      code: 'velocity-inversion-suspected',
      level: 'warning',
      message:
        `${describeShotSide(place)}, branch ${later.branch}: its apparent velocity ${velocityText(later.slowness)} is lower than the ` +
        `${velocityText(earlier.slowness)} of branch ${earlier.branch} nearer the shot, beyond ${INVERSION_SEPARATION} standard errors; ` +
        'on flat layers first arrivals only get faster with offset, so this is dip, a lateral change or a wrong branch split, and if a slower ' +
        'layer truly lies below a faster one it cannot be seen in first arrivals and the depths below it come out too large — ' +
        'shoot the reverse side, check the branch split, and insert a borehole velocity if one is known',
      shot: place.shot,
      side: place.side,
      branch: later.branch,
      details: { earlierVelocity: 1 / earlier.slowness, laterVelocity: 1 / later.slowness, separationInSE: excess / separationSE },
    });
  }
  return warnings;
}

/**
 * `head-wave-precritical`: a head-wave branch whose nearest pick lies nearer the shot than the
 * branch's critical distance x*_n in the interpreted model (Kearey2002 ch. 5): a head wave cannot
 * arrive there, so the branch holds picks of another branch, or the model is wrong.
 *
 * Edges: branch 1 (the direct wave) is never checked; a branch the model cannot have (velocity not
 * above every layer over it) is skipped here (the depth notes report it); a pick exactly at x*_n
 * passes. Throws for a branch index outside the model.
 *
 * @example
 * // METHODS.md check case 1.1: x*_3 = 11.2002 m, so a branch-3 pick at 10 m is flagged.
 * headWavePrecriticalWarnings({ shot: 'S1', side: 'forward' }, model11, [{ branch: 3, firstOffset: 10 }]);
 */
export function headWavePrecriticalWarnings(
  place: ShotSide,
  model: LayeredModel,
  branches: readonly BranchStart[],
): InterpretationWarning[] {
  const warnings: InterpretationWarning[] = [];
  for (const start of branches) {
    if (start.branch === 1) continue;
    const critical = criticalDistance(model, start.branch);
    if (critical === null || !(start.firstOffset < critical)) continue;
    warnings.push({
      code: 'head-wave-precritical',
      level: 'warning',
      message:
        `${describeShotSide(place)}, branch ${start.branch}: its first pick at ${formatQuantity(start.firstOffset, 'm')} is nearer the shot than ` +
        `the critical distance ${formatQuantity(critical, 'm')} of the interpreted layers, where no head wave can arrive yet; the branch holds ` +
        'picks of the branch before it, or the layer model is wrong — move those picks to the earlier branch or revise the branch split',
      shot: place.shot,
      side: place.side,
      branch: start.branch,
      details: { firstOffset: start.firstOffset, criticalDistance: critical },
    });
  }
  return warnings;
}

/**
 * `spread-too-short`: the farthest offset is less than 3 × the deepest depth claimed (common
 * practice: a spread of 3 to 5 times the target depth), so the deepest refractor is seen over
 * too few receivers for a trustworthy velocity and depth.
 *
 * Edges: a deepest depth ≤ 0 or not finite gives no warning (no depth is claimed); an offset of
 * exactly 3 × the depth passes; a null place speaks of the survey as a whole (its longest offset
 * against its deepest interface). Throws for a negative or non-finite farthest offset.
 *
 * @example
 * spreadTooShortWarnings({ shot: 'S1', side: 'forward' }, 40, 15); // 40 < 45: one warning
 */
export function spreadTooShortWarnings(place: ShotSide | null, farthestOffset: number, deepestDepth: number): InterpretationWarning[] {
  if (!(farthestOffset >= 0) || !Number.isFinite(farthestOffset)) {
    throw new RangeError(`spreadTooShortWarnings: the farthest offset must be zero or positive and finite, got ${farthestOffset}`);
  }
  if (!(deepestDepth > 0) || !Number.isFinite(deepestDepth)) return [];
  const needed = SPREAD_DEPTH_RATIO * deepestDepth;
  if (farthestOffset >= needed) return [];
  return [
    {
      code: 'spread-too-short',
      level: 'caution',
      message:
        `${describeShotSide(place)}: the farthest offset ${formatQuantity(farthestOffset, 'm')} is less than ${SPREAD_DEPTH_RATIO} × the deepest ` +
        `depth claimed (${formatQuantity(deepestDepth, 'm')}), so the deepest refractor is seen over too few receivers; lengthen the spread to at ` +
        `least ${formatQuantity(needed, 'm')} (common practice: 3 to 5 times the target depth) or treat that depth as indicative`,
      ...placeFields(place),
      details: { farthestOffset, deepestDepth, neededOffset: needed },
    },
  ];
}

/**
 * `depth-methods-disagree`: one warning per interface whose intercept-time depth (± SE) misses the
 * depth bracket of the crossover-distance method (`depthOutsideBracket`, METHODS §2), naming the
 * layer whose top it is and both methods.
 *
 * Edges: comparisons that agree give nothing; an empty list gives nothing.
 */
export function depthMethodsDisagreeWarnings(place: ShotSide, comparisons: readonly DepthComparison[]): InterpretationWarning[] {
  return comparisons
    .filter((comparison) => comparison.disagree)
    .map((comparison) => ({
      code: 'depth-methods-disagree' as const,
      level: 'warning' as const,
      message:
        `${describeShotSide(place)}, top of layer ${comparison.interface + 1}: the intercept-time method puts it at ` +
        `${formatQuantity(comparison.interceptTimeDepth, 'm', 3)} ± ${formatQuantity(comparison.interceptTimeSE, 'm', 2)}, outside the ` +
        `${formatQuantity(comparison.bracketLow, 'm', 3)} to ${formatQuantity(comparison.bracketHigh, 'm', 3)} that the crossover-distance method allows ` +
        'from where the picks change branch; a wrong branch split, a lateral change or a hidden layer — look at the picks either side of the crossover ' +
        'and assign their branches by hand if the split is wrong',
      shot: place.shot,
      side: place.side,
      layer: comparison.interface + 1,
      details: {
        interceptTimeDepth: comparison.interceptTimeDepth,
        interceptTimeSE: comparison.interceptTimeSE,
        bracketLow: comparison.bracketLow,
        bracketHigh: comparison.bracketHigh,
      },
    }));
}

const NOTE_WARNINGS: Readonly<Record<DepthNote['code'], { readonly code: WarningCode; readonly level: InterpretationWarning['level'] }>> = {
  'thickness-not-positive': { code: 'thickness-not-positive', level: 'warning' },
  'intercept-not-positive': { code: 'thickness-not-positive', level: 'warning' },
  'depth-ill-conditioned': { code: 'depth-ill-conditioned', level: 'caution' },
  'velocity-not-increasing': { code: 'velocity-inversion-suspected', level: 'warning' },
};

/**
 * Warnings from the notes of a depth calculation: `thickness-not-positive` (from a non-positive
 * thickness or intercept), `depth-ill-conditioned`, and `velocity-inversion-suspected` (from a
 * branch not faster than the one above). The note's message follows the shot side.
 *
 * Edges: one warning per warning code and layer — when a layer has both a non-positive intercept
 * and a non-positive thickness, the first note (the intercept, the cause) is kept and
 * `details.notes` counts both; no notes give no warnings.
 */
export function depthNoteWarnings(place: ShotSide, notes: readonly DepthNote[]): InterpretationWarning[] {
  const byKey = new Map<string, { warning: InterpretationWarning; count: number }>();
  for (const note of notes) {
    const mapped = NOTE_WARNINGS[note.code];
    const key = `${mapped.code}/${note.layer}`;
    const seen = byKey.get(key);
    if (seen !== undefined) {
      seen.count += 1;
      continue;
    }
    byKey.set(key, {
      count: 1,
      warning: {
        code: mapped.code,
        level: mapped.level,
        message: `${describeShotSide(place)}, ${note.message}`,
        shot: place.shot,
        side: place.side,
        layer: note.layer,
      },
    });
  }
  return [...byKey.values()].map(({ warning, count }) => ({ ...warning, details: { notes: count } }));
}

