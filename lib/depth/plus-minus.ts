/**
 * The plus-minus method (Hagedoorn1959): the velocity of refractor n and its depth under every
 * receiver covered by both shots of a reversed pair, from the head-wave arrivals of that refractor
 * recorded from shot A (forward) and shot B (reverse) and the reciprocal time t_AB.
 *
 * At a receiver G with A < G < B and an arrival on both branches (METHODS §6):
 * ```
 * T+(G) = t_AG + t_BG − t_AB = 2·δ_G          (plus time: twice the delay under G)
 * T−(G) = t_AG − t_BG = 2·G/V_n′ + const       (minus time)
 * V_n′ = 2/(dT−/dx)   (= V_n/cos α for a plane refractor dipping α)
 * depth under G: delayToDepth(T+/2, overburden at G, V_n′)   (one layer: h_G = T+·V_1·V_n′/(2·√(V_n′² − V_1²)))
 * ```
 * The slope dT−/dx is a weighted least-squares line of T− on x, weights 1/(σ_AG² + σ_BG²), its SE
 * widened by the Birge ratio when T− scatters more than the pick SEs (`weightedLine`). The plus time
 * has variance σ_AG² + σ_BG² + σ_AB². The depth SE combines that with the overburden SEs and the
 * SE of V_n′; the V_n′ part is common to every receiver (one fitted velocity), so the depth errors
 * of different receivers are correlated and their SEs must not be averaged as if independent.
 * T+ and T− share the two picks at G but Cov(T+, T−) = σ_AG² − σ_BG², zero for equal pick SEs;
 * the dependence of V_n′ on the picks at G itself is neglected.
 *
 * Receivers are common when a forward and a reverse receiver lie within
 * `SAME_POSITION_RELATIVE`·max(1 m, B − A) of each other (common practice); G is the forward one.
 *
 * Assumes a refractor that is near-planar over the distance between the points where the forward
 * and the reverse rays to G leave it (≈ 2·h·tan θ, Palmer's optimum XY), dips under 10° (common
 * practice) and a known overburden. The depth is roughly the depth normal to the refractor under G
 * (METHODS 6.1: 9.4722 m against the exact perpendicular 9.4732 m at 4° dip), and V_n′ exceeds the
 * true V_n by 1/cos α on a dipping refractor. It smooths an irregular refractor over that ray
 * separation, where the GRM (`generalized-reciprocal.ts`) with its optimum XY does better. It fails
 * for hidden layers and velocity inversions, and for branches of different refractors.
 *
 * Edges (notes, never throws):
 * - `too-few-common-receivers`: fewer than 3 common receivers strictly between the shots: no
 *   velocity, no receivers (`velocity` and `minusTimeFit` null).
 * - `minus-time-slope-not-positive`: the minus times do not increase towards B (slope ≤ 0): no
 *   velocity, no receivers — the branches are of different refractors or swapped.
 * - `no-head-wave`, `delay-below-upper-layers` (with x): a receiver that `delayToDepth` refuses
 *   (V_n′ not faster than the overburden there; a negative plus time or one the upper layers use
 *   up); it is left out of `receivers`.
 * - `minus-time-curved`: the quadratic term of a weighted quadratic fit of T− exceeds
 *   `CURVATURE_STANDARD_ERRORS` of its SE (≥ 4 receivers): the refractor velocity changes along
 *   the line or the refractor is not planar; V_n′ is then an average and the depths lean on it.
 * - `minus-time-scatter`: the T− residuals exceed the pick SEs (χ² tail probability below
 *   `SCATTER_PROBABILITY`): a rough refractor, lateral velocity change, or pick SEs set too small.
 * - `refractor-steep` (x of the steepest point): the local dip of the depths (a line through
 *   `DIP_WINDOW` neighbouring receivers) exceeds `DELAY_METHOD_STEEP_DIP` (10°) by more than
 *   `DIP_STANDARD_ERRORS` SEs; values kept. The SEs include the parts common to all receivers, so
 *   the test errs towards silence; pick noise alone does not trigger it.
 * Misuse throws (`assertReversedArrivals`): shots not in order, arrays of different lengths,
 * receivers not strictly ascending, a time or position not finite, a pick SE not positive.
 *
 * @example
 * // METHODS check case 6.1: 500/2500 m/s, 6 m under A (x = 0), dipping 4° to B (x = 100 m);
 * // arrivals every 2 m from a Fermat-path oracle, t_AB = 77.02980 ms.
 * plusMinus(arrivals, () => ({ velocities: [{ value: 500, standardError: 0 }], upperThicknesses: [] }));
 * // → velocity 2506.10 m/s; depth 6.6823 m at G = 10 m, 9.4722 m at 50 m, 12.2622 m at 90 m
 */
