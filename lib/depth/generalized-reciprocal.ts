/**
 * The generalized reciprocal method, GRM (Palmer1980): the velocity of refractor n and its
 * time-depths and depths along a reversed pair of shots, using at each point G the forward arrival
 * at Y = G + XY/2 and the reverse arrival at X = G − XY/2, so that for the right separation XY both
 * rays leave the refractor at one point and an irregular refractor is not smoothed over the ray
 * separation as in the plus-minus method (XY = 0, Hagedoorn1959, `plus-minus.ts`).
 *
 * For one XY (METHODS §6):
 * ```
 * velocity analysis:  t_V(G) = (t_AY − t_BX + t_AB)/2,     V_n′ = 1/(dt_V/dG)   (weighted least squares)
 * time-depth:         t_G = [t_AY + t_BX − (t_AB + XY/V_n′)]/2
 * depth:              delayToDepth(t_G, overburden at G, V_n′)   (one layer: h_G = t_G·V_1·V_n′/√(V_n′² − V_1²))
 * ```
 * The weights are 1/Var t_V = 4/(σ_AY² + σ_BX²) (t_AB shifts every t_V alike and leaves the slope).
 * Var t_G = (σ_AY² + σ_BX² + σ_AB²)/4 plus the V_n′ term ∂t_G/∂V_n′ = XY/(2·V_n′²), which
 * `delayToDepth` carries together with V_n′'s own effect on the depth conversion. The V_n′ and t_AB
 * parts are common to every receiver (correlated depth errors); V_n′'s dependence on the picks at
 * G itself is neglected. XY = 0 is the plus-minus method exactly (t_V = T−/2 + t_AB/2, t_G = T+/2).
 *
 * Sampling — chosen so that the XY scan compares like with like: linear interpolation between
 * receivers averages the noise of two picks, so an XY that puts X and Y between receivers would
 * give a smoother t_V by arithmetic alone and be preferred for no physical reason. So for each XY
 * the points are, where they exist, the pairs of a reverse receiver X and a forward receiver Y with
 * Y − X = XY (within `SAME_POSITION_RELATIVE`), G at their midpoint: no interpolation, every point
 * carries the noise of exactly two picks (`sampling: 'receivers'`). For a regular spread this holds
 * for every multiple of the receiver spacing Δx (G on receivers for even multiples, midway between
 * them for odd ones). Only an XY with fewer than 3 such pairs (an XY off the receiver grid, given in
 * `options.xyValues`) is sampled at the receivers G with X and Y interpolated linearly
 * (`'interpolated'`; variance (1 − w)²σ_L² + w²σ_R²), and the optimum is chosen among the
 * `'receivers'` rows whenever there are any. Afterwards the time-depths (and t_V) are put onto the
 * receiver positions between the first and last G by linear interpolation between neighbouring G
 * (not across a gap wider than 2Δx); they are never extrapolated, and X and Y always lie inside
 * their branch's receiver range.
 *
 * XY scan: default 0, Δx, 2Δx, … up to the smaller of 12·Δx and a third of the common coverage
 * (the overlap of the two branches between the shots), Δx the median receiver spacing.
 *
 * Optimum XY — the least roughness of the velocity-analysis function t_V (Palmer's "simplest
 * velocity analysis function"). Two measures are computed for every XY:
 * - `lineDeviation`: RMS deviation of t_V from its weighted straight line;
 * - `secondDifference`: RMS of the second differences of t_V along G
 *   (t_{k−1} − 2t_k + t_{k+1} for equal spacing; 2·(neighbours' chord − t_k) in general).
 * `roughness` is `lineDeviation` by default (`options.roughness` selects the other). Why: at the
 * optimum XY both rays leave the refractor at one point and t_V is a straight line whatever the
 * refractor's shape; away from it t_V carries the difference of the delays at two refractor points
 * XY apart, an undulation of the refractor's own wavelength. A second difference over Δx sees that
 * undulation shrunk by (2π·Δx/λ)², so for refractor relief of wavelength much longer than Δx it
 * measures only the pick noise and the grid of the data (the tests' undulating refractor, λ = 120 m,
 * Δx = 2.5 m: (2π·2.5/120)² ≈ 0.017), whereas the deviation from the line sees the undulation at
 * full amplitude. On that refractor with 0.5 ms pick noise (20 seeds) the line deviation resolved
 * XY in every seed, its least value at 2.5…7.5 m (plane-layer XY 2.9…5.3 m), while the second
 * difference never rose above its noise level and its least value fell across the whole scan.
 * The second difference is the better measure only for relief of a few Δx.
 * `noiseRoughness` is what the measure would be for pick noise alone: √(mean Var t_V·(n − 2)/n)
 * for the line deviation, √(mean of σ_{k−1}² + 4σ_k² + σ_{k+1}²) for the second difference.
 *
 * When the scan does not resolve XY (every roughness within `NOISE_RESOLUTION_FACTOR` times its
 * noise level: a refractor near-planar at the scale scanned, where t_G hardly depends on XY), the
 * least roughness is set by noise; the optimum is then the scanned XY nearest the plane-layer
 * optimum of the depths found at the least-rough XY (one pass: those depths hardly depend on XY),
 * following Palmer's use of the plane-layer XY as a check (Palmer1980, recalled from memory).
 *
 * The optimum is reported with its neighbours in the scan and with Palmer's plane-layer optimum
 * 2·Σ h_j·tan θ_{j,n} (`planeLayerOptimumXY`, sin θ = V_j/V_n′) from the resulting depths, mean over
 * the receivers; a mismatch of more than 2Δx hints at a hidden layer or a velocity inversion
 * (Palmer1980, recalled from memory).
 *
 * Assumes what the plus-minus method does except the near-planar refractor: a known overburden,
 * a refractor velocity constant along the line, dips under 10° (common practice). It fails for
 * hidden layers and inversions (which the mismatch may reveal) and for branches of different
 * refractors.
 *
 * Edges (notes, never throws):
 * - `too-few-common-receivers`: no XY gives 3 points: no velocity, no receivers.
 * - `velocity-slope-not-positive`: t_V does not increase towards B for any XY with points: no
 *   velocity, no receivers — branches of different refractors or swapped.
 * - `xy-beyond-coverage`: XY values (given in `options.xyValues`) with fewer than 3 points — X or
 *   Y would have to lie outside its branch; their scan rows have null velocity and roughness.
 * - `xy-interpolated`: no XY could be sampled on receivers, so the optimum was chosen among
 *   interpolated rows, where the comparison favours XY values off the receiver grid.
 * - `xy-at-scan-edge`: the optimum is the largest XY with points scanned (and the scan resolves
 *   XY); the true optimum may lie beyond.
 * - `xy-not-resolved`: every XY's roughness is within twice its noise level: the refractor is
 *   near-planar at the scale scanned and XY matters little; the plane-layer XY chooses (above).
 * - `xy-mismatch`: |planeLayerXY − XY| > 2Δx (see above), only when the scan resolves XY (an
 *   optimum set by noise says nothing about hidden layers; `mismatch` is then false).
 * - `velocity-analysis-curved`: at the optimum XY the quadratic term of t_V exceeds
 *   `CURVATURE_STANDARD_ERRORS` of its SE: the refractor velocity changes along the line, or the
 *   scanned XY values miss the true optimum over an irregular refractor.
 * - `no-head-wave`, `delay-below-upper-layers` (with x): a receiver that `delayToDepth` refuses; it
 *   is left out of `receivers`.
 * - `refractor-steep` (x of the steepest point): the local dip of the depths exceeds 10° by more
 *   than 2 SEs, as in `plusMinus`.
 * Misuse throws: `assertReversedArrivals`, and XY values that are not finite or are negative.
 *
 * @example
 * // METHODS check case 6.1 (arrivals every 2 m from a Fermat-path oracle):
 * generalizedReciprocal(arrivals, () => ({ velocities: [{ value: 500, standardError: 0 }], upperThicknesses: [] }), { xyValues: [0, 10] });
 * // scan: both XY give V_n′ = 2506.10 m/s and t_G(50 m) = 18.5636 ms (a plane refractor: t_G does not depend on XY)
 */
