/**
 * The branch stage: shot sides, straight-line fits with their uncertainties, automatic and
 * user-assigned segmentation into branches, and branch edits.
 */

// Shot sides
export { splitShotSides, picksLeftOutOfSides, type PicksLeftOut } from './sides.js';

// Line fits (METHODS §3): one entry point and the three methods behind it
export { fitLine } from './line-fit.js';
export { fitLeastSquares, leastSquaresLine, type LeastSquaresLine, type LeastSquaresOptions } from './least-squares.js';
export { fitTheilSen, type TheilSenOptions } from './theil-sen.js';
export { fitHuber, huberWeight, huberCovarianceFactor, HUBER_TUNING, MAD_TO_SD, type HuberOptions } from './huber.js';

// Distributions behind the intervals
export { studentTQuantile, studentTUpperTail, studentTDensity, regularisedIncompleteBeta } from './student-t.js';
export { normalQuantile, normalUpperTail, normalDensity } from './normal.js';

// Segmentation (METHODS §4)
export { segmentSide, segmentationBic, DEFAULT_SEGMENT_OPTIONS, type SegmentSideOptions } from './segment.js';
export { segmentByUserBranches } from './user-branches.js';
export { segmentCostTable, segmentCost, type SegmentCostTable } from './segment-cost.js';
export { optimalPartitions, type Partition } from './optimal-partition.js';
export { failedPhysicalConstraint, type PhysicalConstraint, type SegmentLine } from './branch-constraints.js';
export { fitBranchMembers, branchFromMembers, type BranchOutcome } from './branch-fit.js';

// Edits
export { applyBranchEdits, type BranchEdit } from './edits.js';

// Contract types
export type * from './types.js';
