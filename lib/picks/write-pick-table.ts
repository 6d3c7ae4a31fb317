/**
 * The pick-table writer: a pick set back to CSV in the pick-table contract, the inverse of
 * `readPickTable`.
 */
import type { LengthUnit, TimeUnit } from '../units.js';
import { columnName, identifyColumn, PICK_TABLE_COLUMNS, type PickTableColumn, type PickTableQuantity } from './columns.js';
import { quoteCsvField } from './csv-line.js';
import { writeDecimal, type DecimalScale } from './numbers.js';
import type { Pick, PickColumns, PickSet } from './types.js';

/** Units for the written columns. A `DisplayUnits` value (lib/units.ts) fits here too. */
export interface PickTableUnits {
  readonly distance: LengthUnit;
  readonly time: TimeUnit;
}

export const DEFAULT_PICK_TABLE_UNITS: PickTableUnits = { distance: 'm', time: 'ms' };

interface WrittenColumn {
  readonly column: PickTableColumn;
  readonly name: string;
  readonly scale: DecimalScale;
}

function writtenColumn(column: PickTableColumn, units: PickTableUnits): WrittenColumn {
  const unit = column.kind === 'length' ? units.distance : column.kind === 'time' ? units.time : null;
  const name = columnName(column.quantity, unit);
  const identity = identifyColumn(name);
  if (identity.status !== 'known') throw new Error(`writePickTable: ${name} is not a known column`);
  return { column, name, scale: identity.scale };
}

/** The optional columns that have a flag in `PickColumns`. */
const FLAGGED: Readonly<Record<keyof PickColumns, true>> = {
  receiver: true, sigma: true, branch: true, sourceElevation: true, receiverElevation: true, sourceDepth: true, uphole: true,
};

function isFlagged(quantity: PickTableQuantity): quantity is keyof PickColumns {
  return quantity in FLAGGED;
}

/** True when the pick set needs `column`: always for shot and time, by coordinates, or by content. */
function isWritten(column: PickTableColumn, pickSet: PickSet): boolean {
  const quantity = column.quantity;
  if (column.need === 'required') return true;
  if (column.need === 'line') return pickSet.coordinateSystem === 'line';
  if (column.need === 'geographic') return pickSet.coordinateSystem === 'geographic';
  if (quantity === 'branch') return pickSet.columns.branch || pickSet.picks.some((pick) => pick.branch !== null || pick.excluded);
  if (isFlagged(quantity) && pickSet.columns[quantity]) return true;
  return pickSet.picks.some((pick) => pick[quantity] !== null);
}

function cellText(pick: Pick, written: WrittenColumn): string {
  const quantity = written.column.quantity;
  if (quantity === 'shot' || quantity === 'receiver') {
    const text = pick[quantity];
    if (text === null) return '';
    if (text.trim() === '') {
      throw new RangeError(`writePickTable: the pick from line ${pick.line} has an empty ${quantity} id, which a pick table cannot carry`);
    }
    return quoteCsvField(text);
  }
  if (quantity === 'branch') return pick.excluded ? 'x' : pick.branch === null ? '' : String(pick.branch);
  const value = pick[quantity];
  if (value === null) return '';
  if (!Number.isFinite(value)) {
    throw new RangeError(`writePickTable: the pick from line ${pick.line} (shot ${pick.shot}) has ${quantity} ${value}; a pick table holds finite numbers only`);
  }
  return writeDecimal(value, written.scale);
}

/**
 * Write a pick set as a pick table: a header row, then one row per pick in order, LF line
 * endings, no comments. Columns follow `PICK_TABLE_COLUMNS`; positions and elevations are in
 * `units.distance`, times in `units.time` (metres and milliseconds by default).
 *
 * Reading the result gives the same picks, shot ids, coordinate system and column flags: every
 * value is identical in m, km, ms or s (see `writeDecimal`) and within a unit in the last place
 * in ft. `suggestedScale` survives when the units follow it (`DISPLAY_UNITS[pickSet.suggestedScale]`
 * from lib/units.ts), and `line` numbers become those of the written table.
 *
 * Edges: an optional column is written when its flag in `pickSet.columns` is set or any pick has
 * a value for it; an excluded pick is written as branch `x` (a branch number it also holds is
 * lost); geographic sets write latitude/longitude and no `_x` columns. An empty pick set gives a
 * header row alone, which the reader refuses (`table-no-data`). A shot or receiver id that is
 * blank or holds a line break, or a value that is not finite, is misuse: a RangeError.
 *
 * @example
 * writePickTable(set) // 'shot,source_x_m,receiver_x_m,time_ms\nS1,0,10,25\n...'
 */
export function writePickTable(pickSet: PickSet, units: PickTableUnits = DEFAULT_PICK_TABLE_UNITS): string {
  const columns = PICK_TABLE_COLUMNS.filter((column) => isWritten(column, pickSet)).map((column) => writtenColumn(column, units));
  const rows = [columns.map((written) => written.name).join(',')];
  for (const pick of pickSet.picks) rows.push(columns.map((written) => cellText(pick, written)).join(','));
  return `${rows.join('\n')}\n`;
}
