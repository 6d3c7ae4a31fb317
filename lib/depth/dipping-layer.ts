/**
 * Dipping planar layers from a reversed profile: the true velocity, dip, critical angle and the
 * depths under both shots of each plane dipping refractor, from the direct-wave velocity and the
 * apparent slownesses and intercept times of the forward and reverse head-wave branches
 * (Telford1990 ch. 4; Kearey2002 ch. 5; Sheriff1995 ch. 4; Palmer1986; exact several-layer forms
 * Adachi1954, Mota1954, Johnson1976), with the covariance of every output by the delta method
 * (JCGM2008 §5.2).
 *
 * Geometry: shot A at x = 0, shot B at x = L (`spreadLength`), z positive down; a dip α is
 * positive when the interface deepens from A to B. The forward branch (shot A) is
 * t = p_d·x + τ_A, the reverse branch (shot B) t = p_u·(L − x) + τ_B, with signed apparent
 * slownesses p_d, p_u (forward and reverse; p_d is the down-dip one when α > 0).
 *
 * Two layers (one refractor) — the textbook closed forms:
 * ```
 * θ_c = ½[asin(V_1·p_d) + asin(V_1·p_u)],   α = ½[asin(V_1·p_d) − asin(V_1·p_u)],   V_2 = V_1/sin θ_c
 * h_A = τ_A·V_1/(2·cos θ_c),  h_B = τ_B·V_1/(2·cos θ_c)   (perpendicular depths),   z = h/cos α (vertical)
 * consistency: h_B − h_A = L·sin α  ⇔  τ_A + p_d·L = τ_B + p_u·L (the fitted lines' reciprocal times agree)
 * ```
 * The small-dip harmonic mean V_2 ≈ 2·V_u·V_d/(V_u + V_d) is not used: it drops a factor cos α
 * (1.5 % at 10°).
 *
 * Several layers — stripping from the top (an equivalent vector form of the published exact
 * formulas). V_1…V_{n−1} and interfaces 1…n−2 (depth under each shot, dip δ_k) are known; angles
 * are from the vertical, positive in the direction of travel:
 * 1. ψ_1 = asin(V_1·p_d) (forward), ψ′_1 = asin(V_1·p_u) (reverse).
 * 2. Through interface k: ψ_{k+1} = δ_k + asin[(V_{k+1}/V_k)·sin(ψ_k − δ_k)]; ψ′ alike with −δ_k.
 * 3. θ_c = ½(ψ_{n−1} + ψ′_{n−1}), δ_{n−1} = ½(ψ_{n−1} − ψ′_{n−1}), V_n = V_{n−1}/sin θ_c.
 * 4. Depth under A: the ray going down from A has angles ψ′_k (reciprocity); trace it through the
 *    known interfaces (segments Δr_k). With p↓_k = s_k(sin ψ′_k, cos ψ′_k), p↑_k = s_k(sin ψ_k, −cos ψ_k),
 *    τ_A = Σ_{k<n} (p↓_k − p↑_k)·Δr_k exactly, the last term being 2·d·s_{n−1}·cos θ_c with d the
 *    perpendicular distance from the last crossing point to the refractor: solve for d, place the
 *    refractor (dip δ_{n−1}) and read its perpendicular and vertical depth under A. Under B the same
 *    in the mirrored frame (dips negated, ψ and ψ′ exchanged) from τ_B.
 * For one refractor these steps reduce exactly to the closed forms above (one implementation).
 * Each shot's depths come from its own intercept and its own placement of the upper interfaces;
 * the misfit (h_B − h_A) − L·sin δ of each interface measures how far the data are from one plane.
 *
 * Assumes plane homogeneous isotropic layers, each dipping in the line of the profile (2-D), a flat
 * surface through both shots, velocities increasing downward with every refractor giving a branch
 * on both sides, and branches of the same refractor paired. It fails (silently, values wrong) for
 * curved refractors, lateral velocity change (which mimics dip), hidden layers and inversions.
 *
 * Inputs θ, the Jacobian's columns, in this order:
 *   θ = (s_1, p_{d,2}, τ_{A,2}, p_{u,2}, τ_{B,2}, …, p_{d,N}, τ_{A,N}, p_{u,N}, τ_{B,N})
 * with covariance block-diagonal: Var s_1, then per branch pair the forward 2×2 block and the
 * reverse 2×2 block (slope–intercept covariance kept). The spread length is taken as exact.
 * Outputs, the Jacobian's rows, are `DIPPING_OUTPUTS` per interface, interface 1 first.
 *
 * Edges (each a `DippingNote`, never a throw or a silent NaN):
 * - `apparent-velocity-impossible` (interface n − 1): V_1·|p| > 1 for a slowness of branch n, so
 *   the apparent velocity is slower than the top layer; the stack stops: interfaces 1…n−2 are
 *   returned and branches n…N are not used. V_1·|p| = 1 exactly (grazing emergence, a branch
 *   indistinguishable from the direct wave, where asin has an infinite derivative) is treated the
 *   same, so that no standard error is silently infinite or NaN.
 * - `no-critical-ray` (interface n − 1): an asin argument beyond ±1 (or exactly ±1, as above) while
 *   carrying branch n's rays down through an upper interface (step 2): no critical ray exists, the
 *   data are inconsistent with the upper layers; the stack stops as above.
 * - `critical-angle-not-positive` (interface n − 1): θ_c ≤ 0 (p_d + p_u ≤ 0 for two layers): no
 *   faster refractor fits both branches; the stack stops as above.
 * - `apparent-slowness-not-positive` (interface n − 1): p_u ≤ 0 (or p_d ≤ 0): the branch gets
 *   earlier away from its shot, possible only when the dip exceeds the critical angle; signs are
 *   kept and all values computed.
 * - `dip-steep` (interface k): |δ_k| > 15° (`STEEP_DIP`, common practice): planar formulas are
 *   unreliable; values kept.
 * - `depth-not-positive` (interface k): a perpendicular depth under A or B ≤ 0; value kept and the
 *   stack goes on (deeper interfaces inherit the error).
 * - `dip-inconsistent` (interface k): |(h_B − h_A) − L·sin δ_k| exceeds 3 of its standard errors
 *   plus `consistencyTolerance` (default 1 mm): lateral velocity change, a non-planar refractor or
 *   branches of different refractors; values kept.
 * No branch pairs give no interfaces and no notes.
 *
 * Misuse throws with a message: a value or variance not finite, a negative variance, a direct
 * slowness not positive, a spread length not positive.
 *
 * @example
 * // METHODS.md check case 5.1: 600 m/s over 2400 m/s, 8 m under A, dipping 6° towards B, L = 120 m.
 * const exact = (slowness: number, intercept: number) => ({ slowness, intercept, slownessVariance: 0, interceptVariance: 0, covariance: 0 });
 * dippingLayer({ slowness: 1 / 600, variance: 0 },
 *   { forward: exact(1 / 1715.0711, 0.02567844), reverse: exact(1 / 4069.9703, 0.06616214) }, 120)
 *   .interfaces[0]; // refractorVelocity 2400.00 m/s, dip 0.10472 rad (6°), verticalDepthA 8.0000 m, verticalDepthB 20.6125 m
 */
