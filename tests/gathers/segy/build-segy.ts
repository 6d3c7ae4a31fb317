/**
 * A small SEG-Y writer for edge-case tests, built on the reader's own layout table (so it proves
 * nothing about byte positions: the segyio tests do that). It writes what a test asks, including
 * what the standard forbids.
 */
import {
  BINARY_HEADER_FIELDS,
  TRACE_HEADER_FIELDS,
  type BinaryHeaderFieldName,
  type HeaderField,
  type TraceHeaderFieldName,
} from '../../../lib/gathers/segy/layout.js';

export interface BuildOptions {
  readonly littleEndian?: boolean;
  readonly format?: number;
  /** Samples per trace, or one count per trace (then written in each trace header only). */
  readonly samples?: number | readonly number[];
  readonly traces?: number;
  readonly textual?: 'ebcdic' | 'ascii';
  /** Extended textual headers as text (each padded to 3200 ASCII bytes). */
  readonly extended?: readonly string[];
  readonly binary?: Partial<Record<BinaryHeaderFieldName, number>>;
  readonly trace?: (index: number) => Partial<Record<TraceHeaderFieldName, number>>;
  /** Sample value k of trace t (integers for integer formats). */
  readonly sample?: (trace: number, k: number) => number;
  /** Bytes appended after the traces. */
  readonly tail?: number;
}

const BYTES_PER_SAMPLE: Readonly<Record<number, number>> = { 1: 4, 2: 4, 3: 2, 4: 4, 5: 4, 6: 8, 7: 3, 8: 1, 9: 8, 10: 4, 11: 2, 12: 8, 15: 3, 16: 1 };

export function writeField(view: DataView, at: number, headerField: HeaderField, value: number, little: boolean): void {
  const offset = at + headerField.offset;
  switch (headerField.type) {
    case 'int8': view.setInt8(offset, value); break;
    case 'uint8': view.setUint8(offset, value); break;
    case 'int16': view.setInt16(offset, value, little); break;
    case 'uint16': view.setUint16(offset, value, little); break;
    case 'int32': view.setInt32(offset, value, little); break;
    case 'uint32': view.setUint32(offset, value, little); break;
    case 'uint64': view.setBigUint64(offset, BigInt(value), little); break;
    case 'float64': view.setFloat64(offset, value, little); break;
  }
}

/** EBCDIC for upper-case letters, digits, space and a few marks (enough for test text). */
function ebcdic(character: string): number {
  const code = character.charCodeAt(0);
  if (character === ' ') return 0x40;
  if (code >= 0x30 && code <= 0x39) return 0xf0 + code - 0x30;
  if (code >= 0x41 && code <= 0x49) return 0xc1 + code - 0x41;
  if (code >= 0x4a && code <= 0x52) return 0xd1 + code - 0x4a;
  if (code >= 0x53 && code <= 0x5a) return 0xe2 + code - 0x53;
  return 0x4b; // '.'
}

export function buildSegy(options: BuildOptions = {}): Uint8Array {
  const little = options.littleEndian ?? false;
  const format = options.format ?? 5;
  const traces = options.traces ?? 3;
  const counts = typeof options.samples === 'object' ? options.samples : Array.from({ length: traces }, () => (options.samples as number | undefined) ?? 10);
  const bytesPerSample = BYTES_PER_SAMPLE[format] ?? 4;
  const extended = options.extended ?? [];
  const headerBytes = 3600 + 3200 * extended.length;
  const traceBytes = counts.reduce((sum, count) => sum + 240 + count * bytesPerSample, 0);
  const bytes = new Uint8Array(headerBytes + traceBytes + (options.tail ?? 0));
  const view = new DataView(bytes.buffer);
  const text = 'C 1 SLOPEBREAK EDGE CASE'.padEnd(3200, ' ');
  for (let index = 0; index < 3200; index += 1) {
    bytes[index] = options.textual === 'ascii' ? text.charCodeAt(index) : ebcdic(text.charAt(index));
  }
  extended.forEach((page, index) => {
    const padded = page.padEnd(3200, ' ');
    for (let k = 0; k < 3200; k += 1) bytes[3600 + 3200 * index + k] = padded.charCodeAt(k) & 0x7f;
  });
  const binary: Partial<Record<BinaryHeaderFieldName, number>> = {
    sampleInterval: 250,
    samplesPerDataTrace: typeof options.samples === 'object' ? 0 : counts[0] ?? 0,
    dataSampleFormatCode: format,
    measurementSystem: 1,
    segyFormatRevisionMajor: 1,
    fixedLengthTraceFlag: typeof options.samples === 'object' ? 0 : 1,
    extendedTextualHeaders: extended.length,
    ...options.binary,
  };
  for (const [name, value] of Object.entries(binary) as Array<[BinaryHeaderFieldName, number]>) {
    writeField(view, 3200, BINARY_HEADER_FIELDS[name], value, little);
  }
  let at = headerBytes;
  counts.forEach((count, trace) => {
    const fields: Partial<Record<TraceHeaderFieldName, number>> = {
      traceSequenceNumberWithinLine: trace + 1,
      samplesInThisTrace: count,
      sampleIntervalForThisTrace: 250,
      coordinateUnits: 1,
      ...options.trace?.(trace),
    };
    for (const [name, value] of Object.entries(fields) as Array<[TraceHeaderFieldName, number]>) {
      writeField(view, at, TRACE_HEADER_FIELDS[name], value, little);
    }
    for (let k = 0; k < count; k += 1) {
      const value = options.sample?.(trace, k) ?? trace * 100 + k;
      const offset = at + 240 + k * bytesPerSample;
      if (format === 5) view.setFloat32(offset, value, little);
      else if (format === 2) view.setInt32(offset, value, little);
      else if (format === 3) view.setInt16(offset, value, little);
      else if (format === 8) view.setInt8(offset, value);
      else if (format === 6) view.setFloat64(offset, value, little);
    }
    at += 240 + count * bytesPerSample;
  });
  return bytes;
}
