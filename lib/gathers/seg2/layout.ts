/**
 * The SEG-2 byte layout as data: the fixed fields of the file descriptor block and of each trace
 * descriptor block, the data format codes and the free-format keywords the reader decodes.
 *
 * Source: Pullan1990 (SEG-2, Geophysics 55(9)), as summarised in the project's reference notes
 * `seg-formats.md` §3. Every fixed field below is tagged [V] there (checked against public
 * readers and decoded files) except where a comment says otherwise. Offsets are 0-based from the
 * start of the block; every integer is unsigned, in the byte order that the first two bytes of
 * the file fix.
 */

/** The integer types a fixed field can have. */
export type Seg2FieldType = 'u8' | 'u16' | 'u32' | 'bytes';

/** One fixed field: where it is in its block, its type, and what it means. */
export interface Seg2Field {
  readonly offset: number;
  readonly bytes: number;
  readonly type: Seg2FieldType;
  /** Our name for the field; the paper's symbol, where it has one, is in `meaning`. */
  readonly name: string;
  readonly meaning: string;
}

/** Length of the fixed part of the file descriptor block, bytes. */
export const FILE_DESCRIPTOR_FIXED_BYTES = 32;
/** Length of the fixed part of a trace descriptor block, bytes. */
export const TRACE_DESCRIPTOR_FIXED_BYTES = 32;

/** The file descriptor block's ID as a u16 in the file's byte order. */
export const FILE_DESCRIPTOR_BLOCK_ID = 0x3a55;
/** The trace descriptor block's ID as a u16 in the file's byte order. */
export const TRACE_DESCRIPTOR_BLOCK_ID = 0x4422;

/** Fixed fields of the file descriptor block (at file offset 0). */
export const FILE_DESCRIPTOR_FIELDS = {
  blockId: { offset: 0, bytes: 2, type: 'u16', name: 'file descriptor block ID', meaning: '0x3A55; on disk 55 3A means little-endian, 3A 55 big-endian' },
  revision: { offset: 2, bytes: 2, type: 'u16', name: 'revision number', meaning: 'format revision, 1' },
  pointerBytes: { offset: 4, bytes: 2, type: 'u16', name: 'trace pointer sub-block size', meaning: 'M, bytes of trace pointers: a multiple of 4, at least 4N' },
  traceCount: { offset: 6, bytes: 2, type: 'u16', name: 'number of traces', meaning: 'N, 1 to 16383' },
  stringTerminatorLength: { offset: 8, bytes: 1, type: 'u8', name: 'string terminator length', meaning: '1 or 2' },
  stringTerminator: { offset: 9, bytes: 2, type: 'bytes', name: 'string terminator', meaning: 'usually 0x00; the second byte unused when the length is 1' },
  lineTerminatorLength: { offset: 11, bytes: 1, type: 'u8', name: 'line terminator length', meaning: '1 or 2' },
  lineTerminator: { offset: 12, bytes: 2, type: 'bytes', name: 'line terminator', meaning: 'usually 0x0A (LF)' },
  reserved: { offset: 14, bytes: 18, type: 'bytes', name: 'reserved', meaning: 'zero' },
} as const satisfies Record<string, Seg2Field>;

/**
 * The trace pointer sub-block follows the fixed fields: N u32 absolute file offsets of the trace
 * descriptor blocks, the rest of its M bytes unused. The file's free-format strings run from
 * 32 + M to the first trace descriptor block.
 */
export const TRACE_POINTERS_OFFSET = FILE_DESCRIPTOR_FIXED_BYTES;
/** Bytes per trace pointer. */
export const TRACE_POINTER_BYTES = 4;

/** Fixed fields of a trace descriptor block (at each trace pointer). */
export const TRACE_DESCRIPTOR_FIELDS = {
  blockId: { offset: 0, bytes: 2, type: 'u16', name: 'trace descriptor block ID', meaning: '0x4422' },
  descriptorBytes: { offset: 2, bytes: 2, type: 'u16', name: 'trace descriptor block size', meaning: 'X, bytes including the fixed 32: a multiple of 4 (one real file had 197)' },
  dataBytes: { offset: 4, bytes: 4, type: 'u32', name: 'data block size', meaning: 'Y, bytes of samples right after the descriptor block' },
  sampleCount: { offset: 8, bytes: 4, type: 'u32', name: 'number of samples', meaning: 'NS' },
  formatCode: { offset: 12, bytes: 1, type: 'u8', name: 'data format code', meaning: '1 to 5, see SEG2_FORMATS' },
  reserved: { offset: 13, bytes: 19, type: 'bytes', name: 'reserved', meaning: 'zero' },
} as const satisfies Record<string, Seg2Field>;