import {
  assertReversedArrivals,
  CURVATURE_STANDARD_ERRORS,
  delayToDepth,
  positionTolerance,
  quadraticTerm,
  steepRefractorNote,
  weightedLine,
  type Estimate,
  type Overburden,
  type ReversedArrivals,
} from './delay-depth.js';
import { formatQuantity } from '../checks/wording.js';
import { chiSquareSurvival } from '../stats/chi-square.js';

/** Fewest common receivers that give a velocity (a line and one degree of freedom for its scatter). */
export const MINIMUM_COMMON_RECEIVERS = 3;

/** T− scatter is noted when χ² of its line has a tail probability below this (0.1 %: rare by chance). */
export const SCATTER_PROBABILITY = 1e-3;

export type PlusMinusNoteCode =
  | 'too-few-common-receivers'
  | 'minus-time-slope-not-positive'
  | 'no-head-wave'
  | 'delay-below-upper-layers'
  | 'minus-time-curved'
  | 'minus-time-scatter'
  | 'refractor-steep';

export interface DelayMethodNote<Code extends string> {
  readonly code: Code;
  readonly message: string;
  /** The receiver concerned, m, when the note is about one place. */
  readonly x?: number;
}

export type PlusMinusNote = DelayMethodNote<PlusMinusNoteCode>;

export interface PlusMinusReceiver {
  /** G, m. */
  readonly x: number;
  /** T+ = t_AG + t_BG − t_AB, s. */
  readonly plusTime: number;
  /** √(σ_AG² + σ_BG² + σ_AB²), s. */
  readonly plusTimeSE: number;
  /** T− = t_AG − t_BG, s. */
  readonly minusTime: number;
  /** T+/2, s: the one-way delay under G. */
  readonly delay: number;
  /** Depth to refractor n under G, m (roughly normal to the refractor). */
  readonly depth: number;
  readonly depthSE: number;
  /** Thickness of the deepest overburden layer under G, m. */
  readonly thickness: number;
  readonly thicknessSE: number;
  /** DCF of the deepest layer, m/s. */
  readonly depthConversionFactor: number;
}

export interface MinusTimeFit {
  /** dT−/dx, s/m. */
  readonly slope: number;
  readonly slopeSE: number;
  /** T− at x = 0, s. */
  readonly intercept: number;
  /** RMS of the T− residuals about the line, s. */
  readonly residualSD: number;
  readonly count: number;
}

export interface PlusMinusResult {
  /** V_n′ = 2/(dT−/dx), m/s; null when no velocity could be fitted (see the notes). */
  readonly velocity: Estimate | null;
  readonly minusTimeFit: MinusTimeFit | null;
  /** [first, last] common receiver, m; null when there is none. */
  readonly coverage: readonly [number, number] | null;
  readonly receivers: readonly PlusMinusReceiver[];
  readonly notes: readonly PlusMinusNote[];
}

/** A receiver recorded on both branches. */
export interface CommonReceiver {
  readonly x: number;
  readonly forwardTime: number;
  readonly forwardSigma: number;
  readonly reverseTime: number;
  readonly reverseSigma: number;
}

/** Receivers G with A < G < B on both branches, matched within `positionTolerance`, ascending. */
export function commonReceivers(input: ReversedArrivals): CommonReceiver[] {
  const tolerance = positionTolerance(input);
  const { forward, reverse } = input;
  const found: CommonReceiver[] = [];
  let cursor = 0;
  forward.receiverX.forEach((x, index) => {
    if (!(x > input.forwardSourceX + tolerance && x < input.reverseSourceX - tolerance)) return;
    while (cursor < reverse.receiverX.length && reverse.receiverX[cursor]! < x - tolerance) cursor += 1;
    const other = reverse.receiverX[cursor];
    if (other === undefined || Math.abs(other - x) > tolerance) return;
    found.push({
      x,
      forwardTime: forward.times[index]!,
      forwardSigma: forward.sigmas[index]!,
      reverseTime: reverse.times[cursor]!,
      reverseSigma: reverse.sigmas[cursor]!,
    });
  });
  return found;
}

const ms = (seconds: number): string => formatQuantity(seconds * 1000, 'ms');

/**
 * Refractor velocity and depths under the common receivers of a reversed pair of shots by the
 * plus-minus method; `overburdenAt(x)` gives the layers above refractor n at receiver x (see the
 * module comment for the method, the SEs, the assumptions and the notes).
 */
