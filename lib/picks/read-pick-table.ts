/**
 * The pick-table reader: a CSV table of first-arrival picks in, a pick set in SI units out, or
 * every problem that refuses it.
 */
import type { Outcome } from '../problems.js';
import { countQuotes, splitCsvLine, type CsvLineFault } from './csv-line.js';
import { readHeader, type HeaderColumn, type HeaderLayout } from './header.js';
import { checkInputSize, decodeInputText } from './input-text.js';
import { LineScanner } from './lines.js';
import { readDecimal, writeDecimal, type NumberFault } from './numbers.js';
import type { MagnitudeLimit, PickTableQuantity } from './columns.js';
import type { PickTableProblemCode } from './problem-codes.js';
import { counted, ProblemList, quoted, type ProblemPlace } from './problem-list.js';
import { sniffForeignSeparator } from './separator.js';
import type { CoordinateSystem, Pick, PickSet } from './types.js';

export interface ReadPickTableOptions {
  /** Largest input accepted, in bytes (UTF-8 bytes for a text); default 256 MiB. */
  readonly maxBytes?: number;
  /** Most problems listed before one closing entry counts the rest; default 200. */
  readonly maxProblems?: number;
}

/** Default size limit: 256 MiB holds several million picks (about 30 bytes a row). */
export const DEFAULT_MAX_BYTES = 256 * 2 ** 20;
/** Default problem cap: enough to see every kind of fault, short enough to read. */
export const DEFAULT_MAX_PROBLEMS = 200;
/** A shot needs three picks to fit even one straight branch (common practice). */
export const MIN_PICKS_PER_SHOT = 3;
/**
 * A quoted field that closes within this many following lines is reported as one field spanning
 * lines (and those lines are skipped); one that does not close so soon is reported as unclosed
 * and the following lines are read as rows. Real embedded line breaks are a remark or two long.
 */
const MAX_SPANNED_LINES = 10;

type PickDraft = { -readonly [Key in keyof Pick]: Pick[Key] };

function emptyDraft(line: number): PickDraft {
  return {
    shot: '', receiver: null, sourceX: 0, receiverX: 0, time: 0, sigma: null, branch: null, excluded: false,
    sourceElevation: null, receiverElevation: null, sourceDepth: null, uphole: null,
    sourceLat: null, sourceLon: null, receiverLat: null, receiverLon: null, line,
  };
}

const NUMBER_FAULTS: Readonly<Record<Exclude<NumberFault, 'empty'>, { code: PickTableProblemCode; cause: string; fix: string }>> = {
  syntax: {
    code: 'number-invalid',
    cause: 'is not a number',
    fix: 'write a plain decimal such as 12.5 or 1.25e3 (point as decimal mark, no units, no thousands separators)',
  },
  'not-finite': {
    code: 'number-not-finite',
    cause: 'is not a finite number',
    fix: 'enter the measured value, or delete the row when there is none',
  },
  overflow: {
    code: 'number-too-large',
    cause: 'is too large: beyond 1.8e308 in SI units',
    fix: 'check the value and the unit in the column name',
  },
};

/** Fix for a value outside its column's range, by problem code. */
const RANGE_FIXES: Readonly<Partial<Record<PickTableProblemCode, string>>> = {
  'time-negative': 'times count from the shot instant: check the pick and the time-zero (trigger) correction',
  'sigma-not-positive': 'give the pick uncertainty as a positive standard deviation, or leave the cell empty',
  'source-depth-negative': 'give the shot depth below ground as a positive number (0 for a surface shot)',
  'uphole-negative': 'give the uphole time as 0 or more, or leave the cell empty',
  'latitude-out-of-range': 'check that latitude and longitude are not swapped and are in decimal degrees',
  'longitude-out-of-range': 'check that latitude and longitude are not swapped and are in decimal degrees',
};

/** Where a problem is: the cell of `column` on `line`, or the whole line when there is no column. */
function cellPlace(line: number, cell: HeaderColumn | undefined): ProblemPlace {
  return cell === undefined ? { line, column: null } : { line, column: cell.position, field: cell.name };
}

/**
 * Read one cell into the draft; false after reporting a problem with it.
 * Empty cells of optional columns leave the draft's null; empty required cells are errors.
 */
