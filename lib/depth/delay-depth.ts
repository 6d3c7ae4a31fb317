/**
 * Delay time to depth for the delay-time methods (the plus-minus method, Hagedoorn1959; the
 * generalized reciprocal method, Palmer1980): the thickness of the deepest overburden layer and
 * the depth to refractor n under one receiver, from a one-way delay (T+/2 or the GRM time-depth
 * t_G), with the overburden stripped from the top, and the shared input of both methods.
 *
 * For refractor n under layers 1…n−1 of velocities V_1…V_{n−1} and thicknesses h_1…h_{n−1}
 * (METHODS §6, in its vertical-slowness notation):
 * ```
 * delay = Σ_{j<n} h_j·q_{j,n},      q_{j,n} = √(1/V_j² − 1/V_n²)  (= cos θ_{j,n}/V_j, sin θ_{j,n} = V_j/V_n)
 * h_{n−1} = (delay − Σ_{j<n−1} h_j·q_{j,n})·DCF,   DCF = 1/q_{n−1,n} = V_{n−1}·V_n/√(V_n² − V_{n−1}²)
 * depth z_n = h_1 + … + h_{n−1}
 * ```
 * With one layer this is h = delay·DCF (METHODS 6.2: 500/2500 m/s, delay 19.59592 ms, DCF
 * 510.3104 m/s, h = 10 m). The thicknesses are "roughly normal to the refractor" (METHODS §6):
 * the delay is a sum over the layers' vertical slownesses, exact for plane horizontal layers, and
 * for a dipping refractor the depth measured perpendicular to it.
 *
 * Standard errors are first order (the delta method, JCGM2008 §5.1), with the delay, every
 * velocity, every upper thickness and the refractor velocity taken as independent. The GRM
 * time-depth depends on the refractor velocity itself (its −XY/(2V_n′) term): pass
 * `delayRefractorVelocityDerivative` = ∂delay/∂V_n so that term is carried with the V_n
 * uncertainty instead of being counted as independent.
 *
 * Edges (refusals are values, never throws):
 * - `no-head-wave`: V_n ≤ V_i for some overburden layer i — no critical refraction into layer n,
 *   so the delay has no depth meaning (a branch taken for the wrong refractor or a velocity
 *   inversion).
 * - `delay-below-upper-layers`: the delay left for the deepest layer, delay − Σ_{j<n−1} h_j·q_{j,n},
 *   is negative (for one layer: a negative delay) — the upper thicknesses or velocities are too
 *   large for this delay, or the picks are late at the shots (reciprocal time too large). A delay
 *   that leaves exactly zero gives a layer of zero thickness.
 * Misuse throws with a message: a value or standard error that is not finite, a negative standard
 * error, a velocity that is not positive, an empty list of velocities, or upper thicknesses whose
 * number is not one less than the velocities'.
 *
 * @example
 * // METHODS check case 6.2: 500 m/s over 2500 m/s, one-way delay 19.59592 ms.
 * delayToDepth({ value: 0.01959592, standardError: 0.0005 },
 *   { velocities: [{ value: 500, standardError: 0 }], upperThicknesses: [] },
 *   { value: 2500, standardError: 0 });
 * // → { ok: true, thickness: { value: 10.000, standardError: 0.255 }, depth: { value: 10.000, … }, depthConversionFactor: { value: 510.31, … } }
 */
import type { Estimate } from './dipping-layer.js';
import { formatQuantity } from '../checks/wording.js';
import { maximum } from '../stats/extent.js';
import { linearLeastSquares } from '../stats/linear-least-squares.js';

export type { Estimate } from './dipping-layer.js';

/** What is known above refractor n at one receiver. */
export interface Overburden {
  /** V_1 … V_{n−1} above refractor n, m/s. */
  readonly velocities: readonly Estimate[];
  /** h_1 … h_{n−2}: thicknesses of all overburden layers but the deepest, known at this receiver (length velocities.length − 1). */
  readonly upperThicknesses: readonly Estimate[];
}

