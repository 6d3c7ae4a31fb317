/**
 * Interpretation warnings: what a practitioner must know before trusting a result.
 *
 * Every warning has a stable machine `code` (listed in `WARNING_CODES`, never renamed once
 * released), a plain-language `message` in the project's grammar (the thing, the likely cause,
 * the fix), and names the shot, side, branch or layer it concerns.
 */
import type { Side } from '../branches/types.js';

export type WarningLevel = 'caution' | 'warning' | 'info';

export interface InterpretationWarning {
  readonly code: WarningCode;
  readonly level: WarningLevel;
  readonly message: string;
  readonly shot?: string;
  readonly side?: Side;
  /** Branch index: 1 = direct wave, n ≥ 2 = head wave along the top of layer n. */
  readonly branch?: number;
  /** Layer index, 1 = top layer. */
  readonly layer?: number;
  /** Numbers behind the message, in SI units, for programs (e.g. `{ maxHiddenThickness: 3.84 }`). */
  readonly details?: Readonly<Record<string, number | string | boolean>>;
}

/**
 * The registry of warning codes. Adding a code is fine; renaming or removing one breaks users'
 * scripts and is not.
 */
export const WARNING_CODES = {
  // --- branches and fits
  'branch-too-few-picks': 'A branch holds fewer picks than a trustworthy fit needs (3 to fit, 4 for a usable standard error).',
  'branch-poor-fit': 'The picks scatter about the fitted line more than their uncertainty allows, or the branch is curved.',
  'branch-outlier-picks': 'The robust fit gave some picks almost no weight: they are probably mispicks.',
  'direct-not-through-origin': 'The direct-wave line does not pass through the origin: time-zero error, trigger delay, wrong source position or a buried shot.',
  'velocity-unbounded': 'The apparent slowness is so uncertain that the velocity has no upper bound.',
  'segmentation-constraint-failed': 'The statistically best split of the picks into branches failed a physical constraint; which split was used, and why, is in the message.',
  'air-wave-suspected': 'A branch travels at the speed of sound in air: an air blast, not a layer.',
  'water-table-suspected': 'A branch travels at about 1500 m/s: probably the water table in unconsolidated sediment, not rock.',
  'user-branch-gap': 'User-assigned branches skip a branch number; the missing layer is taken from other shots or left out.',
  // --- layering and depths
  'velocity-inversion-suspected': 'Apparent velocity decreases with offset: a slower layer below a faster one, dip, or a lateral change.',
  'hidden-layer-possible': 'A layer of intermediate velocity could lie between two interpreted layers without ever giving first arrivals.',
  'head-wave-precritical': 'A head-wave branch starts nearer the shot than its critical distance: the branch or the model is wrong.',
  'spread-too-short': 'The spread is too short for the depth claimed (common practice: 3 to 5 times the target depth).',
  'depth-methods-disagree': 'The intercept-time and crossover-distance depths disagree beyond their uncertainties.',
  'depth-ill-conditioned': 'Consecutive layer velocities are too close for a stable depth: the linearised standard error is not reliable.',
  'thickness-not-positive': 'A layer came out with zero or negative thickness: velocity inversion, hidden layer or a wrong branch.',
  'lateral-variation': 'Depths or velocities differ between shots by more than their uncertainties: dipping or undulating layers.',
  'missing-layer-branch': 'A shot side shows no branch for a layer seen on other shots.',
  'branches-one-refractor': 'Branches that automatic segmentation split by apparent velocity were joined: reversed minus times show one refractor of changing depth, not a deeper layer.',
  // --- reversed profiles
  'reciprocal-time-misfit': 'The reciprocal times of a reversed pair (shot A at B, shot B at A) differ by more than the picks allow.',
  'reciprocal-time-shot-suspect': 'Every reversed pair with this shot misfits its reciprocal time while the others agree: its time zero or position is suspect.',
  'reversed-pair-refused': 'A reversed pair the user named cannot be formed (no common refractor, too few common receivers or no reciprocal time).',
  'no-reversed-coverage': 'No receiver has the same refractor recorded from both directions, so no depth under the receivers is given.',
  'delay-time-note': 'The plus-minus or generalized reciprocal method reported a limitation of its result.',
  'dipping-layer-note': 'The dipping-layer solution under a pair of shots is steep, inconsistent between its interfaces or has a depth that is not positive.',
  'elevation-missing': 'With a datum, shots or receivers without a ground elevation cannot be lowered to it; their picks are left out of the delay-time depths.',
  'datum-above-ground': 'The datum lies above some source or receiver end; it should lie below every one.',
  'datum-too-low': "A side's datum correction exceeds half its corrected intercept time: the datum reaches below the near-surface layer.",
  'shot-below-layer': 'A buried shot lies below the base of layer 1 (or below a refractor), where the near-surface correction does not hold.',
  'forward-check-misfit': 'The travel times computed through the interpreted depth section miss this shot\'s picks by more than their uncertainty and the grid\'s own error allow.',
  // --- crustal profiles
  'station-off-line': 'A station or shot lies far off the best-fitting profile line: along-line positions are projections, the offsets are the true geodesic distances.',
  'earth-curvature-applied': 'The offsets are long enough for a flat earth to err by more than the picks allow; the layers were refit in a sphere, and the bias of the flat reading is stated.',
  'flat-earth-bias': 'A flat earth was asked for on offsets where it errs by more than the picks allow; the flat reading carries the bias stated.',
  'earth-curvature-not-applied': 'The layers could not be refit in a sphere; the flat-earth reading stands although the offsets ask for the correction.',
  'time-term-note': 'The time-term inversion reported a limitation: rejected picks, a disconnected shot–station graph, a one-sided geometry or a station with too few picks.',
  // --- forward model
  'model-misfit': 'The interpreted model explains this shot worse than the picks\' uncertainty.',
  // --- the survey as a whole
  'zero-offset-picks': 'Picks at the source position belong to neither side of the shot and are not fitted.',
  'nothing-interpreted': 'No shot side had a branch that could be fitted, so no layer is reported.',
  'corrections-not-applied': 'Shot depths, uphole times or ground elevations were given but are not corrected for by the horizontal-layer methods (the delay-time sections do correct for them).',
} as const;

export type WarningCode = keyof typeof WARNING_CODES;
