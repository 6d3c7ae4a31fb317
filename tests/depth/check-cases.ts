/**
 * Check-case data of METHODS.md used by the depth tests (computed from the stated model or the
 * stated data with numpy/scipy, not published values).
 */

/** METHODS.md check case 3.1: picks of a 500/2000 m/s, h = 8 m model with fixed perturbations. */
export const CASE_3_1 = {
  source: 'METHODS.md check case 3.1 (computed from the stated data with numpy)',
  direct: { offsets: [2, 4, 6, 8, 10, 12, 14, 16], timesMs: [4.2, 7.85, 12.05, 15.75, 20.1, 24.3, 27.8, 31.95] },
  refracted: {
    offsets: [24, 28, 32, 36, 40, 44, 48, 52, 56, 60, 64, 68],
    timesMs: [43.2839, 44.7839, 46.5839, 49.0839, 51.4839, 52.6839, 54.9839, 57.1839, 58.4839, 61.3839, 62.8839, 64.9839],
  },
  directVelocity: 500.276,
  refractorVelocity: 2001.4,
  interceptMs: 31.0,
  thickness: 8.0085,
  /** ∂h/∂s_1, ∂h/∂s_2 (m²/s), ∂h/∂τ (m/s). */
  jacobian: { directSlowness: -4273.47, refractorSlowness: 1068.21, intercept: 258.339 },
  thicknessSE: 0.0842,
  thicknessSEWithoutCovariance: 0.0912,
} as const;

/** METHODS.md check case 3.3: model 1.1 with SE 1 % on every s, 0.5 ms on τ_2, τ_3, ρ(s_n, τ_n) = −0.9. */
export const CASE_3_3 = {
  source: 'METHODS.md check case 3.3 (computed from the stated model)',
  relativeSlownessSE: 0.01,
  interceptSE: 0.5e-3,
  correlation: -0.9,
  thicknessSE: [0.1095, 0.545],
  thicknessCorrelation: -0.577,
  depthSE2: 0.49,
} as const;