/** A data format code's sample encoding. */
export interface Seg2Format {
  readonly code: 1 | 2 | 3 | 4 | 5;
  readonly meaning: string;
  /** Bytes per sample (2.5 for the 20-bit format, whose samples come in 10-byte groups of 4). */
  readonly bytesPerSample: number;
  /** True when every value fits a float32 exactly, so the samples are returned as Float32Array. */
  readonly exactInFloat32: boolean;
}

/**
 * Data format codes. Format 3 (SEG-D style 20-bit floating point): groups of 4 samples in 10
 * bytes, five u16 words in the file's byte order; word 0 holds four 4-bit exponents (sample k of
 * the group in bits 4k…4k+3, lowest nibble first), words 1–4 the one's-complement 16-bit
 * mantissas; value = mantissa × 2^exponent. The reference notes verify that rule against one
 * test file only, so its sign convention is the least certain part of this table.
 */
export const SEG2_FORMATS: Readonly<Record<number, Seg2Format>> = {
  1: { code: 1, meaning: '16-bit two\'s-complement integer', bytesPerSample: 2, exactInFloat32: true },
  2: { code: 2, meaning: '32-bit two\'s-complement integer', bytesPerSample: 4, exactInFloat32: false },
  3: { code: 3, meaning: '20-bit floating point (SEG-D style)', bytesPerSample: 2.5, exactInFloat32: true },
  4: { code: 4, meaning: '32-bit IEEE float', bytesPerSample: 4, exactInFloat32: true },
  5: { code: 5, meaning: '64-bit IEEE float', bytesPerSample: 8, exactInFloat32: false },
};

/** Samples per group and bytes per group in format 3. */
export const FORMAT3_GROUP_SAMPLES = 4;
export const FORMAT3_GROUP_BYTES = 10;

/** Bytes a data block needs for `sampleCount` samples of `format` (format 3 rounds up to whole groups). */
export function dataBytesNeeded(format: Seg2Format, sampleCount: number): number {
  if (format.code === 3) return Math.ceil(sampleCount / FORMAT3_GROUP_SAMPLES) * FORMAT3_GROUP_BYTES;
  return sampleCount * format.bytesPerSample;
}

/**
 * Free-format strings: each is a u16 offset to the next string (counted from the start of this
 * one), the ASCII text `KEYWORD value…`, the string terminator and any padding; an offset of 0
 * ends the list.
 */
export const STRING_OFFSET_BYTES = 2;

/**
 * Trace keywords the reader decodes into typed fields of the gather (seg-formats.md §3.3, [V] as
 * keyword names; the value forms are those seen in real files). Every other keyword, and any of
 * these whose value cannot be decoded, stays in the trace's metadata.
 */
export const DECODED_TRACE_KEYWORDS = {
  sampleInterval: 'SAMPLE_INTERVAL',
  delay: 'DELAY',
  receiverLocation: 'RECEIVER_LOCATION',
  sourceLocation: 'SOURCE_LOCATION',
  receiverStation: 'RECEIVER_STATION_NUMBER',
  sourceStation: 'SOURCE_STATION_NUMBER',
} as const;

/** The file keyword that gives the length unit of the locations. */
export const UNITS_KEYWORD = 'UNITS';

/**
 * Metres per unit for UNITS values. METERS is seen in real files [V]; FEET, INCHES and
 * CENTIMETERS are from memory of the standard [M]. NONE (or any other value) is no length unit:
 * locations are then left undecoded.
 */
export const UNIT_METRES: Readonly<Record<string, number>> = {
  METERS: 1,
  FEET: 0.3048,
  INCHES: 0.0254,
  CENTIMETERS: 0.01,
};