function readCell(text: string, cell: HeaderColumn, draft: PickDraft, problems: ProblemList): boolean {
  const { column } = cell;
  const line = draft.line;
  if (text === '') {
    if (column.need === 'optional') return true;
    problems.error(
      'cell-empty',
      cellPlace(line, cell),
      `the ${column.meaning} (${quoted(cell.name)}) is empty`,
      'fill the cell, or delete the row',
    );
    return false;
  }
  if (column.kind === 'text') {
    if (column.quantity === 'shot') draft.shot = text;
    else draft.receiver = text;
    return true;
  }
  if (column.kind === 'branch') return readBranch(text, cell, draft, problems);
  const reading = readDecimal(text, cell.scale);
  if (!reading.ok) {
    const fault = NUMBER_FAULTS[reading.fault === 'empty' ? 'syntax' : reading.fault];
    problems.error(fault.code, cellPlace(line, cell), `${cell.name} ${quoted(text)} ${fault.cause}`, fault.fix);
    return false;
  }
  const value = reading.value;
  const range = column.range;
  if (range !== null) {
    const aboveLowest = range.lowestIncluded ? value >= range.lowest : value > range.lowest;
    const belowHighest = range.highestIncluded ? value <= range.highest : value < range.highest;
    if (!aboveLowest || !belowHighest) {
      problems.error(
        range.code,
        cellPlace(line, cell),
        `${cell.name} ${quoted(text)}: the ${column.meaning} ${range.rule}`,
        RANGE_FIXES[range.code] ?? 'correct the value',
      );
      return false;
    }
  }
  if (column.limit !== null && Math.abs(value) > column.limit.largest) {
    reportImplausible(text, cell, column.limit, line, problems);
    return false;
  }
  const quantity = column.quantity;
  if (quantity === 'shot' || quantity === 'receiver' || quantity === 'branch') {
    throw new Error(`readCell: column ${column.stem} has no numeric pick field`);
  }
  draft[quantity] = value;
  return true;
}

/**
 * Report a value beyond its column's magnitude limit, giving the limit in the column's unit (and
 * in SI when the unit is another): "at most 100000000 ms (1e5 s)".
 */
function reportImplausible(text: string, cell: HeaderColumn, limit: MagnitudeLimit, line: number, problems: ProblemList): void {
  const { column, scale, unit } = cell;
  const siUnit = column.kind === 'time' ? 's' : 'm';
  // A power-of-ten unit shows the limit exactly; the foot shows it to four digits.
  const exact = scale.coefficient === 1n;
  const inUnit = exact ? writeDecimal(limit.largest, scale) : writeDecimal(Number((limit.largest / scale.size).toPrecision(4)));
  const inSI = `${limit.largest.toExponential().replace('e+', 'e')} ${siUnit}`;
  const shown = unit === null || unit === siUnit ? inSI : `${inUnit} ${unit} (${inSI})`;
  const about = exact ? '' : 'about ';
  const bound = column.kind === 'time' ? `must be at most ${about}${shown}` : `must lie within ${about}±${shown}`;
  problems.error(
    limit.code,
    cellPlace(line, cell),
    `${cell.name} ${quoted(text)}: the ${column.meaning} ${bound}, a limit ${limit.reason}`,
    `check the value and the column's unit (${unit ?? siUnit}): a value this large is usually in another unit or has a mistyped exponent`,
  );
}

/** A branch cell: a positive whole number (digits only), or x/X for an excluded pick. */
function readBranch(text: string, cell: HeaderColumn, draft: PickDraft, problems: ProblemList): boolean {
  if (text === 'x' || text === 'X') {
    draft.excluded = true;
    return true;
  }
  let digitsOnly = text.length > 0;
  for (let index = 0; index < text.length && digitsOnly; index += 1) {
    const code = text.charCodeAt(index);
    digitsOnly = code >= 0x30 && code <= 0x39;
  }
  const branch = digitsOnly ? Number(text) : Number.NaN;
  if (!Number.isSafeInteger(branch) || branch < 1) {
    problems.error(
      'branch-invalid',
      cellPlace(draft.line, cell),
      `branch ${quoted(text)} is not a branch number: it must be a whole number 1 or more (1 = direct wave, 2 = first refractor, ...), x, or empty`,
      'write the branch number, x to exclude the pick, or leave the cell empty to let slopebreak assign it',
    );
    return false;
  }
  draft.branch = branch;
  return true;
}

