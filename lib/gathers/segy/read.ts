/**
 * The SEG-Y reader (rev 0, rev 1 2002 and rev 2.0 2017; Norris & Faichney 2002, Hagelund & Levin
 * 2017): `openSegy` reads the file headers and indexes the traces; `readTrace` reads one trace;
 * `readSegy` reads the whole file into a `Gather`.
 *
 * Every byte comes through a `ByteSource`, so a file of many gigabytes is read a trace at a time
 * and never held whole. Bad input is a value, never an exception: a refusal lists problems that
 * each name the byte offset, the field and the fix. Nothing grows with a number read from the
 * file unless that number is first checked against the file's size and the limits in
 * `SegyReadOptions`, so a damaged header cannot make the reader hang or exhaust memory.
 *
 * What it does at the edges:
 * - Byte order: the rev 2 constant (bytes 3297–3300); without it, big-endian (see `sniff.ts`).
 * - Textual headers: EBCDIC or ASCII, sniffed per header. Extended textual headers: the count at
 *   3505–3506; −1 means "until the `((SEG: EndText))` stanza" (rev 1 [M]); the first
 *   `maxExtendedTextualHeaders` are decoded, the rest skipped with a warning.
 * - Trace length: fixed (flag 3503–3504 = 1, or a rev 0 file) uses the binary header's samples per
 *   trace (3221–3222, or rev 2's 3269–3272 when non-zero [M]) for every trace; otherwise each
 *   trace's own count (115–116) and the traces are indexed by one pass over their headers.
 * - Sample interval: the trace's (117–118) when positive, else the file's (3217–3218, or rev 2's
 *   double at 3273–3280 when positive [M]), in microseconds. Neither positive: the file is refused.
 * - Delay (109–110, ms) is scaled by the time scalar (215–216) [V: segyio field types]; positions
 *   (73–88) by the coordinate scalar (71–72) and elevations (41–68) by the elevation scalar
 *   (69–70): positive multiplies, negative divides, zero means one.
 * - Lengths are in feet when the measurement system (3255–3256) is 2 and are converted to metres;
 *   any other value is read as metres (with a warning unless it is 1). Coordinates in arc-seconds
 *   or degrees (89–90 = 2, 3, 4) are not lengths: the trace's positions are null.
 * - Bytes after the last whole trace (a cut-off trace, a data trailer) are ignored with a warning.
 * - A variable-length trace whose count is 0 (and the binary header's too) is kept with no
 *   samples, with a warning.
 * - Refused: format 4 and unknown format codes, pairwise byte swapping, rev 2 additional trace
 *   headers (3507–3508 > 0), zero samples per trace, more traces or samples than the limits.
 */
import type { Gather, GatherLocation, GatherOutcome, GatherProblem, GatherTrace } from '../gather.js';
import { byteSourceOf, viewOf, type ByteSource } from './byte-source.js';
import { REFUSED_FORMATS, SAMPLE_FORMATS, type SampleFormat } from './formats.js';
import {
  BINARY_HEADER_FIELDS,
  BINARY_HEADER_OFFSET,
  binaryBytes,
  END_TEXT_STANZA,
  FIXED_HEADERS_BYTES,
  readHeaderField,
  TEXTUAL_HEADER_BYTES,
  TRACE_HEADER_BYTES,
  TRACE_HEADER_FIELDS,
  traceBytes,
  type BinaryHeaderFieldName,
  type HeaderField,
  type TraceHeaderFieldName,
} from './layout.js';
import { detectByteOrder } from './sniff.js';
import { decodeTextualHeader, sniffTextualEncoding, textualLines, type TextualEncoding } from './text.js';

export interface SegyReadOptions {
  /** Most samples in one trace; default 2^20 (over 4 minutes at 0.25 ms). */
  readonly maxSamplesPerTrace?: number;
  /**
   * Most traces `readSegy` reads, and most a variable-length file's index holds (`openSegy` opens
   * a fixed-length file of any size: it needs no index); default 100 000.
   */
  readonly maxTraces?: number;
  /** Most samples `readSegy` holds in memory over all traces; default 2^25 (256 MiB as doubles). */
  readonly maxTotalSamples?: number;
  /** Extended textual headers decoded and kept (the rest are skipped); default 100. */
  readonly maxExtendedTextualHeaders?: number;
}

export const DEFAULT_MAX_SAMPLES_PER_TRACE = 2 ** 20;
export const DEFAULT_MAX_TRACES = 100_000;
export const DEFAULT_MAX_TOTAL_SAMPLES = 2 ** 25;
export const DEFAULT_MAX_EXTENDED_TEXTUAL_HEADERS = 100;
/** Scalars the standard allows (bytes 69–70, 71–72, 215–216) [M]; others are applied with a warning. */
const STANDARD_SCALARS = new Set([0, 1, -1, 10, -10, 100, -100, 1000, -1000, 10000, -10000]);
const FOOT = 0.3048;

