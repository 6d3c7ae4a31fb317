/**
 * Checks on single branches: enough picks, a fit as good as the picks allow, no curvature, no
 * outliers, a bounded velocity, a direct wave through the origin, and velocities that name a
 * known non-rock arrival (air blast, water table).
 *
 * Each function is pure and returns zero or more warnings in the project's grammar: the thing,
 * the likely cause, the fix.
 */
import type { Branch, Side, SidePicks } from '../branches/types.js';
import { fitBranchMembers } from '../branches/branch-fit.js';
import { chiSquareSurvival } from '../stats/chi-square.js';
import { maximum } from '../stats/extent.js';
import { normalQuantile } from '../branches/normal.js';
import { studentTQuantile } from '../branches/student-t.js';
import type { InterpretationWarning } from './warning.js';

export interface BranchContext {
  readonly shot: string;
  readonly side: Side;
  readonly branch: Branch;
  readonly sidePicks: SidePicks;
}

/** Picks below which a branch's standard error is weak (common practice: 2 define a line, 3 give one residual, 4 a usable SE). */
export const WEAK_BRANCH_PICKS = 4;
/** χ² upper-tail probability below which the fit is worse than the sigmas allow (METHODS §3: P < 0.01). */
export const POOR_FIT_PROBABILITY = 0.01;
/** |t| of a quadratic term above which a branch is called curved (METHODS §9: |t| > 3). */
export const CURVATURE_T = 3;
/** Fewest picks for the curvature test to mean anything (three parameters plus three residuals). */
export const CURVATURE_MIN_PICKS = 6;
/** Robust weight below which a pick is named an outlier (Huber weight k/|u| < 0.35 ⇔ |u| > ~3.8; METHODS §3 names |u| > 3). */
export const OUTLIER_STANDARDISED_RESIDUAL = 3;
/** Air-wave speed band, m/s (common practice: about 343 m/s at 20 °C; 320–350 m/s flags an air blast). */
export const AIR_WAVE_BAND: readonly [number, number] = [320, 350];
/** Water-table band, m/s (common practice: saturated sediment ≈ 1500 m/s; METHODS §4 gives 1450–1550). */
export const WATER_TABLE_BAND: readonly [number, number] = [1450, 1550];
/**
 * Two-sided probability of the direct-wave origin test: the Student-t equivalent of METHODS §4
 * constraint 4's "within 3 SE" (3 SE of a normal variable, P = 0.9973), so branches of few picks
 * (1–2 degrees of freedom) are not called wrong ten times too often.
 */
export const DIRECT_ORIGIN_PROBABILITY = 0.9973;

export interface DirectInterceptTest {
  /** Free-line intercept, s, and its SE. */
  readonly intercept: number;
  readonly interceptSE: number;
  /** Slope of the free line, s/m (what the branch's velocity is when not forced through the origin). */
  readonly slope: number;
  /** |intercept| may reach this before the branch is said to miss the origin, s. */
  readonly allowed: number;
  readonly passes: boolean;
}

/**
 * Does the free-intercept line through a branch pass through the time origin? It passes when
 * |a| ≤ max(t_{(1+P)/2, ν}·SE(a), time resolution) with P = `DIRECT_ORIGIN_PROBABILITY` and ν the
 * fit's degrees of freedom; the time-resolution floor keeps exact or rounded picks from failing on
 * a difference no seismograph resolves. Returns null when the free line cannot be fitted.
 */
export function directInterceptTest(sidePicks: SidePicks, members: readonly number[], timeResolution: number): DirectInterceptTest | null {
  const outcome = fitBranchMembers(sidePicks, members, { method: 'least-squares', throughOrigin: false });
  if (!outcome.ok) return null;
  const { intercept, interceptSE, degreesOfFreedom, weighted, slope } = outcome.fit;
  const quantile = weighted || degreesOfFreedom < 1 ? normalQuantile((1 + DIRECT_ORIGIN_PROBABILITY) / 2) : studentTQuantile((1 + DIRECT_ORIGIN_PROBABILITY) / 2, degreesOfFreedom);
  const allowed = Math.max(quantile * interceptSE, timeResolution);
  return { intercept, interceptSE, slope, allowed, passes: Math.abs(intercept) <= allowed };
}

