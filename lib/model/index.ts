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

// Earth flattening (Müller 1971; Chapman 1973): sphere ↔ flat depths, velocities and distances.
export {
  EARTH_MEAN_RADIUS,
  flattenDepth,
  flattenedDistance,
  flattenVelocity,
  unflattenDepth,
  unflattenLayers,
  unflattenVelocity,
  type UnflattenedLayer,
} from './earth-flattening.js';

// Constant-velocity shells in a sphere: direct, turning-chord and interface-arc times, and the flat-earth error.
export {
  flatEarthError,
  flatErrorOffset,
  sphericalBranchExists,
  sphericalBranchTime,
  sphericalBranchTimes,
  sphericalCriticalDistance,
  sphericalFirstArrival,
  sphericalMaximumDistance,
  sphericalSyntheticTimes,
  sphericalTimeDerivatives,
  type FlatEarthError,
  type FlatErrorOffsetOptions,
  type RefractedRay,
  type SphericalModel,
  type SphericalOptions,
  type SphericalTimeDerivatives,
} from './spherical-earth.js';