/** True for a line holding nothing but whitespace (as `String.prototype.trim` counts it). */
function isBlank(line: string): boolean {
  if (line.length === 0) return true;
  const first = line.charCodeAt(0);
  // A line that starts with a visible ASCII character is not blank: data rows skip the trim.
  return (first <= 0x20 || first >= 0x80) && line.trim() === '';
}

/** True for a line whose first non-blank character is `#`. */
function isComment(line: string): boolean {
  return line.startsWith('#') || line.trimStart().startsWith('#');
}

/**
 * Report a quoting fault on `line`; for a field that closes a few lines below, skip those lines.
 */
function reportQuoteFault(fault: CsvLineFault, line: number, lines: LineScanner, problems: ProblemList): void {
  const place = { line, column: fault.column };
  if (fault.kind === 'quote-stray') {
    problems.error(
      'quote-stray',
      place,
      `field ${fault.column} has a double quote inside unquoted text, or text after its closing quote`,
      'enclose the whole field in double quotes and double every quote inside it ("" for ")',
    );
    return;
  }
  const ahead = lines.fork();
  for (let step = 0; step < MAX_SPANNED_LINES; step += 1) {
    const next = ahead.next();
    if (next === null) break;
    if (countQuotes(next) % 2 === 1) {
      problems.error(
        'quote-spans-lines',
        place,
        `the quoted field in column ${fault.column} opens on this line and closes on line ${ahead.lineNumber}: a pick-table field may not hold a line break`,
        `join lines ${line} to ${ahead.lineNumber} into one line, removing the line break from the quoted text`,
      );
      while (lines.lineNumber < ahead.lineNumber) lines.next();
      return;
    }
  }
  problems.error(
    'quote-unclosed',
    place,
    `the quoted field in column ${fault.column} is never closed`,
    'add the closing double quote, or remove the opening one',
  );
}

/** Lines of a shot's picks so far, by receiver id and (for rows without one) by position. */
interface ShotReceivers {
  readonly byId: Map<string, number>;
  readonly byPosition: Map<string | number, number>;
}

/** The rows attributed to one shot: how many, and the first few lines (for the message). */
interface ShotRows {
  count: number;
  readonly lines: number[];
}

/**
 * Record the pick's receiver among its shot's; the line of an earlier pick of the same receiver
 * (same id, or for a row without id the same position), or undefined for the first.
 */
function recordReceiver(seen: ShotReceivers, pick: Pick, system: CoordinateSystem): number | undefined {
  if (pick.receiver !== null) {
    const earlier = seen.byId.get(pick.receiver);
    if (earlier === undefined) seen.byId.set(pick.receiver, pick.line);
    return earlier;
  }
  const position = system === 'geographic' ? `${pick.receiverLat} ${pick.receiverLon}` : pick.receiverX;
  const earlier = seen.byPosition.get(position);
  if (earlier === undefined) seen.byPosition.set(position, pick.line);
  return earlier;
}

/** Source values every row of one shot must share. */
const SOURCE_FIELDS = {
  line: ['sourceX', 'sourceElevation', 'sourceDepth', 'uphole'],
  geographic: ['sourceLat', 'sourceLon', 'sourceElevation', 'sourceDepth', 'uphole'],
} as const;

/**
 * Checks across rows: duplicate picks (the same shot, receiver and branch: a receiver may hold a
 * later arrival under another branch number), shots with too few picks, shots with two sources.
 * `shotRows` holds every row attributed to each shot, including refused rows.
 */