function where(context: BranchContext): string {
  return `shot ${context.shot}, ${context.side} side, branch ${context.branch.index}`;
}

function base(context: BranchContext) {
  return { shot: context.shot, side: context.side, branch: context.branch.index };
}

/** Too few picks on a branch: below 3 no residual is left; below 4 the standard error is weak. */
export function tooFewPicksWarnings(context: BranchContext): InterpretationWarning[] {
  const count = context.branch.fit.count;
  if (count >= WEAK_BRANCH_PICKS) return [];
  return [
    {
      code: 'branch-too-few-picks',
      level: count < 3 ? 'warning' : 'info',
      message: `${where(context)}: only ${count} picks, so its velocity and intercept ${count < 3 ? 'have no residual check at all' : 'have a weak standard error'}; add receivers over this offset range or merge the branch with its neighbour`,
      ...base(context),
      details: { pickCount: count },
    },
  ];
}

/**
 * Poor fit: with sigmas, χ² against χ²(ν) with P < 0.01; without, a quadratic term significant at
 * |t| > 3 on a branch of at least 6 picks (a curved branch: velocity gradient or curved refractor).
 * A branch whose residual SD is below `timeResolution` is never called curved (numerical noise).
 */
export function poorFitWarnings(context: BranchContext, timeResolution: number): InterpretationWarning[] {
  const warnings: InterpretationWarning[] = [];
  const { fit } = context.branch;
  if (fit.chiSquare !== null && fit.degreesOfFreedom > 0) {
    const probability = chiSquareSurvival(fit.chiSquare, fit.degreesOfFreedom);
    if (probability < POOR_FIT_PROBABILITY) {
      warnings.push({
        code: 'branch-poor-fit',
        level: 'warning',
        message: `${where(context)}: the picks scatter more than their sigmas allow (χ² = ${fit.chiSquare.toFixed(1)} for ${fit.degreesOfFreedom} degrees of freedom, P = ${probability.toExponential(1)}); the sigmas are understated, the branch is curved or it holds picks of another branch — check the picks or enlarge sigma`,
        ...base(context),
        details: { chiSquare: fit.chiSquare, degreesOfFreedom: fit.degreesOfFreedom, probability },
      });
    }
  }
  const curvature = curvatureTStatistic(context);
  if (curvature !== null && fit.residualSD > timeResolution && Math.abs(curvature) > CURVATURE_T) {
    warnings.push({
      code: 'branch-poor-fit',
      level: 'warning',
      message: `${where(context)}: the branch is curved (quadratic term t = ${curvature.toFixed(1)}), so straight-line velocities and depths from it are biased; a velocity gradient or a curved refractor is likely — split the branch or use a method that allows gradients`,
      ...base(context),
      details: { curvatureT: curvature },
    });
  }
  return warnings;
}

/** t statistic of the quadratic coefficient in t = a + b·x + c·x², or null when too few picks. */
export function curvatureTStatistic(context: BranchContext): number | null {
  const { members } = context.branch;
  if (members.length < CURVATURE_MIN_PICKS) return null;
  const offsets = members.map((position) => context.sidePicks.offsets[position] ?? Number.NaN);
  const times = members.map((position) => context.sidePicks.times[position] ?? Number.NaN);
  return quadraticTermT(offsets, times);
}

