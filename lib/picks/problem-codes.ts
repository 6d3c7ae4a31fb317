/**
 * The registry of pick-table problem codes. A code is a stable name for one kind of fault in a
 * pick table: scripts and the web client key on it, so a code is never renamed or removed once
 * released (adding one is fine). The text here documents the code; each problem's own message
 * names the row, the cell and the cause.
 */
export const PICK_TABLE_PROBLEM_CODES = {
  // --- the input as a whole
  'input-too-large': 'The input is larger than the size limit (maxBytes, 256 MiB by default); nothing was parsed.',
  'encoding-invalid': 'The bytes are not valid UTF-8 (or a text holds a lone UTF-16 surrogate).',
  'table-empty': 'The input holds no text at all, or only blank lines.',
  'table-only-comments': 'The input holds comment lines but no header row.',
  'table-no-data': 'The input has a header row but no data rows below it.',
  'problems-truncated': 'More problems were found than the list may hold (maxProblems); this entry counts the rest.',
  // --- quoting
  'quote-spans-lines': 'A quoted field runs over a line break; a pick-table field must fit on one line.',
  'quote-unclosed': 'A quoted field is never closed.',
  'quote-stray': 'A double quote inside an unquoted field, or text after a closing quote.',
  // --- the header row
  'separator-not-comma': 'The header is separated by semicolons or tabs, not commas (a spreadsheet saved the table with a locale list separator); nothing else is checked.',
  'header-name-empty': 'A header cell is empty, so its column has no name.',
  'column-unknown': 'A column the pick table does not define; it is ignored (warning).',
  'column-unit-unknown': 'A known quantity with a unit suffix the pick table does not accept (e.g. time_us).',
  'column-unit-missing': 'A known quantity without the unit suffix its name must carry (e.g. time).',
  'column-duplicate': 'The same quantity appears in two columns (possibly in two units).',
  'column-missing': 'A required column is absent.',
  'coordinates-mixed': 'Positions are given both along the line (_x) and as latitude/longitude.',
  'coordinates-incomplete': 'A latitude column without its longitude, or the reverse.',
  // --- rows and cells
  'comment-after-header': 'A line starting with # below the header; comments belong above it.',
  'row-field-count': 'A row has more or fewer fields than the header has columns.',
  'cell-empty': 'A required cell is empty.',
  'number-invalid': 'A numeric cell is not a plain decimal number.',
  'number-not-finite': 'A numeric cell spells NaN or infinity.',
  'number-too-large': 'A numeric cell is beyond the range of double-precision numbers in SI units.',
  'time-negative': 'A first-arrival time is negative.',
  'time-implausible': 'A time, pick uncertainty or uphole time above 1e5 s (more than a day): no refraction arrival comes so late, so the unit or the exponent is wrong.',
  'length-implausible': "A position, elevation or shot depth beyond ±4.1e7 m (larger than the Earth's circumference), so the unit or the exponent is wrong.",
  'sigma-not-positive': 'A pick uncertainty is zero or negative.',
  'source-depth-negative': 'A shot depth below ground is negative.',
  'uphole-negative': 'An uphole time is negative.',
  'latitude-out-of-range': 'A latitude outside −90 to 90 degrees.',
  'longitude-out-of-range': 'A longitude outside −180 (inclusive) to 360 (exclusive) degrees.',
  'branch-invalid': 'A branch cell that is neither a positive whole number, x, nor empty.',
  // --- across rows
  'pick-duplicate': 'Two rows pick the same receiver for the same shot and the same branch.',
  'shot-too-few-picks': 'A shot has fewer than three picks in all.',
  'shot-source-inconsistent': 'Rows of one shot give different source positions, elevations, depths or uphole times.',
} as const;

export type PickTableProblemCode = keyof typeof PICK_TABLE_PROBLEM_CODES;
