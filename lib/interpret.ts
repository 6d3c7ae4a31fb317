/**
 * The interpretation pipeline for plane horizontal layers: a pick set in, the interpretation JSON
 * out (see `interpretation/shape.ts`).
 *
 *   picks ─> shot sides ─> branches (segmentation, line fits) ─> depths under each shot side by the
 *   intercept-time and crossover-distance methods (± bootstrap) ─> survey layers (weighted means)
 *   ─> forward model and residuals ─> checks and warnings ─> display units.
 *
 * Everything is computed in SI and converted to the survey's display units only when the result
 * is shaped. The function is pure: the same pick set and options give the same interpretation.
 */
import type { PickSet } from './picks/types.js';
import type { FitMethod, SideSegmentation, SidePicks } from './branches/types.js';
import type { LayerDepths } from './depth/types.js';
import type { InterpretationWarning } from './checks/warning.js';
import type { DisplayScale } from './units.js';
import { DISPLAY_UNITS } from './units.js';
import { definedOnly } from './defined-only.js';
import { splitShotSides } from './branches/sides.js';
import { segmentSide } from './branches/segment.js';
import { segmentSideRobustly } from './branches/robust-segment.js';
import { crossoverAmbiguity } from './branches/branch-constraints.js';
import { interceptTimeDepths } from './depth/intercept-time.js';
import { crossoverDistanceDepths, fittedCrossovers, observedCrossover } from './depth/crossover-distance.js';
import { bootstrapInterceptTimeDepths, type BootstrapDepths } from './depth/bootstrap.js';
import { branchParameters } from './interpretation/branch-parameters.js';
import { firstBranchIndices } from './interpretation/branch-identity.js';
import { identifyRefractors, type MinusTimeEvidence, type RefractorMerge } from './interpretation/refractor-identity.js';
import { formatQuantity } from './checks/wording.js';
import { reversedProfile, type ReversedProfile } from './interpretation/reversed-profile.js';
import type { PairChoice } from './interpretation/reversed-pairs.js';
import { combineSideLayers, thicknessesFromDepths, type CombinedLayers } from './interpretation/survey-layers.js';
import { branchWarnings } from './checks/branch-checks.js';
import { surveyWarnings, sideWarnings } from './interpretation/survey-checks.js';
import { forwardResiduals, type ForwardResiduals } from './interpretation/residuals.js';
import { shapeInterpretation } from './interpretation/present.js';
import { placeOnLine, type LinePlacement } from './geodesy/place-on-line.js';
import { surveyTimeTerms, type SurveyTimeTerms } from './interpretation/survey-time-terms.js';
import { earthCurvature, type EarthCurvature, type EarthModelChoice } from './interpretation/earth-curvature.js';
import type { Interpretation } from './interpretation/shape.js';
import type { LayeredModel } from './model/layered-model.js';

export interface InterpretOptions {
  /** Line-fit method for every branch. Default `least-squares`. */
  readonly fitMethod?: FitMethod;
  /** Residual-bootstrap replicates per shot side; 0 (default) skips the bootstrap. */
  readonly bootstrapReplicates?: number;
  /** Seed of every random procedure. Default 1. */
  readonly seed?: number;
  /** Display units; default the scale the pick table suggests. */
  readonly scale?: DisplayScale;
  /** Fewest picks per automatic branch. Default 3. */
  readonly minPicksPerBranch?: number;
  /** Most branches per shot side. Default 5. */
  readonly maxBranches?: number;
  /** Name of the input (file name), reported in the result. */
  readonly sourceName?: string;
  /** Software version written into the result. */
  readonly softwareVersion?: string;
  /** Reversed pairs for the delay-time methods: the user's choice instead of automatic pairing. */
  readonly reversedPairs?: readonly PairChoice[] | null;
  /** Datum elevation, m: depths under the receivers are then referred to it (times corrected, METHODS §8). */
  readonly datumElevation?: number | null;
  /** Run the grid forward check of the depth section. Default true. */
  readonly forwardCheck?: boolean;
  /** Earth model for the layer depths: `auto` (default: a sphere where offsets are long enough for curvature to matter), `flat` or `spherical`. */
  readonly earthModel?: EarthModelChoice;
  /**
   * Solve the time-term method on the deepest refractor (shot and station delays, depth under every
   * station). Default: on for crustal tables (km, or latitude/longitude), where it is the standard
   * reading of Pn; off for engineering lines, whose delay-time sections already give the depth
   * under every receiver and whose shots seldom stand at receivers to tie the delays.
   */
  readonly timeTerms?: boolean;
  /** Add the refractor's velocity-gradient term (−κΔ³, a diving wave below the refractor) to the time-term model. Default false. */
  readonly timeTermGradient?: boolean;
}

