/**
 * The checks that need more than one branch: per shot side (segmentation notes, velocity
 * inversion, depth notes, intercept-time against crossover-distance depths, head waves before their
 * critical distance, layers missing on a side) and for the survey as a whole (hidden layers,
 * spread length, lateral variation, forward-model misfit). The physics of each check lives in
 * `lib/checks/`; this module decides what to check where and with which numbers.
 */
import type { PickSet } from '../picks/types.js';
import type { LayeredModel } from '../model/layered-model.js';
import { crossoverDistance } from '../model/layered-model.js';
import type { InterpretationWarning } from '../checks/warning.js';
import type { SideResult } from '../interpret.js';
import type { CombinedLayers } from './survey-layers.js';
import type { ForwardResiduals } from './residuals.js';
import { depthOutsideBracket } from '../depth/crossover-distance.js';
import {
  depthMethodsDisagreeWarnings,
  depthNoteWarnings,
  headWavePrecriticalWarnings,
  spreadTooShortWarnings,
  velocityInversionWarnings,
} from '../checks/layering.js';
import { hiddenLayerWarnings } from '../checks/hidden-layer.js';
import { WATER_TABLE_BAND } from '../checks/branch-checks.js';
import { describeShotSide, formatQuantity } from '../checks/wording.js';
import { picksLeftOutOfSides } from '../branches/sides.js';
import { maximum, minimum } from '../stats/extent.js';

/** Probability below which shot sides are called inconsistent (the χ² test of METHODS §3, P < 0.01). */
export const LATERAL_VARIATION_PROBABILITY = 0.01;
/** A shot misfits when its RMS exceeds this many pick sigmas (METHODS §12: RMS > 2·σ_pick). */
export const MISFIT_SIGMAS = 2;
/** A side must reach this far beyond a survey crossover before a missing branch is remarkable (fraction of the crossover). */
export const MISSING_BRANCH_MARGIN = 0.25;

export function sideWarnings(side: SideResult, model: LayeredModel | null): InterpretationWarning[] {
  const { sidePicks, branches, notes } = side.segmentation;
  const place = { shot: sidePicks.shot, side: sidePicks.side };
  const warnings: InterpretationWarning[] = [];

  for (const note of notes) {
    const code = note.code === 'fit-refused' ? 'branch-too-few-picks' : note.code === 'outliers-screened' ? 'branch-outlier-picks' : note.code;
    warnings.push({
      code,
      level: note.code === 'outliers-screened' ? 'info' : 'warning',
      message: note.message,
      ...place,
      ...(note.branch !== undefined ? { branch: note.branch } : {}),
    });
  }

  const inversions = velocityInversionWarnings(
    place,
    branches.map((branch) => ({ branch: branch.index, slowness: branch.fit.slope, slownessSE: branch.fit.slopeSE })),
  );
  warnings.push(...inversions);

  if (side.interceptTime) {
    // A branch slower than the one above is reported once, by the inversion check above.
    const notes = side.interceptTime.notes.filter((note) => !(note.code === 'velocity-not-increasing' && inversions.length > 0));
    warnings.push(...depthNoteWarnings(place, notes));
    if (side.crossoverBracket) {
      warnings.push(
        ...depthMethodsDisagreeWarnings(place, depthOutsideBracket(side.interceptTime, side.crossoverBracket.low, side.crossoverBracket.high)),
      );
    }
    const sideModel = modelUnderSide(side);
    if (sideModel) {
      warnings.push(
        ...headWavePrecriticalWarnings(
          place,
          sideModel,
          branches.filter((branch) => branch.index <= sideModel.velocities.length).map((branch) => ({ branch: branch.index, firstOffset: branch.firstOffset })),
        ),
      );
    }
  }

  if (side.borrowedDirect) {
    warnings.push({
      code: 'missing-layer-branch',
      level: 'info',
      message: `${describeShotSide(place)}: no direct-wave picks, so the top-layer velocity is the survey mean; place receivers near the shot to measure it here`,
      ...place,
      branch: 1,
    });
  }

  if (model) {
    const farthest = sidePicks.offsets[sidePicks.offsets.length - 1] ?? 0;
    const seen = new Set(branches.map((branch) => branch.index));
    for (let branch = 2; branch <= model.velocities.length; branch += 1) {
      const crossover = crossoverDistance(model, branch - 1);
      if (seen.has(branch) || crossover === null || !(farthest > crossover * (1 + MISSING_BRANCH_MARGIN))) continue;
      warnings.push({
        code: 'missing-layer-branch',
        level: 'warning',
        message: `${describeShotSide(place)}: picks reach ${formatQuantity(farthest, 'm')}, beyond where branch ${branch} should arrive first (${formatQuantity(crossover, 'm')} on the survey model), yet no branch ${branch} was found; the layer may thin out or change here, or the split merged two branches — inspect this side or assign its branches`,
        ...place,
        branch,
        details: { farthestOffset: farthest, surveyCrossover: crossover },
      });
    }
  }
  return warnings;
}