function checkAcrossRows(picks: readonly Pick[], shotRows: ReadonlyMap<string, ShotRows>, header: HeaderLayout, problems: ProblemList): void {
  const receiverLines = new Map<string, ShotReceivers>();
  const firstOfShot = new Map<string, Pick>();
  const receiverCell = header.byQuantity.get('receiver');
  for (const pick of picks) {
    // A receiver may carry one pick per branch: a later arrival (e.g. a masked layer's head wave)
    // supplied with its own branch number is not a duplicate of the first arrival.
    const phase = pick.excluded ? 'excluded' : pick.branch === null ? 'automatic' : `branch ${pick.branch}`;
    const key = `${pick.shot}\u0000${phase}`;
    let seen = receiverLines.get(key);
    if (seen === undefined) {
      seen = { byId: new Map(), byPosition: new Map() };
      receiverLines.set(key, seen);
    }
    const earlier = recordReceiver(seen, pick, header.coordinateSystem);
    if (earlier !== undefined) {
      const receiver = pick.receiver !== null ? `receiver ${quoted(pick.receiver)}` : `the receiver at ${describeReceiver(pick, header)}`;
      problems.error(
        'pick-duplicate',
        cellPlace(pick.line, pick.receiver !== null ? receiverCell : undefined),
        `shot ${quoted(pick.shot)}, ${receiver} is picked twice${pick.branch === null ? '' : ` for branch ${pick.branch}`}, on lines ${earlier} and ${pick.line}`,
        'delete one of the two rows or correct its receiver; a later arrival on purpose needs its own number in the branch column',
      );
    }
    const first = firstOfShot.get(pick.shot);
    if (first === undefined) {
      firstOfShot.set(pick.shot, pick);
      continue;
    }
    for (const quantity of SOURCE_FIELDS[header.coordinateSystem]) {
      if (first[quantity] === pick[quantity]) continue;
      const cell = header.byQuantity.get(quantity);
      const shown = (value: number | null): string => (value === null || cell === undefined ? 'empty' : writeDecimal(value, cell.scale));
      problems.error(
        'shot-source-inconsistent',
        cellPlace(pick.line, cell),
        `shot ${quoted(pick.shot)} has ${cell?.name ?? quantity} ${shown(first[quantity])} on line ${first.line} but ${shown(pick[quantity])} on line ${pick.line}: a shot has one source`,
        'give every row of the shot the same source values, or give a second shot at another place its own shot id',
      );
    }
  }
  for (const [shot, { count: rowCount, lines }] of shotRows) {
    if (rowCount >= MIN_PICKS_PER_SHOT) continue;
    const first = lines[0] ?? header.line;
    const count = lines.length === 1 ? 'one pick' : counted(lines.length, 'pick');
    problems.error(
      'shot-too-few-picks',
      { line: first, column: null },
      `shot ${quoted(shot)} has only ${count} (${lines.length === 1 ? 'line' : 'lines'} ${lines.join(', ')}): a shot needs at least ${MIN_PICKS_PER_SHOT}, across both sides`,
      'add the missing picks, or delete the shot\'s rows',
    );
  }
}

function describeReceiver(pick: Pick, header: HeaderLayout): string {
  if (header.coordinateSystem === 'geographic') return `latitude ${pick.receiverLat}, longitude ${pick.receiverLon}`;
  const cell = header.byQuantity.get('receiverX');
  return cell === undefined ? `${pick.receiverX} m` : `${cell.name} ${writeDecimal(pick.receiverX, cell.scale)}`;
}

function positiveInteger(value: number | undefined, name: string, fallback: number): number {
  if (value === undefined) return fallback;
  if (!Number.isSafeInteger(value) || value < 1) {
    throw new RangeError(`readPickTable: options.${name} must be a whole number 1 or more, got ${value}`);
  }
  return value;
}