/** First-order sensitivities of one output of `delayToDepth` to each input. */
export interface DelaySensitivities {
  /** ∂/∂delay, m/s. */
  readonly delay: number;
  /** ∂/∂V_1 … ∂/∂V_{n−1}, s (m per m/s). */
  readonly velocities: readonly number[];
  /** ∂/∂h_1 … ∂/∂h_{n−2}, dimensionless. */
  readonly upperThicknesses: readonly number[];
  /** ∂/∂V_n, s; includes `delayRefractorVelocityDerivative` when given. */
  readonly refractorVelocity: number;
}

export type DelayDepth =
  | {
      readonly ok: true;
      /** h_{n−1}: thickness of the deepest overburden layer, m. */
      readonly thickness: Estimate;
      /** z_n = h_1 + … + h_{n−1}: depth to refractor n, m. */
      readonly depth: Estimate;
      /** DCF = 1/q_{n−1,n} = V_{n−1}·V_n/√(V_n² − V_{n−1}²), m/s, with its SE from V_{n−1} and V_n. */
      readonly depthConversionFactor: Estimate;
      readonly thicknessSensitivities: DelaySensitivities;
      readonly depthSensitivities: DelaySensitivities;
    }
  | { readonly ok: false; readonly code: 'no-head-wave' | 'delay-below-upper-layers'; readonly message: string };

export interface DelayToDepthOptions {
  /** ∂delay/∂V_n, s²/m: the delay's own dependence on the refractor velocity (the GRM time-depth t_G = […− XY/V_n′]/2 has XY/(2·V_n′²)). Default 0. */
  readonly delayRefractorVelocityDerivative?: number;
}

function assertEstimate(estimate: Estimate, label: string, caller: string): void {
  if (!Number.isFinite(estimate.value) || !Number.isFinite(estimate.standardError)) {
    throw new RangeError(`${caller}: ${label} and its standard error must be finite, got ${estimate.value} ± ${estimate.standardError}`);
  }
  if (estimate.standardError < 0) throw new RangeError(`${caller}: ${label} standard error must not be negative, got ${estimate.standardError}`);
}

function assertVelocity(velocity: number, label: string, caller: string): void {
  if (!(velocity > 0) || !Number.isFinite(velocity)) throw new RangeError(`${caller}: ${label} must be a positive finite velocity in m/s, got ${velocity}`);
}

/**
 * Vertical slowness q_{i,n} = √(1/V_i² − 1/V_n²) of layer i for a ray critically refracted into
 * refractor n (METHODS §0), s/m: the delay per metre of layer i. Equal to cos θ_{i,n}/V_i with
 * sin θ_{i,n} = V_i/V_n.
 *
 * Edges: V_n = V_i gives 0 (grazing incidence). Misuse throws: a velocity not positive and finite,
 * or V_n < V_i (no critical refraction; callers refuse that case as data first).
 *
 * @example
 * verticalSlowness(500, 2500); // 0.0019596 s/m (1/510.3104 m/s, METHODS 6.2)
 */
export function verticalSlowness(layerVelocity: number, refractorVelocity: number): number {
  assertVelocity(layerVelocity, 'layer velocity', 'verticalSlowness');
  assertVelocity(refractorVelocity, 'refractor velocity', 'verticalSlowness');
  if (refractorVelocity < layerVelocity) {
    throw new RangeError(
      `verticalSlowness: refractor velocity ${refractorVelocity} m/s is slower than the layer above (${layerVelocity} m/s), so no ray is critically refracted; check for this case before asking`,
    );
  }
  // (1/V_i − 1/V_n)(1/V_i + 1/V_n) keeps the precision when the velocities are close.
  return Math.sqrt((1 / layerVelocity - 1 / refractorVelocity) * (1 / layerVelocity + 1 / refractorVelocity));
}