/** The binary file header, every field by its name in `layout.ts`. */
export type SegyBinaryHeader = Readonly<Record<BinaryHeaderFieldName, number>>;
/** A trace header, every field by its name in `layout.ts`, unscaled as the file holds it. */
export type SegyTraceHeader = Readonly<Record<TraceHeaderFieldName, number>>;

/** One trace as a gather trace, with its raw header and where it lies in the file. */
export interface SegyTrace extends GatherTrace {
  /** 0-based position of the trace in the file. */
  readonly index: number;
  /** File offset of the trace header. */
  readonly byteOffset: number;
  readonly header: SegyTraceHeader;
  /** Source depth below the surface (49–52, elevation-scaled), metres; null when not in a length unit. */
  readonly sourceDepth: number | null;
  /** Source–receiver distance (37–40, not scaled), metres as the file's length unit gives it. */
  readonly offset: number;
}

export type SegyTraceOutcome =
  | { readonly ok: true; readonly value: SegyTrace; readonly warnings: readonly GatherProblem[] }
  | { readonly ok: false; readonly problems: readonly GatherProblem[] };

/** An opened SEG-Y file: its headers, and random access to its traces. */
export interface SegyFile {
  readonly textualEncoding: TextualEncoding;
  /** The 3200-byte textual header as 3200 characters. */
  readonly textualHeader: string;
  /** The decoded extended textual headers (at most `maxExtendedTextualHeaders`). */
  readonly extendedTextualHeaders: readonly string[];
  /** Extended textual headers in the file, decoded or not. */
  readonly extendedTextualHeaderCount: number;
  readonly binaryHeader: SegyBinaryHeader;
  readonly revision: { readonly major: number; readonly minor: number };
  readonly littleEndian: boolean;
  readonly format: SampleFormat;
  /** The file's sample interval, seconds; 0 when the binary header gives none (traces must). */
  readonly sampleInterval: number;
  /** True when every trace has the binary header's sample count. */
  readonly fixedLengthTraces: boolean;
  /** Samples per trace from the binary header (fixed-length files); for others, the first trace's. */
  readonly samplesPerTrace: number;
  readonly traceCount: number;
  /** Metres per unit of length in the headers: 1, or 0.3048 for feet. */
  readonly metresPerLengthUnit: number;
  /** File offset of trace `index`'s header. */
  traceOffset(index: number): number;
  /** Samples in trace `index`. */
  traceSamples(index: number): number;
  /** Read the header of trace `index` (0-based; a RangeError outside [0, traceCount)). */
  readTraceHeader(index: number): SegyTraceHeader | null;
  /** Read trace `index` (0-based; a RangeError outside [0, traceCount)). */
  readTrace(index: number): SegyTraceOutcome;
}

export type SegyFileOutcome =
  | { readonly ok: true; readonly value: SegyFile; readonly warnings: readonly GatherProblem[] }
  | { readonly ok: false; readonly problems: readonly GatherProblem[] };

function problem(
  severity: 'error' | 'warning',
  code: string,
  byteOffset: number | null,
  field: string | undefined,
  message: string,
  fix: string,
): GatherProblem {
  const bare: GatherProblem = { code, severity, line: 0, column: null, message, fix, byteOffset };
  return field === undefined ? bare : { ...bare, field };
}

function refuse(code: string, byteOffset: number | null, field: string | undefined, message: string, fix: string): { ok: false; problems: GatherProblem[] } {
  return { ok: false, problems: [problem('error', code, byteOffset, field, message, fix)] };
}

function binaryAt(headerField: HeaderField): number {
  return BINARY_HEADER_OFFSET + headerField.offset;
}

/** "binary header bytes 3225–3226 (data sample format code, file offset 3224)" */
function binaryPlace(headerField: HeaderField): string {
  return `binary header byte${headerField.bytes === 1 ? '' : 's'} ${binaryBytes(headerField)} (${headerField.name}, file offset ${binaryAt(headerField)})`;
}

function positiveLimit(value: number | undefined, fallback: number, name: string): number {
  if (value === undefined) return fallback;
  if (!Number.isSafeInteger(value) || value < 0) throw new RangeError(`SegyReadOptions.${name} must be a whole number ≥ 0, got ${value}`);
  return value;
}

/** Scale a header value by a SEG-Y scalar: positive multiplies, negative divides, zero is one. */
export function applyScalar(value: number, scalar: number): number {
  if (scalar > 0) return value * scalar;
  if (scalar < 0) return value / -scalar;
  return value;
}

/** Read `length` bytes at `offset`, or null when the source returns fewer. */
function readExactly(source: ByteSource, offset: number, length: number): Uint8Array | null {
  const bytes = source.read(offset, length);
  return bytes.byteLength === length ? bytes : null;
}

function shortRead(offset: number, length: number, what: string): { ok: false; problems: GatherProblem[] } {
  return refuse(
    'segy-read-short',
    offset,
    undefined,
    `reading ${what} (${length} bytes at file offset ${offset}) returned fewer bytes than the file's size promises`,
    'check that the file is not being written or truncated while it is read, then read it again',
  );
}