/**
 * Read a pick table (the CSV contract of DESIGN.md, columns in `PICK_TABLE_COLUMNS`) into a
 * pick set in SI units (m, s), or refuse it whole with every problem found.
 *
 * The input is UTF-8 text or its bytes. Blank lines and lines whose first non-blank character is
 * `#` may precede the header; the first other line is the header; every later non-blank line is a
 * data row. Cells are split by RFC 4180 quoting (Shafranovich 2005) without line breaks inside
 * quotes; numbers are strict decimals converted exactly (see numbers.ts); units come from the
 * column names. Geographic tables set `sourceX` and `receiverX` to 0 (a later stage measures
 * geodesic distances) and `coordinateSystem` to `geographic`.
 *
 * Edges, each a problem with a stable code (see `PICK_TABLE_PROBLEM_CODES`):
 * - an input over `maxBytes` gets one `input-too-large` and is not decoded;
 * - invalid UTF-8 stops the reading after one `encoding-invalid` per line;
 * - a header with no comma but pick-table names between semicolons or tabs (see
 *   `sniffForeignSeparator`) gets one `separator-not-comma` on the header's line, and nothing
 *   else is read;
 * - a header with errors still has its rows checked cell by cell, but no checks across rows run;
 * - a header with bad quoting ends the reading; a row with a wrong field count or bad quoting is
 *   not read further; one trailing empty field (a trailing comma) is tolerated on any row, the
 *   header included;
 * - a time, uncertainty or uphole time above `LATEST_TIME_SECONDS` (1e5 s) is `time-implausible`,
 *   a position, elevation or depth beyond ±`LARGEST_LENGTH_METRES` (4.1e7 m) `length-implausible`
 *   (the limits themselves are accepted; a value below its column's lowest is reported as such
 *   first);
 * - blank lines below the header are skipped, `#` lines there are errors;
 * - across rows (for rows without errors): a receiver picked twice for one shot (by receiver id
 *   when given, else by position), a shot with fewer than three rows in all, and a shot whose rows
 *   disagree on its source position, elevation, depth or uphole time (an empty cell counts as a
 *   value that differs from a filled one).
 * Problems come sorted by line, then column (a whole-line problem after the cells of its line;
 * problems at one place in the order found), and the `maxProblems` cap keeps those that sort
 * first. Warnings (unknown columns) let the table load; a refusal lists them among its errors,
 * since an unknown column is often a misspelt required one (`tme_ms` beside "no time column"). Misuse — an input that is neither a string nor a
 * Uint8Array, or an option that is not a whole number ≥ 1 — throws a TypeError or RangeError.
 *
 * @example
 * const outcome = readPickTable('shot,source_x_m,receiver_x_m,time_ms\nS1,0,10,25\nS1,0,30,38.1149\nS1,0,60,48.1292\n');
 * // outcome.ok === true; outcome.value.picks[1].time === 0.0381149 (seconds)
 */
export function readPickTable(input: string | Uint8Array, options: ReadPickTableOptions = {}): Outcome<PickSet> {
  if (typeof input !== 'string' && !(input instanceof Uint8Array)) {
    throw new TypeError(`readPickTable: the input must be a string or a Uint8Array, got ${input === null ? 'null' : typeof input}`);
  }
  const maxBytes = positiveInteger(options.maxBytes, 'maxBytes', DEFAULT_MAX_BYTES);
  const problems = new ProblemList(positiveInteger(options.maxProblems, 'maxProblems', DEFAULT_MAX_PROBLEMS));
  const refused = (): Outcome<PickSet> => ({ ok: false, problems: problems.problems() });

  checkInputSize(input, maxBytes, problems);
  if (problems.hasErrors) return refused();
  const text = decodeInputText(input, problems);
  if (text === null) return refused();

  const lines = new LineScanner(text);
  const headerText = findHeader(lines, problems);
  if (headerText === null) return refused();
  const foreign = sniffForeignSeparator(headerText);
  if (foreign !== null) {
    problems.error(
      'separator-not-comma',
      { line: lines.lineNumber, column: null },
      `the table is separated by ${foreign.name}; slopebreak reads comma-separated values`,
      'save it as CSV with commas (decimal points, not commas)',
    );
    return refused();
  }
  const headerFields = splitCsvLine(headerText);
  if (headerFields.fault !== null) {
    reportQuoteFault(headerFields.fault, lines.lineNumber, lines, problems);
    return refused();
  }
  const header = readHeader(headerFields.fields, lines.lineNumber, problems);
  const { picks, shotRows } = readRows(lines, header, problems);
  if (!header.usable) return refused();
  checkAcrossRows(picks, shotRows, header, problems);
  if (problems.hasErrors) return refused();
  return { ok: true, value: pickSet(picks, header), warnings: problems.warnings() };
}

