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

// The shortest-path first-arrival solver on a grid (forward check of a depth section).
export {
  forwardStar,
  shortestPathTimes,
  SHORTEST_PATH_REFERENCES,
  slownessGridFromSection,
  type GridGeometry,
  type GridSource,
  type LayeredSection,
  type ShortestPathOptions,
  type SlownessGrid,
  type StarOffset,
  type TravelTimeField,
} from './shortest-path.js';
