/**
 * Hidden (masked) layer check: how thick a layer of intermediate velocity V_a < V_m < V_b could be,
 * between two interpreted layers a and b = a + 1, and still never give a first arrival; and how
 * wrong the depth to layer b is if such a layer is there (concept Soske1959; N layers
 * VijayaRaghava1979; Telford1990 ch. 4; Redpath1973; the closed form tests the hidden branch at the
 * a/b crossover, METHODS §9, derived there).
 *
 * ```
 * h_m ≤ [ (τ_m − τ_a)·(s_a − s_b)/(s_a − s_m) + τ_a − τ_b⁰ ] / (2·q_{m,b})
 * ```
 * with τ_a, τ_m, τ_b⁰ the intercepts the layers above give branches a, m and b (τ_b⁰ without layer
 * m). With the direct wave as branch a it reduces to
 * h_m,max = h_1·[(s_1 − s_b)·q_{1,m}/(s_1 − s_m) − q_{1,b}]/q_{m,b}.
 *
 * Two questions are answered:
 * - `maxHiddenThickness(model, V_m)`: the stack above is known (true thicknesses); the hidden layer
 *   would sit directly above the model's half-space. This is the formula as it stands.
 * - `assessHiddenLayer(model, a, V_m)`: the model is an interpretation, so its thickness h_a of
 *   layer a was computed from the intercept τ_b as if no layer m were there. A hidden layer of
 *   thickness h_m leaves τ_b unchanged only if layer a is really h_a′ = h_a − r·h_m thick,
 *   r = q_{m,b}/q_{a,b} (< 1). The bound above is affine in h_a′, say f(h_a′) = f_0 + f_1·h_a′, so the
 *   largest h_m consistent with the observed times solves h_m = f(h_a − r·h_m):
 *   h_m,max = f(h_a)/(1 + f_1·r), capped at h_a/r (where h_a′ reaches 0). The depth to layer b with
 *   that layer present is z_a + h_m,max·(1 − r): the interpretation is too shallow by
 *   h_m,max·(1 − r) (q_{m,b} < q_{a,b}).
 *
 * Where it fails: the test is made at the a/b crossover and ignores the hidden branch's critical
 * distance, so the bound is conservative (a layer slightly thicker may still be masked); plane
 * horizontal layers only.
 *
 * Edges: the bound is never negative (an intercept 2·Σ h_i·√(s_i² − s²) is concave in the slowness
 * s, so branch m's intercept lies on or above the chord between branches a and b); it is 0 when
 * layer a has zero thickness and nothing above it does (the direct-wave form with h_1 = 0). In
 * `assessHiddenLayer` an upper layer of zero thickness gives 0 (no room to trade thickness), and
 * the result is capped at h_a/r, where layer a would vanish (h_a′ = 0). Misuse throws: fewer than
 * two layers, velocities not increasing downwards (an interpretation from first arrivals always
 * increases; an inversion cannot be checked this way), V_m not strictly between V_a and V_b, a
 * layer index outside 1…N − 1.
 *
 * @example
 * // METHODS.md check case 9.1: 400 m/s (5 m) over 3000 m/s, hidden 1200 m/s layer.
 * maxHiddenThickness({ velocities: [400, 3000], thicknesses: [5] }, 1200); // 3.83922 m
 */
import type { LayeredModel } from '../model/layered-model.js';
import { headWaveIntercept } from '../model/layered-model.js';
import type { InterpretationWarning } from './warning.js';
import { describeShotSide, formatQuantity, placeFields, type ShotSide } from './wording.js';

/** What a hidden layer between interpreted layers a and b = a + 1 could be and would do. */
export interface HiddenLayerAssessment {
  readonly upperLayer: number;
  readonly lowerLayer: number;
  /** V_m, m/s. */
  readonly intermediateVelocity: number;
  /** Largest thickness of the hidden layer consistent with the observed times, m (≥ 0). */
  readonly maxHiddenThickness: number;
  /** Thickness layer a must have for τ_b to stay as observed when the hidden layer is present, m. */
  readonly upperThicknessIfPresent: number;
  /** Depth to the top of layer b as interpreted, m. */
  readonly interpretedDepth: number;
  /** Depth to the top of layer b with the hidden layer present at its largest thickness, m. */
  readonly depthIfPresent: number;
  /** interpretedDepth − depthIfPresent, m (negative: the interpretation is too shallow). */
  readonly depthErrorIfPresent: number;
}

function assertIncreasing(velocities: readonly number[], caller: string): void {
  if (velocities.length < 2) throw new RangeError(`${caller}: needs at least two layers, got ${velocities.length}`);
  for (let layer = 2; layer <= velocities.length; layer += 1) {
    const above = velocities[layer - 2] ?? Number.NaN;
    const below = velocities[layer - 1] ?? Number.NaN;
    if (!(below > above)) {
      throw new RangeError(
        `${caller}: velocities must increase downwards (layer ${layer} has ${below} m/s under ${above} m/s); a velocity inversion cannot be checked for hidden layers`,
      );
    }
  }
}

