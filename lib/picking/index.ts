/**
 * Automatic first-break picking (METHODS §11): trace conditioning, a first estimate by the
 * modified energy ratio or STA/LTA, refinement by the AIC picker, a confidence and sigma for
 * every pick, and the neighbour-trace check.
 */

// The picker and its contract
export { pickFirstBreaks, REPICK_MIN_CONFIDENCE } from './pick-first-breaks.js';
export { conditionTrace } from './condition.js';
export { DEFAULT_PICKING_OPTIONS, DEFAULT_HIGH_CUT, resolvePickingOptions, validatePickingOptions, highCutFor, samplesIn, type PickingOptions } from './options.js';
export type { PickableTrace, TracePick } from './types.js';
export { pickableTrace } from './pickable.js';

// Trace conditioning: Butterworth band-pass (causal or zero-phase), AGC, normalisation
export { butterworthBandPass, bandPassGain, bandPassCentre, MAX_BUTTERWORTH_ORDER, type SecondOrderSection } from './butterworth.js';
export { sosFilter, steadyStateStates, type SectionStates } from './sos-filter.js';
export { sosFiltFilt } from './zero-phase-filter.js';
export { automaticGainControl } from './agc.js';
export { normaliseTrace, type NormalisationMode } from './normalise.js';

// Characteristic functions and the onset
export { staLtaCharacteristic, staLtaRatio, staLtaTrigger, LTA_FLOOR } from './sta-lta.js';
export { energyRatio, modifiedEnergyRatio, shortestEnergyWindow, ENERGY_FLOOR } from './energy-ratio.js';
export { aicCurve, aicOnset, VARIANCE_FLOOR, type AicOnset } from './aic.js';
export { traceOnset, onsetInWindow, amplitudeRatioAt, typicalWindowEnergy, MIN_PICKABLE_SAMPLES, type TraceOnset, type TraceOnsetOutcome } from './trace-onset.js';

// Quality and the neighbour check
export { pickQuality, CONFIDENCE_MIDPOINT_DB, CONFIDENCE_WIDTH_DB, SIGMA_JITTER_FACTOR, SIGMA_RISE_FRACTION, MIN_SNR, type OnsetMeasures, type PickQuality } from './pick-quality.js';
export { neighbourConsistency, medianSlopePrediction, earliestTowardsShot, earliestAwayFromShot, earliestBetween, MIN_ANCHORS, REACH_NEAR, REACH_FAR, type ConsistencyItem, type ConsistencyOptions, type ConsistencyVerdict } from './consistency.js';

// Running sums shared by the characteristic functions
export { prefixSums, windowSum, CANCELLATION_FLOOR } from './running-sums.js';