/** Open a SEG-Y file: read and check its headers and index its traces. */
export function openSegy(input: ByteSource | Uint8Array, options: SegyReadOptions = {}): SegyFileOutcome {
  const source = input instanceof Uint8Array ? byteSourceOf(input) : input;
  const maxSamplesPerTrace = positiveLimit(options.maxSamplesPerTrace, DEFAULT_MAX_SAMPLES_PER_TRACE, 'maxSamplesPerTrace');
  const maxTraces = positiveLimit(options.maxTraces, DEFAULT_MAX_TRACES, 'maxTraces');
  const maxExtended = positiveLimit(options.maxExtendedTextualHeaders, DEFAULT_MAX_EXTENDED_TEXTUAL_HEADERS, 'maxExtendedTextualHeaders');
  const size = source.size;
  const warnings: GatherProblem[] = [];
  if (!Number.isSafeInteger(size) || size < FIXED_HEADERS_BYTES) {
    return refuse(
      'segy-too-short',
      null,
      undefined,
      `the file is ${size} bytes long: a SEG-Y file starts with a 3200-byte textual header and a 400-byte binary header (3600 bytes)`,
      'check that this is a SEG-Y file and that the upload or copy was complete',
    );
  }
  const head = readExactly(source, 0, FIXED_HEADERS_BYTES);
  if (head === null) return shortRead(0, FIXED_HEADERS_BYTES, 'the textual and binary file headers');
  const headView = viewOf(head);

  const order = detectByteOrder(headView);
  if (!order.ok) {
    return refuse('segy-byte-order-unknown', binaryAt(BINARY_HEADER_FIELDS.byteOrderConstant), BINARY_HEADER_FIELDS.byteOrderConstant.name, order.reason, 'rewrite the file with the byte-order constant 16909060 set, or big-endian without it');
  }
  const littleEndian = order.littleEndian;
  if (order.how === 'guessed') {
    warnings.push(problem('warning', 'segy-byte-order-guessed', binaryAt(BINARY_HEADER_FIELDS.dataSampleFormatCode), BINARY_HEADER_FIELDS.dataSampleFormatCode.name,
      'the file has no byte-order constant (bytes 3297–3300) and its data sample format code (3225–3226) makes sense only little-endian, so it was read little-endian',
      'check the samples; a writer that sets the rev 2 byte-order constant removes the guess'));
  }

  const binaryView = viewOf(head.subarray(BINARY_HEADER_OFFSET));
  const binaryEntries = Object.entries(BINARY_HEADER_FIELDS) as Array<[BinaryHeaderFieldName, HeaderField]>;
  const binaryHeader = Object.fromEntries(binaryEntries.map(([name, headerField]) => [name, readHeaderField(binaryView, headerField, littleEndian)])) as Record<BinaryHeaderFieldName, number>;

  let major = binaryHeader.segyFormatRevisionMajor;
  const minor = binaryHeader.segyFormatRevisionMinor;
  if (major > 2) {
    warnings.push(problem('warning', 'segy-revision-unknown', binaryAt(BINARY_HEADER_FIELDS.segyFormatRevisionMajor), BINARY_HEADER_FIELDS.segyFormatRevisionMajor.name,
      `${binaryPlace(BINARY_HEADER_FIELDS.segyFormatRevisionMajor)} gives revision ${major}.${minor}, newer than the rev 2 this reader knows; it was read as rev 2`,
      'check the traces; report the file so a reader for its revision can be added'));
    major = 2;
  }

  const formatField = BINARY_HEADER_FIELDS.dataSampleFormatCode;
  const format = SAMPLE_FORMATS.get(binaryHeader.dataSampleFormatCode);
  if (format === undefined) {
    const refused = REFUSED_FORMATS.get(binaryHeader.dataSampleFormatCode);
    return refuse(
      refused === undefined ? 'segy-format-unknown' : 'segy-format-unsupported',
      binaryAt(formatField),
      formatField.name,
      `${binaryPlace(formatField)} reads ${binaryHeader.dataSampleFormatCode}: ${refused ?? 'not a SEG-Y data sample format (the standard defines 1–12, 15 and 16)'}`,
      'rewrite the file in format 1 (IBM float), 2 (32-bit integer), 3 (16-bit integer), 5 (IEEE float) or 8 (8-bit integer)',
    );
  }

  const sampleFormat: SampleFormat = format;

  // Extended textual headers.
  const extendedField = BINARY_HEADER_FIELDS.extendedTextualHeaders;
  const declaredExtended = binaryHeader.extendedTextualHeaders;
  const extendedTextualHeaders: string[] = [];
  let extendedCount: number;
  if (declaredExtended >= 0) {
    extendedCount = declaredExtended;
    const end = FIXED_HEADERS_BYTES + extendedCount * TEXTUAL_HEADER_BYTES;
    if (end > size) {
      return refuse('segy-extended-headers-beyond-file', binaryAt(extendedField), extendedField.name,
        `${binaryPlace(extendedField)} gives ${extendedCount} extended textual headers, which would end at byte ${end}, beyond the end of the ${size}-byte file`,
        'set the count to the number of 3200-byte extended textual headers the file holds (usually 0)');
    }
    for (let index = 0; index < Math.min(extendedCount, maxExtended); index += 1) {
      const at = FIXED_HEADERS_BYTES + index * TEXTUAL_HEADER_BYTES;
      const bytes = readExactly(source, at, TEXTUAL_HEADER_BYTES);
      if (bytes === null) return shortRead(at, TEXTUAL_HEADER_BYTES, `extended textual header ${index + 1}`);
      extendedTextualHeaders.push(decodeTextualHeader(bytes, sniffTextualEncoding(bytes)));
    }
  } else if (declaredExtended === -1) {
    // A variable number, the last holding the end stanza: search at most maxExtended of them.
    extendedCount = 0;
    let ended = false;
    while (!ended && extendedCount < maxExtended) {
      const at = FIXED_HEADERS_BYTES + extendedCount * TEXTUAL_HEADER_BYTES;
      if (at + TEXTUAL_HEADER_BYTES > size) break;
      const bytes = readExactly(source, at, TEXTUAL_HEADER_BYTES);
      if (bytes === null) return shortRead(at, TEXTUAL_HEADER_BYTES, `extended textual header ${extendedCount + 1}`);
      const text = decodeTextualHeader(bytes, sniffTextualEncoding(bytes));
      extendedTextualHeaders.push(text);
      extendedCount += 1;
      ended = text.replace(/ /g, '').includes(END_TEXT_STANZA.replace(/ /g, ''));
    }
    if (!ended) {
      return refuse('segy-extended-headers-unterminated', binaryAt(extendedField), extendedField.name,
        `${binaryPlace(extendedField)} is −1 (a variable number of extended textual headers ending with ${END_TEXT_STANZA}), but none of the ${extendedCount} that follow (at most ${maxExtended} searched) holds that stanza`,
        'set the count to the number of extended textual headers, or end the last one with the stanza');
    }
  } else {
    return refuse('segy-extended-headers-invalid', binaryAt(extendedField), extendedField.name,
      `${binaryPlace(extendedField)} reads ${declaredExtended}: the count of extended textual headers is 0 or more, or −1 for a variable number`,
      'set the count to the number of 3200-byte extended textual headers the file holds (usually 0)');
  }
  if (extendedCount > extendedTextualHeaders.length) {
    warnings.push(problem('warning', 'segy-extended-headers-skipped', FIXED_HEADERS_BYTES + extendedTextualHeaders.length * TEXTUAL_HEADER_BYTES, extendedField.name,
      `only the first ${extendedTextualHeaders.length} of ${extendedCount} extended textual headers were decoded`,
      'raise maxExtendedTextualHeaders to keep more of them'));
  }

  let firstTrace = FIXED_HEADERS_BYTES + extendedCount * TEXTUAL_HEADER_BYTES;
  let end = size;
  if (major >= 2) {
    const additionalField = BINARY_HEADER_FIELDS.maximumAdditionalTraceHeaders;
    if (binaryHeader.maximumAdditionalTraceHeaders > 0) {
      return refuse('segy-additional-trace-headers', binaryAt(additionalField), additionalField.name,
        `${binaryPlace(additionalField)} gives ${binaryHeader.maximumAdditionalTraceHeaders} additional 240-byte trace headers, which this reader does not read`,
        'rewrite the file with standard 240-byte trace headers only');
    }
    const offsetField = BINARY_HEADER_FIELDS.byteOffsetOfFirstTrace;
    const declaredFirst = binaryHeader.byteOffsetOfFirstTrace;
    if (declaredFirst > 0) {
      if (declaredFirst < firstTrace || declaredFirst > size) {
        return refuse('segy-first-trace-offset-invalid', binaryAt(offsetField), offsetField.name,
          `${binaryPlace(offsetField)} puts the first trace at byte ${declaredFirst}, ${declaredFirst < firstTrace ? `inside the file headers, which end at byte ${firstTrace}` : `beyond the end of the ${size}-byte file`}`,
          'set it to 0, or to the offset of the first trace header');
      }
      firstTrace = declaredFirst;
    }
    const trailerField = BINARY_HEADER_FIELDS.dataTrailerStanzas;
    const trailers = binaryHeader.dataTrailerStanzas;
    if (trailers > 0 && trailers * TEXTUAL_HEADER_BYTES <= size - firstTrace) end = size - trailers * TEXTUAL_HEADER_BYTES;
    else if (trailers !== 0) {
      warnings.push(problem('warning', 'segy-data-trailer-ignored', binaryAt(trailerField), trailerField.name,
        `${binaryPlace(trailerField)} gives ${trailers} data trailer stanzas, which do not fit after the traces; bytes after the last whole trace are ignored`,
        'check the end of the file; set the count to the number of 3200-byte trailer records'));
    }
  }

  // File sample interval, microseconds.
  let intervalMicroseconds = 0;
  const extendedInterval = binaryHeader.extendedSampleInterval;
  if (major >= 2 && Number.isFinite(extendedInterval) && extendedInterval > 0) intervalMicroseconds = extendedInterval;
  else if (binaryHeader.sampleInterval > 0) intervalMicroseconds = binaryHeader.sampleInterval;
  else if (binaryHeader.sampleInterval < 0) {
    warnings.push(problem('warning', 'segy-sample-interval-negative', binaryAt(BINARY_HEADER_FIELDS.sampleInterval), BINARY_HEADER_FIELDS.sampleInterval.name,
      `${binaryPlace(BINARY_HEADER_FIELDS.sampleInterval)} reads ${binaryHeader.sampleInterval} µs; each trace's own interval (trace header bytes 117–118) is used instead`,
      'set the sample interval in microseconds'));
  }

  // Length unit.
  let metresPerLengthUnit = 1;
  if (binaryHeader.measurementSystem === 2) metresPerLengthUnit = FOOT;
  else if (binaryHeader.measurementSystem !== 1) {
    warnings.push(problem('warning', 'segy-measurement-system-unknown', binaryAt(BINARY_HEADER_FIELDS.measurementSystem), BINARY_HEADER_FIELDS.measurementSystem.name,
      `${binaryPlace(BINARY_HEADER_FIELDS.measurementSystem)} reads ${binaryHeader.measurementSystem}, neither 1 (metres) nor 2 (feet): coordinates, elevations and offsets were read as metres`,
      'check the positions; set the measurement system to 1 or 2'));
  }

  // Samples per trace from the binary header.
  const samplesField = BINARY_HEADER_FIELDS.samplesPerDataTrace;
  let binarySamples = binaryHeader.samplesPerDataTrace;
  if (major >= 2 && binaryHeader.extendedSamplesPerDataTrace > 0) binarySamples = binaryHeader.extendedSamplesPerDataTrace;
  const flag = binaryHeader.fixedLengthTraceFlag;
  const flagField = BINARY_HEADER_FIELDS.fixedLengthTraceFlag;
  if (major >= 1 && flag !== 0 && flag !== 1) {
    warnings.push(problem('warning', 'segy-fixed-length-flag-unknown', binaryAt(flagField), flagField.name,
      `${binaryPlace(flagField)} reads ${flag}, neither 0 (lengths may vary) nor 1 (fixed): each trace's own sample count was used`,
      'set the flag to 1 when every trace has the same number of samples'));
  }
  const fixedLengthTraces = major === 0 || flag === 1;
  const bytesPerSample = format.bytesPerSample;
  const offsets: number[] = [];
  const counts: number[] = [];
  let samplesPerTrace: number;
  let traceCount: number;
  const tooManySamples = (count: number, at: number, where: string) =>
    refuse('segy-samples-per-trace-too-many', at, undefined,
      `${where} gives ${count} samples per trace, more than the limit of ${maxSamplesPerTrace}`,
      'check the sample count; raise maxSamplesPerTrace if the traces really are this long');

  if (fixedLengthTraces) {
    samplesPerTrace = binarySamples;
    if (samplesPerTrace === 0 && firstTrace + TRACE_HEADER_BYTES <= end) {
      const traceHead = readExactly(source, firstTrace, TRACE_HEADER_BYTES);
      if (traceHead === null) return shortRead(firstTrace, TRACE_HEADER_BYTES, 'the first trace header');
      samplesPerTrace = readHeaderField(viewOf(traceHead), TRACE_HEADER_FIELDS.samplesInThisTrace, littleEndian);
      if (samplesPerTrace > 0) {
        warnings.push(problem('warning', 'segy-samples-per-trace-from-trace', binaryAt(samplesField), samplesField.name,
          `${binaryPlace(samplesField)} is 0; every trace was read with the first trace's count (${samplesPerTrace}, trace header bytes 115–116)`,
          'set the samples per trace in the binary header'));
      }
    }
    if (samplesPerTrace <= 0) {
      return refuse('segy-samples-per-trace-zero', binaryAt(samplesField), samplesField.name,
        `${binaryPlace(samplesField)} and the first trace header (bytes 115–116) give no samples per trace`,
        'set the number of samples per trace in the binary header');
    }
    if (samplesPerTrace > maxSamplesPerTrace) return tooManySamples(samplesPerTrace, binaryAt(samplesField), binaryPlace(samplesField));
    const traceLength = TRACE_HEADER_BYTES + samplesPerTrace * bytesPerSample;
    traceCount = Math.floor(Math.max(0, end - firstTrace) / traceLength);
    const leftOver = end - firstTrace - traceCount * traceLength;
    if (traceCount === 0) {
      return refuse('segy-no-traces', firstTrace, undefined,
        `the file holds no whole trace: after the headers (${firstTrace} bytes) come ${Math.max(0, end - firstTrace)} bytes, and a trace of ${samplesPerTrace} samples in format ${format.code} takes ${traceLength}`,
        `check the samples per trace (${binaryBytes(samplesField)}) and the format code (3225–3226), and that the file is complete`);
    }
    if (leftOver > 0) {
      warnings.push(problem('warning', 'segy-trailing-bytes', firstTrace + traceCount * traceLength, undefined,
        `${leftOver} bytes after trace ${traceCount} do not make a whole trace of ${traceLength} bytes and were ignored`,
        'check that the file was copied whole and that the samples per trace and format code are right'));
    }
  } else {
    // Variable length: one pass over the trace headers.
    let at = firstTrace;
    while (at + TRACE_HEADER_BYTES <= end) {
      if (offsets.length >= maxTraces) {
        return refuse('segy-too-many-traces', at, undefined,
          `the file holds more than ${maxTraces} traces`, 'split the file, or raise maxTraces');
      }
      const traceHead = readExactly(source, at, TRACE_HEADER_BYTES);
      if (traceHead === null) return shortRead(at, TRACE_HEADER_BYTES, `trace header ${offsets.length + 1}`);
      let count = readHeaderField(viewOf(traceHead), TRACE_HEADER_FIELDS.samplesInThisTrace, littleEndian);
      if (count === 0) count = binarySamples;
      if (count > maxSamplesPerTrace) return tooManySamples(count, at + TRACE_HEADER_FIELDS.samplesInThisTrace.offset, `trace ${offsets.length + 1}, trace header bytes 115–116,`);
      const length = TRACE_HEADER_BYTES + count * bytesPerSample;
      if (at + length > end) break;
      offsets.push(at);
      counts.push(count);
      at += length;
    }
    traceCount = offsets.length;
    if (traceCount === 0) {
      return refuse('segy-no-traces', firstTrace, undefined,
        `the file holds no whole trace after its headers (${firstTrace} bytes; the file is ${size} bytes)`,
        'check that the file is complete and that the trace sample counts (bytes 115–116) are right');
    }
    if (at < end) {
      warnings.push(problem('warning', 'segy-trailing-bytes', at, undefined,
        `${end - at} bytes after trace ${traceCount} do not make a whole trace and were ignored`,
        'check that the file was copied whole and that the sample counts (trace header bytes 115–116) are right'));
    }
    samplesPerTrace = counts[0] ?? 0;
  }

  const fixedLength = TRACE_HEADER_BYTES + samplesPerTrace * bytesPerSample;
  const traceOffset = (index: number): number => {
    checkIndex(index, traceCount);
    return fixedLengthTraces ? firstTrace + index * fixedLength : (offsets[index] ?? 0);
  };
  const traceSamples = (index: number): number => {
    checkIndex(index, traceCount);
    return fixedLengthTraces ? samplesPerTrace : (counts[index] ?? 0);
  };
  const readTraceHeader = (index: number): SegyTraceHeader | null => {
    const at = traceOffset(index);
    const bytes = readExactly(source, at, TRACE_HEADER_BYTES);
    return bytes === null ? null : decodeTraceHeader(viewOf(bytes), littleEndian);
  };

  const textualBytes = head.subarray(0, TEXTUAL_HEADER_BYTES);
  const textualEncoding = sniffTextualEncoding(textualBytes);
  const file: SegyFile = {
    textualEncoding,
    textualHeader: decodeTextualHeader(textualBytes, textualEncoding),
    extendedTextualHeaders,
    extendedTextualHeaderCount: extendedCount,
    binaryHeader,
    revision: { major: binaryHeader.segyFormatRevisionMajor, minor },
    littleEndian,
    format,
    sampleInterval: intervalMicroseconds * 1e-6,
    fixedLengthTraces,
    samplesPerTrace,
    traceCount,
    metresPerLengthUnit,
    traceOffset,
    traceSamples,
    readTraceHeader,
    readTrace: (index) => readOneTrace(index, traceOffset(index), traceSamples(index)),
  };
  return { ok: true, value: file, warnings };

  function readOneTrace(index: number, at: number, count: number): SegyTraceOutcome {
    const length = TRACE_HEADER_BYTES + count * bytesPerSample;
    const bytes = readExactly(source, at, length);
    if (bytes === null) return shortRead(at, length, `trace ${index + 1}`);
    const traceWarnings: GatherProblem[] = [];
    const header = decodeTraceHeader(viewOf(bytes.subarray(0, TRACE_HEADER_BYTES)), littleEndian);
    const fields = TRACE_HEADER_FIELDS;
    const place = (headerField: HeaderField) => `trace ${index + 1}, trace header bytes ${traceBytes(headerField)} (${headerField.name}, file offset ${at + headerField.offset})`;

    const intervalField = fields.sampleIntervalForThisTrace;
    const ownInterval = header.sampleIntervalForThisTrace;
    const microseconds = ownInterval > 0 ? ownInterval : intervalMicroseconds;
    if (!(microseconds > 0)) {
      return refuse('segy-sample-interval-missing', at + intervalField.offset, intervalField.name,
        `${place(intervalField)} reads ${ownInterval} µs and the binary header (bytes 3217–3218) gives no sample interval either`,
        'set the sample interval in microseconds in the binary header or in every trace header');
    }
    if (count === 0) {
      traceWarnings.push(problem('warning', 'segy-trace-empty', at + fields.samplesInThisTrace.offset, fields.samplesInThisTrace.name,
        `${place(fields.samplesInThisTrace)} gives 0 samples and the binary header none either: the trace has a header and no samples`,
        'check the sample count; a picker finds no first break on this trace'));
    }
    if (fixedLengthTraces && header.samplesInThisTrace !== 0 && header.samplesInThisTrace !== count) {
      traceWarnings.push(problem('warning', 'segy-trace-sample-count-differs', at + fields.samplesInThisTrace.offset, fields.samplesInThisTrace.name,
        `${place(fields.samplesInThisTrace)} gives ${header.samplesInThisTrace} samples, but the file's traces are fixed at ${count} (binary header); ${count} were read`,
        'check the trace; set the fixed-length trace flag (3503–3504) to 0 if trace lengths vary'));
    }

    const scalarWarning = (headerField: HeaderField, scalar: number) => {
      if (STANDARD_SCALARS.has(scalar)) return;
      traceWarnings.push(problem('warning', 'segy-scalar-unusual', at + headerField.offset, headerField.name,
        `${place(headerField)} reads ${scalar}; the standard allows 0, ±1, ±10, ±100, ±1000 and ±10000. It was applied as given (negative divides)`,
        'check the positions, elevations and times of this trace'));
    };
    scalarWarning(fields.coordinateScalar, header.coordinateScalar);
    scalarWarning(fields.elevationScalar, header.elevationScalar);
    scalarWarning(fields.timeScalar, header.timeScalar);

    const units = header.coordinateUnits;
    const lengthCoordinates = units === 0 || units === 1;
    if (!lengthCoordinates) {
      traceWarnings.push(problem('warning', 'segy-coordinates-not-length', at + fields.coordinateUnits.offset, fields.coordinateUnits.name,
        `${place(fields.coordinateUnits)} reads ${units}${units >= 2 && units <= 4 ? ' (geographic coordinates)' : ''}, not 1 (length): source and receiver positions were not read`,
        'give positions as lengths (coordinate units 1), or enter the geometry with the pick table'));
    }
    const coordinate = (value: number) => applyScalar(value, header.coordinateScalar) * metresPerLengthUnit;
    const elevation = (value: number) => applyScalar(value, header.elevationScalar) * metresPerLengthUnit;
    const receiver: GatherLocation | null = lengthCoordinates
      ? { x: coordinate(header.groupCoordinateX), y: coordinate(header.groupCoordinateY), elevation: elevation(header.receiverGroupElevation) }
      : null;
    const sourceLocation: GatherLocation | null = lengthCoordinates
      ? { x: coordinate(header.sourceCoordinateX), y: coordinate(header.sourceCoordinateY), elevation: elevation(header.surfaceElevationAtSource) }
      : null;

    const samples = sampleFormat.float32Exact ? new Float32Array(count) : new Float64Array(count);
    sampleFormat.decode(viewOf(bytes.subarray(TRACE_HEADER_BYTES)), count, littleEndian, samples);

    const metadata = new TraceHeaderMetadata(header);
    const trace: SegyTrace = {
      index,
      byteOffset: at,
      header,
      samples,
      sampleInterval: microseconds * 1e-6,
      delay: applyScalar(header.delayRecordingTime, header.timeScalar) * 1e-3,
      receiver,
      source: sourceLocation,
      receiverStation: null,
      sourceStation: header.energySourcePointNumber === 0 ? null : String(header.energySourcePointNumber),
      metadata,
      sourceDepth: lengthCoordinates ? elevation(header.sourceDepthBelowSurface) : null,
      offset: header.distanceFromSourceToReceiverGroup * metresPerLengthUnit,
    };
    return { ok: true, value: trace, warnings: traceWarnings };
  }
}

