/**
 * Pick tables: reading, writing and the pieces they are made of.
 */

// --- the pick set (the contract between the reader and the interpretation)
export type { CoordinateSystem, Pick, PickColumns, PickSet } from './types.js';

// --- reading and writing a pick table
export { readPickTable, DEFAULT_MAX_BYTES, DEFAULT_MAX_PROBLEMS, MIN_PICKS_PER_SHOT, type ReadPickTableOptions } from './read-pick-table.js';
export { writePickTable, DEFAULT_PICK_TABLE_UNITS, type PickTableUnits } from './write-pick-table.js';
export { PICK_TABLE_PROBLEM_CODES, type PickTableProblemCode } from './problem-codes.js';

// --- the column table (for the README, the API docs and header checks)
export {
  PICK_TABLE_COLUMNS,
  LATEST_TIME_SECONDS,
  LARGEST_LENGTH_METRES,
  identifyColumn,
  columnName,
  type ColumnIdentity,
  type ColumnKind,
  type ColumnNeed,
  type PickTableColumn,
  type MagnitudeLimit,
  type PickTableQuantity,
  type ValueRange,
} from './columns.js';

// --- building blocks: CSV fields, the separator sniffer and strict decimals
export { sniffForeignSeparator, type ForeignSeparator } from './separator.js';
export { splitCsvLine, quoteCsvField, type CsvLine, type CsvLineFault } from './csv-line.js';
export { readDecimal, writeDecimal, decimalScale, UNIT_SCALE, type DecimalScale, type NumberFault, type NumberReading } from './numbers.js';