export const DEFAULT_OPTIONS = {
  fitMethod: 'least-squares' as FitMethod,
  bootstrapReplicates: 0,
  seed: 1,
  minPicksPerBranch: 3,
  maxBranches: 5,
  reversedPairs: null as readonly PairChoice[] | null,
  datumElevation: null as number | null,
  forwardCheck: true,
  earthModel: 'auto' as EarthModelChoice,
  timeTerms: true,
  timeTermGradient: false,
};

/** Time resolution assumed for picks of each scale of table (s): 0.1 ms engineering, 10 ms crustal (common practice). */
export const TIME_RESOLUTION: Readonly<Record<DisplayScale, number>> = { engineering: 1e-4, crustal: 1e-2 };

/** One shot side after branches and depths, in SI. */
export interface SideResult {
  readonly segmentation: SideSegmentation;
  /** Branches 1…N without gaps, the stack the depth methods used (empty when a gap stops them). */
  readonly stackBranchCount: number;
  readonly interceptTime: LayerDepths | null;
  readonly crossoverDistance: LayerDepths | null;
  /**
   * Depths from the two ends of each observed crossover bracket, widened by the zone where the
   * branches differ by less than twice the pick scatter: the depth range the picks allow
   * (METHODS §2, "Agreement"). Null when there is no crossover-distance reading.
   */
  readonly crossoverBracket: { readonly low: LayerDepths; readonly high: LayerDepths } | null;
  /** Fitted crossover distance and SE between consecutive stack branches. */
  readonly fittedCrossovers: readonly ({ readonly distance: number; readonly variance: number } | null)[];
  readonly bootstrap: BootstrapDepths | null;
  /** True when the direct-wave slowness came from the survey mean (the side has no direct branch). */
  readonly borrowedDirect: boolean;
}

/** The whole interpretation in SI, before shaping. */
export interface SurveyResult {
  readonly pickSet: PickSet;
  readonly sides: readonly SideResult[];
  readonly combined: CombinedLayers;
  readonly model: LayeredModel | null;
  readonly residuals: ForwardResiduals;
  /** Branch splits tested against reversed minus times (`refractor-identity.ts`). */
  readonly refractorTests: readonly RefractorMerge[];
  /** Pairs, dipping layers and depths under every receiver (`reversed-profile.ts`). */
  readonly reversed: ReversedProfile;
  /** Flat or spherical earth, and the layers refit in a sphere where curvature matters (`earth-curvature.ts`). */
  readonly curvature: EarthCurvature | null;
  /** Where a geographic table's shots and stations lie on its profile line; null for a table along a line. */
  readonly placement: LinePlacement | null;
  /** The time-term method on the deepest refractor (`survey-time-terms.ts`); null when off or not solvable. */
  readonly timeTerms: SurveyTimeTerms | null;
  readonly warnings: readonly InterpretationWarning[];
}