function checkIndex(index: number, traceCount: number): void {
  if (!Number.isInteger(index) || index < 0 || index >= traceCount) {
    throw new RangeError(`SEG-Y trace index ${index} is outside 0…${traceCount - 1}`);
  }
}

/** The trace-header fields as a list, made once (decoding runs once per trace of a large file). */
const TRACE_HEADER_ENTRIES = Object.entries(TRACE_HEADER_FIELDS) as Array<[TraceHeaderFieldName, HeaderField]>;
const TRACE_HEADER_NAMES: readonly TraceHeaderFieldName[] = TRACE_HEADER_ENTRIES.map(([name]) => name);

/** Every field of a 240-byte trace header, unscaled. */
export function decodeTraceHeader(view: DataView, littleEndian: boolean): SegyTraceHeader {
  const header = {} as Record<TraceHeaderFieldName, number>;
  for (const [name, headerField] of TRACE_HEADER_ENTRIES) header[name] = readHeaderField(view, headerField, littleEndian);
  return header;
}

/**
 * A trace's header values as the gather's `metadata` (field name → decimal text), made from the
 * decoded header on demand: a file of many traces is read without building ninety strings per
 * trace that nobody asks for.
 */
class TraceHeaderMetadata implements ReadonlyMap<string, string> {
  constructor(private readonly header: SegyTraceHeader) {}
  get size(): number {
    return TRACE_HEADER_NAMES.length;
  }
  get(key: string): string | undefined {
    return this.has(key) ? String(this.header[key as TraceHeaderFieldName]) : undefined;
  }
  has(key: string): boolean {
    return Object.prototype.hasOwnProperty.call(TRACE_HEADER_FIELDS, key);
  }
  forEach(callback: (value: string, key: string, map: ReadonlyMap<string, string>) => void): void {
    for (const name of TRACE_HEADER_NAMES) callback(String(this.header[name]), name, this);
  }
  *entries(): MapIterator<[string, string]> {
    for (const name of TRACE_HEADER_NAMES) yield [name, String(this.header[name])];
  }
  *keys(): MapIterator<string> {
    yield* TRACE_HEADER_NAMES;
  }
  *values(): MapIterator<string> {
    for (const name of TRACE_HEADER_NAMES) yield String(this.header[name]);
  }
  [Symbol.iterator](): MapIterator<[string, string]> {
    return this.entries();
  }
}

