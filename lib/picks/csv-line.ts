/**
 * One line of comma-separated values, split into fields by the quoting rules of RFC 4180
 * (Shafranovich 2005), restricted as the pick-table contract requires.
 *
 * - Fields are separated by commas. A field may be enclosed in double quotes; inside quotes a
 *   comma is text and a doubled quote (`""`) is one quote character.
 * - Whitespace around a field (outside its quotes) is dropped, as spreadsheet exports often pad
 *   cells (common practice); whitespace inside quotes is kept.
 * - Unlike RFC 4180, a quoted field may not hold a line break: the caller splits the text into
 *   lines first, and a line that ends inside quotes is reported (`quote-unclosed`), never joined
 *   to the next one.
 * - A quote inside an unquoted field (`ab"c`) or text after a closing quote (`"ab"c`) is
 *   malformed in RFC 4180 and reported (`quote-stray`).
 *
 * The split scans characters with `indexOf`; no regular expression runs over the line, so the
 * cost is linear in its length whatever it holds.
 */

/** What is wrong with the quoting of a line, and in which field (1-based). */
export interface CsvLineFault {
  readonly kind: 'quote-unclosed' | 'quote-stray';
  readonly column: number;
}

export interface CsvLine {
  /** The fields, trimmed outside quotes, unquoted; up to the fault when there is one. */
  readonly fields: readonly string[];
  /** The quoting fault, or null for a well-formed line. */
  readonly fault: CsvLineFault | null;
}

const QUOTE = '"';
const COMMA = ',';
/** Same set as `String.prototype.trim` (ECMAScript WhiteSpace and LineTerminator). */
const WHITESPACE = /\s/;

function skipWhitespace(line: string, start: number): number {
  let index = start;
  while (index < line.length && WHITESPACE.test(line.charAt(index))) index += 1;
  return index;
}

/**
 * Split one line into fields.
 *
 * Edges: an empty line is one empty field; a trailing comma yields a final empty field (the
 * caller decides whether to tolerate it); on a fault the fields before the faulty one are
 * returned with it, and the rest of the line is not read.
 *
 * @example splitCsvLine(' S1 , "a, ""b""" ,3') // { fields: ['S1', 'a, "b"', '3'], fault: null }
 */
export function splitCsvLine(line: string): CsvLine {
  const fields: string[] = [];
  const hasQuotes = line.includes(QUOTE);
  let start = 0;
  for (let column = 1; ; column += 1) {
    const fieldStart = hasQuotes ? skipWhitespace(line, start) : start;
    if (hasQuotes && line.charAt(fieldStart) === QUOTE) {
      let text = '';
      let segmentStart = fieldStart + 1;
      let closing = line.indexOf(QUOTE, segmentStart);
      while (closing !== -1 && line.charAt(closing + 1) === QUOTE) {
        text += line.slice(segmentStart, closing + 1);
        segmentStart = closing + 2;
        closing = line.indexOf(QUOTE, segmentStart);
      }
      if (closing === -1) return { fields, fault: { kind: 'quote-unclosed', column } };
      fields.push(text + line.slice(segmentStart, closing));
      const after = skipWhitespace(line, closing + 1);
      if (after === line.length) return { fields, fault: null };
      if (line.charAt(after) !== COMMA) return { fields, fault: { kind: 'quote-stray', column } };
      start = after + 1;
    } else {
      const comma = line.indexOf(COMMA, start);
      const end = comma === -1 ? line.length : comma;
      const raw = line.slice(start, end);
      if (hasQuotes && raw.includes(QUOTE)) return { fields, fault: { kind: 'quote-stray', column } };
      fields.push(raw.trim());
      if (comma === -1) return { fields, fault: null };
      start = comma + 1;
    }
  }
}

/** Number of double-quote characters in `text` (a line's quote parity tells where a quoted field ends). */
export function countQuotes(text: string): number {
  let count = 0;
  for (let index = text.indexOf(QUOTE); index !== -1; index = text.indexOf(QUOTE, index + 1)) count += 1;
  return count;
}

/**
 * Write one field so that `splitCsvLine` reads it back unchanged: quoted (with inner quotes
 * doubled) when it holds a comma or quote, starts with `#`, is empty, or has whitespace at
 * either end; as it is otherwise.
 *
 * Edges: throws a RangeError for text holding a line break (CR or LF), which no field of the
 * contract can carry.
 *
 * @example quoteCsvField('a, "b"') // '"a, ""b"""'
 */
export function quoteCsvField(text: string): string {
  if (text.includes('\n') || text.includes('\r')) {
    throw new RangeError(`quoteCsvField: ${JSON.stringify(text)} holds a line break, which a pick-table field cannot carry`);
  }
  const needsQuotes =
    text.length === 0 || text.includes(COMMA) || text.includes(QUOTE) || text.startsWith('#') || text.trim() !== text;
  return needsQuotes ? `"${text.split(QUOTE).join('""')}"` : text;
}