import {
  assertReversedArrivals,
  CURVATURE_STANDARD_ERRORS,
  delayToDepth,
  planeLayerOptimumXY,
  positionTolerance,
  quadraticTerm,
  steepRefractorNote,
  weightedLine,
  type Estimate,
  type Overburden,
  type RefractorArrivals,
  type ReversedArrivals,
} from './delay-depth.js';
import type { DelayMethodNote } from './plus-minus.js';
import { median } from '../branches/median.js';
import { formatQuantity } from '../checks/wording.js';

/** Fewest points of one XY that give a velocity and a roughness. */
export const MINIMUM_GRM_POINTS = 3;
/** The default scan stops at this many receiver spacings … */
export const MAXIMUM_XY_SPACINGS = 12;
/** … or at this fraction of the common coverage, whichever is smaller. */
export const MAXIMUM_XY_COVERAGE_FRACTION = 1 / 3;
/** A roughness within this many times its noise level does not resolve XY. */
export const NOISE_RESOLUTION_FACTOR = 2;
/** Time-depths are interpolated onto receivers between neighbouring points at most this many receiver spacings apart. */
export const BRIDGED_GAP_SPACINGS = 2;
/** planeLayerXY and the optimum XY disagree beyond this many receiver spacings (Palmer1980, from memory). */
export const MISMATCH_SPACINGS = 2;

