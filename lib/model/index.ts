// Plane horizontal layered model: forward travel times of the direct wave and head waves.
export type { FirstArrival, LayeredModel } from './layered-model.js';
export {
  branchExists,
  branchTime,
  criticalDistance,
  crossoverDistance,
  firstArrival,
  headWaveIntercept,
  rmsResidual,
  syntheticTimes,
  verticalSlowness,
} from './layered-model.js';
