/**
 * Does a file look like SEG-Y (rev 0, 1 or 2)? A cheap, pure check of the first 3600 bytes (the
 * textual and binary file headers), for recognising uploads by content. It never throws, and
 * returns the reason when it says no.
 *
 * Yes needs: at least 3600 bytes; a textual header whose bytes are mostly printable in EBCDIC or
 * ASCII (zeros count as blanks); a byte order (below); and a data sample format code the standard
 * defines. A yes is not a promise that the file reads: `openSegy` checks everything else.
 *
 * Byte order (`detectByteOrder`): the rev 2 constant at bytes 3297–3300, read big-endian, is
 * 16909060 for a big-endian file and 67305985 (0x04030201) for a little-endian one [V: segyio
 * `segy_endianness`]. Zero (a rev 0 or rev 1 file) means big-endian, the rule before rev 2.
 * Without the constant, a file whose format code is unknown big-endian but known little-endian is
 * read little-endian, with a warning: some writers make such files without setting the constant.
 *
 * @example
 * sniffSegy(new Uint8Array(100)) // { segy: false, reason: 'the file is 100 bytes long: ...' }
 */
import { viewOf } from './byte-source.js';
import { REFUSED_FORMATS, SAMPLE_FORMATS } from './formats.js';
import { BINARY_HEADER_FIELDS, BINARY_HEADER_OFFSET, BYTE_ORDER_CONSTANT, FIXED_HEADERS_BYTES, TEXTUAL_HEADER_BYTES } from './layout.js';
import { EBCDIC_TO_CHARACTER, sniffTextualEncoding, type TextualEncoding } from './text.js';

export type SegySniff =
  | { readonly segy: true; readonly littleEndian: boolean; readonly textualEncoding: TextualEncoding }
  | { readonly segy: false; readonly reason: string };

export type ByteOrder =
  | { readonly ok: true; readonly littleEndian: boolean; readonly how: 'constant' | 'default' | 'guessed' }
  | { readonly ok: false; readonly reason: string };

/** Share of textual header bytes that must be printable (or zero) for the sniffer to say yes. */
const PRINTABLE_SHARE = 0.75;

const FORMAT_OFFSET = BINARY_HEADER_OFFSET + BINARY_HEADER_FIELDS.dataSampleFormatCode.offset;
const CONSTANT_OFFSET = BINARY_HEADER_OFFSET + BINARY_HEADER_FIELDS.byteOrderConstant.offset;
const MAJOR_OFFSET = BINARY_HEADER_OFFSET + BINARY_HEADER_FIELDS.segyFormatRevisionMajor.offset;

function knownFormat(code: number): boolean {
  return SAMPLE_FORMATS.has(code) || REFUSED_FORMATS.has(code);
}

function hex32(value: number): string {
  return `0x${(value >>> 0).toString(16).toUpperCase().padStart(8, '0')}`;
}

/** The file's byte order from the first 3600 bytes (see the module comment). */
export function detectByteOrder(head: DataView): ByteOrder {
  const constant = head.getInt32(CONSTANT_OFFSET, false);
  if (constant === BYTE_ORDER_CONSTANT) return { ok: true, littleEndian: false, how: 'constant' };
  if (constant === 0x04030201) return { ok: true, littleEndian: true, how: 'constant' };
  if (constant === 0x02010403 || constant === 0x03040102) {
    return {
      ok: false,
      reason: `binary header bytes 3297–3300 (byte-order constant, file offset ${CONSTANT_OFFSET}) read ${hex32(constant)}: the file's bytes are swapped in pairs, which this reader does not undo; rewrite the file big- or little-endian`,
    };
  }
  const major = head.getUint8(MAJOR_OFFSET);
  if (constant !== 0 && major >= 2) {
    return {
      ok: false,
      reason: `binary header bytes 3297–3300 (byte-order constant, file offset ${CONSTANT_OFFSET}) read ${hex32(constant)} in a rev ${major} file: rev 2 requires 16909060 (0x01020304) in the file's byte order; check that the file is SEG-Y and not damaged, or set the constant`,
    };
  }
  // Before rev 2 these bytes are unassigned: big-endian, unless only little-endian gives a format.
  const bigFormat = head.getInt16(FORMAT_OFFSET, false);
  const littleFormat = head.getInt16(FORMAT_OFFSET, true);
  if (!knownFormat(bigFormat) && knownFormat(littleFormat)) return { ok: true, littleEndian: true, how: 'guessed' };
  return { ok: true, littleEndian: false, how: 'default' };
}

export function sniffSegy(bytes: Uint8Array): SegySniff {
  if (bytes.byteLength < FIXED_HEADERS_BYTES) {
    return {
      segy: false,
      reason: `the file is ${bytes.byteLength} bytes long: a SEG-Y file starts with a ${TEXTUAL_HEADER_BYTES}-byte textual header and a 400-byte binary header (${FIXED_HEADERS_BYTES} bytes)`,
    };
  }
  const textual = bytes.subarray(0, TEXTUAL_HEADER_BYTES);
  const textualEncoding = sniffTextualEncoding(textual);
  let printable = 0;
  for (const byte of textual) {
    const isPrintable = byte === 0 || (textualEncoding === 'ascii' ? (byte >= 0x20 && byte <= 0x7e) || byte === 0x0a || byte === 0x0d : EBCDIC_TO_CHARACTER[byte] !== undefined);
    if (isPrintable) printable += 1;
  }
  if (printable < PRINTABLE_SHARE * TEXTUAL_HEADER_BYTES) {
    return {
      segy: false,
      reason: `bytes 1–3200 are not a textual header: only ${printable} of 3200 are printable in ${textualEncoding === 'ascii' ? 'ASCII' : 'EBCDIC'} (a SEG-Y file starts with 40 lines of text)`,
    };
  }
  const head = viewOf(bytes.subarray(0, FIXED_HEADERS_BYTES));
  const order = detectByteOrder(head);
  if (!order.ok) return { segy: false, reason: order.reason };
  const code = head.getInt16(FORMAT_OFFSET, order.littleEndian);
  if (!knownFormat(code)) {
    return {
      segy: false,
      reason: `binary header bytes 3225–3226 (data sample format code, file offset ${FORMAT_OFFSET}) read ${code}: SEG-Y defines codes 1–12, 15 and 16`,
    };
  }
  return { segy: true, littleEndian: order.littleEndian, textualEncoding };
}
