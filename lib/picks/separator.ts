/**
 * The field separator a header line was written with, when it is not the comma.
 *
 * Spreadsheet programs in locales whose decimal mark is a comma save "CSV" with semicolons
 * between fields (and decimal commas inside them), and copying cells out of a spreadsheet gives
 * tab-separated text (common practice). Read as comma-separated, such a header is one long
 * unknown column name and every row one field, which yields a handful of problems that all miss
 * the point; the reader asks this sniffer first and reports the one real cause instead.
 */
import { identifyColumn } from './columns.js';

/** A separator other than the comma, and its plural for a message. */
export interface ForeignSeparator {
  readonly separator: ';' | '\t';
  /** "semicolons" or "tabs". */
  readonly name: string;
}

const CANDIDATES: readonly ForeignSeparator[] = [
  { separator: ';', name: 'semicolons' },
  { separator: '\t', name: 'tabs' },
];

/** A header name as written, without the whitespace and double quotes around it. */
function bareName(text: string): string {
  const trimmed = text.trim();
  return trimmed.length >= 2 && trimmed.startsWith('"') && trimmed.endsWith('"') ? trimmed.slice(1, -1) : trimmed;
}

/** How many names between `separator`s in `header` are pick-table columns (in any unit, right or wrong). */
function knownNames(header: string, separator: string): number {
  let known = 0;
  for (const name of header.split(separator)) {
    if (identifyColumn(bareName(name)).status !== 'unknown') known += 1;
  }
  return known;
}

/**
 * The separator of a header line that holds no comma but has at least two pick-table column
 * names (`time_ms`, `shot`, even `time` without its unit) between semicolons or between tabs; null
 * for any other line.
 *
 * Edges: a line with a comma anywhere is comma-separated (null), even when it also holds
 * semicolons or tabs; names may be padded with whitespace or enclosed in double quotes; when
 * both separators would qualify, the one that separates more known names wins, semicolons on a
 * tie; a single known name (`shot;notes`) is not enough to say the table is not comma-separated.
 *
 * @example sniffForeignSeparator('shot;source_x_m;receiver_x_m;time_ms') // { separator: ';', name: 'semicolons' }
 * @example sniffForeignSeparator('shot,source_x_m,receiver_x_m,time_ms') // null
 */
export function sniffForeignSeparator(header: string): ForeignSeparator | null {
  if (header.includes(',')) return null;
  let best: ForeignSeparator | null = null;
  let bestKnown = 1;
  for (const candidate of CANDIDATES) {
    const known = header.includes(candidate.separator) ? knownNames(header, candidate.separator) : 0;
    if (known > bestKnown) {
      best = candidate;
      bestKnown = known;
    }
  }
  return best;
}
