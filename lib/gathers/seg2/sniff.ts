/**
 * Does a file look like SEG-2 (Pullan1990)? A cheap check of the bytes, for recognising uploads
 * by content: the file descriptor block ID in either byte order, and (when the file reaches that
 * far) the trace descriptor block ID at the first trace pointer. It reads at most 38 bytes plus
 * two at the first pointer, never throws, and returns the reason when it says no.
 *
 * A yes is not a promise that the file reads: `readSeg2` checks everything else.
 *
 * @example
 * sniffSeg2(new Uint8Array([0x55, 0x3a, 1, 0])) // { seg2: false, reason: 'the file is 4 bytes long: …' }
 */
import {
  FILE_DESCRIPTOR_BLOCK_ID,
  FILE_DESCRIPTOR_FIELDS,
  FILE_DESCRIPTOR_FIXED_BYTES,
  TRACE_DESCRIPTOR_BLOCK_ID,
  TRACE_POINTERS_OFFSET,
} from './layout.js';

export type Seg2Sniff =
  | { readonly seg2: true; readonly littleEndian: boolean }
  | { readonly seg2: false; readonly reason: string };

/** A DataView over exactly the bytes given (a Uint8Array may be a window on a larger buffer). */
export function viewOf(bytes: Uint8Array | ArrayBuffer): DataView {
  return bytes instanceof Uint8Array ? new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength) : new DataView(bytes);
}

function hex(value: number): string {
  return `0x${value.toString(16).toUpperCase().padStart(4, '0')}`;
}

/**
 * The byte order that the file descriptor block ID (bytes 0–1) fixes, or null when the bytes are
 * neither 55 3A (little-endian) nor 3A 55 (big-endian) or the file is shorter than 2 bytes.
 */
export function seg2ByteOrder(view: DataView): 'little' | 'big' | null {
  if (view.byteLength < 2) return null;
  const offset = FILE_DESCRIPTOR_FIELDS.blockId.offset;
  if (view.getUint16(offset, true) === FILE_DESCRIPTOR_BLOCK_ID) return 'little';
  if (view.getUint16(offset, false) === FILE_DESCRIPTOR_BLOCK_ID) return 'big';
  return null;
}

export function sniffSeg2(bytes: Uint8Array | ArrayBuffer): Seg2Sniff {
  const view = viewOf(bytes);
  const length = view.byteLength;
  if (length < 2) {
    return { seg2: false, reason: `the file is ${length} bytes long: a SEG-2 file starts with a ${FILE_DESCRIPTOR_FIXED_BYTES}-byte file descriptor block` };
  }
  const byteOrder = seg2ByteOrder(view);
  if (byteOrder === null) {
    return {
      seg2: false,
      reason: `bytes 0–1 read ${hex(view.getUint16(0, false))}: a SEG-2 file starts with the file descriptor block ID 0x3A55 (bytes 55 3A little-endian or 3A 55 big-endian)`,
    };
  }
  const littleEndian = byteOrder === 'little';
  if (length < FILE_DESCRIPTOR_FIXED_BYTES + 4) {
    return {
      seg2: false,
      reason: `the file is ${length} bytes long: too short for the ${FILE_DESCRIPTOR_FIXED_BYTES}-byte file descriptor block and one trace pointer`,
    };
  }
  const firstPointer = view.getUint32(TRACE_POINTERS_OFFSET, littleEndian);
  if (firstPointer <= length - 2) {
    const traceId = view.getUint16(firstPointer, littleEndian);
    if (traceId !== TRACE_DESCRIPTOR_BLOCK_ID) {
      return {
        seg2: false,
        reason: `the first trace pointer (bytes 32–35) gives offset ${firstPointer}, where the bytes read ${hex(traceId)} instead of the trace descriptor block ID 0x4422`,
      };
    }
  }
  return { seg2: true, littleEndian };
}
