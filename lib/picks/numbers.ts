/**
 * Numbers in a pick table: strict decimal syntax, and exact decimal unit scaling.
 *
 * `Number()` alone accepts too much for a measurement cell: it turns "" and " " into 0, reads
 * "0x10" as 16, "Infinity" as a value, and "1e999" as Infinity. A pick-table cell must instead
 * be a plain decimal: an optional sign, digits with at most one decimal point (at least one
 * digit), and an optional exponent (`e` or `E`, optional sign, digits) — ECMAScript's
 * StrDecimalLiteral without `Infinity` and without surrounding whitespace. Leading zeros, `5.`
 * and `.5` are accepted; thousands separators, decimal commas, hexadecimal, `NaN` and `Infinity`
 * are not.
 *
 * Unit conversion works on the decimal, not on the rounded double: a cell of `12.3` in a `_ms`
 * column becomes the double nearest to 0.0123 s (the cell's exponent is shifted by −3 before the
 * one rounding), where `12.3 * 0.001` would round twice. Feet are scaled by the exact decimal
 * 0.3048 (the international foot; NIST SP 811, 2008, appendix B — recalled from memory) with
 * integer arithmetic, so `100` ft is exactly the double nearest 30.48 m. Because writing uses the
 * inverse shift on the shortest round-trip decimal of each value (ECMAScript `Number.prototype
 * .toString`), a value written in m, km, ms or s reads back as the identical double.
 */

/** A unit's size in SI written as an exact decimal: `coefficient × 10^exponent`. */
export interface DecimalScale {
  /** Integer coefficient, e.g. 3048n for the foot (0.3048 = 3048 × 10⁻⁴). */
  readonly coefficient: bigint;
  readonly exponent: number;
  /** The same size as a double, for the (inexact) inverse of a non-power-of-ten unit. */
  readonly size: number;
}

/** Why a cell is not a number. */
export type NumberFault =
  /** The cell is empty or whitespace only. */
  | 'empty'
  /** The text is not a plain decimal (letters, two points, hexadecimal, a decimal comma…). */
  | 'syntax'
  /** The text spells NaN or infinity. */
  | 'not-finite'
  /** A decimal whose value in SI is beyond the largest double (about 1.8e308). */
  | 'overflow';

export type NumberReading =
  | { readonly ok: true; readonly value: number }
  | { readonly ok: false; readonly fault: NumberFault };

/**
 * Where the parts of a syntactically valid decimal lie in its text (positions only, so scanning
 * a cell allocates nothing): the value is `mantissa × 10^exponent`, where the mantissa is
 * `text[0, mantissaEnd)` (sign, digits, point).
 */
interface DecimalParts {
  readonly negative: boolean;
  /** End of the mantissa: where the exponent marker starts, or the text length. */
  readonly mantissaEnd: number;
  /** The written exponent (0 when there is none), clamped to ±EXPONENT_CLAMP. */
  readonly exponent: number;
}

/**
 * Exponents are clamped to this magnitude before they are shifted. A mantissa cannot hold more
 * digits than the 256 MiB input limit allows (under 3·10⁸), so any exponent beyond ±10¹⁰ gives
 * 0 or overflow whether clamped or not, and the clamp keeps the shifted exponent an integer
 * that prints without exponent notation.
 */
const EXPONENT_CLAMP = 1e10;

/**
 * A mantissa written with more characters than this is scaled by a double multiplication (two
 * roundings) instead of exact integer arithmetic, so a pathological cell of a million digits
 * costs no quadratic BigInt parse. No measurement carries 400 digits; 17 significant digits
 * already identify any double.
 */
const EXACT_PRODUCT_DIGITS = 400;

const DIGIT_ZERO = 0x30;
const DIGIT_NINE = 0x39;
const PLUS = 0x2b;
const MINUS = 0x2d;
const POINT = 0x2e;

function isDigit(code: number): boolean {
  return code >= DIGIT_ZERO && code <= DIGIT_NINE;
}

