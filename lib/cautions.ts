/**
 * Standing cautions printed with every interpretation (CLI, JSON, report, UI). They are not
 * warnings about this data set: they are what every refraction interpretation is subject to.
 */
export const STANDING_CAUTIONS: readonly string[] = [
  'A refraction interpretation is non-unique: other velocity–depth models fit the same first arrivals, and the uncertainties given here are for the model assumed, not for every model.',
  'A layer slower than the one above it (a velocity inversion) and a thin layer of intermediate velocity (a hidden layer) give no first arrivals of their own; both make depths wrong without any sign in the data. Where one may be present the warnings say so.',
  'Confirm depths with boreholes, test pits or other ground truth before they are used for excavation, rippability or foundation decisions.',
  'Defer to local codes and to a licensed geotechnical engineer or geophysicist for any design decision; this software assists interpretation and does not replace professional judgement.',
  'Seismic sources, explosives above all, are used only by qualified people under the local regulations and permits that apply.',
];

/** The caution that states the model's basic assumption for the horizontal-layer methods. */
export const HORIZONTAL_LAYER_ASSUMPTION =
  'Depths here assume plane horizontal layers of constant velocity under each shot; dipping or undulating refractors need reversed shots and a delay-time method.';

/** Added when depths under every receiver are given (plus-minus, GRM). */
export const DELAY_TIME_ASSUMPTION =
  'Depths under every receiver (plus-minus, generalized reciprocal method) assume the overburden velocities of the survey layers, a refractor velocity constant along each pair, dips under about 10° and no hidden or slower layer; they are given only where both shots of a pair record the same refractor, and the forward check shows where the section fails to explain the picks.';