import type { BranchParameters } from './types.js';
import type { SlownessReading } from './crossover-distance.js';
import { sandwich, zeros } from '../stats/small-matrix.js';
import { formatQuantity } from '../checks/wording.js';

/** Dips steeper than this (15°, common practice) make the planar formulas unreliable. */
export const STEEP_DIP = (15 * Math.PI) / 180;

/** The consistency misfit is noted beyond this many of its standard errors (plus a tolerance). */
export const CONSISTENCY_STANDARD_ERRORS = 3;

/** Default absolute tolerance on the consistency misfit, m: rounding of picks to 0.01 ms at 2 km/s. */
export const DEFAULT_CONSISTENCY_TOLERANCE = 1e-3;

/** The forward (shot A) and reverse (shot B) head-wave branches of one refractor. */
export interface ReversedBranchPair {
  /** p_d (signed apparent slowness, s/m) and τ_A of the branch recorded from shot A, with covariance. */
  readonly forward: BranchParameters;
  /** p_u (signed apparent slowness, s/m) and τ_B of the branch recorded from shot B, with covariance. */
  readonly reverse: BranchParameters;
}

/** A value with its standard error. */
export interface Estimate {
  readonly value: number;
  readonly standardError: number;
}

/** One plane dipping interface k (the top of layer k + 1). Angles in radians, lengths in m. */
export interface DippingInterface {
  /** k, 1-based: the refractor along the top of layer k + 1, seen as branch pair k + 1. */
  readonly interface: number;
  /** V_{k+1}, m/s (true, not apparent). */
  readonly refractorVelocity: Estimate;
  /** δ_k (α for two layers), rad; positive when the interface deepens from A to B. */
  readonly dip: Estimate;
  /** θ_c = asin(V_k/V_{k+1}), rad. */
  readonly criticalAngle: Estimate;
  /** h_A, h_B: distance from the shot perpendicular to the interface, m. */
  readonly perpendicularDepthA: Estimate;
  readonly perpendicularDepthB: Estimate;
  /** z_A = h_A/cos δ, z_B = h_B/cos δ: depth straight below the shot, m. */
  readonly verticalDepthA: Estimate;
  readonly verticalDepthB: Estimate;
  /** (h_B − h_A) − L·sin δ_k, m: 0 for data from one plane (two layers: reciprocity of the lines). */
  readonly consistencyMisfit: Estimate;
}

