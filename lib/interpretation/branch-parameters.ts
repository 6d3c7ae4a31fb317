/**
 * The bridge from a branch's line fit to the parameters a depth calculation takes: slowness,
 * intercept and their full 2×2 covariance (never dropped: slope and intercept of a head-wave
 * branch are strongly anti-correlated).
 */
import type { LineFit } from '../branches/types.js';
import type { BranchParameters } from '../depth/types.js';

export function branchParameters(fit: LineFit): BranchParameters {
  return {
    slowness: fit.slope,
    intercept: fit.intercept,
    slownessVariance: fit.slopeSE * fit.slopeSE,
    interceptVariance: fit.interceptSE * fit.interceptSE,
    covariance: fit.covariance,
  };
}
