// Horizontal-layer depths: the intercept-time method and its covariance.
export { ILL_CONDITIONED_SEPARATION, interceptTimeDepths, interceptTimeRecursion, type InterceptTimeRecursion } from './intercept-time.js';

// The crossover-distance method, crossovers from fitted lines or from the picks, and the comparison of two depth results.
export {
  crossoverDistanceDepths,
  depthOutsideBracket,
  fittedCrossovers,
  observedCrossover,
  type CrossoverReading,
  type DepthComparison,
  type InterceptReading,
  type SlownessReading,
} from './crossover-distance.js';

// First-order propagation (J·Σ·Jᵀ) shared by both methods.
export { branchParameterCovariance, chainJacobians, cumulativeRows, layerDepthsFromThicknesses } from './propagate.js';

// The contract types of the depth stage.
export type { BranchParameters, DepthMethod, DepthNote, LayerDepths } from './types.js';

// Near-surface corrections of head-wave times: datum (elevations) and uphole (buried shots).
export { buriedShotDirectTime, datumTooLow, headWaveDatumCorrection, upholeCorrection, type NearSurfaceCorrection } from './near-surface-corrections.js';

// Dipping planar layers from reversed shots (true velocity, dip, depth under both shots) and the reciprocal-time check.
export {
  CONSISTENCY_STANDARD_ERRORS,
  DEFAULT_CONSISTENCY_TOLERANCE,
  dippingLayer,
  dippingLayers,
  reciprocalTimeCheck,
  STEEP_DIP,
  type DippingInterface,
  type DippingLayers,
  type DippingNote,
  type DippingOptions,
  type ReciprocalTimeCheck,
  type ReversedBranchPair,
} from './dipping-layer.js';
// Delay-time methods under every receiver of a reversed pair: plus-minus (Hagedoorn 1959) and the GRM (Palmer 1980).
export { delayToDepth, planeLayerOptimumXY, steepRefractorNote, type DelayDepth, type Overburden, type RefractorArrivals, type ReversedArrivals } from './delay-depth.js';
export { commonReceivers, plusMinus, type PlusMinusNote, type PlusMinusReceiver, type PlusMinusResult } from './plus-minus.js';
export { generalizedReciprocal, type GrmNote, type GrmOptions, type GrmReceiver, type GrmResult, type GrmScanRow } from './generalized-reciprocal.js';

// Curvature-corrected layer fit (spherical shells, Levenberg–Marquardt) and the bias of a flat-earth reading of the same data.
export {
  fitSphericalLayers,
  predictedFlatBias,
  type FlatBias,
  type SphericalFit,
  type SphericalFitNote,
  type SphericalFitOptions,
  type SphericalPick,
} from './spherical-fit.js';
export * from './time-term.js'; export * from './time-term-depth.js'; // the time-term inversion of every head-wave pick (ScheideggerWillmore1957) and time terms to depth
