/**
 * METHODS.md check case 1.1 (computed from the stated model, not published values): V = 400/1600/
 * 3500 m/s, h = 4 m and 10 m, surface shot. The values are printed to 4 decimals (ms for times,
 * m for distances); agreement is expected to the rounding.
 */
export const CASE_1_1 = {
  source: 'METHODS.md check case 1.1 (computed from the stated model)',
  velocities: [400, 1600, 3500],
  thicknesses: [4, 10],
  intercepts: { 2: 19.3649e-3, 3: 30.9864e-3 },
  criticalDistances: { 2: 2.0656, 3: 11.2002 },
  crossovers: { 1: 10.328, 2: 34.2527 },
  firstArrivals: [
    { offset: 10, time: 25.0e-3, branch: 1 },
    { offset: 30, time: 38.1149e-3, branch: 2 },
    { offset: 60, time: 48.1292e-3, branch: 3 },
    { offset: 100, time: 59.5578e-3, branch: 3 },
  ],
} as const;

/** Half a unit in the 4th decimal of a value printed in ms: the rounding of the check case. */
export const ROUNDING_TIME = 0.5e-4 * 1e-3;
/** Half a unit in the 4th decimal of a value printed in m. */
export const ROUNDING_DISTANCE = 0.5e-4;
