/**
 * From the raw input to text: the size limit, the byte-order mark, and UTF-8 validation
 * (RFC 3629, Yergeau 2003), with the line of every fault.
 */
import { countLineBreaks } from './lines.js';
import { quoted, type ProblemList } from './problem-list.js';

/** Group the digits of a byte count for a message: 268435456 → "268,435,456". */
function grouped(count: number): string {
  const digits = String(count);
  let text = '';
  for (let index = 0; index < digits.length; index += 1) {
    if (index > 0 && (digits.length - index) % 3 === 0) text += ',';
    text += digits.charAt(index);
  }
  return text;
}

/** Size in MiB for a message, one decimal. */
function mebibytes(count: number): string {
  return `${(count / 2 ** 20).toFixed(1)} MiB`;
}

/**
 * UTF-8 size of a text and the index of the first code unit that takes it past `limit`
 * (the text's length when it stays within). A lone surrogate counts 3 bytes, as U+FFFD would.
 */
function utf8Size(text: string, limit: number): { readonly bytes: number; readonly indexAtLimit: number } {
  let bytes = 0;
  let indexAtLimit = text.length;
  for (let index = 0; index < text.length; index += 1) {
    const code = text.charCodeAt(index);
    if (code < 0x80) bytes += 1;
    else if (code < 0x800) bytes += 2;
    else if (code >= 0xd800 && code <= 0xdbff && (text.charCodeAt(index + 1) & 0xfc00) === 0xdc00) {
      bytes += 4;
      index += 1;
    } else bytes += 3;
    if (bytes > limit && indexAtLimit === text.length) indexAtLimit = index;
  }
  return { bytes, indexAtLimit };
}

/**
 * Check the input against `maxBytes` before anything is decoded or split. A byte array is
 * measured by its length; a text by its UTF-8 size (a text of at most maxBytes / 3 code units
 * is under any limit and is not measured).
 *
 * Edges: at most one problem, `input-too-large`, on the line where the limit is reached (line 1
 * when the input has no line break before it).
 */
export function checkInputSize(input: string | Uint8Array, maxBytes: number, problems: ProblemList): void {
  let size: number;
  let limitIndex: number;
  if (typeof input === 'string') {
    if (input.length * 3 <= maxBytes) return;
    const measured = utf8Size(input, maxBytes);
    size = measured.bytes;
    limitIndex = measured.indexAtLimit;
  } else {
    size = input.length;
    limitIndex = maxBytes;
  }
  if (size <= maxBytes) return;
  const line = 1 + countLineBreaks(input, limitIndex);
  problems.error(
    'input-too-large',
    { line, column: null },
    `the pick table is ${grouped(size)} bytes (${mebibytes(size)}), over the limit of ${grouped(maxBytes)} ${maxBytes === 1 ? 'byte' : 'bytes'} (${mebibytes(maxBytes)}), which is reached on line ${line}; nothing was read`,
    'split the survey into several tables by shot, or raise the limit (maxBytes)',
  );
}

const BYTE_ORDER_MARK = [0xef, 0xbb, 0xbf] as const;

/**
 * Offsets of the first invalid byte of every line that has one (RFC 3629 §4: no overlong forms,
 * no surrogates D800–DFFF, nothing above U+10FFFF), with the 1-based line of each.
 */
function invalidUtf8Lines(bytes: Uint8Array): { readonly line: number; readonly offset: number }[] {
  const found: { line: number; offset: number }[] = [];
  let line = 1;
  let index = 0;
  const continuation = (at: number, low = 0x80, high = 0xbf): boolean => {
    const byte = bytes[at];
    return byte !== undefined && byte >= low && byte <= high;
  };
  while (index < bytes.length) {
    const lead = bytes[index] ?? 0;
    let length = 0;
    if (lead < 0x80) length = 1;
    else if (lead >= 0xc2 && lead <= 0xdf) length = continuation(index + 1) ? 2 : 0;
    else if (lead >= 0xe0 && lead <= 0xef) {
      const low = lead === 0xe0 ? 0xa0 : 0x80;
      const high = lead === 0xed ? 0x9f : 0xbf;
      length = continuation(index + 1, low, high) && continuation(index + 2) ? 3 : 0;
    } else if (lead >= 0xf0 && lead <= 0xf4) {
      const low = lead === 0xf0 ? 0x90 : 0x80;
      const high = lead === 0xf4 ? 0x8f : 0xbf;
      length = continuation(index + 1, low, high) && continuation(index + 2) && continuation(index + 3) ? 4 : 0;
    }
    if (length === 0) {
      if (found.at(-1)?.line !== line) found.push({ line, offset: index });
      index += 1;
      continue;
    }
    if (lead === 0x0a || (lead === 0x0d && bytes[index + 1] !== 0x0a)) line += 1;
    index += length;
  }
  return found;
}

/**
 * The input as text, without a leading byte-order mark; null after reporting `encoding-invalid`
 * problems (one per line) when bytes are not UTF-8 or a text holds lone UTF-16 surrogates.
 *
 * Edges: only one leading BOM is removed here (a further U+FEFF is whitespace to ECMAScript's
 * `trim`, so the field splitter drops it from around a cell); bytes are
 * decoded with the platform's `TextDecoder` in fatal mode, and located byte by byte only when it
 * refuses them.
 */
export function decodeInputText(input: string | Uint8Array, problems: ProblemList): string | null {
  if (typeof input === 'string') {
    const text = input.startsWith('\uFEFF') ? input.slice(1) : input;
    return textWithoutLoneSurrogates(text, problems);
  }
  const hasMark = BYTE_ORDER_MARK.every((byte, index) => input[index] === byte);
  const bytes = hasMark ? input.subarray(BYTE_ORDER_MARK.length) : input;
  try {
    return new TextDecoder('utf-8', { fatal: true, ignoreBOM: true }).decode(bytes);
  } catch {
    for (const fault of invalidUtf8Lines(bytes)) {
      const byte = (bytes[fault.offset] ?? 0).toString(16).toUpperCase().padStart(2, '0');
      const offset = fault.offset + (hasMark ? BYTE_ORDER_MARK.length : 0);
      problems.error(
        'encoding-invalid',
        { line: fault.line, column: null },
        `byte 0x${byte} at byte offset ${offset} is not valid UTF-8: the file was probably saved in another encoding (e.g. Latin-1 or Windows-1252)`,
        'save the pick table as UTF-8 (CSV UTF-8 in most spreadsheet programs) and read it again',
      );
    }
    return null;
  }
}

/** Lone surrogates only (in `u` mode a surrogate pair is one code point above U+FFFF). */
const LONE_SURROGATE = /[\uD800-\uDFFF]/gu;

function textWithoutLoneSurrogates(text: string, problems: ProblemList): string | null {
  let lastIndex = 0;
  let line = 1;
  let lastReportedLine = 0;
  for (const match of text.matchAll(LONE_SURROGATE)) {
    line += countLineBreaks(text.slice(lastIndex, match.index), Infinity);
    lastIndex = match.index;
    if (line === lastReportedLine) continue;
    lastReportedLine = line;
    const unit = match[0].charCodeAt(0).toString(16).toUpperCase();
    problems.error(
      'encoding-invalid',
      { line, column: null },
      `the text holds a lone UTF-16 surrogate U+${unit} (${quoted(match[0])}), which no UTF-8 file can contain: the text was cut inside a character`,
      'pass the text of a UTF-8 file, or its bytes, without cutting characters apart',
    );
  }
  return lastReportedLine === 0 ? text : null;
}