function assertIntermediate(upperVelocity: number, intermediateVelocity: number, lowerVelocity: number, caller: string): void {
  if (!(intermediateVelocity > upperVelocity && intermediateVelocity < lowerVelocity)) {
    throw new RangeError(
      `${caller}: the intermediate velocity must lie strictly between ${upperVelocity} and ${lowerVelocity} m/s, got ${intermediateVelocity}`,
    );
  }
}

/** The §9 bound as it stands (may be ≤ 0), hidden layer directly above the half-space of `model`. */
function hiddenLayerBound(model: LayeredModel, intermediateVelocity: number): number {
  const lower = model.velocities.length;
  const upper = lower - 1;
  const upperSlowness = 1 / (model.velocities[upper - 1] ?? Number.NaN);
  const lowerSlowness = 1 / (model.velocities[lower - 1] ?? Number.NaN);
  const intermediateSlowness = 1 / intermediateVelocity;
  const withIntermediate: LayeredModel = {
    velocities: [...model.velocities.slice(0, upper), intermediateVelocity],
    thicknesses: model.thicknesses,
  };
  const upperIntercept = headWaveIntercept(model, upper) ?? Number.NaN;
  const intermediateIntercept = headWaveIntercept(withIntermediate, lower) ?? Number.NaN;
  const lowerIntercept = headWaveIntercept(model, lower) ?? Number.NaN;
  const intermediateVertical = Math.sqrt(intermediateSlowness ** 2 - lowerSlowness ** 2);
  const masked =
    ((intermediateIntercept - upperIntercept) * (upperSlowness - lowerSlowness)) / (upperSlowness - intermediateSlowness) +
    upperIntercept -
    lowerIntercept;
  return masked / (2 * intermediateVertical);
}

/**
 * Largest thickness, m, a layer of velocity V_m could have directly above the half-space of
 * `model` (between its last two layers a = N − 1 and b = N, with every thickness above known) and
 * still never give a first arrival (METHODS §9 formula). Edges as the module comment; the
 * `max(0, …)` only guards against rounding below zero.
 */
export function maxHiddenThickness(model: LayeredModel, intermediateVelocity: number): number {
  assertIncreasing(model.velocities, 'maxHiddenThickness');
  const lower = model.velocities.length;
  assertIntermediate(model.velocities[lower - 2] ?? Number.NaN, intermediateVelocity, model.velocities[lower - 1] ?? Number.NaN, 'maxHiddenThickness');
  return Math.max(0, hiddenLayerBound(model, intermediateVelocity));
}

/**
 * Hidden-layer assessment for interpreted layers a = `upperLayer` and b = a + 1 of an interpreted
 * model: the largest masked thickness consistent with the observed intercept of branch b, and the
 * depth to layer b if it is present. V_m defaults to √(V_a·V_b). See the module comment.
 *
 * @example
 * // iasp91 read as two layers (5.8 km/s, 31.375 km over 8.04 km/s), V_m = 6.5 km/s:
 * assessHiddenLayer({ velocities: [5800, 8040], thicknesses: [31375] }, 1, 6500).maxHiddenThickness; // ≈ 16 840 m
 */
export function assessHiddenLayer(model: LayeredModel, upperLayer: number, intermediateVelocity?: number): HiddenLayerAssessment {
  assertIncreasing(model.velocities, 'assessHiddenLayer');
  if (!Number.isInteger(upperLayer) || upperLayer < 1 || upperLayer >= model.velocities.length) {
    throw new RangeError(`assessHiddenLayer: the upper layer must be an integer from 1 to ${model.velocities.length - 1}, got ${upperLayer}`);
  }
  const lowerLayer = upperLayer + 1;
  const upperVelocity = model.velocities[upperLayer - 1] ?? Number.NaN;
  const lowerVelocity = model.velocities[lowerLayer - 1] ?? Number.NaN;
  const velocity = intermediateVelocity ?? Math.sqrt(upperVelocity * lowerVelocity);
  assertIntermediate(upperVelocity, velocity, lowerVelocity, 'assessHiddenLayer');

  const thicknessesAbove = model.thicknesses.slice(0, upperLayer - 1);
  const upperThickness = model.thicknesses[upperLayer - 1] ?? Number.NaN;
  const stack = (thickness: number): LayeredModel => ({
    velocities: model.velocities.slice(0, lowerLayer),
    thicknesses: [...thicknessesAbove, thickness],
  });
  const boundAtInterpreted = hiddenLayerBound(stack(upperThickness), velocity);
  const boundAtZero = hiddenLayerBound(stack(0), velocity);
  const lowerSlowness = 1 / lowerVelocity;
  const ratio =
    Math.sqrt(1 / velocity ** 2 - lowerSlowness ** 2) / Math.sqrt(1 / upperVelocity ** 2 - lowerSlowness ** 2);

  let maxThickness = 0;
  if (upperThickness > 0 && boundAtInterpreted > 0) {
    const boundSlope = (boundAtInterpreted - boundAtZero) / upperThickness;
    const denominator = 1 + boundSlope * ratio;
    const cap = upperThickness / ratio;
    maxThickness = denominator > 0 ? Math.min(boundAtInterpreted / denominator, cap) : cap;
  }
  const upperThicknessIfPresent = upperThickness - ratio * maxThickness;
  const interpretedDepth = [...thicknessesAbove, upperThickness].reduce((sum, thickness) => sum + thickness, 0);
  const depthIfPresent = interpretedDepth - upperThickness + upperThicknessIfPresent + maxThickness;
  return {
    upperLayer,
    lowerLayer,
    intermediateVelocity: velocity,
    maxHiddenThickness: maxThickness,
    upperThicknessIfPresent,
    interpretedDepth,
    depthIfPresent,
    depthErrorIfPresent: interpretedDepth - depthIfPresent,
  };
}