/**
 * Thickness of the deepest overburden layer and depth to refractor n under one receiver from a
 * one-way delay (T+/2 or the GRM time-depth t_G, s, with its SE), stripping the known upper layers
 * (module comment: the formula, the SEs and the refusals); plus the depth-conversion factor of the
 * deepest layer.
 */
export function delayToDepth(delay: Estimate, overburden: Overburden, refractorVelocity: Estimate, options: DelayToDepthOptions = {}): DelayDepth {
  const caller = 'delayToDepth';
  assertEstimate(delay, 'delay', caller);
  assertEstimate(refractorVelocity, 'refractor velocity', caller);
  assertVelocity(refractorVelocity.value, 'refractor velocity', caller);
  const { velocities, upperThicknesses } = overburden;
  if (velocities.length === 0) throw new RangeError(`${caller}: the overburden needs at least one layer velocity (V_1 above refractor 2)`);
  if (upperThicknesses.length !== velocities.length - 1) {
    throw new RangeError(
      `${caller}: ${velocities.length} overburden velocities need ${velocities.length - 1} upper thicknesses (all layers but the deepest), got ${upperThicknesses.length}`,
    );
  }
  velocities.forEach((velocity, index) => {
    assertEstimate(velocity, `velocity of layer ${index + 1}`, caller);
    assertVelocity(velocity.value, `velocity of layer ${index + 1}`, caller);
  });
  upperThicknesses.forEach((thickness, index) => assertEstimate(thickness, `thickness of layer ${index + 1}`, caller));
  const velocityDerivativeOfDelay = options.delayRefractorVelocityDerivative ?? 0;
  if (!Number.isFinite(velocityDerivativeOfDelay)) {
    throw new RangeError(`${caller}: delayRefractorVelocityDerivative must be finite, got ${velocityDerivativeOfDelay}`);
  }

  const refractor = refractorVelocity.value;
  const fastest = velocities.reduce((best, velocity, index) => (velocity.value > best.value ? { value: velocity.value, layer: index + 1 } : best), {
    value: 0,
    layer: 0,
  });
  if (!(refractor > fastest.value)) {
    return {
      ok: false,
      code: 'no-head-wave',
      message: `refractor velocity ${formatQuantity(refractor, 'm/s')} is not faster than layer ${fastest.layer} (${formatQuantity(fastest.value, 'm/s')}), so no head wave travels along this refractor and the delay gives no depth; the branch belongs to another refractor or the overburden velocity is wrong — check the branch pairing and the layer velocities`,
    };
  }

  const deepest = velocities.length - 1;
  const slownesses = velocities.map((velocity) => verticalSlowness(velocity.value, refractor));
  const deepestSlowness = slownesses[deepest]!;
  let upperDelay = 0;
  upperThicknesses.forEach((thickness, index) => {
    upperDelay += thickness.value * slownesses[index]!;
  });
  const remaining = delay.value - upperDelay;
  if (remaining < 0) {
    return {
      ok: false,
      code: 'delay-below-upper-layers',
      message:
        deepest === 0
          ? `the delay ${formatQuantity(delay.value * 1000, 'ms')} is negative, so the refractor would lie above the surface; the reciprocal time is too large for these picks (a time-zero or pick error) or the branches are of different refractors — check the reciprocal time and the picks`
          : `the delay ${formatQuantity(delay.value * 1000, 'ms')} is less than the ${formatQuantity(upperDelay * 1000, 'ms')} the upper ${deepest} layer(s) take, so layer ${deepest + 1} would have a negative thickness; the upper thicknesses or velocities are too large here or the delay is too small — check the upper layers at this receiver`,
    };
  }

  const conversion = 1 / deepestSlowness;
  const thicknessValue = remaining * conversion;
  // ∂q_{j,n}/∂V_j = −1/(V_j³·q_j),  ∂q_{j,n}/∂V_n = 1/(V_n³·q_j).
  const cube = (value: number): number => value * value * value;
  const thicknessVelocity = velocities.map((velocity, index) => {
    if (index === deepest) return thicknessValue / (deepestSlowness * cube(velocity.value) * deepestSlowness);
    const thickness = upperThicknesses[index]!.value;
    return thickness / (cube(velocity.value) * slownesses[index]! * deepestSlowness);
  });
  const thicknessUpper = upperThicknesses.map((_, index) => -slownesses[index]! / deepestSlowness);
  let thicknessRefractor = -thicknessValue / (cube(refractor) * deepestSlowness * deepestSlowness);
  upperThicknesses.forEach((thickness, index) => {
    thicknessRefractor -= thickness.value / (cube(refractor) * slownesses[index]! * deepestSlowness);
  });
  thicknessRefractor += velocityDerivativeOfDelay * conversion;
  const thicknessSensitivities: DelaySensitivities = {
    delay: conversion,
    velocities: thicknessVelocity,
    upperThicknesses: thicknessUpper,
    refractorVelocity: thicknessRefractor,
  };
  const depthSensitivities: DelaySensitivities = {
    ...thicknessSensitivities,
    upperThicknesses: thicknessUpper.map((derivative) => 1 + derivative),
  };

  const standardError = (sensitivities: DelaySensitivities): number => {
    let variance = (sensitivities.delay * delay.standardError) ** 2 + (sensitivities.refractorVelocity * refractorVelocity.standardError) ** 2;
    sensitivities.velocities.forEach((derivative, index) => {
      variance += (derivative * velocities[index]!.standardError) ** 2;
    });
    sensitivities.upperThicknesses.forEach((derivative, index) => {
      variance += (derivative * upperThicknesses[index]!.standardError) ** 2;
    });
    return Math.sqrt(variance);
  };
  const depthValue = upperThicknesses.reduce((sum, thickness) => sum + thickness.value, 0) + thicknessValue;
  // DCF = 1/q: ∂/∂V_{n−1} = 1/(V_{n−1}³·q³), ∂/∂V_n = −1/(V_n³·q³).
  const deepestVelocity = velocities[deepest]!;
  const conversionSE = Math.hypot(
    deepestVelocity.standardError / (cube(deepestVelocity.value) * cube(deepestSlowness)),
    refractorVelocity.standardError / (cube(refractor) * cube(deepestSlowness)),
  );
  return {
    ok: true,
    thickness: { value: thicknessValue, standardError: standardError(thicknessSensitivities) },
    depth: { value: depthValue, standardError: standardError(depthSensitivities) },
    depthConversionFactor: { value: conversion, standardError: conversionSE },
    thicknessSensitivities,
    depthSensitivities,
  };
}