export function interpret(pickSet: PickSet, options: InterpretOptions = {}): Interpretation {
  const settings = { ...DEFAULT_OPTIONS, ...definedOnly(options), timeTerms: options.timeTerms ?? pickSet.suggestedScale === 'crustal' };
  const scale = options.scale ?? pickSet.suggestedScale;
  // Geographic tables: shots and stations placed on the best-fitting profile line, every offset the
  // true geodesic distance (`geodesy/place-on-line.ts`); the rest of the pipeline works along it.
  const placement = pickSet.coordinateSystem === 'geographic' ? placeOnLine(pickSet) : null;
  const surveyed = interpretSurvey(placement?.pickSet ?? pickSet, { ...settings, scale });
  const result: SurveyResult = placement === null ? surveyed : { ...surveyed, placement, warnings: [...placement.warnings, ...surveyed.warnings] };
  return shapeInterpretation(result, {
    units: DISPLAY_UNITS[scale],
    options: settings,
    sourceName: options.sourceName ?? null,
    softwareVersion: options.softwareVersion ?? '0.0.0',
  });
}

export function interpretSurvey(
  pickSet: PickSet,
  settings: typeof DEFAULT_OPTIONS & { readonly scale: DisplayScale },
): SurveyResult {
  // The resolution belongs to the data (how the table gave its times), not to the display units.
  const timeResolution = TIME_RESOLUTION[pickSet.suggestedScale];
  const segmentOptions = {
    fitMethod: settings.fitMethod,
    minPicksPerBranch: settings.minPicksPerBranch,
    maxBranches: settings.maxBranches,
    timeResolution,
  };
  // Robust fits also get a robust split: outlier picks are set aside while the branches are found.
  const segment = settings.fitMethod === 'least-squares' ? segmentSide : segmentSideRobustly;
  const firstPass = splitShotSides(pickSet).map((side: SidePicks) => segment(side, segmentOptions));
  // Off-end shots may start on a head wave: number their branches by the survey's layers.
  const firstIndices = firstBranchIndices(firstPass, timeResolution);
  const numbered = firstPass.map((segmentation, k) =>
    (firstIndices[k] ?? 1) === (segmentation.branches[0]?.index ?? 1)
      ? segmentation
      : segment(segmentation.sidePicks, { ...segmentOptions, firstBranchIndex: firstIndices[k] ?? 1 }),
  );
  // An undulating refractor splits into branches of different apparent velocity; reversed minus
  // times tell such a split from a deeper layer, and the split is undone.
  const identity = identifyRefractors(numbered, { timeResolution, fitMethod: settings.fitMethod });
  const segmentations = identity.segmentations;

  // The survey's direct-wave slowness, for sides that show no direct branch of their own.
  const directFits = segmentations.flatMap((segmentation) =>
    segmentation.branches.filter((branch) => branch.index === 1).map((branch) => branchParameters(branch.fit)),
  );
  const surveyDirect = combineSideLayers(
    directFits.map((parameters) => ({ slownesses: [{ slowness: parameters.slowness, variance: parameters.slownessVariance }], depths: [], depthCovariance: [] })),
  ).slownesses[0] ?? null;

  const sides = segmentations.map((segmentation) => depthsForSide(segmentation, surveyDirect, settings));
  const combined = combineSideLayers(
    sides.map((side) => ({
      slownesses: slownessesByBranch(side.segmentation),
      depths: side.interceptTime?.depths ?? [],
      depthCovariance: side.interceptTime?.depthCovariance ?? [],
    })),
  );
  const model = surveyModel(combined);
  const residuals = forwardResiduals(pickSet, model);

  const warnings: InterpretationWarning[] = [];
  for (const side of sides) {
    const { sidePicks } = side.segmentation;
    for (const branch of side.segmentation.branches) {
      warnings.push(...branchWarnings({ shot: sidePicks.shot, side: sidePicks.side, branch, sidePicks }, timeResolution));
    }
    warnings.push(...sideWarnings(side, model));
  }
  warnings.push(...surveyWarnings({ pickSet, sides, combined, model, residuals, timeResolution }));
  warnings.push(...mergeWarnings(identity.tests));
  const reversed = reversedProfile(pickSet, segmentations, combined, {
    pairs: settings.reversedPairs,
    datumElevation: settings.datumElevation,
    timeResolution,
    forwardCheck: settings.forwardCheck,
  });
  warnings.push(...reversed.warnings);
  const curvature = earthCurvature(segmentations, model, settings.earthModel, timeResolution);
  if (curvature) warnings.push(...curvature.warnings);
  const delays = settings.timeTerms ? surveyTimeTerms(pickSet, segmentations, model, combined, curvature, warnings, settings.timeTermGradient) : null;
  if (delays) warnings.push(...delays.warnings);
  return { pickSet, sides, combined, model, residuals, refractorTests: identity.tests, reversed, curvature, placement: null, timeTerms: delays, warnings };
}