/** The side's own plane-layer model (its branch velocities and intercept-time thicknesses), when all are usable. */
function modelUnderSide(side: SideResult): LayeredModel | null {
  const depths = side.interceptTime;
  if (!depths || depths.thicknesses.length + 1 !== side.stackBranchCount) return null;
  if (!depths.thicknesses.every((thickness) => thickness > 0)) return null;
  const velocities = side.segmentation.branches.slice(0, side.stackBranchCount).map((branch) => branch.fit.apparentVelocity);
  if (side.borrowedDirect || velocities.length !== side.stackBranchCount || !velocities.every((velocity) => velocity > 0)) return null;
  return { velocities, thicknesses: depths.thicknesses };
}

export interface SurveyCheckInput {
  readonly pickSet: PickSet;
  readonly sides: readonly SideResult[];
  readonly combined: CombinedLayers;
  readonly model: LayeredModel | null;
  readonly residuals: ForwardResiduals;
  readonly timeResolution: number;
}

export function surveyWarnings(input: SurveyCheckInput): InterpretationWarning[] {
  return [
    ...pickUseWarnings(input),
    ...correctionWarnings(input),
    ...resolutionWarnings(input),
    ...hiddenLayerSurveyWarnings(input),
    ...spreadWarnings(input),
    ...waterTableWarnings(input),
    ...lateralVariationWarnings(input),
    ...misfitWarnings(input),
  ];
}

/** Picks that take no part: at the source position (no side), and none at all interpreted. */
function pickUseWarnings({ pickSet, combined }: SurveyCheckInput): InterpretationWarning[] {
  const warnings: InterpretationWarning[] = [];
  const { zeroOffset } = picksLeftOutOfSides(pickSet);
  if (zeroOffset.length > 0) {
    const lines = zeroOffset.slice(0, 5).map((index) => pickSet.picks[index]?.line ?? 0).join(', ');
    warnings.push({
      code: 'zero-offset-picks',
      level: 'info',
      message: `survey: ${zeroOffset.length} pick(s) at the source position (line ${lines}${zeroOffset.length > 5 ? ', …' : ''}) belong to neither side of the shot and are not fitted; they are kept, and their time is a check of time zero`,
      details: { count: zeroOffset.length },
    });
  }
  if (combined.slownesses.every((entry) => entry === null)) {
    warnings.push({
      code: 'nothing-interpreted',
      level: 'warning',
      message: 'survey: no shot side has a branch that could be fitted, so there is no layer to report; check that the picks are not all excluded and that each shot side has at least three picks with times that grow with offset',
    });
  }
  return warnings;
}

