/**
 * Pick quality: a confidence in [0, 1] and a one-SD uncertainty (sigma, s) for a first break,
 * from what the trace shows at the onset (our construction, calibrated on the synthetic gathers of
 * tests/picking; METHODS §11 "Quality").
 *
 * Measures (from `trace-onset.ts`): the amplitude ratio R = RMS after / RMS before the onset over
 * the quality window; the rise r, the time from the onset to the largest |y| in the energy window
 * after it (about a quarter period of the arrival); whether the onset test passed.
 *
 * **Confidence.** With ρ = 20·log10 R (dB),
 * ```
 * confidence = 1 / (1 + exp(−(ρ − ρ₅₀)/w))  × (½ when the onset test failed)
 * ```
 * ρ₅₀ = `CONFIDENCE_MIDPOINT_DB`, w = `CONFIDENCE_WIDTH_DB`: 0.5 at ρ₅₀ dB, 0.88 at ρ₅₀ + 2w.
 * On the synthetic gathers, single-trace picks at 9–12 dB missed one sample + 1 ms about one time
 * in five, at 12–15 dB one in ten, above 15 dB one in fifty: 12 dB is where a pick starts to need a
 * look (METHODS §11 suggests flagging below about 6 dB of the same ratio; 12 dB flags more picks,
 * as these gathers call for).
 *
 * **Sigma.** A noisy rising flank of slope A/r crosses the noise level late or early by about
 * r/SNR (common practice for threshold timing), and the onset is only known to the sample:
 * ```
 * SNR ≈ √(R² − 1)     (RMS after² = signal² + noise², RMS before² = noise²)
 * σ = √( T²/12 + (c·r / SNR)² + (b·r)² ),   never below T/2
 * ```
 * T the sample interval; c = `SIGMA_JITTER_FACTOR`, b = `SIGMA_RISE_FRACTION`, calibrated by a
 * grid search on 64 synthetic gathers (seeds kept apart from the acceptance test's) for about
 * 68 % of accepted picks' errors within 1σ and 95 % within 2σ (c = 1.2, b = 0.2 gave 70 % and
 * 95 %; tests/picking/acceptance.test.ts prints the coverage on its own gathers). The b·r term
 * stands for the AIC split's lag on an onset that rises from zero: at high SNR the picks were late
 * by about 0.3 ms at every sample interval. The Akaike-weight spread of the AIC minimum
 * (METHODS §11) is not used: it scales with the sample interval (about a sample at any rate)
 * while the errors do not. SNR is floored at `MIN_SNR` so a pick with no measurable contrast gets
 * a large, finite sigma.
 *
 * **Doubt.** When the onset test failed, the pick is a guess the trace's sharpest peak placed,
 * and with a probability of about 1 − confidence it is no arrival at all but anywhere in the window
 * searched, W = `doubtWindow` (the picker passes the AIC window, aicBefore + aicAfter): its variance
 * gains ((1 − confidence)·W)²/12 (the SD of a uniform spread over W), so a pick of confidence ≈ 0
 * carries a sigma of about W/√12 (≈ 5.8 ms for 20 ms), not the sub-millisecond timing sigma.
 * Triggered picks gain nothing (their calibration above stands).
 *
 * Edges: R infinite (silence before the onset, a zero-padded start) counts as 60 dB and SNR 1000;
 * R ≤ 1 gives SNR = `MIN_SNR`.
 *
 * @example
 * pickQuality({ amplitudeRatio: 10, riseSamples: 10, triggered: true }, 0.00025);
 * // ρ = 20 dB → confidence ≈ 0.96; r = 2.5 ms, SNR ≈ 9.95 → σ = √(0.0052 + 0.0909 + 0.25) ms ≈ 0.59 ms
 */

/** dB of amplitude ratio at which confidence is ½. */
export const CONFIDENCE_MIDPOINT_DB = 12;
/** dB scale of the logistic. */
export const CONFIDENCE_WIDTH_DB = 2.5;
/** c: timing jitter in rises per unit SNR. */
export const SIGMA_JITTER_FACTOR = 1.2;
/** b: a floor on the error, as a fraction of the rise (the AIC split lags a soft onset). */
export const SIGMA_RISE_FRACTION = 0.2;
/** SNR floor for the sigma. */
export const MIN_SNR = 0.3;

export interface OnsetMeasures {
  readonly amplitudeRatio: number;
  /** Samples from the onset to the first strong peak. */
  readonly riseSamples: number;
  readonly triggered: boolean;
}

export interface PickQuality {
  readonly confidence: number;
  /** s, 1 SD. */
  readonly sigma: number;
  /** ρ, dB. */
  readonly amplitudeRatioDb: number;
}

/** Confidence and sigma of an onset (module comment). */
export function pickQuality(measures: OnsetMeasures, sampleInterval: number, doubtWindow = 0): PickQuality {
  const ratio = measures.amplitudeRatio;
  const ratioDb = Number.isFinite(ratio) ? 20 * Math.log10(Math.max(ratio, 1e-6)) : 60;
  const logistic = 1 / (1 + Math.exp(-(ratioDb - CONFIDENCE_MIDPOINT_DB) / CONFIDENCE_WIDTH_DB));
  const confidence = measures.triggered ? logistic : 0.5 * logistic;
  const snr = Number.isFinite(ratio) ? Math.max(MIN_SNR, Math.sqrt(Math.max(0, ratio * ratio - 1))) : 1000;
  const rise = measures.riseSamples * sampleInterval;
  const jitter = (SIGMA_JITTER_FACTOR * rise) / snr;
  const floor = SIGMA_RISE_FRACTION * rise;
  // Doubt (module comment): a pick whose onset test failed may be no arrival at all.
  const doubt = measures.triggered ? 0 : (1 - confidence) * doubtWindow;
  const sigma = Math.sqrt((sampleInterval * sampleInterval) / 12 + jitter * jitter + floor * floor + (doubt * doubt) / 12);
  return { confidence, sigma: Math.max(sigma, sampleInterval / 2), amplitudeRatioDb: ratioDb };
}