/** One `branches-one-refractor` warning per branch split undone, naming the pairs and where the split lay. */
function mergeWarnings(tests: readonly RefractorMerge[]): InterpretationWarning[] {
  const byBranch = new Map<number, MinusTimeEvidence[]>();
  for (const test of tests.filter((entry) => entry.merged)) {
    byBranch.set(test.branch, [...(byBranch.get(test.branch) ?? []), ...test.evidence.filter((entry) => entry.verdict === 'straight')]);
  }
  return [...byBranch.entries()].map(([branch, straightest]) => {
    const pairs = straightest.slice(0, 3).map((entry) => `${entry.forwardShot} → ${entry.reverseShot}`).join(', ');
    const largest = Math.max(...straightest.map((entry) => entry.relativeBend));
    const hinges = [...new Set(straightest.map((entry) => formatQuantity(entry.hingeX, 'm', 4)))];
    return {
      code: 'branches-one-refractor' as const,
      level: 'info' as const,
      message: `survey: the automatic split of head-wave branches ${branch} and ${branch + 1} (at x = ${hinges.slice(0, 4).join(', ')}${hinges.length > 4 ? ', …' : ''}) was undone — the reversed minus times of ${straightest.length} pair${straightest.length === 1 ? '' : 's'} (${pairs}${straightest.length > 3 ? ', …' : ''}) run straight across it (bend at most ${(largest * 100).toFixed(1)} % of the refractor slowness), so it is one refractor whose depth changes, not a deeper layer; assign the branches yourself if a borehole says otherwise`,
      branch,
      details: { pairs: straightest.length, largestBend: largest, hingeX: straightest[0]?.hingeX ?? 0 },
    };
  });
}

