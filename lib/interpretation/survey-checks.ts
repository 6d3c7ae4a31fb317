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
import { depthsDisagree } from '../depth/crossover-distance.js';
import {
  depthMethodsDisagreeWarnings,
  depthNoteWarnings,
  headWavePrecriticalWarnings,
  SPREAD_DEPTH_RATIO,
  velocityInversionWarnings,
} from '../checks/layering.js';
import { assessHiddenLayer } from '../checks/hidden-layer.js';
import { describeShotSide, formatQuantity } from '../checks/wording.js';

/** Probability below which shot sides are called inconsistent (the χ² test of METHODS §3, P < 0.01). */
export const LATERAL_VARIATION_PROBABILITY = 0.01;
/** A shot misfits when its RMS exceeds this many pick sigmas (METHODS §12: RMS > 2·σ_pick). */
export const MISFIT_SIGMAS = 2;
/**
 * A possible hidden layer is raised to a caution when the depth error it could cause exceeds both
 * this many standard errors of the depth and this fraction of it; below that it is reported as
 * information (choice made here: a bound always exists, but only a material one needs attention).
 */
export const HIDDEN_LAYER_SE = 2;
export const HIDDEN_LAYER_FRACTION = 0.05;
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

  warnings.push(
    ...velocityInversionWarnings(
      place,
      branches.map((branch) => ({ branch: branch.index, slowness: branch.fit.slope, slownessSE: branch.fit.slopeSE })),
    ),
  );

  if (side.interceptTime) {
    warnings.push(...depthNoteWarnings(place, side.interceptTime.notes));
    if (side.crossoverDistance) {
      warnings.push(...depthMethodsDisagreeWarnings(place, depthsDisagree(side.interceptTime, side.crossoverDistance)));
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
  return [...hiddenLayerSurveyWarnings(input), ...spreadWarnings(input), ...lateralVariationWarnings(input), ...misfitWarnings(input)];
}

/** For each adjacent pair of survey layers, the largest hidden layer and what it would do (Soske 1959; METHODS §9). */
function hiddenLayerSurveyWarnings({ model, combined }: SurveyCheckInput): InterpretationWarning[] {
  if (!model || model.velocities.length < 2) return [];
  const warnings: InterpretationWarning[] = [];
  for (let upperLayer = 1; upperLayer < model.velocities.length; upperLayer += 1) {
    const assessment = assessHiddenLayer(model, upperLayer);
    if (!(assessment.maxHiddenThickness > 0)) continue;
    const depthSE = Math.sqrt(combined.depthCovariance[upperLayer - 1]?.[upperLayer - 1] ?? 0);
    const error = Math.abs(assessment.depthErrorIfPresent);
    const material = error > HIDDEN_LAYER_SE * depthSE && error > HIDDEN_LAYER_FRACTION * assessment.interpretedDepth;
    const lower = assessment.lowerLayer;
    warnings.push({
      code: 'hidden-layer-possible',
      level: material ? 'caution' : 'info',
      message:
        `survey, layers ${upperLayer} and ${lower}: a layer of about ${formatQuantity(assessment.intermediateVelocity, 'm/s')} up to ` +
        `${formatQuantity(assessment.maxHiddenThickness, 'm', 3)} thick could lie between them without ever arriving first; if it is there, the top of layer ${lower} is at ` +
        `${formatQuantity(assessment.depthIfPresent, 'm', 3)}, not ${formatQuantity(assessment.interpretedDepth, 'm', 3)} (${formatQuantity(error, 'm', 3)} too shallow)` +
        (material ? ', more than the depth uncertainty' : ', within what matters here') +
        ' — a borehole, an uphole survey or a later-arriving branch assigned by hand settles it',
      layer: lower,
      details: {
        intermediateVelocity: assessment.intermediateVelocity,
        maxHiddenThickness: assessment.maxHiddenThickness,
        depthIfPresent: assessment.depthIfPresent,
        interpretedDepth: assessment.interpretedDepth,
        depthErrorIfPresent: assessment.depthErrorIfPresent,
      },
    });
  }
  return warnings;
}

/** Longest source–receiver offset against the deepest interface claimed (common practice: 3–5 × depth). */
function spreadWarnings({ pickSet, combined }: SurveyCheckInput): InterpretationWarning[] {
  const deepest = combined.depths[combined.depths.length - 1];
  if (deepest === undefined || !(deepest > 0)) return [];
  const longest = Math.max(0, ...pickSet.picks.map((pick) => Math.abs(pick.receiverX - pick.sourceX)));
  if (longest >= SPREAD_DEPTH_RATIO * deepest) return [];
  return [
    {
      code: 'spread-too-short',
      level: 'warning',
      message: `survey: the longest offset is ${formatQuantity(longest, 'm')} but the deepest interface is claimed at ${formatQuantity(deepest, 'm')}; common practice wants offsets of 3 to 5 times the target depth, so deeper layers may be missed and this depth is weakly constrained — lengthen the spread or add off-end shots`,
      layer: combined.depths.length + 1,
      details: { longestOffset: longest, deepestDepth: deepest, ratio: longest / deepest },
    },
  ];
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
function misfitWarnings({ pickSet, sides, residuals, timeResolution }: SurveyCheckInput): InterpretationWarning[] {
  const warnings: InterpretationWarning[] = [];
  for (const entry of residuals.perShot) {
    if (entry.rms === null) continue;
    const sigmas = pickSet.picks.filter((pick) => pick.shot === entry.shot && !pick.excluded && pick.sigma !== null).map((pick) => pick.sigma!);
    const scatter = sides
      .filter((side) => side.segmentation.sidePicks.shot === entry.shot)
      .flatMap((side) => side.segmentation.branches.map((branch) => branch.fit.residualSD))
      .filter((value) => Number.isFinite(value));
    const reference =
      sigmas.length === entry.pickCount && sigmas.length > 0
        ? Math.sqrt(sigmas.reduce((sum, sigma) => sum + sigma * sigma, 0) / sigmas.length)
        : Math.max(timeResolution, scatter.length > 0 ? Math.max(...scatter) : timeResolution);
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