/** Scan `text` as a strict decimal; null when it is not one. No regular expression is used. */
function scanDecimal(text: string): DecimalParts | null {
  const length = text.length;
  const first = text.charCodeAt(0);
  const negative = first === MINUS;
  let index = negative || first === PLUS ? 1 : 0;
  let digitCount = 0;
  while (index < length && isDigit(text.charCodeAt(index))) {
    index += 1;
    digitCount += 1;
  }
  if (index < length && text.charCodeAt(index) === POINT) {
    index += 1;
    while (index < length && isDigit(text.charCodeAt(index))) {
      index += 1;
      digitCount += 1;
    }
  }
  if (digitCount === 0) return null;
  const mantissaEnd = index;
  if (index === length) return { negative, mantissaEnd, exponent: 0 };
  const marker = text.charCodeAt(index);
  if (marker !== 0x65 && marker !== 0x45) return null; // e or E
  index += 1;
  const signCode = text.charCodeAt(index);
  const exponentSign = signCode === MINUS ? -1 : 1;
  if (signCode === PLUS || signCode === MINUS) index += 1;
  const exponentStart = index;
  while (index < length && isDigit(text.charCodeAt(index))) index += 1;
  if (index === exponentStart || index !== length) return null;
  const magnitude = index - exponentStart > 11 ? EXPONENT_CLAMP : Math.min(Number(text.slice(exponentStart, index)), EXPONENT_CLAMP);
  return { negative, mantissaEnd, exponent: exponentSign * magnitude };
}

/** The mantissa's digits without sign and point, and the power of ten that goes with them. */
function integerMantissa(text: string, parts: DecimalParts): { readonly digits: string; readonly exponent: number } {
  const unsigned = text.slice(text.charCodeAt(0) === PLUS || parts.negative ? 1 : 0, parts.mantissaEnd);
  const point = unsigned.indexOf('.');
  if (point === -1) return { digits: unsigned, exponent: parts.exponent };
  return { digits: unsigned.slice(0, point) + unsigned.slice(point + 1), exponent: parts.exponent - (unsigned.length - point - 1) };
}

/** Spellings of NaN and infinity that a spreadsheet or program may write (lower case). */
const NOT_FINITE_WORDS = new Set(['nan', 'inf', 'infinity', '∞', '#num!', '#div/0!']);

function isNotFiniteWord(text: string): boolean {
  const lower = text.toLowerCase();
  const unsigned = lower.startsWith('+') || lower.startsWith('-') ? lower.slice(1) : lower;
  return NOT_FINITE_WORDS.has(unsigned);
}

/**
 * The exact decimal scale of a unit size such as 1000 (km), 0.001 (ms) or 0.3048 (ft), read from
 * the size's shortest decimal. Throws a RangeError for a size that is not finite and positive.
 *
 * @example decimalScale(0.3048) // { coefficient: 3048n, exponent: -4, size: 0.3048 }
 */
export function decimalScale(size: number): DecimalScale {
  const text = String(size);
  const parts = Number.isFinite(size) && size > 0 ? scanDecimal(text) : null;
  if (parts === null) throw new RangeError(`decimalScale: a unit size must be a finite positive number, got ${size}`);
  const mantissa = integerMantissa(text, parts);
  let digits = mantissa.digits.replace(/^0+/, '');
  let exponent = mantissa.exponent;
  while (digits.length > 1 && digits.endsWith('0')) {
    digits = digits.slice(0, -1);
    exponent += 1;
  }
  return { coefficient: BigInt(digits), exponent, size };
}

/** The scale of an SI value (metres, seconds, degrees): no conversion. */
export const UNIT_SCALE: DecimalScale = decimalScale(1);

/**
 * Read one cell as a strict decimal and scale it into SI: `readDecimal('12.3', decimalScale(0.001))`
 * is the double nearest 0.0123.
 *
 * Edges: the text must already be trimmed (surrounding whitespace is a `syntax` fault);
 * "" is `empty`; "NaN", "inf", "Infinity" (any case, any sign) are `not-finite`; a decimal whose
 * scaled value exceeds the largest double is `overflow`; one below the smallest subnormal becomes
 * 0 (it is a valid, tiny measurement); −0 becomes 0.
 *
 * @example readDecimal('1.5e3') // { ok: true, value: 1500 }
 * @example readDecimal('0x10')  // { ok: false, fault: 'syntax' }
 */