function depthsForSide(
  segmentation: SideSegmentation,
  surveyDirect: { value: number; standardError: number } | null,
  settings: typeof DEFAULT_OPTIONS,
): SideResult {
  const byIndex = new Map(segmentation.branches.map((branch) => [branch.index, branch]));
  const direct = byIndex.get(1);
  const borrowedDirect = direct === undefined && surveyDirect !== null && segmentation.branches.length > 0;
  const stack = [];
  if (direct) stack.push(branchParameters(direct.fit));
  else if (borrowedDirect && surveyDirect) {
    stack.push({ slowness: surveyDirect.value, intercept: 0, slownessVariance: surveyDirect.standardError ** 2, interceptVariance: 0, covariance: 0 });
  }
  for (let index = 2; stack.length === index - 1 && byIndex.has(index); index += 1) {
    stack.push(branchParameters(byIndex.get(index)!.fit));
  }
  const empty: SideResult = {
    segmentation,
    stackBranchCount: stack.length,
    interceptTime: null,
    crossoverDistance: null,
    crossoverBracket: null,
    fittedCrossovers: [],
    bootstrap: null,
    borrowedDirect,
  };
  if (stack.length < 2) return empty;

  const interceptTime = interceptTimeDepths(stack);
  const fitted = fittedCrossovers(stack);
  // The crossover-distance method reads the crossover where the data put it: between the last pick
  // of one branch and the first of the next (an independent reading, unlike the fitted lines').
  // Where branches overlap in offset (user-assigned later phases) there is no such reading.
  // Near the crossover the two branches differ by less than twice the pick scatter σ_t, so a pick
  // there may sit on either: the reading's variance adds that of a uniform spread over
  // ±2σ_t/|s_n − s_{n+1}| to the bracket's own uniform variance, and the bracket is widened by it.
  const readings = stack.slice(0, -1).map((_, k) => {
    const lower = byIndex.get(k + 1);
    const upper = byIndex.get(k + 2);
    if (!lower || !upper || upper.firstOffset < lower.lastOffset) return null;
    const bracket = observedCrossover(lower.lastOffset, upper.firstOffset);
    const halfZone = 2 * crossoverAmbiguity(lower.fit.residualSD, upper.fit.residualSD, lower.fit.slope - upper.fit.slope);
    return {
      distance: bracket.distance,
      variance: bracket.variance + halfZone ** 2 / 3,
      low: Math.max(0, lower.lastOffset - halfZone),
      high: upper.firstOffset + halfZone,
    };
  });
  const slownesses = stack.map((parameters) => ({ slowness: parameters.slowness, variance: parameters.slownessVariance }));
  const directIntercept = { value: stack[0]!.intercept, variance: stack[0]!.interceptVariance };
  const complete = readings.every((entry) => entry !== null);
  const crossoverDistance = complete
    ? crossoverDistanceDepths(slownesses, readings.map((entry) => ({ distance: entry!.distance, variance: entry!.variance })), directIntercept)
    : null;
  const crossoverBracket = complete
    ? {
        low: crossoverDistanceDepths(slownesses, readings.map((entry) => ({ distance: entry!.low, variance: 0 })), directIntercept),
        high: crossoverDistanceDepths(slownesses, readings.map((entry) => ({ distance: entry!.high, variance: 0 })), directIntercept),
      }
    : null;

  let bootstrap: BootstrapDepths | null = null;
  if (settings.bootstrapReplicates > 0 && !borrowedDirect) {
    const { sidePicks } = segmentation;
    bootstrap = bootstrapInterceptTimeDepths(
      stack.map((_, k) => {
        const branch = byIndex.get(k + 1)!;
        return {
          offsets: branch.members.map((position) => sidePicks.offsets[position]!),
          times: branch.members.map((position) => sidePicks.times[position]!),
          sigmas: sidePicks.sigmas ? branch.members.map((position) => sidePicks.sigmas![position]!) : null,
          fit: branch.fit,
        };
      }),
      { replicates: settings.bootstrapReplicates, seed: settings.seed },
    );
  }
  return {
    ...empty,
    interceptTime,
    crossoverDistance,
    crossoverBracket,
    fittedCrossovers: fitted,
    bootstrap,
  };
}

function slownessesByBranch(segmentation: SideSegmentation): ({ slowness: number; variance: number } | null)[] {
  const largest = Math.max(0, ...segmentation.branches.map((branch) => branch.index));
  const slots: ({ slowness: number; variance: number } | null)[] = new Array(largest).fill(null);
  for (const branch of segmentation.branches) {
    // A branch whose time does not grow with offset has no velocity to average (it is warned about).
    if (!(branch.fit.slope > 0)) continue;
    slots[branch.index - 1] = { slowness: branch.fit.slope, variance: branch.fit.slopeSE ** 2 };
  }
  return slots;
}

/**
 * The survey's layered model: mean velocities and thicknesses, from the top down while each layer
 * is defined, faster than the one above (a plane-layer head wave needs it) and of positive
 * thickness. Where it stops early, `surveyWarnings` says why.
 */
export function surveyModel(combined: CombinedLayers): LayeredModel | null {
  const velocities: number[] = [];
  for (const entry of combined.slownesses) {
    if (entry === null || !(entry.value > 0)) break;
    const velocity = 1 / entry.value;
    if (velocities.length > 0 && !(velocity > velocities[velocities.length - 1]!)) break;
    velocities.push(velocity);
  }
  if (velocities.length === 0) return null;
  const { thicknesses } = thicknessesFromDepths(combined.depths, combined.depthCovariance);
  const usable: number[] = [];
  for (const thickness of thicknesses.slice(0, velocities.length - 1)) {
    if (!(thickness > 0)) break;
    usable.push(thickness);
  }
  return { velocities: velocities.slice(0, usable.length + 1), thicknesses: usable };
}