/** t of c in least-squares t = a + b·u + c·u² with u = centred, scaled offset; null if singular. */
export function quadraticTermT(offsets: readonly number[], times: readonly number[]): number | null {
  const count = offsets.length;
  if (count < 4) return null;
  const mean = offsets.reduce((sum, value) => sum + value, 0) / count;
  const spread = maximum(offsets.map((value) => Math.abs(value - mean)));
  if (!(spread > 0)) return null;
  const u = offsets.map((value) => (value - mean) / spread);
  // Normal equations for [1, u, u²].
  const design = u.map((value) => [1, value, value * value] as const);
  const normal = [0, 1, 2].map((row) => [0, 1, 2].map((column) => design.reduce((sum, d) => sum + d[row]! * d[column]!, 0)));
  const rhs = [0, 1, 2].map((row) => design.reduce((sum, d, k) => sum + d[row]! * times[k]!, 0));
  const inverse = invert3(normal);
  if (inverse === null) return null;
  const coefficients = [0, 1, 2].map((row) => inverse[row]!.reduce((sum, value, column) => sum + value * rhs[column]!, 0));
  const residualSquares = design.reduce((sum, d, k) => {
    const fitted = coefficients[0]! + coefficients[1]! * d[1] + coefficients[2]! * d[2];
    return sum + (times[k]! - fitted) ** 2;
  }, 0);
  const variance = residualSquares / (count - 3);
  const standardError = Math.sqrt(variance * inverse[2]![2]!);
  if (!(standardError > 0)) return null;
  return coefficients[2]! / standardError;
}

function invert3(matrix: readonly (readonly number[])[]): number[][] | null {
  const [a, b, c] = [matrix[0]!, matrix[1]!, matrix[2]!];
  const cofactor = [
    [b[1]! * c[2]! - b[2]! * c[1]!, -(a[1]! * c[2]! - a[2]! * c[1]!), a[1]! * b[2]! - a[2]! * b[1]!],
    [-(b[0]! * c[2]! - b[2]! * c[0]!), a[0]! * c[2]! - a[2]! * c[0]!, -(a[0]! * b[2]! - a[2]! * b[0]!)],
    [b[0]! * c[1]! - b[1]! * c[0]!, -(a[0]! * c[1]! - a[1]! * c[0]!), a[0]! * b[1]! - a[1]! * b[0]!],
  ];
  const determinant = a[0]! * cofactor[0]![0]! + a[1]! * cofactor[1]![0]! + a[2]! * cofactor[2]![0]!;
  if (!(Math.abs(determinant) > 1e-300)) return null;
  return cofactor.map((row) => row.map((value) => value / determinant));
}

/** Picks a robust fit down-weighted to outliers (|standardised residual| > 3), named by offset. */
export function outlierWarnings(context: BranchContext): InterpretationWarning[] {
  const { fit, members } = context.branch;
  if (fit.robustWeights === null || !(fit.residualSD > 0)) return [];
  const scale = robustScale(fit.residuals);
  if (!(scale > 0)) return [];
  const outliers = fit.residuals
    .map((residual, k) => ({ residual, offset: context.sidePicks.offsets[members[k] ?? -1] ?? Number.NaN }))
    .filter((entry) => Math.abs(entry.residual / scale) > OUTLIER_STANDARDISED_RESIDUAL);
  if (outliers.length === 0) return [];
  const named = outliers.map((entry) => `${entry.offset.toPrecision(4)} m`).join(', ');
  return [
    {
      code: 'branch-outlier-picks',
      level: 'warning',
      message: `${where(context)}: ${outliers.length} pick(s) at offset ${named} lie more than ${OUTLIER_STANDARDISED_RESIDUAL} robust standard deviations off the line and were down-weighted; re-pick them or exclude them`,
      ...base(context),
      details: { outlierCount: outliers.length },
    },
  ];
}

/** 1.4826 × median absolute deviation from zero of the residuals (robust σ for normal errors). */
function robustScale(residuals: readonly number[]): number {
  const sorted = residuals.map((value) => Math.abs(value)).sort((a, b) => a - b);
  const middle = Math.floor(sorted.length / 2);
  const median = sorted.length % 2 === 1 ? sorted[middle]! : (sorted[middle - 1]! + sorted[middle]!) / 2;
  return 1.4826 * median;
}

