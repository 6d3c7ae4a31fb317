/**
 * Textual headers: EBCDIC (code page 037, as rev 1 requires) or ASCII (allowed from rev 2),
 * told apart by content.
 *
 * The EBCDIC table holds the printable characters of code page 037 [M for the table; the tests
 * check every entry against Python's `cp037` codec]. Bytes outside it decode as U+FFFD, except
 * NUL, which decodes as a space (zero-filled headers are common and mean nothing).
 */
import { TEXTUAL_LINE_LENGTH } from './layout.js';

export type TextualEncoding = 'ebcdic' | 'ascii';

const EBCDIC_RUNS: ReadonlyArray<readonly [number, string]> = [
  [0x40, ' '],
  [0x4a, '¢.<(+|&'],
  [0x5a, '!$*);¬-/'],
  [0x6a, '¦,%_>?'],
  [0x79, '`:#@\'="'],
  [0x81, 'abcdefghi'],
  [0x91, 'jklmnopqr'],
  [0xa1, '~stuvwxyz'],
  [0xb0, '^'],
  [0xba, '[]'],
  [0xc0, '{ABCDEFGHI'],
  [0xd0, '}JKLMNOPQR'],
  [0xe0, '\\'],
  [0xe2, 'STUVWXYZ'],
  [0xf0, '0123456789'],
];

/** EBCDIC (cp037) byte to character for the printable bytes; undefined elsewhere. */
export const EBCDIC_TO_CHARACTER: ReadonlyArray<string | undefined> = (() => {
  const table: Array<string | undefined> = new Array<string | undefined>(256).fill(undefined);
  for (const [start, characters] of EBCDIC_RUNS) {
    for (let index = 0; index < characters.length; index += 1) table[start + index] = characters[index];
  }
  return table;
})();

/**
 * Which encoding a textual header is in: the one in which more of its bytes are printable
 * characters. The two sets overlap (0x40 is the EBCDIC space and the ASCII `@`), but an EBCDIC
 * header's letters and digits (0xC1–0xF9) are not ASCII, and an ASCII header's spaces and digits
 * (0x20, 0x30–0x39) are not EBCDIC. A tie (e.g. all zeros) reads as EBCDIC, the rev 1 rule.
 */
export function sniffTextualEncoding(bytes: Uint8Array): TextualEncoding {
  let ascii = 0;
  let ebcdic = 0;
  for (const byte of bytes) {
    if (byte >= 0x20 && byte <= 0x7e) ascii += 1;
    if (EBCDIC_TO_CHARACTER[byte] !== undefined) ebcdic += 1;
  }
  return ascii > ebcdic ? 'ascii' : 'ebcdic';
}

/** Decode a textual header; one character per byte, so offsets in the text are byte offsets. */
export function decodeTextualHeader(bytes: Uint8Array, encoding: TextualEncoding): string {
  let text = '';
  for (const byte of bytes) {
    if (byte === 0) text += ' ';
    else if (encoding === 'ascii') text += byte < 0x80 ? String.fromCharCode(byte) : '\ufffd';
    else text += EBCDIC_TO_CHARACTER[byte] ?? '\ufffd';
  }
  return text;
}

/** A 3200-character header as its 40 lines of 80 characters, trailing blanks removed. */
export function textualLines(text: string): string[] {
  const lines: string[] = [];
  for (let start = 0; start < text.length; start += TEXTUAL_LINE_LENGTH) {
    lines.push(text.slice(start, start + TEXTUAL_LINE_LENGTH).trimEnd());
  }
  return lines;
}
