/**
 * The header row of a pick table: which column holds which quantity in which unit, whether
 * positions are along the line or geographic, and every problem with the names.
 */
import type { DisplayScale } from '../units.js';
import { identifyColumn, PICK_TABLE_COLUMNS, type PickTableColumn, type PickTableQuantity } from './columns.js';
import type { DecimalScale } from './numbers.js';
import { quoted, type ProblemList } from './problem-list.js';
import type { CoordinateSystem } from './types.js';

/** One recognised column of the header. */
export interface HeaderColumn {
  readonly column: PickTableColumn;
  /** 1-based field position. */
  readonly position: number;
  /** The name as written in the file (trimmed). */
  readonly name: string;
  readonly unit: string | null;
  readonly scale: DecimalScale;
}

export interface HeaderLayout {
  readonly line: number;
  /** Number of columns (a single trailing empty name from a trailing comma is not one). */
  readonly width: number;
  /** The recognised column at each position (index = position − 1), null for an ignored one. */
  readonly cells: readonly (HeaderColumn | null)[];
  /** The first column of each quantity present. */
  readonly byQuantity: ReadonlyMap<PickTableQuantity, HeaderColumn>;
  readonly coordinateSystem: CoordinateSystem;
  readonly suggestedScale: DisplayScale;
  /** False when the header itself has errors: rows are still checked, but no pick set is built. */
  readonly usable: boolean;
}

const HEADER_HINT = 'the first line that is neither blank nor a # comment is read as the header';

function columnOf(quantity: PickTableQuantity): PickTableColumn {
  const entry = PICK_TABLE_COLUMNS.find((candidate) => candidate.quantity === quantity);
  if (entry === undefined) throw new Error(`header: no column for ${quantity}`);
  return entry;
}

/** The accepted names of a quantity's column, for a message: "time_ms or time_s". */
function spellings(quantity: PickTableQuantity): string {
  const names = columnOf(quantity).names;
  return names.length === 1 ? names.join('') : `${names.slice(0, -1).join(', ')} or ${names.at(-1)}`;
}

/** "the header has no time column (first-arrival time after the shot instant)". */
function lacking(quantity: PickTableQuantity): string {
  const entry = columnOf(quantity);
  return `the header has no ${entry.stem} column (${entry.meaning})`;
}

/**
 * Read the header row's fields (already split and trimmed) found on `line`.
 *
 * Edges: one trailing empty name (a trailing comma) is dropped; any other empty name is an
 * error; unknown names are warnings and their columns are ignored; a second column of a quantity
 * already present (in any unit) is an error and the first one wins; when both `_x` and
 * latitude/longitude columns appear the layout is reported as `line` and refused.
 */
export function readHeader(fields: readonly string[], line: number, problems: ProblemList): HeaderLayout {
  const errorsBefore = problems.errors;
  const names = fields.length > 1 && fields[fields.length - 1] === '' ? fields.slice(0, -1) : fields;
  const cells: (HeaderColumn | null)[] = [];
  const byQuantity = new Map<PickTableQuantity, HeaderColumn>();
  /** Quantities whose column is present under a wrong name (not reported again as missing). */
  const misnamed = new Set<PickTableQuantity>();
  names.forEach((name, index) => {
    const position = index + 1;
    const place = { line, column: position, field: name };
    cells.push(null);
    if (name === '') {
      problems.error(
        'header-name-empty',
        place,
        `header column ${position} has no name`,
        `name the column (e.g. ${spellings('time')}) or delete the empty column from every row`,
      );
      return;
    }
    const identity = identifyColumn(name);
    if (identity.status === 'unknown') {
      problems.warning(
        'column-unknown',
        place,
        `column ${quoted(name)} is not a pick-table column and is ignored`,
        `if it holds a pick-table quantity, rename it to that column's name (e.g. ${spellings('time')}); otherwise leave it (it is ignored) or delete it`,
      );
      return;
    }
    if (identity.status === 'unit-missing') {
      misnamed.add(identity.column.quantity);
      problems.error(
        'column-unit-missing',
        place,
        `column ${quoted(name)} does not say its unit`,
        `name it ${spellings(identity.column.quantity)}`,
      );
      return;
    }
    if (identity.status === 'unit-unknown') {
      misnamed.add(identity.column.quantity);
      const accepted = spellings(identity.column.quantity);
      const cause = identity.column.names.length === 1 ? `${identity.column.stem} takes no unit suffix` : `the unit ${quoted(identity.suffix)} is not accepted`;
      problems.error(
        'column-unit-unknown',
        place,
        `column ${quoted(name)} (${identity.column.meaning}): ${cause}`,
        `name it ${accepted}, converting the values if needed`,
      );
      return;
    }
    const entry: HeaderColumn = { column: identity.column, position, name, unit: identity.unit, scale: identity.scale };
    cells[index] = entry;
    const earlier = byQuantity.get(identity.column.quantity);
    if (earlier !== undefined) {
      problems.error(
        'column-duplicate',
        place,
        `columns ${earlier.position} (${quoted(earlier.name)}) and ${position} (${quoted(name)}) both give the ${identity.column.meaning}`,
        'keep one of the two columns and delete the other',
      );
      return;
    }
    byQuantity.set(identity.column.quantity, entry);
  });

  const whole = { line, column: null };
  for (const quantity of ['shot', 'time'] as const) {
    if (!byQuantity.has(quantity) && !misnamed.has(quantity)) {
      problems.error(
        'column-missing',
        whole,
        lacking(quantity),
        `add a column named ${spellings(quantity)}; ${HEADER_HINT}`,
      );
    }
  }
  const coordinateSystem = checkPositions(byQuantity, misnamed, line, problems);
  const kilometres = (['sourceX', 'receiverX'] as const).some((quantity) => byQuantity.get(quantity)?.unit === 'km');
  return {
    line,
    width: names.length,
    cells,
    byQuantity,
    coordinateSystem,
    suggestedScale: coordinateSystem === 'geographic' || kilometres ? 'crustal' : 'engineering',
    usable: problems.errors === errorsBefore,
  };
}