/**
 * Warnings from many traces, one entry per code: the first occurrence, its message followed by
 * how many more traces had the same problem. Keeps a file of 100 000 traces from listing 100 000
 * copies of one warning.
 */
class WarningsByCode {
  private readonly first = new Map<string, GatherProblem>();
  private readonly repeats = new Map<string, number>();

  add(warning: GatherProblem): void {
    if (!this.first.has(warning.code)) this.first.set(warning.code, warning);
    else this.repeats.set(warning.code, (this.repeats.get(warning.code) ?? 0) + 1);
  }

  list(): GatherProblem[] {
    return [...this.first.values()].map((warning) => {
      const more = this.repeats.get(warning.code) ?? 0;
      return more === 0 ? warning : { ...warning, message: `${warning.message} (and ${more} more like it)` };
    });
  }
}

/** Read a whole SEG-Y file into a gather (traces in file order), or refuse it whole. */
export function readSegy(input: ByteSource | Uint8Array, options: SegyReadOptions = {}): GatherOutcome {
  const opened = openSegy(input, options);
  if (!opened.ok) return opened;
  const file = opened.value;
  const maxTotalSamples = positiveLimit(options.maxTotalSamples, DEFAULT_MAX_TOTAL_SAMPLES, 'maxTotalSamples');
  const maxTraces = positiveLimit(options.maxTraces, DEFAULT_MAX_TRACES, 'maxTraces');
  if (file.traceCount > maxTraces) {
    return refuse('segy-too-many-traces', file.traceOffset(0), undefined,
      `the file holds ${file.traceCount} traces, more than the limit of ${maxTraces} read at once`,
      'read it trace by trace with openSegy, split the file, or raise maxTraces');
  }
  let total = 0;
  for (let index = 0; index < file.traceCount; index += 1) total += file.traceSamples(index);
  if (total > maxTotalSamples) {
    return refuse('segy-too-many-samples', file.traceOffset(0), undefined,
      `the file's ${file.traceCount} traces hold ${total} samples in all, more than the limit of ${maxTotalSamples} held in memory at once`,
      'read it trace by trace with openSegy, or raise maxTotalSamples');
  }
  const warnings = new WarningsByCode();
  for (const warning of opened.warnings) warnings.add(warning);
  const traces: SegyTrace[] = [];
  for (let index = 0; index < file.traceCount; index += 1) {
    const trace = file.readTrace(index);
    if (!trace.ok) return trace;
    for (const warning of trace.warnings) warnings.add(warning);
    traces.push(trace.value);
  }
  const metadata = new Map<string, string>();
  metadata.set('textualEncoding', file.textualEncoding);
  metadata.set('textualHeader', textualLines(file.textualHeader).join('\n'));
  file.extendedTextualHeaders.forEach((text, index) => metadata.set(`extendedTextualHeader${index + 1}`, textualLines(text).join('\n')));
  metadata.set('byteOrder', file.littleEndian ? 'little-endian' : 'big-endian');
  for (const name of Object.keys(BINARY_HEADER_FIELDS) as BinaryHeaderFieldName[]) metadata.set(name, String(file.binaryHeader[name]));
  const gather: Gather = { format: 'SEG-Y', traces, metadata };
  return { ok: true, value: gather, warnings: warnings.list() };
}