/** Shot depths, uphole times and elevations are read but not yet used by the horizontal-layer methods. */
function correctionWarnings({ pickSet }: SurveyCheckInput): InterpretationWarning[] {
  const buried = new Set(pickSet.picks.filter((pick) => (pick.sourceDepth ?? 0) > 0 || (pick.uphole ?? 0) > 0).map((pick) => pick.shot));
  const warnings: InterpretationWarning[] = [];
  if (buried.size > 0) {
    warnings.push({
      code: 'corrections-not-applied',
      level: 'warning',
      message: `survey: ${buried.size} shot(s) were buried (source depth or uphole time given: ${[...buried].slice(0, 5).join(', ')}), but the horizontal-layer methods here treat every shot as on the surface, so depths under those shots are measured from the shot, not the ground, and their direct waves need not pass through the origin; the delay-time sections (plus-minus, GRM) do bring these shots up to the ground, so rely on those where the line is reversed`,
      details: { buriedShots: buried.size },
    });
  }
  const elevations = pickSet.picks.map((pick) => [pick.sourceElevation, pick.receiverElevation]).flat().filter((value): value is number => value !== null);
  if (elevations.length > 0) {
    const relief = maximum(elevations) - minimum(elevations);
    if (relief > 0) {
      warnings.push({
        code: 'corrections-not-applied',
        level: 'warning',
        message: `survey: ground elevations vary by ${formatQuantity(relief, 'm', 3)}, but the horizontal-layer methods here assume a flat surface and apply no elevation correction, so depths are below each shot's ground level and carry an error of up to about that relief; the delay-time sections (plus-minus, GRM) refer each depth to its own receiver's ground, or to a datum you give (--datum), so rely on those where the line is reversed`,
        details: { relief },
      });
    }
  }
  return warnings;
}

/** Layers whose velocity is known but whose depth could not be resolved (the survey model stops above them). */
function resolutionWarnings({ combined, model }: SurveyCheckInput): InterpretationWarning[] {
  const warnings: InterpretationWarning[] = [];
  const resolved = model?.velocities.length ?? 0;
  const first = combined.slownesses.findIndex((entry) => entry !== null);
  if (first > 0) {
    warnings.push({
      code: 'missing-layer-branch',
      level: 'warning',
      message: 'survey: no shot side shows a direct wave through the time origin, so the top-layer velocity is unknown and no depth can be computed; place receivers close to a shot, or check the trigger (every shot late by the same time-zero error looks like this)',
      layer: 1,
      branch: 1,
    });
  }
  combined.slownesses.forEach((entry, k) => {
    if (entry === null || k < resolved || first > 0) return;
    const previous = combined.slownesses[k - 1];
    const slower = previous !== null && previous !== undefined && !(entry.value < previous.value);
    warnings.push({
      code: slower ? 'velocity-inversion-suspected' : 'missing-layer-branch',
      level: 'warning',
      message: slower
        ? `survey, layer ${k + 1}: its mean velocity (${formatQuantity(1 / entry.value, 'm/s')}) is not above that of layer ${k} (${formatQuantity(1 / previous!.value, 'm/s')}), so no plane-layer depth can be given for it or below; the shots disagree about the layering (dip or a lateral change) or a branch was split wrongly — read the shots' own branches and depths`
        : `survey, layer ${k + 1}: its velocity is measured but its depth is not resolved (a branch number is missing above it on every shot side that shows it, or the layer above has no positive thickness); assign the missing branch or check the layering`,
      layer: k + 1,
    });
  });
  return warnings;
}

/** The survey's own layers in the water-table band (a side-level check may miss it on noisy sides). */
function waterTableWarnings({ model }: SurveyCheckInput): InterpretationWarning[] {
  if (!model) return [];
  return model.velocities.flatMap((velocity, k) =>
    k >= 1 && velocity >= WATER_TABLE_BAND[0] && velocity <= WATER_TABLE_BAND[1]
      ? [
          {
            code: 'water-table-suspected' as const,
            level: 'info' as const,
            message: `survey, layer ${k + 1}: its mean velocity ${formatQuantity(velocity, 'm/s')} is that of water-saturated sediment, so its top is probably the water table rather than rock; confirm with a borehole or piezometer before reading it as bedrock`,
            layer: k + 1,
            details: { velocity },
          },
        ]
      : [],
  );
}

/** For each adjacent pair of survey layers, the largest hidden layer and what it would do (Soske 1959; METHODS §9). */
function hiddenLayerSurveyWarnings({ model, combined }: SurveyCheckInput): InterpretationWarning[] {
  if (!model || model.velocities.length < 2) return [];
  const depthSE = model.thicknesses.map((_, k) => Math.sqrt(combined.depthCovariance[k]?.[k] ?? 0));
  return hiddenLayerWarnings(null, model, [], depthSE);
}

