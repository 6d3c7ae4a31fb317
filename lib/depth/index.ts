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
