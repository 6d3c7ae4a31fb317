/**
 * The synthetic trace of METHODS §11 check cases 11.1 and 11.2 (computed from the stated trace, not
 * published values): 0.25 ms sampling, 400 samples, onset at sample 160, three-sinusoid noise of
 * amplitude A and a 100 Hz sine decaying over 10 ms from the onset.
 */
export const METHODS_ONSET = 160;
export const METHODS_DT = 0.00025;

export function methodsTrace(noiseAmplitude: number): number[] {
  return Array.from({ length: 400 }, (_, k) => {
    const noise =
      noiseAmplitude *
      (Math.sin(2 * Math.PI * 0.1237 * k) + 0.7 * Math.sin(2 * Math.PI * 0.2913 * k + 1.3) + 0.5 * Math.sin(2 * Math.PI * 0.0417 * k + 0.4));
    const tau = (k - METHODS_ONSET) * METHODS_DT;
    const signal = k >= METHODS_ONSET ? Math.sin(2 * Math.PI * 100 * tau) * Math.exp(-tau / 0.01) : 0;
    return noise + signal;
  });
}
