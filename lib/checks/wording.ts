/**
 * Words shared by the messages of the depth notes and the physics checks: which shot side a
 * message speaks about ("shot S3, forward side") and how a quantity is written, so that every
 * message names its place and its numbers alike.
 */
import type { Side } from '../branches/types.js';

export interface ShotSide {
  readonly shot: string;
  readonly side: Side;
}

/** "shot S3, forward side" — the opening of a message about this shot side; "survey" for null (the survey as a whole). */
export function describeShotSide(place: ShotSide | null): string {
  return place === null ? 'survey' : `shot ${place.shot}, ${place.side} side`;
}

/** The `shot` and `side` fields of a warning about `place` (none for the survey as a whole). */
export function placeFields(place: ShotSide | null): { shot?: string; side?: Side } {
  return place === null ? {} : { shot: place.shot, side: place.side };
}

/**
 * A number with its unit for a message: `significantDigits` significant digits without trailing
 * zeros, and never in exponent form for large values — values of 10^digits or more are rounded to
 * whole units, and lengths of 10 km or more are written in km ("31.38 km", not "3.138e+4 m"), so
 * engineering and crustal values both read naturally. Number and unit are joined by a no-break
 * space.
 *
 * @example
 * formatQuantity(8.00850, 'm'); // "8.009 m"
 * formatQuantity(800, 'm/s'); // "800 m/s"
 * formatQuantity(31375.13, 'm'); // "31.38 km"
 */
export function formatQuantity(value: number, unit: string, significantDigits = 4): string {
  // Crustal lengths read in kilometres: 10 km and beyond never occur at engineering scale.
  if (unit === 'm' && Math.abs(value) >= 10_000) return formatQuantity(value / 1000, 'km', significantDigits);
  const text = Math.abs(value) >= 10 ** significantDigits ? Math.round(value).toString() : String(Number(value.toPrecision(significantDigits)));
  // A no-break space keeps a number and its unit on one line when messages are wrapped.
  return `${text}\u00a0${unit}`;
}