/** Longest source–receiver offset against the deepest interface claimed (common practice: 3–5 × depth). */
function spreadWarnings({ pickSet, model }: SurveyCheckInput): InterpretationWarning[] {
  if (!model || model.thicknesses.length === 0) return [];
  const deepest = model.thicknesses.reduce((sum, thickness) => sum + thickness, 0);
  const longest = maximum(
    pickSet.picks.filter((pick) => !pick.excluded).map((pick) => Math.abs(pick.receiverX - pick.sourceX)),
    0,
  );
  return spreadTooShortWarnings(null, longest, deepest).map((warning) => ({ ...warning, layer: model.velocities.length }));
}

function lateralVariationWarnings({ combined }: SurveyCheckInput): InterpretationWarning[] {
  const warnings: InterpretationWarning[] = [];
  if (combined.depthDegreesOfFreedom > 0 && combined.depthConsistencyProbability < LATERAL_VARIATION_PROBABILITY) {
    warnings.push({
      code: 'lateral-variation',
      level: 'warning',
      message: `survey: the depths under different shots differ more than their uncertainties allow (χ² = ${combined.depthChiSquare.toFixed(1)} for ${combined.depthDegreesOfFreedom} degrees of freedom), so the layers are probably dipping or undulating; the mean depths carry inflated errors — read the depths under each shot, and use reversed shots with a delay-time method`,
      details: { chiSquare: combined.depthChiSquare, degreesOfFreedom: combined.depthDegreesOfFreedom, probability: combined.depthConsistencyProbability },
    });
  }
  combined.slownesses.forEach((entry, k) => {
    if (!entry || entry.degreesOfFreedom < 1 || entry.consistencyProbability >= LATERAL_VARIATION_PROBABILITY) return;
    warnings.push({
      code: 'lateral-variation',
      level: 'warning',
      message: `survey, layer ${k + 1}: the apparent velocities of its branch differ between shot sides more than their errors allow (χ² = ${entry.chiSquare.toFixed(1)} for ${entry.degreesOfFreedom} degrees of freedom); unequal forward and reverse velocities mean dip or a lateral velocity change — the mean velocity carries an inflated error`,
      layer: k + 1,
      details: { chiSquare: entry.chiSquare, degreesOfFreedom: entry.degreesOfFreedom, probability: entry.consistencyProbability },
    });
  });
  return warnings;
}

/** Shots the survey model explains worse than 2 pick sigmas (or, without sigmas, 2 × the shot's own branch scatter). */
function misfitWarnings({ sides, residuals, timeResolution }: SurveyCheckInput): InterpretationWarning[] {
  const warnings: InterpretationWarning[] = [];
  // The largest branch scatter of each shot, in one pass over the sides.
  const scatterByShot = new Map<string, number>();
  for (const side of sides) {
    const { shot } = side.segmentation.sidePicks;
    const largest = maximum(side.segmentation.branches.map((branch) => branch.fit.residualSD).filter(Number.isFinite), timeResolution);
    scatterByShot.set(shot, Math.max(scatterByShot.get(shot) ?? timeResolution, largest));
  }
  for (const entry of residuals.perShot) {
    if (entry.rms === null) continue;
    const reference = entry.sigmaRms ?? Math.max(timeResolution, scatterByShot.get(entry.shot) ?? timeResolution);
    if (entry.rms <= MISFIT_SIGMAS * reference) continue;
    warnings.push({
      code: 'model-misfit',
      level: 'warning',
      message: `shot ${entry.shot}: the survey's layered model misses its picks by ${formatQuantity(entry.rms * 1000, 'ms', 3)} RMS, more than ${MISFIT_SIGMAS} × the ${formatQuantity(reference * 1000, 'ms', 3)} the picks allow; the layers differ under this shot (dip, lateral change) or its picks have a timing error — compare its depths with the others'`,
      shot: entry.shot,
      details: { rms: entry.rms, allowed: MISFIT_SIGMAS * reference },
    });
  }
  return warnings;
}
