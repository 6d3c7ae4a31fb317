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

// Forward check of an interpreted depth section: first arrivals on a grid against the picks.
export {
  DEFAULT_FORWARD_CHECK_MAX_NODES,
  DEFAULT_FORWARD_CHECK_RADIUS,
  FORWARD_CHECK_REFERENCES,
  forwardCheck,
  type DepthSection,
  type ForwardCheck,
  type ForwardCheckGrid,
  type ForwardCheckNote,
  type ForwardCheckOptions,
  type ForwardCheckPick,
  type ForwardCheckShot,
  type ReceiverResiduals,
  type ResidualSummary,
  type SectionInterface,
  type ShotResiduals,
} from './forward-check.js';
