/**
 * The columns of a pick table: each quantity, the stem of its header name, the unit suffixes it
 * accepts and the pick field it fills. This table is the single definition the reader, the writer,
 * the README and the API docs all use.
 *
 * A header name is `stem_unit` for a quantity with a unit (`time_ms`, `source_x_km`), or the stem
 * alone for one without (`shot`, `branch`, `source_lat`). Matching is case-insensitive and ignores
 * surrounding whitespace. Lengths accept m, km and ft (the international foot, 0.3048 m exactly);
 * times accept ms and s (see `LENGTH_UNITS` and `TIME_UNITS` in lib/units.ts).
 */
import { LENGTH_UNITS, TIME_UNITS } from '../units.js';
import { decimalScale, UNIT_SCALE, type DecimalScale } from './numbers.js';
import type { PickTableProblemCode } from './problem-codes.js';

/** The pick field a column fills (the `branch` column also sets `excluded`). */
export type PickTableQuantity =
  | 'shot'
  | 'receiver'
  | 'sourceX'
  | 'receiverX'
  | 'sourceLat'
  | 'sourceLon'
  | 'receiverLat'
  | 'receiverLon'
  | 'time'
  | 'sigma'
  | 'branch'
  | 'sourceElevation'
  | 'receiverElevation'
  | 'sourceDepth'
  | 'uphole';

/** What a cell holds: an identifier, a length, a time, decimal degrees, or a branch number. */
export type ColumnKind = 'text' | 'length' | 'time' | 'degrees' | 'branch';

/**
 * Whether a column must be present: always (`required`); as one of the two ways of giving
 * positions (`line` for the `_x` columns, `geographic` for latitude/longitude); or `optional`.
 * Cells of every column that is not optional must be filled.
 */
export type ColumnNeed = 'required' | 'line' | 'geographic' | 'optional';

/** The values a column accepts, in SI units, and the problem code for one outside them. */
export interface ValueRange {
  readonly lowest: number;
  readonly lowestIncluded: boolean;
  readonly highest: number;
  readonly highestIncluded: boolean;
  readonly code: PickTableProblemCode;
  /** The rule in words, e.g. "must be 0 or more". */
  readonly rule: string;
}

export interface PickTableColumn {
  readonly quantity: PickTableQuantity;
  /** Header name before the unit suffix, lower case. */
  readonly stem: string;
  readonly kind: ColumnKind;
  readonly need: ColumnNeed;
  /** Accepted header names, lower case, e.g. `['time_ms', 'time_s']`. */
  readonly names: readonly string[];
  /** What the column means, in the trade's words. */
  readonly meaning: string;
  readonly range: ValueRange | null;
  /** The largest magnitude a plausible value has, for a length or a time column; null otherwise. */
  readonly limit: MagnitudeLimit | null;
}

/**
 * The largest magnitude (absolute value) a cell may hold, in SI units: beyond it the value cannot
 * be a measurement of its quantity, and is refused with `code` (a value exactly at the limit is
 * accepted). It catches a wrong unit or a mistyped exponent before the value reaches the fits.
 */
export interface MagnitudeLimit {
  /** Largest accepted magnitude, SI units (metres or seconds). */
  readonly largest: number;
  readonly code: PickTableProblemCode;
  /** Why no real value is larger, in words that follow "a limit" in a message. */
  readonly reason: string;
}

/**
 * Latest plausible time, seconds: 1e5 s (27.8 hours, a little more than a day). No first arrival
 * on Earth comes this late: the last core phases reach the antipode about 20 minutes after the
 * source (KennettEngdahl1991; recalled from memory), and even a surface wave circles the Earth
 * (40,075 km at 3–4 km/s) in about 3 hours. A round power of ten is used because the limit is
 * there to catch unit and exponent slips (a time in microseconds written as ms, a clock time,
 * 1e300), which miss it by orders of magnitude; it applies alike to times, pick uncertainties and
 * uphole times.
 */
export const LATEST_TIME_SECONDS = 1e5;

/**
 * Largest plausible length, metres: 4.1e7 m (41,000 km), larger than the Earth's equatorial
 * circumference of 2π × 6,378,137 m = 40,075,017 m (WGS84 semi-major axis, as METHODS.md gives
 * it for geodesics). No position along a line on the Earth's surface, no elevation and no shot
 * depth comes near it; it applies to every length column, in magnitude (negative positions and
 * elevations below sea level are fine within it).
 */
export const LARGEST_LENGTH_METRES = 4.1e7;

const TIME_LIMIT: MagnitudeLimit = {
  largest: LATEST_TIME_SECONDS,
  code: 'time-implausible',
  reason: 'of more than a day: no refraction arrival comes later',
};

const LENGTH_LIMIT: MagnitudeLimit = {
  largest: LARGEST_LENGTH_METRES,
  code: 'length-implausible',
  reason: "larger than the Earth's circumference (about 40,075 km)",
};

function unitSuffixes(kind: ColumnKind): readonly string[] {
  if (kind === 'length') return Object.keys(LENGTH_UNITS);
  if (kind === 'time') return Object.keys(TIME_UNITS);
  return [];
}

function atLeast(lowest: number, included: boolean, code: PickTableProblemCode): ValueRange {
  const rule = included ? `must be ${lowest} or more` : `must be more than ${lowest}`;
  return { lowest, lowestIncluded: included, highest: Infinity, highestIncluded: false, code, rule };
}

function column(
  quantity: PickTableQuantity,
  stem: string,
  kind: ColumnKind,
  need: ColumnNeed,
  meaning: string,
  range: ValueRange | null = null,
): PickTableColumn {
  const suffixes = unitSuffixes(kind);
  const names = suffixes.length === 0 ? [stem] : suffixes.map((suffix) => `${stem}_${suffix}`);
  const limit = kind === 'time' ? TIME_LIMIT : kind === 'length' ? LENGTH_LIMIT : null;
  return { quantity, stem, kind, need, names, meaning, range, limit };
}

