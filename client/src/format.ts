/**
 * Numbers as a practitioner reads them: a value to the precision its standard error supports
 * (two significant figures of the SE), with its unit, and a thin space before the unit.
 */
import type { Units } from './api-types.js';

/** Decimal places that show `se` to two significant figures (0–6). */
export function decimalsFor(se: number | null | undefined, value: number): number {
  const scale = se !== null && se !== undefined && Number.isFinite(se) && se > 0 ? se : Math.abs(value) / 1000;
  if (!(scale > 0) || !Number.isFinite(scale)) return 2;
  return Math.min(6, Math.max(0, 1 - Math.floor(Math.log10(scale))));
}

/** `1381 ± 21` (no unit), or `—` when the value is not available. */
export function withError(value: number | null | undefined, se: number | null | undefined): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  // Without a standard error: four significant figures, trailing zeros dropped.
  if (se === null || se === undefined || !Number.isFinite(se)) return String(Number(value.toPrecision(4)));
  const places = decimalsFor(se, value);
  return `${value.toFixed(places)} ± ${se.toFixed(places)}`;
}

/** A value with its unit: `1381 ± 21 m/s`. */
export function quantity(value: number | null | undefined, se: number | null | undefined, unit: string): string {
  const text = withError(value, se);
  return text === '—' ? text : `${text}\u202f${unit}`;
}

/** A plain number to a sensible precision for axis labels and hover text. */
export function plain(value: number, places = 2): string {
  return Number.isFinite(value) ? String(Number(value.toFixed(places))) : '—';
}

/** Factors from the SI values the server stores to the display units of an interpretation. */
export function displayFactors(units: Units): { distance: number; time: number } {
  return { distance: units.distance === 'km' ? 1e-3 : 1, time: units.time === 'ms' ? 1e3 : 1 };
}

/** Time per distance over velocity in display units: (distance / velocity) × this = time. */
export function reductionFactor(units: Units): number {
  // m ÷ (m/s) = s → ms ×1000; km ÷ (km/s) = s → s ×1.
  return units.time === 'ms' ? 1e3 : 1;
}

export function sideLabel(side: 'forward' | 'reverse'): string {
  return side === 'forward' ? 'forward' : 'reverse';
}

/**
 * Branch n in the trade's words: the engine's name for layer n when the interpretation has it
 * ("Pg", "P*", "Pn" on crustal surveys), else 1 is the direct wave and n ≥ 2 the head wave of
 * refractor n − 1 (top of layer n).
 */
export function branchLabel(index: number, layers: readonly { readonly index: number; readonly phase: string }[] = []): string {
  const named = layers.find((layer) => layer.index === index)?.phase;
  if (named !== undefined) return named;
  return index === 1 ? 'direct wave' : `refractor ${index - 1}`;
}

/** A date and time as `2026-12-02 14:05` (local time): unambiguous in every locale. */
export function shortDateTime(iso: string): string {
  const date = new Date(iso);
  if (Number.isNaN(date.getTime())) return iso;
  const two = (value: number) => String(value).padStart(2, '0');
  return `${date.getFullYear()}-${two(date.getMonth() + 1)}-${two(date.getDate())} ${two(date.getHours())}:${two(date.getMinutes())}`;
}

/**
 * Text for plotly's labels and hover boxes, which read a small subset of HTML: `&`, `<` and `>`
 * escaped, so a shot named `<a href=…>` is shown as written, never as a link or a style.
 */
export function plotlyText(text: string): string {
  return text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');
}