export function plusMinus(input: ReversedArrivals, overburdenAt: (x: number) => Overburden): PlusMinusResult {
  assertReversedArrivals(input, 'plusMinus');
  const notes: PlusMinusNote[] = [];
  const common = commonReceivers(input);
  const coverage: readonly [number, number] | null = common.length === 0 ? null : [common[0]!.x, common[common.length - 1]!.x];
  const empty = (): PlusMinusResult => ({ velocity: null, minusTimeFit: null, coverage, receivers: [], notes });
  if (common.length < MINIMUM_COMMON_RECEIVERS) {
    notes.push({
      code: 'too-few-common-receivers',
      message: `only ${common.length} receiver(s) between the shots carry this refractor's arrivals from both shots, and the plus-minus method needs ${MINIMUM_COMMON_RECEIVERS} for a refractor velocity; no depths are given — extend the branches so that they overlap (move the shots out or pick farther)`,
    });
    return empty();
  }

  const positions = common.map((receiver) => receiver.x);
  const minusTimes = common.map((receiver) => receiver.forwardTime - receiver.reverseTime);
  const minusSEs = common.map((receiver) => Math.hypot(receiver.forwardSigma, receiver.reverseSigma));
  const line = weightedLine(positions, minusTimes, minusSEs);
  if (line === null || !(line.slope > 0)) {
    notes.push({
      code: 'minus-time-slope-not-positive',
      message: `the minus times t_AG − t_BG ${line === null ? 'give no line' : `fall towards shot B (slope ${formatQuantity(line.slope * 1000, 'ms/m')})`}, which a head wave along one refractor cannot do; no velocity or depths are given — the forward and reverse branches are of different refractors or swapped; check the branch pairing`,
    });
    return empty();
  }
  const velocity: Estimate = { value: 2 / line.slope, standardError: (2 * line.slopeSE) / (line.slope * line.slope) };
  const minusTimeFit: MinusTimeFit = { slope: line.slope, slopeSE: line.slopeSE, intercept: line.intercept, residualSD: line.residualSD, count: line.count };

  const curvature = quadraticTerm(positions, minusTimes, minusSEs);
  if (curvature !== null && Math.abs(curvature.value) > CURVATURE_STANDARD_ERRORS * curvature.standardError) {
    notes.push({
      code: 'minus-time-curved',
      message: `the minus times curve along the line (quadratic term ${(Math.abs(curvature.value) / curvature.standardError).toFixed(1)} standard errors), so the refractor velocity changes along the line or the refractor is not planar; ${formatQuantity(velocity.value, 'm/s')} is an average and the depths lean on it — fit the velocity piecewise or use the GRM`,
    });
  }
  const degreesOfFreedom = line.count - 2;
  const chiSquare = line.reducedChiSquare * degreesOfFreedom;
  if (chiSquareSurvival(chiSquare, degreesOfFreedom) < SCATTER_PROBABILITY) {
    notes.push({
      code: 'minus-time-scatter',
      message: `the minus times scatter ${ms(line.residualSD)} RMS about their line, more than the pick SEs allow (χ²/ν = ${line.reducedChiSquare.toPrecision(3)}); a rough refractor, a lateral velocity change or pick SEs set too small — the velocity SE has been widened to match the scatter`,
    });
  }

  const reciprocal = input.reciprocalTime;
  const receivers: PlusMinusReceiver[] = [];
  common.forEach((receiver, index) => {
    const plusTime = receiver.forwardTime + receiver.reverseTime - reciprocal.value;
    const plusTimeSE = Math.sqrt(receiver.forwardSigma ** 2 + receiver.reverseSigma ** 2 + reciprocal.standardError ** 2);
    const converted = delayToDepth({ value: plusTime / 2, standardError: plusTimeSE / 2 }, overburdenAt(receiver.x), velocity);
    if (!converted.ok) {
      notes.push({ code: converted.code, x: receiver.x, message: `receiver at ${formatQuantity(receiver.x, 'm')} (plus time ${ms(plusTime)}): ${converted.message}` });
      return;
    }
    receivers.push({
      x: receiver.x,
      plusTime,
      plusTimeSE,
      minusTime: minusTimes[index]!,
      delay: plusTime / 2,
      depth: converted.depth.value,
      depthSE: converted.depth.standardError,
      thickness: converted.thickness.value,
      thicknessSE: converted.thickness.standardError,
      depthConversionFactor: converted.depthConversionFactor.value,
    });
  });

  const steep = steepRefractorNote(receivers, 'the plus-minus method', 'the depths there are smoothed and placed too far from their true positions');
  if (steep !== null) notes.push(steep);
  return { velocity, minusTimeFit, coverage, receivers, notes };
}