const LATITUDE: ValueRange = {
  lowest: -90, lowestIncluded: true, highest: 90, highestIncluded: true, code: 'latitude-out-of-range',
  rule: 'must lie between -90 and 90 degrees',
};
const LONGITUDE: ValueRange = {
  lowest: -180, lowestIncluded: true, highest: 360, highestIncluded: false, code: 'longitude-out-of-range',
  rule: 'must lie from -180 up to (not including) 360 degrees',
};

/** Every column of the pick table, in the order the writer puts them. */
export const PICK_TABLE_COLUMNS: readonly PickTableColumn[] = [
  column('shot', 'shot', 'text', 'required', 'shot identifier'),
  column('receiver', 'receiver', 'text', 'optional', 'receiver (geophone station) identifier'),
  column('sourceX', 'source_x', 'length', 'line', 'source position along the line'),
  column('receiverX', 'receiver_x', 'length', 'line', 'receiver position along the line'),
  column('sourceLat', 'source_lat', 'degrees', 'geographic', 'source latitude in decimal degrees WGS84', LATITUDE),
  column('sourceLon', 'source_lon', 'degrees', 'geographic', 'source longitude in decimal degrees WGS84', LONGITUDE),
  column('receiverLat', 'receiver_lat', 'degrees', 'geographic', 'receiver latitude in decimal degrees WGS84', LATITUDE),
  column('receiverLon', 'receiver_lon', 'degrees', 'geographic', 'receiver longitude in decimal degrees WGS84', LONGITUDE),
  column('time', 'time', 'time', 'required', 'first-arrival time after the shot instant', atLeast(0, true, 'time-negative')),
  column('sigma', 'sigma', 'time', 'optional', 'pick uncertainty as one standard deviation', atLeast(0, false, 'sigma-not-positive')),
  column('branch', 'branch', 'branch', 'optional', 'user-assigned branch (1 = direct wave, 2 = first refractor, ...; empty = automatic; x = pick excluded)'),
  column('sourceElevation', 'source_elev', 'length', 'optional', 'ground elevation at the source'),
  column('receiverElevation', 'receiver_elev', 'length', 'optional', 'ground elevation at the receiver'),
  column('sourceDepth', 'source_depth', 'length', 'optional', 'shot depth below ground (shot holes)', atLeast(0, true, 'source-depth-negative')),
  column('uphole', 'uphole', 'time', 'optional', 'uphole time of a buried shot', atLeast(0, true, 'uphole-negative')),
];

/** How a header name was understood. */
export type ColumnIdentity =
  | { readonly status: 'known'; readonly column: PickTableColumn; readonly unit: string | null; readonly scale: DecimalScale }
  /** A known stem with a suffix that is not one of its units (`time_us`, `source_lat_deg`). */
  | { readonly status: 'unit-unknown'; readonly column: PickTableColumn; readonly suffix: string }
  /** A stem that needs a unit given without one (`time`, `source_x`). */
  | { readonly status: 'unit-missing'; readonly column: PickTableColumn }
  | { readonly status: 'unknown' };

const UNIT_SIZES: Readonly<Record<string, number>> = { ...LENGTH_UNITS, ...TIME_UNITS };

const BY_NAME = new Map<string, ColumnIdentity>();
const BY_STEM = new Map<string, PickTableColumn>();
for (const entry of PICK_TABLE_COLUMNS) {
  BY_STEM.set(entry.stem, entry);
  const suffixes = unitSuffixes(entry.kind);
  if (suffixes.length === 0) BY_NAME.set(entry.stem, { status: 'known', column: entry, unit: null, scale: UNIT_SCALE });
  for (const suffix of suffixes) {
    const size = UNIT_SIZES[suffix];
    if (size === undefined) throw new Error(`columns: unit ${suffix} has no size in lib/units.ts`);
    BY_NAME.set(`${entry.stem}_${suffix}`, { status: 'known', column: entry, unit: suffix, scale: decimalScale(size) });
  }
}

/**
 * Identify one header name (`identifyColumn(' Time_MS ')` is the time column in ms).
 *
 * Edges: the name is trimmed and lower-cased first; a known stem with a wrong suffix is
 * `unit-unknown` (the suffix is whatever follows the last underscore), a unit-carrying stem alone
 * is `unit-missing`; anything else, including the empty name, is `unknown`.
 */
export function identifyColumn(headerName: string): ColumnIdentity {
  const name = headerName.trim().toLowerCase();
  const known = BY_NAME.get(name);
  if (known !== undefined) return known;
  const bare = BY_STEM.get(name);
  if (bare !== undefined) return { status: 'unit-missing', column: bare };
  const underscore = name.lastIndexOf('_');
  const stemmed = underscore > 0 ? BY_STEM.get(name.slice(0, underscore)) : undefined;
  if (stemmed !== undefined) return { status: 'unit-unknown', column: stemmed, suffix: name.slice(underscore + 1) };
  return { status: 'unknown' };
}

/** The header name of `quantity` in `unit` (or the bare stem for a quantity without units). */
export function columnName(quantity: PickTableQuantity, unit: string | null = null): string {
  const entry = PICK_TABLE_COLUMNS.find((candidate) => candidate.quantity === quantity);
  if (entry === undefined) throw new RangeError(`columnName: no pick-table column fills ${quantity}`);
  const name = unit === null ? entry.stem : `${entry.stem}_${unit}`;
  if (!entry.names.includes(name)) {
    throw new RangeError(`columnName: ${quantity} is written as ${entry.names.join(' or ')}, not ${name}`);
  }
  return name;
}