/**
 * Palmer's optimum XY for plane layers (Palmer1980, recalled from memory; METHODS §6): the
 * separation at the surface of the forward and reverse rays that leave refractor n at one point,
 * XY = 2·Σ_{j<n} h_j·tan θ_{j,n} with sin θ_{j,n} = V_j/V_n, m.
 *
 * Edges: no layers give 0; a layer of zero thickness adds nothing. Misuse throws: lists of
 * different lengths, a thickness not finite, a velocity not positive and finite, or V_n ≤ V_j (no
 * critical ray, tan θ infinite).
 *
 * @example
 * planeLayerOptimumXY([10], [500], 2500); // 4.0825 m (METHODS 6.2)
 * planeLayerOptimumXY([3, 7], [400, 1200], 3000); // 6.9173 m (METHODS 6.2)
 */
export function planeLayerOptimumXY(thicknesses: readonly number[], velocities: readonly number[], refractorVelocity: number): number {
  const caller = 'planeLayerOptimumXY';
  if (thicknesses.length !== velocities.length) {
    throw new RangeError(`${caller}: ${velocities.length} layer velocities need as many thicknesses, got ${thicknesses.length}`);
  }
  assertVelocity(refractorVelocity, 'refractor velocity', caller);
  let sum = 0;
  thicknesses.forEach((thickness, index) => {
    const velocity = velocities[index]!;
    assertVelocity(velocity, `velocity of layer ${index + 1}`, caller);
    if (!Number.isFinite(thickness)) throw new RangeError(`${caller}: thickness of layer ${index + 1} must be finite, got ${thickness}`);
    if (!(refractorVelocity > velocity)) {
      throw new RangeError(`${caller}: refractor velocity ${refractorVelocity} m/s must exceed layer ${index + 1}'s ${velocity} m/s for a critical ray`);
    }
    const sine = velocity / refractorVelocity;
    sum += (thickness * sine) / Math.sqrt((1 - sine) * (1 + sine));
  });
  return 2 * sum;
}