/** Skip blank and comment lines; the header line's text, or null after reporting its absence. */
function findHeader(lines: LineScanner, problems: ProblemList): string | null {
  let sawComment = false;
  for (let current = lines.next(); current !== null; current = lines.next()) {
    if (isBlank(current)) continue;
    if (!isComment(current)) return current;
    sawComment = true;
  }
  const example = 'a header row (e.g. shot,source_x_m,receiver_x_m,time_ms)';
  if (sawComment) {
    problems.error(
      'table-only-comments',
      { line: 1, column: null },
      'the pick table holds only comment lines (starting with #): it has no header row and no picks',
      `add ${example} below the comments, and one row per pick`,
    );
  } else {
    problems.error(
      'table-empty',
      { line: 1, column: null },
      'the pick table is empty: it holds no text, or only blank lines',
      `give ${example} and one row per pick`,
    );
  }
  return null;
}

/** Count a row toward its shot (when its shot cell can be read, even if the row is refused). */
function tallyShot(shotRows: Map<string, ShotRows>, shot: string | undefined, line: number): void {
  if (shot === undefined || shot === '') return;
  const rows = shotRows.get(shot);
  if (rows === undefined) {
    shotRows.set(shot, { count: 1, lines: [line] });
  } else {
    rows.count += 1;
    if (rows.lines.length < MIN_PICKS_PER_SHOT) rows.lines.push(line);
  }
}

/**
 * Read every line below the header: the picks of rows without problems (none when the header is
 * unusable) and the rows attributed to each shot.
 */
function readRows(lines: LineScanner, header: HeaderLayout, problems: ProblemList): { picks: Pick[]; shotRows: Map<string, ShotRows> } {
  const picks: Pick[] = [];
  const shotRows = new Map<string, ShotRows>();
  const shotIndex = (header.byQuantity.get('shot')?.position ?? 0) - 1;
  let dataRows = 0;
  for (let current = lines.next(); current !== null; current = lines.next()) {
    if (isBlank(current)) continue;
    const line = lines.lineNumber;
    if (isComment(current)) {
      problems.error(
        'comment-after-header',
        { line, column: null },
        'a line starting with # below the header: comments are allowed only above the header row',
        'move the comment above the header; to leave a pick out, write x in its branch column; a shot id that starts with # must be quoted',
      );
      continue;
    }
    dataRows += 1;
    const row = splitCsvLine(current);
    const width = header.width;
    const fields = row.fields.length === width + 1 && row.fields[width] === '' ? row.fields.slice(0, width) : row.fields;
    tallyShot(shotRows, fields[shotIndex], line);
    if (row.fault !== null) {
      reportQuoteFault(row.fault, line, lines, problems);
      continue;
    }
    if (fields.length !== width) {
      problems.error(
        'row-field-count',
        { line, column: null },
        `the row has ${counted(fields.length, 'field')} but the header (line ${header.line}) has ${counted(width, 'column')}`,
        'give every row one field per header column; quote a value that holds a comma',
      );
      continue;
    }
    const draft = emptyDraft(line);
    let rowOk = true;
    for (let index = 0; index < width; index += 1) {
      const cell = header.cells[index];
      if (cell !== null && cell !== undefined && !readCell(fields[index] ?? '', cell, draft, problems)) rowOk = false;
    }
    if (rowOk && header.usable) picks.push(draft);
  }
  if (dataRows === 0) {
    problems.error(
      'table-no-data',
      { line: header.line, column: null },
      'the pick table has a header row but no data rows',
      'add one row per pick below the header',
    );
  }
  return { picks, shotRows };
}

function pickSet(picks: readonly Pick[], header: HeaderLayout): PickSet {
  const shotIds: string[] = [];
  const seen = new Set<string>();
  for (const pick of picks) {
    if (seen.has(pick.shot)) continue;
    seen.add(pick.shot);
    shotIds.push(pick.shot);
  }
  const has = (quantity: PickTableQuantity): boolean => header.byQuantity.has(quantity);
  return {
    picks,
    shotIds,
    coordinateSystem: header.coordinateSystem,
    columns: {
      receiver: has('receiver'),
      sigma: has('sigma'),
      branch: has('branch'),
      sourceElevation: has('sourceElevation'),
      receiverElevation: has('receiverElevation'),
      sourceDepth: has('sourceDepth'),
      uphole: has('uphole'),
    },
    suggestedScale: header.suggestedScale,
  };
}