export interface DippingNote {
  readonly code:
    | 'apparent-velocity-impossible'
    | 'no-critical-ray'
    | 'critical-angle-not-positive'
    | 'apparent-slowness-not-positive'
    | 'dip-steep'
    | 'depth-not-positive'
    | 'dip-inconsistent';
  /** The interface concerned, 1-based (interface k is seen as branch pair k + 1). */
  readonly interface: number;
  readonly message: string;
}

export interface DippingLayers {
  readonly interfaces: readonly DippingInterface[];
  /** ∂(outputs)/∂θ: `DIPPING_OUTPUTS.length` rows per interface; columns in the θ order of the module comment. */
  readonly jacobian: readonly (readonly number[])[];
  /** J·Σ_θ·Jᵀ over the same outputs. */
  readonly covariance: readonly (readonly number[])[];
  readonly notes: readonly DippingNote[];
}

export interface DippingOptions {
  /** Absolute tolerance on the consistency misfit, m (default `DEFAULT_CONSISTENCY_TOLERANCE`). */
  readonly consistencyTolerance?: number;
}

/** The outputs of each interface in the order of the Jacobian's rows. */
export const DIPPING_OUTPUTS = [
  'refractorVelocity',
  'dip',
  'criticalAngle',
  'perpendicularDepthA',
  'perpendicularDepthB',
  'verticalDepthA',
  'verticalDepthB',
  'consistencyMisfit',
] as const;

// ---- forward-mode differentiation: each quantity carries its gradient over θ ----

interface Differentiated {
  readonly value: number;
  readonly gradient: readonly number[];
}

function variable(value: number, column: number, width: number): Differentiated {
  const gradient = new Array<number>(width).fill(0);
  gradient[column] = 1;
  return { value, gradient };
}

function constant(value: number, width: number): Differentiated {
  return { value, gradient: new Array<number>(width).fill(0) };
}

/** a·x + b·y with scalar weights a, b. */
function combine(x: Differentiated, a: number, y: Differentiated, b: number): Differentiated {
  return { value: a * x.value + b * y.value, gradient: x.gradient.map((g, column) => a * g + b * (y.gradient[column] ?? 0)) };
}

