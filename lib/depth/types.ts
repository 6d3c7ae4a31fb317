/**
 * Types of the depth stage for plane horizontal layers. All values SI.
 *
 * Parameter vector θ, in this order, for a stack of N layers seen as branches 1…N:
 *   θ = (s_1, τ_1, s_2, τ_2, …, s_N, τ_N)
 * with s_n the slowness of branch n (s/m) and τ_n its intercept time (s); τ_1 is the direct
 * wave's intercept (0 for a fit through the origin). Its covariance is block-diagonal for
 * independent branch fits: one 2×2 block per branch.
 */

/** Slope, intercept and their covariance for one branch, as a depth calculation needs them. */
export interface BranchParameters {
  /** Slowness s_n = 1/V_n, s/m. */
  readonly slowness: number;
  /** Intercept time τ_n, s. */
  readonly intercept: number;
  readonly slownessVariance: number;
  readonly interceptVariance: number;
  /** Cov(τ_n, s_n). */
  readonly covariance: number;
}

export type DepthMethod = 'intercept-time' | 'crossover-distance';

export interface LayerDepths {
  readonly method: DepthMethod;
  /** h_1 … h_{N−1}, m (thickness of each layer above the half-space). */
  readonly thicknesses: readonly number[];
  readonly thicknessSE: readonly number[];
  /** z_k = h_1 + … + h_k, m: depth to the top of layer k+1. */
  readonly depths: readonly number[];
  readonly depthSE: readonly number[];
  /** Full covariance of the thicknesses (N−1)×(N−1). */
  readonly thicknessCovariance: readonly (readonly number[])[];
  /** Full covariance of the depths (N−1)×(N−1). */
  readonly depthCovariance: readonly (readonly number[])[];
  /** ∂h/∂(inputs): (N−1) rows; columns in the order the method documents. */
  readonly jacobian: readonly (readonly number[])[];
  /** Problems met (layer index 1-based): e.g. a non-positive thickness, an impossible branch. */
  readonly notes: readonly DepthNote[];
}

export interface DepthNote {
  readonly code: 'thickness-not-positive' | 'velocity-not-increasing' | 'depth-ill-conditioned' | 'intercept-not-positive';
  readonly layer: number;
  readonly message: string;
}