// ---- the shared input of the plus-minus method and the GRM ----

/** The arrivals of one shot on the head-wave branch of refractor n. */
export interface RefractorArrivals {
  /** Receiver positions along the line, m, ascending, of the picks on the head-wave branch of refractor n. */
  readonly receiverX: readonly number[];
  /** Arrival times, s. */
  readonly times: readonly number[];
  /** s, one per arrival (the caller fills in the branch's residual SD when picks have none); positive. */
  readonly sigmas: readonly number[];
}

/** A reversed pair of shots on refractor n. */
export interface ReversedArrivals {
  /** Shot A, m. */
  readonly forwardSourceX: number;
  /** Shot B, m; > A. */
  readonly reverseSourceX: number;
  /** Refractor-n branch recorded from A (receivers on A's +x side). */
  readonly forward: RefractorArrivals;
  /** The same refractor's branch recorded from B (receivers on B's −x side). */
  readonly reverse: RefractorArrivals;
  /** t_AB, s: the time from A recorded at B (equal to t_BA when reciprocity holds). */
  readonly reciprocalTime: Estimate;
}

/** Two receivers are the same when closer than this fraction of max(1 m, B − A) (common practice: survey positions to the micrometre per metre). */
export const SAME_POSITION_RELATIVE = 1e-6;

/** The matching tolerance of a survey, m: SAME_POSITION_RELATIVE·max(1, B − A). */
export function positionTolerance(input: ReversedArrivals): number {
  return SAME_POSITION_RELATIVE * Math.max(1, input.reverseSourceX - input.forwardSourceX);
}

function assertArrivals(arrivals: RefractorArrivals, label: string, caller: string): void {
  const { receiverX, times, sigmas } = arrivals;
  if (times.length !== receiverX.length || sigmas.length !== receiverX.length) {
    throw new RangeError(`${caller}: ${label} branch has ${receiverX.length} receivers but ${times.length} times and ${sigmas.length} sigmas; give one of each per arrival`);
  }
  receiverX.forEach((x, index) => {
    const time = times[index]!;
    const sigma = sigmas[index]!;
    if (!Number.isFinite(x) || !Number.isFinite(time)) throw new RangeError(`${caller}: ${label} arrival ${index + 1} needs a finite position and time, got x = ${x} m, t = ${time} s`);
    if (!(sigma > 0) || !Number.isFinite(sigma)) {
      throw new RangeError(`${caller}: ${label} arrival ${index + 1} (x = ${x} m) needs a positive finite pick SE, got ${sigma} s; use the branch's residual SD when the pick has none`);
    }
    if (index > 0 && !(x > receiverX[index - 1]!)) {
      throw new RangeError(`${caller}: ${label} receivers must be strictly ascending, got ${receiverX[index - 1]} m then ${x} m (arrival ${index + 1}); sort them and merge duplicates`);
    }
  });
}