const add = (x: Differentiated, y: Differentiated): Differentiated => combine(x, 1, y, 1);
const subtract = (x: Differentiated, y: Differentiated): Differentiated => combine(x, 1, y, -1);
const scale = (x: Differentiated, factor: number): Differentiated => ({ value: factor * x.value, gradient: x.gradient.map((g) => factor * g) });

function multiply(x: Differentiated, y: Differentiated): Differentiated {
  return { value: x.value * y.value, gradient: x.gradient.map((g, column) => g * y.value + x.value * (y.gradient[column] ?? 0)) };
}

function divide(x: Differentiated, y: Differentiated): Differentiated {
  const value = x.value / y.value;
  return { value, gradient: x.gradient.map((g, column) => (g - value * (y.gradient[column] ?? 0)) / y.value) };
}

/** f(x) with f′(x) given: the chain rule. */
function apply(x: Differentiated, value: number, derivative: number): Differentiated {
  return { value, gradient: x.gradient.map((g) => derivative * g) };
}

const sine = (x: Differentiated): Differentiated => apply(x, Math.sin(x.value), Math.cos(x.value));
const cosine = (x: Differentiated): Differentiated => apply(x, Math.cos(x.value), -Math.sin(x.value));
/** asin for |x| < 1 only (callers check); the derivative is infinite at ±1. */
const arcsine = (x: Differentiated): Differentiated => apply(x, Math.asin(x.value), 1 / Math.sqrt(1 - x.value * x.value));

// ---- the stripping procedure ----

/** A known interface as one shot sees it: vertical depth below that shot and dip in that shot's frame. */
interface PlacedInterface {
  readonly depth: Differentiated;
  readonly dip: Differentiated;
}

/**
 * Step 4 in the frame of one shot (at the origin, travel towards +x): the perpendicular depth of
 * the refractor below the shot from its intercept. `downAngles`/`upAngles` are the angles of the
 * ray going down from this shot and of the head wave coming up towards it, layer 1…n−1.
 * Returns the perpendicular depth and whether every traced leg went down (positive length).
 */
function perpendicularDepthBelowShot(
  intercept: Differentiated,
  slownesses: readonly Differentiated[],
  downAngles: readonly Differentiated[],
  upAngles: readonly Differentiated[],
  upper: readonly PlacedInterface[],
  refractorDip: Differentiated,
  criticalAngle: Differentiated,
): { depth: Differentiated; legsDown: boolean } {
  const width = intercept.gradient.length;
  let crossingX = constant(0, width);
  let crossingZ = constant(0, width);
  let timeAbove = constant(0, width);
  let legsDown = true;
  upper.forEach((known, index) => {
    const down = downAngles[index]!;
    const up = upAngles[index]!;
    const slowness = slownesses[index]!;
    // Leg length t from (x_C, z_C) along (sin φ↓, cos φ↓) to z = depth + x·tan δ.
    const tangent = divide(sine(known.dip), cosine(known.dip));
    const numerator = subtract(add(known.depth, multiply(crossingX, tangent)), crossingZ);
    const denominator = subtract(cosine(down), multiply(sine(down), tangent));
    const length = divide(numerator, denominator);
    if (!(length.value > 0)) legsDown = false;
    // (p↓ − p↑)·Δr = s·t·[1 + cos(φ↑ + φ↓)].
    const factor = add(constant(1, width), cosine(add(up, down)));
    timeAbove = add(timeAbove, multiply(multiply(slowness, length), factor));
    crossingX = add(crossingX, multiply(length, sine(down)));
    crossingZ = add(crossingZ, multiply(length, cosine(down)));
  });
  const lastSlowness = slownesses[upper.length]!;
  const distance = divide(subtract(intercept, timeAbove), scale(multiply(lastSlowness, cosine(criticalAngle)), 2));
  // h = d + n·C with n = (−sin δ, cos δ), the refractor's downward normal.
  const depth = add(distance, subtract(multiply(crossingZ, cosine(refractorDip)), multiply(crossingX, sine(refractorDip))));
  if (!(distance.value > 0) && upper.length > 0) legsDown = false;
  return { depth, legsDown };
}