export type RoughnessMeasure = 'line-deviation' | 'second-difference';

export interface GrmOptions {
  /** XY values to scan, m (≥ 0); default 0, Δx, 2Δx, … (module comment). */
  readonly xyValues?: readonly number[];
  /** Roughness measure for the optimum; default 'line-deviation' (module comment says why). */
  readonly roughness?: RoughnessMeasure;
}

export type GrmNoteCode =
  | 'too-few-common-receivers'
  | 'velocity-slope-not-positive'
  | 'xy-beyond-coverage'
  | 'xy-interpolated'
  | 'xy-at-scan-edge'
  | 'xy-not-resolved'
  | 'xy-mismatch'
  | 'velocity-analysis-curved'
  | 'no-head-wave'
  | 'delay-below-upper-layers'
  | 'refractor-steep';

export type GrmNote = DelayMethodNote<GrmNoteCode>;

/** One XY of the scan. Velocity and roughness are null with fewer than `MINIMUM_GRM_POINTS` points or a slope ≤ 0. */
export interface GrmScanRow {
  readonly xy: number;
  readonly pointCount: number;
  readonly sampling: 'receivers' | 'interpolated';
  /** V_n′ from this XY's velocity analysis, m/s. */
  readonly velocity: number | null;
  readonly velocitySE: number | null;
  /** The chosen measure (`lineDeviation` or `secondDifference`), s. */
  readonly roughness: number | null;
  readonly lineDeviation: number | null;
  readonly secondDifference: number | null;
  /** The chosen measure for pick noise alone, s. */
  readonly noiseRoughness: number | null;
  /** Mean t_G over the points, s. */
  readonly meanTimeDepth: number | null;
}

export interface GrmOptimum {
  readonly xy: number;
  /** One plain sentence saying why this XY. */
  readonly reason: string;
  /** The scan rows next to the optimum (smaller and larger XY), when scanned. */
  readonly neighbours: readonly { readonly xy: number; readonly roughness: number | null }[];
  /** 2·Σ h_j·tan θ_{j,n} from the resulting depths, mean over the receivers, m. */
  readonly planeLayerXY: number | null;
  /** False when every XY's roughness is within twice its noise level (note `xy-not-resolved`): the data do not choose an XY. */
  readonly resolved: boolean;
  /** |planeLayerXY − xy| > 2Δx with the scan resolved: a hint of a hidden layer or a velocity inversion. */
  readonly mismatch: boolean;
}

export interface GrmReceiver {
  readonly x: number;
  /** t_V at x, s. */
  readonly velocityAnalysisTime: number;
  /** t_G at x, s. */
  readonly timeDepth: number;
  /** Includes the picks, t_AB and V_n′. */
  readonly timeDepthSE: number;
  /** Depth to refractor n under x, m. */
  readonly depth: number;
  readonly depthSE: number;
  /** Thickness of the deepest overburden layer under x, m. */
  readonly thickness: number;
  readonly thicknessSE: number;
  /** DCF of the deepest layer, m/s. */
  readonly depthConversionFactor: number;
}

export interface GrmResult {
  /** V_n′ at the optimum XY, m/s; null when none (see the notes). */
  readonly velocity: Estimate | null;
  /** Median receiver spacing Δx, m (null with fewer than 2 receivers on both branches). */
  readonly receiverSpacing: number | null;
  readonly scan: readonly GrmScanRow[];
  readonly optimum: GrmOptimum | null;
  /** [first, last] receiver of the optimum's results, m. */
  readonly coverage: readonly [number, number] | null;
  readonly receivers: readonly GrmReceiver[];
  readonly notes: readonly GrmNote[];
}