/**
 * A possible hidden layer is a `caution` when the depth error it could cause exceeds both this many
 * standard errors of the interpreted depth and this fraction of it; below that it is reported as
 * `info` (choice made here: a bound always exists, but only a material one needs attention).
 */
export const HIDDEN_LAYER_SE = 2;
export const HIDDEN_LAYER_FRACTION = 0.05;

/**
 * One `hidden-layer-possible` warning per adjacent pair of interpreted layers where a layer of
 * intermediate velocity could hide, with details {intermediateVelocity, maxHiddenThickness,
 * depthIfPresent, interpretedDepth, depthErrorIfPresent} (SI) and `layer` = the lower layer b,
 * whose depth it affects. `intermediateVelocities[a − 1]` overrides V_m for pair a (default
 * √(V_a·V_b)); `depthStandardErrors[a − 1]` is the SE of the interpreted depth to layer b, which
 * decides the level (`HIDDEN_LAYER_SE`, `HIDDEN_LAYER_FRACTION`; 0 when not given). A null place
 * speaks of the survey as a whole.
 *
 * Edges: a pair whose bound is 0 (an upper layer of zero thickness) gives no warning; a one-layer
 * model gives none. Misuse throws as `assessHiddenLayer`.
 */
export function hiddenLayerWarnings(
  place: ShotSide | null,
  model: LayeredModel,
  intermediateVelocities: readonly (number | undefined)[] = [],
  depthStandardErrors: readonly number[] = [],
): InterpretationWarning[] {
  const warnings: InterpretationWarning[] = [];
  if (model.velocities.length < 2) return warnings;
  for (let upperLayer = 1; upperLayer < model.velocities.length; upperLayer += 1) {
    const assessment = assessHiddenLayer(model, upperLayer, intermediateVelocities[upperLayer - 1]);
    if (!(assessment.maxHiddenThickness > 0)) continue;
    const error = Math.abs(assessment.depthErrorIfPresent);
    const depthSE = depthStandardErrors[upperLayer - 1] ?? 0;
    const material = error > HIDDEN_LAYER_SE * depthSE && error > HIDDEN_LAYER_FRACTION * assessment.interpretedDepth;
    const upperVelocity = model.velocities[upperLayer - 1] ?? Number.NaN;
    const lowerVelocity = model.velocities[upperLayer] ?? Number.NaN;
    const lower = assessment.lowerLayer;
    warnings.push({
      code: 'hidden-layer-possible',
      level: material ? 'caution' : 'info',
      message:
        `${describeShotSide(place)}: a layer of about ${formatQuantity(assessment.intermediateVelocity, 'm/s')} between layer ${upperLayer} ` +
        `(${formatQuantity(upperVelocity, 'm/s')}) and layer ${lower} (${formatQuantity(lowerVelocity, 'm/s')}) could be up to ` +
        `${formatQuantity(assessment.maxHiddenThickness, 'm', 3)} thick without ever arriving first; if it is there, the top of layer ${lower} ` +
        `is at ${formatQuantity(assessment.depthIfPresent, 'm', 3)}, not ${formatQuantity(assessment.interpretedDepth, 'm', 3)} ` +
        `(${formatQuantity(error, 'm', 3)} too shallow${material ? ', more than the depth uncertainty' : ', within the depth uncertainty'}) — ` +
        'a borehole, an uphole or downhole velocity survey, or that layer\'s head wave picked as a later arrival and assigned by hand settles it',
      ...placeFields(place),
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
