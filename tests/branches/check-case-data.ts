/**
 * The picks of METHODS.md check cases 3.1 and 3.2 (stated data; the expected values in the tests
 * are "computed from the stated data with numpy/scipy, not published values").
 */

/** 3.1 direct branch: x = 2, 4, …, 16 m; times in s. */
export const DIRECT_OFFSETS = [2, 4, 6, 8, 10, 12, 14, 16];
export const DIRECT_TIMES = [4.2, 7.85, 12.05, 15.75, 20.1, 24.3, 27.8, 31.95].map((milliseconds) => milliseconds / 1000);

/** 3.1 refracted branch: x = 24, 28, …, 68 m (from 500/2000 m/s, h = 8 m, plus fixed perturbations). */
export const REFRACTED_OFFSETS = [24, 28, 32, 36, 40, 44, 48, 52, 56, 60, 64, 68];
export const REFRACTED_TIMES = [
  43.2839, 44.7839, 46.5839, 49.0839, 51.4839, 52.6839, 54.9839, 57.1839, 58.4839, 61.3839, 62.8839, 64.9839,
].map((milliseconds) => milliseconds / 1000);

/** 3.1 weighted fit: σ = 0.3 ms on the first six refracted picks, 0.6 ms on the last six. */
export const REFRACTED_SIGMAS = REFRACTED_OFFSETS.map((_, index) => (index < 6 ? 0.3e-3 : 0.6e-3));

/** 3.2: the refracted picks with 8 ms added to the 6th. */
export const OUTLIER_POSITION = 5;
export const REFRACTED_TIMES_WITH_OUTLIER = REFRACTED_TIMES.map((time, index) => (index === OUTLIER_POSITION ? time + 8e-3 : time));
