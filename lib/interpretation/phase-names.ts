/**
 * The trade's names for the branches of a layered model.
 *
 * Engineering scale: branch 1 is the direct wave, branch n ≥ 2 the head wave of refractor n − 1.
 * Crustal scale: branch 1 is Pg (the crustal direct or diving wave); the head wave along the top
 * of a layer whose velocity reaches MOHO_VELOCITY is Pn (the mantle head wave: the Moho is put
 * conventionally where Vp reaches 7.6 km/s, Steinhart 1967 via Mooney2002); the head wave of an
 * intermediate crustal refractor is P* (the name the trade gives the lower-crust head wave), and
 * where there are several, P*₂, P*₃, … counted from the top. A head wave slower than
 * MOHO_VELOCITY is never called Pn, however deep; a layer below a first Pn layer is named by its
 * index ("P, refractor 4"), since it is a refractor within the mantle.
 *
 * @example
 * phaseNames([5800, 6500, 8040], 'crustal'); // ['Pg', 'P*', 'Pn']
 * phaseNames([500, 2000], 'engineering');    // ['direct wave', 'refractor 1']
 */
import type { DisplayScale } from '../units.js';

/** Vp (m/s) from which a refractor is taken for the Moho (Steinhart 1967 via Mooney2002). */
export const MOHO_VELOCITY = 7600;

const SUBSCRIPTS = '₀₁₂₃₄₅₆₇₈₉';
const subscript = (value: number) => String(value).replace(/\d/g, (digit) => SUBSCRIPTS[Number(digit)]!);

/** The name of each branch 1…N, given the velocity (m/s) of the layer each travels in (NaN if unknown). */
export function phaseNames(velocities: readonly number[], scale: DisplayScale): string[] {
  if (scale === 'engineering') return velocities.map((_, k) => (k === 0 ? 'direct wave' : `refractor ${k}`));
  const mantle = velocities.findIndex((velocity, k) => k > 0 && velocity >= MOHO_VELOCITY);
  const crustalRefractors = (mantle < 0 ? velocities.length : mantle) - 1;
  return velocities.map((_, k) => {
    if (k === 0) return 'Pg';
    if (k === mantle) return 'Pn';
    if (mantle >= 0 && k > mantle) return `P, refractor ${k}`;
    return crustalRefractors > 1 ? `P*${subscript(k)}` : 'P*';
  });
}