/** Misuse of a `ReversedArrivals` throws with a message (both methods check their input alike). */
export function assertReversedArrivals(input: ReversedArrivals, caller: string): void {
  if (!Number.isFinite(input.forwardSourceX) || !Number.isFinite(input.reverseSourceX) || !(input.reverseSourceX > input.forwardSourceX)) {
    throw new RangeError(
      `${caller}: shot B (reverseSourceX ${input.reverseSourceX} m) must lie beyond shot A (forwardSourceX ${input.forwardSourceX} m) on the line; give the shots in order`,
    );
  }
  assertEstimate(input.reciprocalTime, 'reciprocal time', caller);
  assertArrivals(input.forward, 'forward', caller);
  assertArrivals(input.reverse, 'reverse', caller);
}

/** A weighted straight line y = intercept + slope·x with the SEs of the two coefficients and how well it fits. */
export interface WeightedLine {
  readonly slope: number;
  readonly slopeSE: number;
  readonly intercept: number;
  readonly interceptSE: number;
  /** Cov(intercept, slope), scaled as the SEs are. */
  readonly covariance: number;
  /** √(Σ r²/(n − 2)) of the unweighted residuals, in the unit of y. */
  readonly residualSD: number;
  /** Σ r²/σ² over n − 2 (1 when the residuals scatter as the SEs say). */
  readonly reducedChiSquare: number;
  readonly residuals: readonly number[];
  readonly count: number;
}

/**
 * Weighted least-squares line (Bevington2003 ch. 6; Draper1998 ch. 9) through points with
 * absolute SEs, abscissae centred for conditioning. The coefficient SEs are those of the given
 * SEs scaled by max(1, √χ²_ν) (the Birge ratio, common practice: never shrunk below what the SEs
 * give, widened when the points scatter more than their SEs — as they do about a non-planar
 * refractor). Null for fewer than 3 points or all abscissae equal (no slope and no scatter).
 */
export function weightedLine(x: readonly number[], y: readonly number[], standardErrors: readonly number[]): WeightedLine | null {
  const count = x.length;
  if (count < 3) return null;
  const centre = x.reduce((sum, value) => sum + value, 0) / count;
  const fit = linearLeastSquares(
    x.map((value) => [1, value - centre]),
    y,
    standardErrors.map((se) => 1 / (se * se)),
  );
  if (fit === null) return null;
  const [level, slope] = fit.coefficients as [number, number];
  const reducedChiSquare = fit.weightedResidualSumOfSquares / (count - 2);
  const inflation = Math.max(1, Math.sqrt(reducedChiSquare));
  const covariance = fit.unscaledCovariance;
  const slopeVariance = covariance[1]![1]!;
  const intercept = level - slope * centre;
  const interceptVariance = covariance[0]![0]! - 2 * centre * covariance[0]![1]! + centre * centre * slopeVariance;
  const residuals = x.map((value, index) => y[index]! - (level + slope * (value - centre)));
  const residualSD = Math.sqrt(residuals.reduce((sum, residual) => sum + residual * residual, 0) / (count - 2));
  return {
    slope,
    slopeSE: inflation * Math.sqrt(slopeVariance),
    intercept,
    interceptSE: inflation * Math.sqrt(Math.max(0, interceptVariance)),
    covariance: inflation * inflation * (covariance[0]![1]! - centre * slopeVariance),
    residualSD,
    reducedChiSquare,
    residuals,
    count,
  };
}

/** Systematic curvature is noted when the quadratic coefficient exceeds this many of its SEs. */
export const CURVATURE_STANDARD_ERRORS = 3;

/**
 * The quadratic term of a weighted fit y = a + b·u + c·u² (u = x − mean x) and its SE, scaled by
 * max(1, √χ²_ν) of the quadratic fit itself so that plain scatter is not read as curvature. Null
 * for fewer than 4 points or a singular design.
 */
