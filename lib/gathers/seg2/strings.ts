/**
 * SEG-2 free-format strings (Pullan1990; seg-formats.md §3.3): the `KEYWORD value…` entries of
 * the file descriptor block and of each trace descriptor block.
 *
 * Each entry is a u16 offset to the next entry (counted from the start of this one), the ASCII
 * text and the string terminator, then any padding; an offset of 0 ends the list, and so does the
 * end of the block. What real files do beyond the standard is read with a warning (§3.4): a
 * keyword prefixed with `*` (the star is dropped), non-printing bytes (removed), an entry without
 * its terminator (read to the next entry). An entry that would run past its block, or an offset of
 * 1 (which would overlap the offset itself), is an error: the list cannot be followed further.
 *
 * The walk is bounded: every step moves on by at least 2 bytes and never leaves [start, end).
 */
import { STRING_OFFSET_BYTES } from './layout.js';
import type { Seg2ProblemList } from './problems.js';

/** One decoded entry: the keyword as written (without a leading `*`), its value, and where it was. */
export interface Seg2String {
  readonly keyword: string;
  readonly value: string;
  readonly byteOffset: number;
}

/** The terminators the file descriptor block declares. */
export interface Seg2Terminators {
  /** String terminator bytes (1 or 2). */
  readonly string: readonly number[];
  /** Line terminator bytes (1 or 2): inside a value (NOTE), converted to '\n'. */
  readonly line: readonly number[];
}

function matchesAt(view: DataView, at: number, end: number, pattern: readonly number[]): boolean {
  if (at + pattern.length > end) return false;
  for (let index = 0; index < pattern.length; index += 1) {
    if (view.getUint8(at + index) !== pattern[index]) return false;
  }
  return true;
}

const TAB = 0x09;
const BLANK = 0x20;

/**
 * Read the entries of the free-format section [start, end) of a block; `label` names the block in
 * messages ("file descriptor block", "trace 3 descriptor block"); string offsets are u16 in the
 * file's byte order.
 */
export function readSeg2Strings(
  view: DataView,
  littleEndian: boolean,
  start: number,
  end: number,
  terminators: Seg2Terminators,
  label: string,
  problems: Seg2ProblemList,
): Seg2String[] {
  const entries: Seg2String[] = [];
  let position = start;
  while (position + STRING_OFFSET_BYTES <= end) {
    const offsetToNext = view.getUint16(position, littleEndian);
    if (offsetToNext === 0) break;
    const field = `${label}, free-format string offset`;
    if (offsetToNext < STRING_OFFSET_BYTES) {
      problems.error(
        'string-offset-invalid',
        { byteOffset: position, field },
        `the free-format string at byte ${position} of the ${label} gives an offset of ${offsetToNext} to the next string: it must be 0 (end of the list) or at least ${STRING_OFFSET_BYTES}`,
        'the block is damaged: copy the file again from the recorder or the original medium',
      );
      break;
    }
    const next = position + offsetToNext;
    if (next > end) {
      problems.error(
        'string-past-block',
        { byteOffset: position, field },
        `the free-format string at byte ${position} of the ${label} claims ${offsetToNext} bytes, running to byte ${next}, past the block's end at byte ${end}`,
        'the block is damaged or its size field is wrong: copy the file again from the recorder or the original medium',
      );
      break;
    }
    const entry = readEntry(view, position, next, terminators, label, problems);
    if (entry !== null) entries.push(entry);
    position = next;
  }
  return entries;
}

function readEntry(
  view: DataView,
  position: number,
  next: number,
  terminators: Seg2Terminators,
  label: string,
  problems: Seg2ProblemList,
): Seg2String | null {
  const textStart = position + STRING_OFFSET_BYTES;
  let textEnd = next;
  let terminated = false;
  for (let at = textStart; at < next; at += 1) {
    if (matchesAt(view, at, next, terminators.string)) {
      textEnd = at;
      terminated = true;
      break;
    }
  }
  const field = `${label}, free-format string`;
  let text = '';
  let nonPrinting = 0;
  for (let at = textStart; at < textEnd; at += 1) {
    if (matchesAt(view, at, textEnd, terminators.line)) {
      text += '\n';
      at += terminators.line.length - 1;
      continue;
    }
    const byte = view.getUint8(at);
    if (byte === TAB) text += ' ';
    else if (byte < BLANK || byte >= 0x7f) nonPrinting += 1;
    else text += String.fromCharCode(byte);
  }
  const trimmed = text.trim();
  if (!terminated && trimmed !== '') {
    problems.warning(
      'string-unterminated',
      { byteOffset: position, field },
      `the free-format string at byte ${position} of the ${label} has no string terminator before the next string; it was read up to the next string`,
      'nothing to do if the value reads right; otherwise check the recorder\'s export settings',
    );
  }
  if (nonPrinting > 0) {
    problems.warning(
      'string-nonprinting',
      { byteOffset: position, field },
      `the free-format string at byte ${position} of the ${label} holds ${nonPrinting} non-printing byte${nonPrinting === 1 ? '' : 's'}, removed from its text`,
      'nothing to do if the value reads right; SEG-2 strings are plain ASCII',
    );
  }
  if (trimmed === '') return null;
  const blank = trimmed.search(/[ \n]/);
  let keyword = blank < 0 ? trimmed : trimmed.slice(0, blank);
  const value = blank < 0 ? '' : trimmed.slice(blank + 1).trim();
  if (keyword.startsWith('*')) {
    const bare = keyword.replace(/^\*+/, '');
    problems.warning(
      'keyword-prefixed',
      { byteOffset: position, field },
      `the keyword "${keyword}" at byte ${position} of the ${label} starts with "*"; read as "${bare}"`,
      'nothing to do if that is the keyword meant',
    );
    keyword = bare;
  }
  if (keyword === '') return null;
  return { keyword, value, byteOffset: position };
}