/** The position columns: `_x` along the line, or latitude and longitude, complete and unmixed. */
function checkPositions(
  byQuantity: ReadonlyMap<PickTableQuantity, HeaderColumn>,
  misnamed: ReadonlySet<PickTableQuantity>,
  line: number,
  problems: ProblemList,
): CoordinateSystem {
  const whole = { line, column: null };
  const present = (quantities: readonly PickTableQuantity[]): HeaderColumn[] =>
    quantities.flatMap((quantity) => byQuantity.get(quantity) ?? []);
  const alongLine = present(['sourceX', 'receiverX']);
  const geographic = present(['sourceLat', 'sourceLon', 'receiverLat', 'receiverLon']);
  if (alongLine.length > 0 && geographic.length > 0) {
    const list = (columns: HeaderColumn[]): string => columns.map((entry) => quoted(entry.name)).join(', ');
    problems.error(
      'coordinates-mixed',
      whole,
      `positions are given both along the line (${list(alongLine)}) and as latitude/longitude (${list(geographic)})`,
      'give every position one way: source_x and receiver_x columns, or source_lat, source_lon, receiver_lat and receiver_lon',
    );
    return 'line';
  }
  if (geographic.length > 0) {
    for (const end of ['source', 'receiver'] as const) {
      const latitude = byQuantity.get(`${end}Lat`);
      const longitude = byQuantity.get(`${end}Lon`);
      const given = latitude ?? longitude;
      if (given === undefined && !misnamed.has(`${end}Lat`) && !misnamed.has(`${end}Lon`)) {
        problems.error(
          'column-missing',
          whole,
          `the header has no ${end} position: the table uses latitude/longitude, but has no ${end}_lat and ${end}_lon columns`,
          `add ${end}_lat and ${end}_lon columns (decimal degrees WGS84)`,
        );
      } else if (given !== undefined && (latitude === undefined || longitude === undefined)) {
        if (misnamed.has(latitude === undefined ? `${end}Lat` : `${end}Lon`)) continue;
        const partner = latitude === undefined ? `${end}_lat` : `${end}_lon`;
        problems.error(
          'coordinates-incomplete',
          { line, column: given.position, field: given.name },
          `column ${quoted(given.name)} has no partner ${partner}: a geographic position needs both latitude and longitude`,
          `add a ${partner} column, or give positions along the line instead`,
        );
      }
    }
    return 'geographic';
  }
  for (const quantity of ['sourceX', 'receiverX'] as const) {
    if (!byQuantity.has(quantity) && !misnamed.has(quantity)) {
      const end = quantity === 'sourceX' ? 'source' : 'receiver';
      problems.error(
        'column-missing',
        whole,
        lacking(quantity),
        `add a column named ${spellings(quantity)} (or give positions as ${end}_lat and ${end}_lon); ${HEADER_HINT}`,
      );
    }
  }
  return 'line';
}