function assertFinite(value: number, label: string): void {
  if (!Number.isFinite(value)) throw new RangeError(`dippingLayers: ${label} must be a finite number, got ${value}`);
}

function assertBranch(branch: BranchParameters, label: string): void {
  for (const [name, value] of Object.entries(branch)) assertFinite(typeof value === 'number' ? value : Number.NaN, `${label} ${name}`);
  if (branch.slownessVariance < 0 || branch.interceptVariance < 0) {
    throw new RangeError(`dippingLayers: ${label} variances must not be negative (got ${branch.slownessVariance}, ${branch.interceptVariance})`);
  }
}

const degrees = (radians: number): string => formatQuantity((radians * 180) / Math.PI, '°');

/**
 * True velocities, dips, critical angles and depths under both shots of N − 1 plane dipping
 * interfaces, stripped from the top, from the direct-wave slowness s_1 (`direct`) and one
 * forward/reverse branch pair per refractor (`pairs[0]` = branch 2). See the module comment for
 * the method, the θ order, the notes and the edges.
 */
export function dippingLayers(
  direct: SlownessReading,
  pairs: readonly ReversedBranchPair[],
  spreadLength: number,
  options: DippingOptions = {},
): DippingLayers {
  assertFinite(direct.slowness, 'direct-wave slowness');
  assertFinite(direct.variance, 'direct-wave slowness variance');
  if (!(direct.slowness > 0)) throw new RangeError(`dippingLayers: direct-wave slowness must be positive, got ${direct.slowness} s/m`);
  if (direct.variance < 0) throw new RangeError(`dippingLayers: direct-wave slowness variance must not be negative, got ${direct.variance}`);
  assertFinite(spreadLength, 'spread length');
  if (!(spreadLength > 0)) throw new RangeError(`dippingLayers: spread length (distance from shot A to shot B) must be positive, got ${spreadLength} m`);
  pairs.forEach((pair, index) => {
    assertBranch(pair.forward, `branch ${index + 2} forward`);
    assertBranch(pair.reverse, `branch ${index + 2} reverse`);
  });
  const tolerance = options.consistencyTolerance ?? DEFAULT_CONSISTENCY_TOLERANCE;
  if (!(tolerance >= 0)) throw new RangeError(`dippingLayers: consistencyTolerance must be a non-negative number of metres, got ${tolerance}`);

  const width = 1 + 4 * pairs.length;
  const inputCovariance = zeros(width, width);
  inputCovariance[0]![0] = direct.variance;
  pairs.forEach((pair, index) => {
    const base = 1 + 4 * index;
    for (const [offset, branch] of [[0, pair.forward], [2, pair.reverse]] as const) {
      inputCovariance[base + offset]![base + offset] = branch.slownessVariance;
      inputCovariance[base + offset]![base + offset + 1] = branch.covariance;
      inputCovariance[base + offset + 1]![base + offset] = branch.covariance;
      inputCovariance[base + offset + 1]![base + offset + 1] = branch.interceptVariance;
    }
  });

  const slownesses: Differentiated[] = [variable(direct.slowness, 0, width)];
  const dips: Differentiated[] = [];
  const placedUnderA: PlacedInterface[] = [];
  const placedUnderB: PlacedInterface[] = [];
  const outputs: Differentiated[][] = [];
  const notes: DippingNote[] = [];

  for (let index = 0; index < pairs.length; index += 1) {
    const pair = pairs[index]!;
    const branch = index + 2;
    const interfaceIndex = index + 1;
    const base = 1 + 4 * index;
    const forwardSlowness = variable(pair.forward.slowness, base, width);
    const forwardIntercept = variable(pair.forward.intercept, base + 1, width);
    const reverseSlowness = variable(pair.reverse.slowness, base + 2, width);
    const reverseIntercept = variable(pair.reverse.intercept, base + 3, width);
    const topSlowness = slownesses[0]!;

    // Step 1.
    const forwardSine = divide(forwardSlowness, topSlowness);
    const reverseSine = divide(reverseSlowness, topSlowness);
    if (!(Math.abs(forwardSine.value) < 1 && Math.abs(reverseSine.value) < 1)) {
      const which = Math.abs(forwardSine.value) < 1 ? 'reverse' : 'forward';
      const slowness = which === 'forward' ? pair.forward.slowness : pair.reverse.slowness;
      notes.push({
        code: 'apparent-velocity-impossible',
        interface: interfaceIndex,
        message: `branch ${branch}, ${which} side: apparent velocity ${formatQuantity(1 / Math.abs(slowness), 'm/s')} is not faster than the top layer (${formatQuantity(1 / direct.slowness, 'm/s')}), which no head wave can have, so no interface is given from ${interfaceIndex} down; a direct-wave or air-wave branch taken for a head wave, or a wrong direct-wave velocity — check the branch split on that side`,
      });
      break;
    }
    let forwardAngle = arcsine(forwardSine);
    let reverseAngle = arcsine(reverseSine);

    // Step 2: carry both rays down through the known interfaces.
    let traced = true;
    const forwardAngles: Differentiated[] = [forwardAngle];
    const reverseAngles: Differentiated[] = [reverseAngle];
    for (let layer = 1; layer < branch - 1; layer += 1) {
      const dip = dips[layer - 1]!;
      const ratio = divide(slownesses[layer - 1]!, slownesses[layer]!); // V_{k+1}/V_k
      const forwardArgument = multiply(ratio, sine(subtract(forwardAngle, dip)));
      const reverseArgument = multiply(ratio, sine(add(reverseAngle, dip)));
      if (!(Math.abs(forwardArgument.value) < 1 && Math.abs(reverseArgument.value) < 1)) {
        const which = Math.abs(forwardArgument.value) < 1 ? 'reverse' : 'forward';
        notes.push({
          code: 'no-critical-ray',
          interface: interfaceIndex,
          message: `branch ${branch}, ${which} side: its ray cannot pass down through interface ${layer} (Snell's law asks for a sine of ${Math.abs(which === 'forward' ? forwardArgument.value : reverseArgument.value).toFixed(3)}), so no critical ray reaches interface ${interfaceIndex} and no interface is given from ${interfaceIndex} down; branches of different refractors paired, a lateral velocity change or a wrong upper layer — check the pairing of forward and reverse branches`,
        });
        traced = false;
        break;
      }
      forwardAngle = add(dip, arcsine(forwardArgument));
      reverseAngle = subtract(arcsine(reverseArgument), dip);
      forwardAngles.push(forwardAngle);
      reverseAngles.push(reverseAngle);
    }
    if (!traced) break;

    // Step 3.
    const criticalAngle = scale(add(forwardAngle, reverseAngle), 0.5);
    const dip = scale(subtract(forwardAngle, reverseAngle), 0.5);
    if (!(criticalAngle.value > 0 && criticalAngle.value < Math.PI / 2)) {
      notes.push({
        code: 'critical-angle-not-positive',
        interface: interfaceIndex,
        message: `branch ${branch}: the forward and reverse apparent slownesses give a critical angle of ${degrees(criticalAngle.value)}, so no faster refractor fits both sides and no interface is given from ${interfaceIndex} down; branches of different refractors paired or a branch mis-split — check the forward and reverse branches of this refractor`,
      });
      break;
    }
    const upperSlowness = slownesses[branch - 2]!;
    const refractorSlowness = multiply(upperSlowness, sine(criticalAngle));

    // Step 4: from A in its own frame; from B in the mirrored frame (x′ = L − x, dips negated).
    const fromA = perpendicularDepthBelowShot(forwardIntercept, slownesses, reverseAngles, forwardAngles, placedUnderA, dip, criticalAngle);
    const fromB = perpendicularDepthBelowShot(reverseIntercept, slownesses, forwardAngles, reverseAngles, placedUnderB, scale(dip, -1), criticalAngle);
    const dipCosine = cosine(dip);
    const verticalA = divide(fromA.depth, dipCosine);
    const verticalB = divide(fromB.depth, dipCosine);
    const misfit = subtract(subtract(fromB.depth, fromA.depth), scale(sine(dip), spreadLength));

    slownesses.push(refractorSlowness);
    dips.push(dip);
    placedUnderA.push({ depth: verticalA, dip });
    placedUnderB.push({ depth: verticalB, dip: scale(dip, -1) });
    const refractorVelocity = divide(constant(1, width), refractorSlowness);
    outputs.push([refractorVelocity, dip, criticalAngle, fromA.depth, fromB.depth, verticalA, verticalB, misfit]);

    if (!(pair.forward.slowness > 0 && pair.reverse.slowness > 0)) {
      const which = pair.forward.slowness > 0 ? 'reverse' : 'forward';
      notes.push({
        code: 'apparent-slowness-not-positive',
        interface: interfaceIndex,
        message: `branch ${branch}, ${which} side: the apparent slowness is not positive (arrivals earlier farther from the shot), possible only for a refractor dipping more steeply than its critical angle (here dip ${degrees(dip.value)}, critical angle ${degrees(criticalAngle.value)}); values are computed with the signs kept, but more likely the branches are of different refractors or mis-picked — check the picks and the pairing on that side`,
      });
    }
    if (Math.abs(dip.value) > STEEP_DIP) {
      notes.push({
        code: 'dip-steep',
        interface: interfaceIndex,
        message: `interface ${interfaceIndex} dips ${degrees(dip.value)}, steeper than ${degrees(STEEP_DIP)}, where planar dipping-layer formulas are unreliable; values are kept — treat them as indicative and prefer a delay-time or ray-traced interpretation`,
      });
    }
    if (!(fromA.depth.value > 0 && fromB.depth.value > 0) || !fromA.legsDown || !fromB.legsDown) {
      notes.push({
        code: 'depth-not-positive',
        interface: interfaceIndex,
        message: `interface ${interfaceIndex} comes out ${formatQuantity(fromA.depth.value, 'm')} below A and ${formatQuantity(fromB.depth.value, 'm')} below B (perpendicular), not below the interface above it; the intercept is smaller than the layers above need — a velocity inversion, a hidden layer or a wrong branch; check the branch split`,
      });
    }
    const misfitSE = Math.sqrt(Math.max(0, sandwich([misfit.gradient], inputCovariance)[0]?.[0] ?? 0));
    if (Math.abs(misfit.value) > CONSISTENCY_STANDARD_ERRORS * misfitSE + tolerance) {
      notes.push({
        code: 'dip-inconsistent',
        interface: interfaceIndex,
        message: `interface ${interfaceIndex}: the depths under A and B differ by ${formatQuantity((fromB.depth.value - fromA.depth.value), 'm')} where a plane with the dip found needs ${formatQuantity(spreadLength * Math.sin(dip.value), 'm')} (misfit ${formatQuantity(misfit.value, 'm')}, ${misfitSE > 0 ? `${(Math.abs(misfit.value) / misfitSE).toFixed(1)} standard errors` : 'no standard error given'}); lateral velocity change, a non-planar refractor or forward and reverse branches of different refractors — check the reciprocal times and the pairing`,
      });
    }
  }

  const rows = outputs.flat();
  const jacobian = rows.map((output) => [...output.gradient]);
  const covariance = rows.length === 0 ? [] : sandwich(jacobian, inputCovariance);
  const estimate = (row: number): Estimate => ({
    value: rows[row]!.value,
    standardError: Math.sqrt(Math.max(0, covariance[row]?.[row] ?? Number.NaN)),
  });
  const size = DIPPING_OUTPUTS.length;
  const interfaces = outputs.map((_, index): DippingInterface => ({
    interface: index + 1,
    refractorVelocity: estimate(size * index),
    dip: estimate(size * index + 1),
    criticalAngle: estimate(size * index + 2),
    perpendicularDepthA: estimate(size * index + 3),
    perpendicularDepthB: estimate(size * index + 4),
    verticalDepthA: estimate(size * index + 5),
    verticalDepthB: estimate(size * index + 6),
    consistencyMisfit: estimate(size * index + 7),
  }));
  return { interfaces, jacobian, covariance, notes };
}