/** One point of one XY: G, and the forward arrival at Y and the reverse arrival at X. */
interface SamplePoint {
  /** G, m. */
  readonly midpoint: number;
  readonly forwardTime: number;
  readonly forwardVariance: number;
  readonly reverseTime: number;
  readonly reverseVariance: number;
}

/** Linear interpolation of a branch at x inside its receiver range (null outside), with the variance of the weights. */
function interpolate(arrivals: RefractorArrivals, x: number, tolerance: number): { time: number; variance: number } | null {
  const positions = arrivals.receiverX;
  const count = positions.length;
  if (count === 0 || x < positions[0]! - tolerance || x > positions[count - 1]! + tolerance) return null;
  let low = 0;
  let high = count - 1;
  while (high - low > 1) {
    const middle = (low + high) >> 1;
    if (positions[middle]! <= x) low = middle;
    else high = middle;
  }
  if (Math.abs(positions[low]! - x) <= tolerance) return { time: arrivals.times[low]!, variance: arrivals.sigmas[low]! ** 2 };
  if (Math.abs(positions[high]! - x) <= tolerance) return { time: arrivals.times[high]!, variance: arrivals.sigmas[high]! ** 2 };
  const weight = (x - positions[low]!) / (positions[high]! - positions[low]!);
  return {
    time: (1 - weight) * arrivals.times[low]! + weight * arrivals.times[high]!,
    variance: (1 - weight) ** 2 * arrivals.sigmas[low]! ** 2 + weight ** 2 * arrivals.sigmas[high]! ** 2,
  };
}

/** Pairs of a reverse receiver X and a forward receiver Y = X + XY, G at the midpoint, A < G < B. */
function receiverPairs(input: ReversedArrivals, xy: number, tolerance: number): SamplePoint[] {
  const { forward, reverse } = input;
  const points: SamplePoint[] = [];
  let cursor = 0;
  forward.receiverX.forEach((forwardX, index) => {
    const wanted = forwardX - xy;
    while (cursor < reverse.receiverX.length && reverse.receiverX[cursor]! < wanted - tolerance) cursor += 1;
    const reverseX = reverse.receiverX[cursor];
    if (reverseX === undefined || Math.abs(reverseX - wanted) > tolerance) return;
    const midpoint = (reverseX + forwardX) / 2;
    if (!(midpoint > input.forwardSourceX + tolerance && midpoint < input.reverseSourceX - tolerance)) return;
    points.push({
      midpoint,
      forwardTime: forward.times[index]!,
      forwardVariance: forward.sigmas[index]! ** 2,
      reverseTime: reverse.times[cursor]!,
      reverseVariance: reverse.sigmas[cursor]! ** 2,
    });
  });
  return points;
}

/** Every receiver position of either branch (merged within the tolerance), ascending. */
function allReceivers(input: ReversedArrivals, tolerance: number): number[] {
  const sorted = [...input.forward.receiverX, ...input.reverse.receiverX].sort((a, b) => a - b);
  const merged: number[] = [];
  for (const x of sorted) if (merged.length === 0 || x - merged[merged.length - 1]! > tolerance) merged.push(x);
  return merged;
}

/** G at every receiver strictly between the shots, X and Y interpolated inside their branches. */
function interpolatedPoints(input: ReversedArrivals, xy: number, tolerance: number): SamplePoint[] {
  const points: SamplePoint[] = [];
  for (const midpoint of allReceivers(input, tolerance)) {
    if (!(midpoint > input.forwardSourceX + tolerance && midpoint < input.reverseSourceX - tolerance)) continue;
    const atY = interpolate(input.forward, midpoint + xy / 2, tolerance);
    const atX = interpolate(input.reverse, midpoint - xy / 2, tolerance);
    if (atY === null || atX === null) continue;
    points.push({ midpoint, forwardTime: atY.time, forwardVariance: atY.variance, reverseTime: atX.time, reverseVariance: atX.variance });
  }
  return points;
}

/** The median spacing of consecutive receivers on each branch, null with fewer than 2 on both. */
function receiverSpacing(input: ReversedArrivals): number | null {
  const gaps: number[] = [];
  for (const branch of [input.forward, input.reverse]) {
    for (let index = 1; index < branch.receiverX.length; index += 1) gaps.push(branch.receiverX[index]! - branch.receiverX[index - 1]!);
  }
  return gaps.length === 0 ? null : median(gaps);
}