export function readDecimal(text: string, scale: DecimalScale = UNIT_SCALE): NumberReading {
  if (text.length === 0) return { ok: false, fault: 'empty' };
  const parts = scanDecimal(text);
  if (parts === null) return { ok: false, fault: isNotFiniteWord(text) ? 'not-finite' : 'syntax' };
  let value: number;
  if (scale.coefficient === 1n && scale.exponent === 0) {
    value = Number(text);
  } else if (scale.coefficient === 1n) {
    value = Number(`${text.slice(0, parts.mantissaEnd)}e${parts.exponent + scale.exponent}`);
  } else if (parts.mantissaEnd > EXACT_PRODUCT_DIGITS) {
    value = Number(text) * scale.size;
  } else {
    const mantissa = integerMantissa(text, parts);
    const product = BigInt(mantissa.digits) * scale.coefficient;
    value = Number(`${parts.negative ? '-' : ''}${product}e${mantissa.exponent + scale.exponent}`);
  }
  if (!Number.isFinite(value)) return { ok: false, fault: 'overflow' };
  return { ok: true, value: value === 0 ? 0 : value };
}

/** Plain notation is used while it needs at most this many zeros of padding (as ECMAScript does). */
const PLAIN_NOTATION_PADDING = 20;

/** Print `sign digits × 10^exponent` in plain notation when short, else as d.ddde±n. */
function formatDecimal(sign: string, rawDigits: string, rawExponent: number): string {
  let digits = rawDigits.replace(/^0+/, '');
  if (digits.length === 0) return '0';
  let exponent = rawExponent;
  while (digits.endsWith('0')) {
    digits = digits.slice(0, -1);
    exponent += 1;
  }
  const pointPosition = digits.length + exponent;
  if (exponent >= 0 && exponent <= PLAIN_NOTATION_PADDING) return `${sign}${digits}${'0'.repeat(exponent)}`;
  if (exponent < 0 && pointPosition > 0) return `${sign}${digits.slice(0, pointPosition)}.${digits.slice(pointPosition)}`;
  if (exponent < 0 && -pointPosition < PLAIN_NOTATION_PADDING) return `${sign}0.${'0'.repeat(-pointPosition)}${digits}`;
  const fraction = digits.length > 1 ? `.${digits.slice(1)}` : '';
  return `${sign}${digits.slice(0, 1)}${fraction}e${pointPosition - 1}`;
}

/**
 * Write an SI value in the unit of `scale`, the inverse of `readDecimal`.
 *
 * For a power-of-ten unit (m, km, s, ms) the result is the value's shortest round-trip decimal
 * with its point shifted, so `readDecimal(writeDecimal(value, scale), scale) === value` exactly.
 * For any other unit (ft) it is the shortest decimal of the double `value / size`, which reads
 * back within a unit or two in the last place. −0 is written as 0.
 *
 * Edges: throws a RangeError for a value that is not finite, or whose size in the unit overflows
 * (a programming error: a pick set holds finite values only).
 *
 * @example writeDecimal(0.0123, decimalScale(0.001)) // '12.3'
 */
export function writeDecimal(value: number, scale: DecimalScale = UNIT_SCALE): string {
  const inUnit = scale.coefficient === 1n ? value : value / scale.size;
  if (!Number.isFinite(inUnit)) {
    throw new RangeError(`writeDecimal: cannot write ${value} in a unit of ${scale.size} SI units as a finite decimal`);
  }
  const shortest = String(inUnit === 0 ? 0 : inUnit);
  if (scale.coefficient !== 1n || scale.exponent === 0) return shortest;
  const parts = scanDecimal(shortest);
  if (parts === null) throw new RangeError(`writeDecimal: ${shortest} is not a decimal`);
  const mantissa = integerMantissa(shortest, parts);
  return formatDecimal(parts.negative ? '-' : '', mantissa.digits, mantissa.exponent - scale.exponent);
}