/**
 * Two layers, one dipping refractor: the closed forms of the module comment (θ_c, α, V_2, h_A,
 * h_B, z_A, z_B) with standard errors. It is `dippingLayers` with one branch pair (the stripping
 * procedure reduces exactly to the closed forms), so the edges and notes are those listed there;
 * `interfaces` holds one entry, or none when the stack stops (an impossible apparent velocity, a
 * critical angle not positive).
 */
export function dippingLayer(
  direct: SlownessReading,
  pair: ReversedBranchPair,
  spreadLength: number,
  options: DippingOptions = {},
): DippingLayers {
  return dippingLayers(direct, [pair], spreadLength, options);
}

/** The reciprocal-time check of a reversed pair of shots. */
export interface ReciprocalTimeCheck {
  /** t_AB − t_BA, s. */
  readonly misfit: number;
  /** √2·σ_pick + tolerance, s. */
  readonly limit: number;
  /** |misfit| > limit. */
  readonly exceeds: boolean;
}

/**
 * Reciprocal-time check (common practice; Telford1990 ch. 4; Palmer1980): the time from shot A
 * recorded at shot B (`forwardTimeAtFarShot`, t_AB) must equal the time from B recorded at A
 * (`reverseTimeAtNearShot`, t_BA). Two independent picks of standard error σ_pick differ with
 * standard error √2·σ_pick, so a misfit |t_AB − t_BA| > √2·σ_pick + tolerance is flagged
 * (a time-zero error, a shot or receiver position error, or branches of different refractors).
 *
 * Edges: a misfit exactly at the limit does not exceed it; σ_pick = 0 and tolerance = 0 flag any
 * difference. Misuse throws: a time not finite, σ_pick or tolerance negative or not finite.
 *
 * @example
 * reciprocalTimeCheck(0.09565, 0.09610, 0.0002, 0.0001); // misfit −0.45 ms, limit 0.383 ms, exceeds: true
 */
export function reciprocalTimeCheck(
  forwardTimeAtFarShot: number,
  reverseTimeAtNearShot: number,
  pickStandardError: number,
  tolerance: number,
): ReciprocalTimeCheck {
  if (!Number.isFinite(forwardTimeAtFarShot) || !Number.isFinite(reverseTimeAtNearShot)) {
    throw new RangeError(`reciprocalTimeCheck: both reciprocal times must be finite seconds, got ${forwardTimeAtFarShot} and ${reverseTimeAtNearShot}`);
  }
  if (!(pickStandardError >= 0) || !Number.isFinite(pickStandardError)) {
    throw new RangeError(`reciprocalTimeCheck: the pick standard error must be a non-negative number of seconds, got ${pickStandardError}`);
  }
  if (!(tolerance >= 0) || !Number.isFinite(tolerance)) {
    throw new RangeError(`reciprocalTimeCheck: the tolerance must be a non-negative number of seconds, got ${tolerance}`);
  }
  const misfit = forwardTimeAtFarShot - reverseTimeAtNearShot;
  const limit = Math.SQRT2 * pickStandardError + tolerance;
  return { misfit, limit, exceeds: Math.abs(misfit) > limit };
}