/** Default XY values: 0, Δx, … up to min(12Δx, common coverage/3). */
function defaultXYValues(input: ReversedArrivals, spacing: number | null): number[] {
  if (spacing === null) return [0];
  const { forward, reverse } = input;
  const first = Math.max(input.forwardSourceX, forward.receiverX[0] ?? Number.POSITIVE_INFINITY, reverse.receiverX[0] ?? Number.POSITIVE_INFINITY);
  const last = Math.min(
    input.reverseSourceX,
    forward.receiverX[forward.receiverX.length - 1] ?? Number.NEGATIVE_INFINITY,
    reverse.receiverX[reverse.receiverX.length - 1] ?? Number.NEGATIVE_INFINITY,
  );
  const coverage = Math.max(0, last - first);
  const largest = Math.min(MAXIMUM_XY_SPACINGS * spacing, MAXIMUM_XY_COVERAGE_FRACTION * coverage);
  const steps = Math.floor(largest / spacing + 1e-9);
  return Array.from({ length: steps + 1 }, (_, step) => step * spacing);
}

interface Analysis {
  readonly row: GrmScanRow;
  readonly points: readonly SamplePoint[];
}

function rms(values: readonly number[]): number {
  return Math.sqrt(values.reduce((sum, value) => sum + value * value, 0) / values.length);
}

/** Velocity analysis and roughness of one XY. */
function analyse(input: ReversedArrivals, xy: number, tolerance: number, measure: RoughnessMeasure): Analysis {
  let points = receiverPairs(input, xy, tolerance);
  let sampling: GrmScanRow['sampling'] = 'receivers';
  if (points.length < MINIMUM_GRM_POINTS) {
    points = interpolatedPoints(input, xy, tolerance);
    sampling = 'interpolated';
  }
  const nothing = { velocity: null, velocitySE: null, roughness: null, lineDeviation: null, secondDifference: null, noiseRoughness: null, meanTimeDepth: null };
  const positions = points.map((point) => point.midpoint);
  const analysisTimes = points.map((point) => (point.forwardTime - point.reverseTime + input.reciprocalTime.value) / 2);
  const variances = points.map((point) => (point.forwardVariance + point.reverseVariance) / 4);
  const line = points.length < MINIMUM_GRM_POINTS ? null : weightedLine(positions, analysisTimes, variances.map(Math.sqrt));
  if (line === null || !(line.slope > 0)) return { row: { xy, pointCount: points.length, sampling, ...nothing }, points };

  const velocity = 1 / line.slope;
  const lineDeviation = rms(line.residuals);
  const secondDifferences: number[] = [];
  const secondNoise: number[] = [];
  for (let index = 1; index + 1 < points.length; index += 1) {
    const before = positions[index - 1]!;
    const here = positions[index]!;
    const after = positions[index + 1]!;
    const weight = (here - before) / (after - before);
    const chord = (1 - weight) * analysisTimes[index - 1]! + weight * analysisTimes[index + 1]!;
    secondDifferences.push(2 * (chord - analysisTimes[index]!));
    secondNoise.push(4 * ((1 - weight) ** 2 * variances[index - 1]! + variances[index]! + weight ** 2 * variances[index + 1]!));
  }
  const secondDifference = rms(secondDifferences);
  const meanVariance = variances.reduce((sum, variance) => sum + variance, 0) / variances.length;
  const lineNoise = Math.sqrt((meanVariance * (points.length - 2)) / points.length);
  const differenceNoise = Math.sqrt(secondNoise.reduce((sum, value) => sum + value, 0) / secondNoise.length);
  const timeDepths = points.map((point) => (point.forwardTime + point.reverseTime - (input.reciprocalTime.value + xy / velocity)) / 2);
  const row: GrmScanRow = {
    xy,
    pointCount: points.length,
    sampling,
    velocity,
    velocitySE: line.slopeSE / (line.slope * line.slope),
    roughness: measure === 'line-deviation' ? lineDeviation : secondDifference,
    lineDeviation,
    secondDifference,
    noiseRoughness: measure === 'line-deviation' ? lineNoise : differenceNoise,
    meanTimeDepth: timeDepths.reduce((sum, value) => sum + value, 0) / timeDepths.length,
  };
  return { row, points };
}

