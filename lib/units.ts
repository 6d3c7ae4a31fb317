/**
 * Units. Everything inside `lib/` is SI (metres, seconds, metres per second); conversion happens
 * only at the edges: the pick-table reader converts in, the interpretation JSON and the CLI
 * convert out to the survey's display units.
 */

/** Length units a pick-table column may carry as a suffix. */
export const LENGTH_UNITS = { m: 1, km: 1000, ft: 0.3048 } as const;
/** Time units a pick-table column may carry as a suffix. */
export const TIME_UNITS = { ms: 1e-3, s: 1 } as const;

export type LengthUnit = keyof typeof LENGTH_UNITS;
export type TimeUnit = keyof typeof TIME_UNITS;

/**
 * Display scale of a survey. Engineering scale shows m, ms, m/s; crustal scale shows km, s, km/s.
 */
export type DisplayScale = 'engineering' | 'crustal';

export interface DisplayUnits {
  readonly scale: DisplayScale;
  readonly distance: 'm' | 'km';
  readonly time: 'ms' | 's';
  readonly velocity: 'm/s' | 'km/s';
}

export const DISPLAY_UNITS: Readonly<Record<DisplayScale, DisplayUnits>> = {
  engineering: { scale: 'engineering', distance: 'm', time: 'ms', velocity: 'm/s' },
  crustal: { scale: 'crustal', distance: 'km', time: 's', velocity: 'km/s' },
};

/** Factor that turns an SI value into display units (divide SI by the unit's size in SI). */
export function distanceFromSI(metres: number, units: DisplayUnits): number {
  return units.distance === 'km' ? metres / 1000 : metres;
}
export function timeFromSI(seconds: number, units: DisplayUnits): number {
  return units.time === 'ms' ? seconds * 1000 : seconds;
}
export function velocityFromSI(metresPerSecond: number, units: DisplayUnits): number {
  return units.velocity === 'km/s' ? metresPerSecond / 1000 : metresPerSecond;
}