/** The 95 % velocity interval is unbounded (slope interval reaches zero). */
export function unboundedVelocityWarnings(context: BranchContext): InterpretationWarning[] {
  if (context.branch.fit.velocityInterval95 !== null || context.branch.fit.degreesOfFreedom < 1) return [];
  return [
    {
      code: 'velocity-unbounded',
      level: 'warning',
      message: `${where(context)}: the slope is not distinguishable from zero at 95 %, so the velocity has no upper bound; a longer branch or more picks are needed before depths below it mean anything`,
      ...base(context),
    },
  ];
}

/** Apparent velocity in the air-wave or water-table band (plausibility, common practice). */
export function knownArrivalWarnings(context: BranchContext): InterpretationWarning[] {
  const velocity = context.branch.fit.apparentVelocity;
  if (velocity >= AIR_WAVE_BAND[0] && velocity <= AIR_WAVE_BAND[1]) {
    return [
      {
        code: 'air-wave-suspected',
        level: 'warning',
        message: `${where(context)}: ${velocity.toFixed(0)} m/s is the speed of sound in air, so these picks are probably the air blast, not a ground arrival; re-pick the earlier, weaker arrival or exclude them`,
        ...base(context),
        details: { apparentVelocity: velocity },
      },
    ];
  }
  if (context.branch.index >= 2 && velocity >= WATER_TABLE_BAND[0] && velocity <= WATER_TABLE_BAND[1]) {
    return [
      {
        code: 'water-table-suspected',
        level: 'info',
        message: `${where(context)}: ${velocity.toFixed(0)} m/s is the P velocity of water-saturated sediment, so this refractor is probably the water table rather than rock; confirm with a borehole or piezometer before reading it as bedrock`,
        ...base(context),
        details: { apparentVelocity: velocity },
      },
    ];
  }
  return [];
}

/**
 * Direct branch of a surface shot: refit with a free intercept (`directInterceptTest`); an
 * intercept beyond what its uncertainty allows means a time-zero (trigger) error, a wrong source
 * position or a buried shot. Branches of fewer than 3 picks are not judged (no residual freedom).
 */
export function directOriginWarnings(context: BranchContext, timeResolution: number): InterpretationWarning[] {
  const { branch, sidePicks } = context;
  if (branch.index !== 1 || !sidePicks.surfaceShot || branch.members.length < 3) return [];
  const test = directInterceptTest(sidePicks, branch.members, timeResolution);
  if (test === null || test.passes) return [];
  const milliseconds = test.intercept * 1000;
  const ratio = test.interceptSE > 0 ? ` (${Math.abs(test.intercept / test.interceptSE).toFixed(1)} standard errors)` : '';
  return [
    {
      code: 'direct-not-through-origin',
      level: 'warning',
      message: `${where(context)}: the direct-wave line meets zero offset at ${milliseconds.toFixed(2)} ms${ratio}, not at zero; check the trigger (time zero) and the source position, and whether the shot was buried (a buried shot's direct wave is hyperbolic near it; give source_depth_m and uphole_ms so the delay-time sections bring it up to the ground)`,
      ...base(context),
      details: { freeIntercept: test.intercept, interceptSE: test.interceptSE, allowed: test.allowed },
    },
  ];
}

/** Every single-branch check, in a fixed order. */
export function branchWarnings(context: BranchContext, timeResolution: number): InterpretationWarning[] {
  return [
    ...tooFewPicksWarnings(context),
    ...poorFitWarnings(context, timeResolution),
    ...outlierWarnings(context),
    ...unboundedVelocityWarnings(context),
    ...knownArrivalWarnings(context),
    ...directOriginWarnings(context, timeResolution),
  ];
}