const ms = (seconds: number): string => formatQuantity(seconds * 1000, 'ms', 3);
const metres = (value: number): string => formatQuantity(value, 'm');

/** Velocity, time-depths and depths of one XY's analysis put onto the receivers, with the refused receivers and the plane-layer XY. */
function depthsAt(
  input: ReversedArrivals,
  analysis: Analysis,
  overburdenAt: (x: number) => Overburden,
  spacing: number | null,
  tolerance: number,
): { velocity: Estimate; receivers: GrmReceiver[]; refusals: GrmNote[]; planeLayerXY: number | null } {
  const { row, points } = analysis;
  const xy = row.xy;
  const velocity: Estimate = { value: row.velocity!, standardError: row.velocitySE! };
  // Time-depths at the points, then onto the receiver positions between the first and last G.
  const reciprocal = input.reciprocalTime;
  const halfSum = points.map((point) => ({
    midpoint: point.midpoint,
    sum: (point.forwardTime + point.reverseTime) / 2,
    analysis: (point.forwardTime - point.reverseTime + reciprocal.value) / 2,
    variance: (point.forwardVariance + point.reverseVariance) / 4,
  }));
  const widestGap = BRIDGED_GAP_SPACINGS * (spacing ?? 0) + tolerance;
  const placed: { x: number; sum: number; analysis: number; variance: number }[] = [];
  let segment = 0;
  for (const x of allReceivers(input, tolerance)) {
    while (segment + 1 < halfSum.length && halfSum[segment + 1]!.midpoint < x - tolerance) segment += 1;
    const left = halfSum[segment]!;
    if (Math.abs(left.midpoint - x) <= tolerance) {
      placed.push({ x, sum: left.sum, analysis: left.analysis, variance: left.variance });
      continue;
    }
    const right = halfSum[segment + 1];
    if (right === undefined || x < left.midpoint || x > right.midpoint) continue;
    if (Math.abs(right.midpoint - x) <= tolerance) {
      placed.push({ x, sum: right.sum, analysis: right.analysis, variance: right.variance });
      continue;
    }
    if (right.midpoint - left.midpoint > widestGap) continue;
    const weight = (x - left.midpoint) / (right.midpoint - left.midpoint);
    placed.push({
      x,
      sum: (1 - weight) * left.sum + weight * right.sum,
      analysis: (1 - weight) * left.analysis + weight * right.analysis,
      variance: (1 - weight) ** 2 * left.variance + weight ** 2 * right.variance,
    });
  }

  const velocityDerivative = xy / (2 * velocity.value * velocity.value);
  const receivers: GrmReceiver[] = [];
  const refusals: GrmNote[] = [];
  const planeXY: number[] = [];
  for (const point of placed) {
    const timeDepth = point.sum - (reciprocal.value + xy / velocity.value) / 2;
    const pickAndReciprocalVariance = point.variance + reciprocal.standardError ** 2 / 4;
    const overburden = overburdenAt(point.x);
    const converted = delayToDepth({ value: timeDepth, standardError: Math.sqrt(pickAndReciprocalVariance) }, overburden, velocity, {
      delayRefractorVelocityDerivative: velocityDerivative,
    });
    if (!converted.ok) {
      refusals.push({ code: converted.code, x: point.x, message: `receiver at ${metres(point.x)} (time-depth ${ms(timeDepth)}): ${converted.message}` });
      continue;
    }
    receivers.push({
      x: point.x,
      velocityAnalysisTime: point.analysis,
      timeDepth,
      timeDepthSE: Math.sqrt(pickAndReciprocalVariance + (velocityDerivative * velocity.standardError) ** 2),
      depth: converted.depth.value,
      depthSE: converted.depth.standardError,
      thickness: converted.thickness.value,
      thicknessSE: converted.thickness.standardError,
      depthConversionFactor: converted.depthConversionFactor.value,
    });
    planeXY.push(
      planeLayerOptimumXY(
        [...overburden.upperThicknesses.map((thickness) => thickness.value), converted.thickness.value],
        overburden.velocities.map((layer) => layer.value),
        velocity.value,
      ),
    );
  }
  const planeLayerXY = planeXY.length === 0 ? null : planeXY.reduce((sum, value) => sum + value, 0) / planeXY.length;
  return { velocity, receivers, refusals, planeLayerXY };
}

