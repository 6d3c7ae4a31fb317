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

/** "shot S3, forward side" — the opening of a message about this shot side. */
export function describeShotSide(place: ShotSide): string {
  return `shot ${place.shot}, ${place.side} side`;
}

/**
 * A number with its unit for a message: `significantDigits` significant digits without trailing
 * zeros, and never in exponent form for large values — values of 10^digits or more are rounded to
 * whole units ("31375 m", not "3.138e+4 m"), so engineering and crustal values read alike.
 *
 * @example
 * formatQuantity(8.00850, 'm'); // "8.009 m"
 * formatQuantity(800, 'm/s'); // "800 m/s"
 * formatQuantity(31375.13, 'm'); // "31375 m"
 */
export function formatQuantity(value: number, unit: string, significantDigits = 4): string {
  const text = Math.abs(value) >= 10 ** significantDigits ? Math.round(value).toString() : String(Number(value.toPrecision(significantDigits)));
  return `${text} ${unit}`;
}