export function quadraticTerm(x: readonly number[], y: readonly number[], standardErrors: readonly number[]): { value: number; standardError: number } | null {
  const count = x.length;
  if (count < 4) return null;
  const centre = x.reduce((sum, value) => sum + value, 0) / count;
  const halfRange = maximum(x.map((value) => Math.abs(value - centre))) || 1;
  const fit = linearLeastSquares(
    x.map((value) => {
      const u = (value - centre) / halfRange;
      return [1, u, u * u];
    }),
    y,
    standardErrors.map((se) => 1 / (se * se)),
  );
  if (fit === null) return null;
  const inflation = Math.max(1, Math.sqrt(fit.weightedResidualSumOfSquares / (count - 3)));
  return {
    value: (fit.coefficients[2] as number) / (halfRange * halfRange),
    standardError: (inflation * Math.sqrt(fit.unscaledCovariance[2]![2]!)) / (halfRange * halfRange),
  };
}

/** Refractors steeper than this (10°, common practice, METHODS §6) break the delay-time methods' near-planar assumption. */
export const DELAY_METHOD_STEEP_DIP = (10 * Math.PI) / 180;

/** The local dip of a depth profile is read from a line through this many neighbouring receivers. */
export const DIP_WINDOW = 5;

/** A dip counts as steep only when it exceeds the limit by this many of its SEs (pick noise alone makes neighbouring depths jump). */
export const DIP_STANDARD_ERRORS = 2;

/**
 * The steepest place where a depth profile dips beyond `limit` (rad) by more than
 * `DIP_STANDARD_ERRORS` of its SE: the local dip is atan of the slope of a weighted line through
 * `DIP_WINDOW` neighbouring depths (fewer at the ends, at least 3) with their SEs (`weightedLine`,
 * so scatter widens the SE). Null when no place qualifies or there are fewer than 3 points.
 */
export function steepestDip(x: readonly number[], depth: readonly number[], depthSE: readonly number[], limit: number): { dip: number; x: number } | null {
  const half = Math.floor(DIP_WINDOW / 2);
  let steepest: { dip: number; x: number } | null = null;
  const threshold = Math.tan(limit);
  for (let index = 0; index < x.length; index += 1) {
    const first = Math.max(0, index - half);
    const last = Math.min(x.length, index + half + 1);
    const line = weightedLine(x.slice(first, last), depth.slice(first, last), depthSE.slice(first, last));
    if (line === null || !(Math.abs(line.slope) - DIP_STANDARD_ERRORS * line.slopeSE > threshold)) continue;
    const dip = Math.atan(line.slope);
    if (steepest === null || Math.abs(dip) > Math.abs(steepest.dip)) steepest = { dip, x: x[index]! };
  }
  return steepest;
}

/**
 * The `refractor-steep` note of a delay-time section, or null: the steepest local dip of the depths
 * (`steepestDip`) when it exceeds `DELAY_METHOD_STEEP_DIP`; `consequence` says what that does to this
 * method's depths.
 */
export function steepRefractorNote(
  receivers: readonly { readonly x: number; readonly depth: number; readonly depthSE: number }[],
  methodName: string,
  consequence: string,
): { readonly code: 'refractor-steep'; readonly x: number; readonly message: string } | null {
  const steepest = steepestDip(
    receivers.map((receiver) => receiver.x),
    receivers.map((receiver) => receiver.depth),
    receivers.map((receiver) => receiver.depthSE),
    DELAY_METHOD_STEEP_DIP,
  );
  if (steepest === null) return null;
  const degrees = (radians: number): string => formatQuantity((radians * 180) / Math.PI, '°', 3);
  return {
    code: 'refractor-steep',
    x: steepest.x,
    message: `the refractor dips ${degrees(Math.abs(steepest.dip))} near ${formatQuantity(steepest.x, 'm')}, steeper than the ${degrees(DELAY_METHOD_STEEP_DIP)} ${methodName} assumes, so ${consequence}; values are kept — treat them as indicative and check with a ray-traced model`,
  };
}