/**
 * Refractor velocity, optimum XY, time-depths and depths of a reversed pair of shots by the
 * generalized reciprocal method; `overburdenAt(x)` gives the layers above refractor n at x (see
 * the module comment for the method, the sampling, the roughness measure and the notes).
 */
export function generalizedReciprocal(input: ReversedArrivals, overburdenAt: (x: number) => Overburden, options: GrmOptions = {}): GrmResult {
  assertReversedArrivals(input, 'generalizedReciprocal');
  const measure = options.roughness ?? 'line-deviation';
  (options.xyValues ?? []).forEach((xy) => {
    if (!(xy >= 0) || !Number.isFinite(xy)) throw new RangeError(`generalizedReciprocal: XY values must be finite and not negative (a separation in m), got ${xy}`);
  });
  const tolerance = positionTolerance(input);
  const spacing = receiverSpacing(input);
  const xyValues = options.xyValues === undefined ? defaultXYValues(input, spacing) : [...options.xyValues].sort((a, b) => a - b);
  const analyses = xyValues.map((xy) => analyse(input, xy, tolerance, measure));
  const scan = analyses.map((analysis) => analysis.row);
  const notes: GrmNote[] = [];
  const empty = (): GrmResult => ({ velocity: null, receiverSpacing: spacing, scan, optimum: null, coverage: null, receivers: [], notes });

  const short = scan.filter((row) => row.pointCount < MINIMUM_GRM_POINTS);
  if (short.length === scan.length) {
    notes.push({
      code: 'too-few-common-receivers',
      message: `no XY gives ${MINIMUM_GRM_POINTS} points where both shots have this refractor's arrivals (most: ${Math.max(0, ...scan.map((row) => row.pointCount))}), so the GRM gives no velocity or depths; extend the branches so that they overlap (move the shots out or pick farther)`,
    });
    return empty();
  }
  if (options.xyValues !== undefined && short.length > 0) {
    notes.push({
      code: 'xy-beyond-coverage',
      message: `XY = ${short.map((row) => metres(row.xy)).join(', ')} give fewer than ${MINIMUM_GRM_POINTS} points: X or Y would lie outside its branch, and the GRM never extrapolates; scan smaller XY values or extend the branches`,
    });
  }
  const usable = analyses.filter((analysis) => analysis.row.roughness !== null);
  if (usable.length === 0) {
    notes.push({
      code: 'velocity-slope-not-positive',
      message: 'the velocity-analysis times do not increase towards shot B for any XY, which a head wave along one refractor cannot do; no velocity or depths are given — the forward and reverse branches are of different refractors or swapped; check the branch pairing',
    });
    return empty();
  }
  const onReceivers = usable.filter((analysis) => analysis.row.sampling === 'receivers');
  const candidates = onReceivers.length > 0 ? onReceivers : usable;
  if (onReceivers.length === 0) {
    notes.push({
      code: 'xy-interpolated',
      message: 'no XY scanned falls on pairs of receivers, so every velocity analysis interpolates between picks, which smooths the noise more for some XY than for others; the optimum may be chosen by that — scan multiples of the receiver spacing',
    });
  }
  const leastRough = candidates.reduce((chosen, analysis) => (analysis.row.roughness! < chosen.row.roughness! ? analysis : chosen));
  const resolved = !usable.every((analysis) => analysis.row.roughness! <= NOISE_RESOLUTION_FACTOR * analysis.row.noiseRoughness!);
  let best = leastRough;
  let depths = depthsAt(input, leastRough, overburdenAt, spacing, tolerance);
  let nearestToPlane = false;
  let planeTarget: number | null = null;
  if (!resolved && depths.planeLayerXY !== null && candidates.length > 1) {
    const target = depths.planeLayerXY;
    planeTarget = target;
    const nearest = candidates.reduce((chosen, analysis) => (Math.abs(analysis.row.xy - target) < Math.abs(chosen.row.xy - target) ? analysis : chosen));
    nearestToPlane = true;
    if (nearest !== leastRough) {
      best = nearest;
      depths = depthsAt(input, nearest, overburdenAt, spacing, tolerance);
    }
  }
  const bestRow = best.row;
  const { velocity, receivers, planeLayerXY } = depths;
  const xy = bestRow.xy;
  const index = scan.indexOf(bestRow);
  const neighbours = [scan[index - 1], scan[index + 1]]
    .filter((row): row is GrmScanRow => row !== undefined)
    .map((row) => ({ xy: row.xy, roughness: row.roughness }));

  const largest = candidates[candidates.length - 1]!;
  if (resolved && candidates.length > 1 && best === largest) {
    notes.push({
      code: 'xy-at-scan-edge',
      message: `the optimum XY = ${metres(xy)} is the largest separation scanned, so the true optimum may lie beyond it; scan larger XY values (options.xyValues) if the branches allow`,
    });
  }
  const runnerUp = candidates.filter((analysis) => analysis !== best).sort((a, b) => a.row.roughness! - b.row.roughness!)[0]?.row;
  const what = measure === 'line-deviation' ? 'the straightest velocity-analysis line' : 'the smoothest velocity-analysis function';
  const noiseLevel = ms(leastRough.row.noiseRoughness!);
  const reason = !resolved
    ? nearestToPlane
      ? `no XY stands out, every velocity analysis being as straight as the pick noise allows (${noiseLevel}), so XY = ${metres(xy)} is used as the scanned value nearest the plane-layer XY of the depths found (${metres(planeTarget ?? xy)})`
      : `XY = ${metres(xy)} has the least roughness (${ms(bestRow.roughness!)}), but it is no straighter than the pick noise allows (${noiseLevel})`
    : runnerUp === undefined
      ? `XY = ${metres(xy)} is the only separation with enough points for a velocity analysis (roughness ${ms(bestRow.roughness!)})`
      : `XY = ${metres(xy)} gives ${what} (roughness ${ms(bestRow.roughness!)}, next best ${ms(runnerUp.roughness!)} at XY = ${metres(runnerUp.xy)})`;
  if (!resolved) {
    notes.push({
      code: 'xy-not-resolved',
      message: `every XY scanned gives a velocity analysis as straight as the pick SEs allow (roughness within ${NOISE_RESOLUTION_FACTOR}× the noise level ${noiseLevel}), so the data do not choose an XY: the refractor is near-planar at this scale, where XY matters little; ${nearestToPlane ? `XY = ${metres(xy)}, nearest the plane-layer value, is used` : `XY = ${metres(xy)} is used`}`,
    });
  }
  const curvature = quadraticTerm(
    best.points.map((point) => point.midpoint),
    best.points.map((point) => (point.forwardTime - point.reverseTime + input.reciprocalTime.value) / 2),
    best.points.map((point) => Math.sqrt((point.forwardVariance + point.reverseVariance) / 4)),
  );
  if (curvature !== null && Math.abs(curvature.value) > CURVATURE_STANDARD_ERRORS * curvature.standardError) {
    notes.push({
      code: 'velocity-analysis-curved',
      message: `at the optimum XY = ${metres(xy)} the velocity-analysis times still curve (quadratic term ${(Math.abs(curvature.value) / curvature.standardError).toFixed(1)} standard errors): the refractor velocity changes along the line, or no XY scanned is close enough to the true optimum to straighten the line over an irregular refractor; ${formatQuantity(velocity.value, 'm/s')} is an average — scan finer XY values, then fit the velocity analysis piecewise if it still curves`,
    });
  }
  notes.push(...depths.refusals);

  const mismatch = resolved && planeLayerXY !== null && spacing !== null && Math.abs(planeLayerXY - xy) > MISMATCH_SPACINGS * spacing;
  if (mismatch) {
    notes.push({
      code: 'xy-mismatch',
      message: `the optimum XY = ${metres(xy)} differs from the ${metres(planeLayerXY!)} that plane layers of the depths found would give by more than ${MISMATCH_SPACINGS} receiver spacings, a hint of a hidden layer or a velocity inversion in the overburden (Palmer 1980); check the overburden velocities against uphole or direct-wave data`,
    });
  }
  const steep = steepRefractorNote(receivers, 'the GRM', 'the depths there are indicative only');
  if (steep !== null) notes.push(steep);
  const coverage: readonly [number, number] | null = receivers.length === 0 ? null : [receivers[0]!.x, receivers[receivers.length - 1]!.x];
  return {
    velocity,
    receiverSpacing: spacing,
    scan,
    optimum: { xy, reason, neighbours, planeLayerXY, resolved, mismatch },
    coverage,
    receivers,
    notes,
  };
}
