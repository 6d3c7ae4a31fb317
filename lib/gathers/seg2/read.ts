/**
 * The SEG-2 shot-gather reader (Pullan1990): the bytes of a SEG-2 file in, a gather in SI units
 * out, or every problem that refuses it.
 *
 * What it reads (layout in `layout.ts`, from the project's reference notes `seg-formats.md` §3):
 * the file descriptor block (either byte order), the trace pointers, the file's free-format
 * strings, then for each trace its descriptor block, its strings and its samples in data format
 * 1–5. SAMPLE_INTERVAL (s) and DELAY (s) give each trace's time axis; RECEIVER_LOCATION and
 * SOURCE_LOCATION (x [y [z]], in the file's UNITS) give its geometry in metres;
 * RECEIVER_STATION_NUMBER and SOURCE_STATION_NUMBER its station names. Every other string is
 * kept, by keyword, in the trace's or the file's metadata (a repeated keyword's values joined by
 * a line break).
 *
 * At the edges:
 * - bad structure refuses the whole file with a problem naming the byte offset and field: a file
 *   shorter than its blocks, a wrong block ID, no traces, a pointer block smaller than 4 bytes
 *   per trace, a pointer into the file header or past the end, a descriptor or data block past
 *   the end, a data block smaller than its samples, an unknown data format code, trace blocks
 *   that overlap, a free-format string that runs past its block;
 * - a trace without a positive SAMPLE_INTERVAL, or with a DELAY that is not a number, refuses
 *   the file (every pick would be on a wrong time axis); a missing DELAY is 0;
 * - what real files do beyond the standard loads with a warning: a revision other than 1, block
 *   sizes that are not a multiple of 4, a data block larger than its samples, `*` before a
 *   keyword, non-printing bytes, an unterminated string, a location that is not 1–3 numbers
 *   (left in metadata, location null), a UNITS that is no length unit (locations null), no UNITS
 *   at all (metres assumed).
 * - z of a location is taken as elevation, positive up: the reference notes do not confirm the
 *   sign, so check it against a survey whose elevations are known.
 *
 * Bounded work: the file's size is checked against `maxBytes` first; every trace descriptor is
 * checked to lie inside the file, and trace blocks to be disjoint, before any string is parsed or
 * any sample decoded, so the strings read and the samples allocated total at most about twice
 * the file's size (a 16-bit sample becomes a 4-byte float), and the work is linear in it.
 *
 * @example
 * const outcome = readSeg2(bytes);
 * if (outcome.ok) outcome.value.traces[0]?.sampleInterval; // 0.00025
 * else outcome.problems[0]?.message; // 'trace 3: bytes 4–7 (data block size) …'
 */
import type { Gather, GatherLocation, GatherOutcome, GatherTrace } from '../gather.js';
import {
  DECODED_TRACE_KEYWORDS,
  FILE_DESCRIPTOR_FIELDS,
  FILE_DESCRIPTOR_FIXED_BYTES,
  FORMAT3_GROUP_BYTES,
  FORMAT3_GROUP_SAMPLES,
  SEG2_FORMATS,
  TRACE_DESCRIPTOR_BLOCK_ID,
  TRACE_DESCRIPTOR_FIELDS,
  TRACE_DESCRIPTOR_FIXED_BYTES,
  TRACE_POINTER_BYTES,
  TRACE_POINTERS_OFFSET,
  UNIT_METRES,
  UNITS_KEYWORD,
  dataBytesNeeded,
  type Seg2Field,
  type Seg2Format,
} from './layout.js';
import { SEG2_DEFAULT_MAX_PROBLEMS, Seg2ProblemList } from './problems.js';
import { seg2ByteOrder, sniffSeg2, viewOf } from './sniff.js';
import { readSeg2Strings, type Seg2String, type Seg2Terminators } from './strings.js';

export interface ReadSeg2Options {
  /** Largest file accepted, bytes; default 1 GiB. */
  readonly maxBytes?: number;
  /** Most problems listed before one closing entry counts the rest; default 200. */
  readonly maxProblems?: number;
}

/** Default size limit: 1 GiB holds a thousand 1,000-channel shots of 250 float samples. */
export const SEG2_DEFAULT_MAX_BYTES = 2 ** 30;

const RECORDER_FIX = 'copy the file again from the recorder or the original medium; a file cut short in transfer or a damaged block cannot be read';

/** "bytes 4–7 (data block size)": a field's absolute byte range and name. */
function fieldAt(field: Seg2Field, blockStart: number): string {
  const first = blockStart + field.offset;
  const last = first + field.bytes - 1;
  return first === last ? `byte ${first} (${field.name})` : `bytes ${first}–${last} (${field.name})`;
}

/** A trace's fixed descriptor fields, once checked against the file. */
interface TraceBlock {
  /** 1-based trace number, as messages give it. */
  readonly number: number;
  readonly pointer: number;
  readonly descriptorBytes: number;
  readonly dataBytes: number;
  readonly sampleCount: number;
  readonly format: Seg2Format;
}

export function readSeg2(bytes: Uint8Array | ArrayBuffer, options: ReadSeg2Options = {}): GatherOutcome {
  const maxBytes = options.maxBytes ?? SEG2_DEFAULT_MAX_BYTES;
  const problems = new Seg2ProblemList(options.maxProblems ?? SEG2_DEFAULT_MAX_PROBLEMS);
  const refused = (): GatherOutcome => ({ ok: false, problems: problems.problems() });
  const view = viewOf(bytes);
  const length = view.byteLength;
  if (length > maxBytes) {
    problems.error(
      'file-too-large',
      { byteOffset: null, field: 'file' },
      `the file is ${length} bytes, more than the ${maxBytes} bytes accepted`,
      'split the survey into one file per shot, or raise the size limit',
    );
    return refused();
  }
  const byteOrder = seg2ByteOrder(view);
  if (byteOrder === null) {
    const sniff = sniffSeg2(bytes);
    const reason = sniff.seg2 ? 'no file descriptor block ID' : sniff.reason;
    problems.error(
      'not-seg2',
      { byteOffset: 0, field: FILE_DESCRIPTOR_FIELDS.blockId.name },
      `not a SEG-2 file: ${reason}`,
      'check that this is the SEG-2 file the recorder wrote (often .sg2, .seg2 or .dat), not another format',
    );
    return refused();
  }
  const little = byteOrder === 'little';
  if (length < FILE_DESCRIPTOR_FIXED_BYTES) {
    problems.error(
      'file-truncated',
      { byteOffset: length, field: 'file descriptor block' },
      `the file ends at byte ${length}, inside the ${FILE_DESCRIPTOR_FIXED_BYTES}-byte file descriptor block`,
      RECORDER_FIX,
    );
    return refused();
  }

  // ---- File descriptor block ----
  const fd = FILE_DESCRIPTOR_FIELDS;
  const revision = view.getUint16(fd.revision.offset, little);
  if (revision !== 1) {
    problems.warning(
      'revision-unexpected',
      { byteOffset: fd.revision.offset, field: fd.revision.name },
      `${fieldAt(fd.revision, 0)} read ${revision}; this reader knows revision 1 and read the file as such`,
      'check the traces look right; a later revision may add fields this reader ignores',
    );
  }
  const pointerBytes = view.getUint16(fd.pointerBytes.offset, little);
  const traceCount = view.getUint16(fd.traceCount.offset, little);
  if (traceCount === 0) {
    problems.error(
      'trace-count-zero',
      { byteOffset: fd.traceCount.offset, field: fd.traceCount.name },
      `${fieldAt(fd.traceCount, 0)} is 0: the file holds no traces`,
      'export the shot again with its traces; a SEG-2 file needs at least one',
    );
    return refused();
  }
  if (pointerBytes < TRACE_POINTER_BYTES * traceCount) {
    problems.error(
      'pointer-block-too-small',
      { byteOffset: fd.pointerBytes.offset, field: fd.pointerBytes.name },
      `${fieldAt(fd.pointerBytes, 0)} is ${pointerBytes}, too small for the ${traceCount} traces that ${fieldAt(fd.traceCount, 0)} gives (4 bytes each, ${TRACE_POINTER_BYTES * traceCount} bytes): one of the two fields is damaged`,
      RECORDER_FIX,
    );
    return refused();
  }
  if (pointerBytes % TRACE_POINTER_BYTES !== 0) {
    problems.warning(
      'pointer-block-size-odd',
      { byteOffset: fd.pointerBytes.offset, field: fd.pointerBytes.name },
      `${fieldAt(fd.pointerBytes, 0)} is ${pointerBytes}, not a multiple of 4 as the standard asks; read anyway`,
      'nothing to do if the traces look right',
    );
  }
  const stringsStart = TRACE_POINTERS_OFFSET + pointerBytes;
  if (stringsStart > length) {
    problems.error(
      'file-truncated',
      { byteOffset: length, field: 'trace pointer sub-block' },
      `the file ends at byte ${length}, inside the trace pointer sub-block (bytes ${TRACE_POINTERS_OFFSET}–${stringsStart - 1}, from ${fieldAt(fd.pointerBytes, 0)} = ${pointerBytes})`,
      RECORDER_FIX,
    );
    return refused();
  }
  const terminators = readTerminators(view, problems);
  if (terminators === null) return refused();

  // ---- Trace pointers and fixed trace descriptors (checked before anything is decoded) ----
  const blocks: TraceBlock[] = [];
  for (let index = 0; index < traceCount; index += 1) {
    const block = readTraceBlock(view, little, index, stringsStart, problems);
    if (block !== null) blocks.push(block);
  }
  if (problems.hasErrors) return refused();
  checkDisjoint(blocks, problems);
  if (problems.hasErrors) return refused();

  // ---- Strings and samples ----
  let firstTrace = length;
  for (const block of blocks) firstTrace = Math.min(firstTrace, block.pointer);
  const fileStrings = readSeg2Strings(view, little, stringsStart, firstTrace, terminators, 'file descriptor block', problems);
  const fileMetadata = new Map<string, string>();
  for (const entry of fileStrings) addMetadata(fileMetadata, entry);
  const fileUnits = fileStrings.find((entry) => entry.keyword.toUpperCase() === UNITS_KEYWORD) ?? null;
  const units: UnitsState = { fileUnits, assumedWarned: false, unknownWarned: new Set() };

  const traces: GatherTrace[] = [];
  for (const block of blocks) {
    const trace = readTrace(view, little, block, terminators, units, problems);
    if (trace !== null) traces.push(trace);
  }
  if (problems.hasErrors) return refused();
  const gather: Gather = { format: 'SEG-2', traces, metadata: fileMetadata };
  return { ok: true, value: gather, warnings: problems.problems() };
}

/** The string and line terminators, or null after reporting a length other than 1 or 2. */
function readTerminators(view: DataView, problems: Seg2ProblemList): Seg2Terminators | null {
  const fd = FILE_DESCRIPTOR_FIELDS;
  const read = (lengthField: Seg2Field, bytesField: Seg2Field): number[] | null => {
    const count = view.getUint8(lengthField.offset);
    if (count !== 1 && count !== 2) {
      problems.error(
        'terminator-length-invalid',
        { byteOffset: lengthField.offset, field: lengthField.name },
        `${fieldAt(lengthField, 0)} is ${count}: it must be 1 or 2`,
        RECORDER_FIX,
      );
      return null;
    }
    const terminator = [view.getUint8(bytesField.offset)];
    if (count === 2) terminator.push(view.getUint8(bytesField.offset + 1));
    return terminator;
  };
  const stringTerminator = read(fd.stringTerminatorLength, fd.stringTerminator);
  const lineTerminator = read(fd.lineTerminatorLength, fd.lineTerminator);
  if (stringTerminator === null || lineTerminator === null) return null;
  return { string: stringTerminator, line: lineTerminator };
}

/** One trace's pointer and fixed descriptor fields, checked to lie inside the file; null after an error. */
function readTraceBlock(view: DataView, little: boolean, index: number, stringsStart: number, problems: Seg2ProblemList): TraceBlock | null {
  const length = view.byteLength;
  const number = index + 1;
  const pointerAt = TRACE_POINTERS_OFFSET + TRACE_POINTER_BYTES * index;
  const pointerField = `trace ${number} pointer`;
  const pointer = view.getUint32(pointerAt, little);
  const pointerText = `the pointer of trace ${number} (bytes ${pointerAt}–${pointerAt + 3}) gives offset ${pointer}`;
  if (pointer < stringsStart) {
    problems.error(
      'trace-pointer-in-file-header',
      { byteOffset: pointerAt, field: pointerField },
      `${pointerText}, inside the file descriptor block and its trace pointers (bytes 0–${stringsStart - 1})`,
      RECORDER_FIX,
    );
    return null;
  }
  if (pointer + TRACE_DESCRIPTOR_FIXED_BYTES > length) {
    problems.error(
      'trace-pointer-past-end',
      { byteOffset: pointerAt, field: pointerField },
      `${pointerText}, but the file is ${length} bytes long and a trace descriptor block needs ${TRACE_DESCRIPTOR_FIXED_BYTES} bytes there`,
      RECORDER_FIX,
    );
    return null;
  }
  const td = TRACE_DESCRIPTOR_FIELDS;
  const label = `trace ${number}`;
  const blockId = view.getUint16(pointer + td.blockId.offset, little);
  if (blockId !== TRACE_DESCRIPTOR_BLOCK_ID) {
    problems.error(
      'trace-block-id-wrong',
      { byteOffset: pointer, field: `${label} ${td.blockId.name}` },
      `${pointerText}, where ${fieldAt(td.blockId, pointer)} read 0x${blockId.toString(16).toUpperCase().padStart(4, '0')} instead of 0x4422: the pointer or the block is damaged`,
      RECORDER_FIX,
    );
    return null;
  }
  const descriptorBytes = view.getUint16(pointer + td.descriptorBytes.offset, little);
  const dataBytes = view.getUint32(pointer + td.dataBytes.offset, little);
  const sampleCount = view.getUint32(pointer + td.sampleCount.offset, little);
  const code = view.getUint8(pointer + td.formatCode.offset);
  const place = (field: Seg2Field) => ({ byteOffset: pointer + field.offset, field: `${label} ${field.name}` });
  if (descriptorBytes < TRACE_DESCRIPTOR_FIXED_BYTES) {
    problems.error(
      'trace-descriptor-too-small',
      place(td.descriptorBytes),
      `${label}: ${fieldAt(td.descriptorBytes, pointer)} is ${descriptorBytes}, less than the ${TRACE_DESCRIPTOR_FIXED_BYTES} bytes of the block's fixed fields`,
      RECORDER_FIX,
    );
    return null;
  }
  if (descriptorBytes % 4 !== 0) {
    problems.warning(
      'trace-descriptor-size-odd',
      place(td.descriptorBytes),
      `${label}: ${fieldAt(td.descriptorBytes, pointer)} is ${descriptorBytes}, not a multiple of 4 as the standard asks; read anyway`,
      'nothing to do if the traces look right',
    );
  }
  const dataStart = pointer + descriptorBytes;
  if (dataStart > length) {
    problems.error(
      'trace-descriptor-past-end',
      place(td.descriptorBytes),
      `${label}: ${fieldAt(td.descriptorBytes, pointer)} is ${descriptorBytes}, so the descriptor block would end at byte ${dataStart}, past the end of the file (${length} bytes)`,
      RECORDER_FIX,
    );
    return null;
  }
  const format = SEG2_FORMATS[code];
  if (format === undefined) {
    problems.error(
      'format-code-unknown',
      place(td.formatCode),
      `${label}: ${fieldAt(td.formatCode, pointer)} is ${code}; SEG-2 defines codes 1 to 5 (16-bit integer, 32-bit integer, 20-bit float, 32-bit float, 64-bit float)`,
      'export the shot again in one of the standard data formats, or copy the file again if it was damaged',
    );
    return null;
  }
  if (dataStart + dataBytes > length) {
    problems.error(
      'data-block-past-end',
      place(td.dataBytes),
      `${label}: ${fieldAt(td.dataBytes, pointer)} is ${dataBytes}, so the data block (from byte ${dataStart}) would end at byte ${dataStart + dataBytes}, past the end of the file (${length} bytes)`,
      RECORDER_FIX,
    );
    return null;
  }
  const needed = dataBytesNeeded(format, sampleCount);
  if (needed > dataBytes) {
    problems.error(
      'data-block-too-small',
      place(td.sampleCount),
      `${label}: ${fieldAt(td.sampleCount, pointer)} is ${sampleCount}, which in format ${code} (${format.meaning}) needs ${needed} bytes, but ${fieldAt(td.dataBytes, pointer)} gives ${dataBytes}`,
      RECORDER_FIX,
    );
    return null;
  }
  if (needed < dataBytes) {
    problems.warning(
      'data-block-larger-than-samples',
      place(td.dataBytes),
      `${label}: ${fieldAt(td.dataBytes, pointer)} is ${dataBytes}, more than the ${needed} bytes its ${sampleCount} samples need; the rest was ignored`,
      'nothing to do if the trace looks right',
    );
  }
  if (code === 3 && sampleCount % FORMAT3_GROUP_SAMPLES !== 0) {
    problems.warning(
      'format3-partial-group',
      place(td.sampleCount),
      `${label}: ${fieldAt(td.sampleCount, pointer)} is ${sampleCount}, not a multiple of 4 as the 20-bit format asks; the last group was read in part`,
      'nothing to do if the trace looks right',
    );
  }
  return { number, pointer, descriptorBytes, dataBytes, sampleCount, format };
}

/** Report trace blocks (descriptor and data) that overlap: each byte may belong to one trace only. */
function checkDisjoint(blocks: readonly TraceBlock[], problems: Seg2ProblemList): void {
  const sorted = [...blocks].sort((first, second) => first.pointer - second.pointer || first.number - second.number);
  for (let index = 1; index < sorted.length; index += 1) {
    const before = sorted[index - 1];
    const after = sorted[index];
    if (before === undefined || after === undefined) continue;
    const beforeEnd = before.pointer + before.descriptorBytes + before.dataBytes;
    if (after.pointer < beforeEnd) {
      problems.error(
        'trace-blocks-overlap',
        { byteOffset: after.pointer, field: `trace ${after.number} pointer` },
        `trace ${after.number} starts at byte ${after.pointer}, inside trace ${before.number} (bytes ${before.pointer}–${beforeEnd - 1}): two traces cannot share bytes, so a pointer or a block size is damaged`,
        RECORDER_FIX,
      );
    }
  }
}

interface UnitsState {
  readonly fileUnits: Seg2String | null;
  assumedWarned: boolean;
  readonly unknownWarned: Set<string>;
}

function addMetadata(metadata: Map<string, string>, entry: Seg2String): void {
  const earlier = metadata.get(entry.keyword);
  metadata.set(entry.keyword, earlier === undefined ? entry.value : `${earlier}\n${entry.value}`);
}

/** A plain decimal such as 0.00025, -0.010, 1.25e-4 (no units, no thousands separators). */
const DECIMAL = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

function parseDecimal(text: string): number | null {
  if (!DECIMAL.test(text)) return null;
  const value = Number(text);
  return Number.isFinite(value) ? value : null;
}

/** One trace's strings and samples; null after an error. */
function readTrace(
  view: DataView,
  little: boolean,
  block: TraceBlock,
  terminators: Seg2Terminators,
  units: UnitsState,
  problems: Seg2ProblemList,
): GatherTrace | null {
  const label = `trace ${block.number}`;
  const stringsStart = block.pointer + TRACE_DESCRIPTOR_FIXED_BYTES;
  const stringsEnd = block.pointer + block.descriptorBytes;
  const entries = readSeg2Strings(view, little, stringsStart, stringsEnd, terminators, `${label} descriptor block`, problems);

  const decodedKeywords = new Set<string>(Object.values(DECODED_TRACE_KEYWORDS));
  const decoded = new Map<string, Seg2String>();
  const metadata = new Map<string, string>();
  for (const entry of entries) {
    const upper = entry.keyword.toUpperCase();
    if (!decodedKeywords.has(upper)) {
      addMetadata(metadata, entry);
      continue;
    }
    const earlier = decoded.get(upper);
    if (earlier === undefined) {
      decoded.set(upper, entry);
    } else if (earlier.value !== entry.value) {
      problems.warning(
        'keyword-repeated',
        { byteOffset: entry.byteOffset, field: `${label} ${upper}` },
        `${label}: ${upper} is given twice, "${earlier.value}" at byte ${earlier.byteOffset} and "${entry.value}" at byte ${entry.byteOffset}; the first was used`,
        'check which value is right; the recorder or an editing program may have added the second',
      );
    }
  }

  const keywords = DECODED_TRACE_KEYWORDS;
  const intervalEntry = decoded.get(keywords.sampleInterval);
  let sampleInterval: number | null = null;
  if (intervalEntry === undefined) {
    problems.error(
      'sample-interval-missing',
      { byteOffset: stringsStart, field: `${label} ${keywords.sampleInterval}` },
      `${label}: its descriptor block (bytes ${block.pointer}–${stringsEnd - 1}) has no ${keywords.sampleInterval} string, so its samples have no time axis`,
      `add "${keywords.sampleInterval} <seconds>" to the trace's strings (for example with the recorder's export), or export the shot again`,
    );
  } else {
    const value = parseDecimal(intervalEntry.value.split(/\s+/)[0] ?? '');
    if (value === null || value <= 0) {
      problems.error(
        'sample-interval-invalid',
        { byteOffset: intervalEntry.byteOffset, field: `${label} ${keywords.sampleInterval}` },
        `${label}: ${keywords.sampleInterval} "${intervalEntry.value}" at byte ${intervalEntry.byteOffset} is not a positive number of seconds`,
        'give the sample interval in seconds as a plain decimal, such as 0.00025 for 0.25 ms',
      );
    } else {
      sampleInterval = value;
    }
  }
  const delayEntry = decoded.get(keywords.delay);
  let delay = 0;
  if (delayEntry !== undefined) {
    const value = parseDecimal(delayEntry.value.split(/\s+/)[0] ?? '');
    if (value === null) {
      problems.error(
        'delay-invalid',
        { byteOffset: delayEntry.byteOffset, field: `${label} ${keywords.delay}` },
        `${label}: ${keywords.delay} "${delayEntry.value}" at byte ${delayEntry.byteOffset} is not a number of seconds; every pick on this trace would shift by the unknown delay`,
        'give the recording delay in seconds as a plain decimal (negative for a pre-trigger), such as -0.010',
      );
      return null;
    }
    delay = value;
  }
  if (sampleInterval === null) return null;

  const unitsEntry = entries.find((entry) => entry.keyword.toUpperCase() === UNITS_KEYWORD) ?? units.fileUnits;
  const receiver = readLocation(decoded.get(keywords.receiverLocation), unitsEntry, label, units, metadata, problems);
  const source = readLocation(decoded.get(keywords.sourceLocation), unitsEntry, label, units, metadata, problems);
  const receiverStation = decoded.get(keywords.receiverStation)?.value ?? null;
  const sourceStation = decoded.get(keywords.sourceStation)?.value ?? null;
  const samples = decodeSamples(view, little, block);
  return { samples, sampleInterval, delay, receiver, source, receiverStation, sourceStation, metadata };
}

/**
 * A location string `x [y [z]]` in metres; null (the raw text kept in metadata, with a warning)
 * when it is not 1–3 numbers or UNITS is no length unit. No UNITS at all: metres, with one warning
 * for the file.
 */
function readLocation(
  entry: Seg2String | undefined,
  unitsEntry: Seg2String | null,
  label: string,
  units: UnitsState,
  metadata: Map<string, string>,
  problems: Seg2ProblemList,
): GatherLocation | null {
  if (entry === undefined) return null;
  const keyword = entry.keyword.toUpperCase();
  const parts = entry.value === '' ? [] : entry.value.split(/\s+/);
  const numbers = parts.map(parseDecimal);
  if (parts.length < 1 || parts.length > 3 || numbers.some((value) => value === null)) {
    problems.warning(
      'location-invalid',
      { byteOffset: entry.byteOffset, field: `${label} ${keyword}` },
      `${label}: ${keyword} "${entry.value}" at byte ${entry.byteOffset} is not 1 to 3 numbers (x [y [z]]); the trace has no ${keyword === DECODED_TRACE_KEYWORDS.receiverLocation ? 'receiver' : 'source'} position`,
      'give the position as 1 to 3 plain decimals separated by blanks, or add it to the pick table instead',
    );
    metadata.set(entry.keyword, entry.value);
    return null;
  }
  let metres = 1;
  if (unitsEntry === null) {
    if (!units.assumedWarned) {
      units.assumedWarned = true;
      problems.warning(
        'units-assumed-metres',
        { byteOffset: entry.byteOffset, field: UNITS_KEYWORD },
        `the file gives locations but no ${UNITS_KEYWORD} string; they were read as metres`,
        'check the positions against the survey notes; if they are in feet, convert them or add "UNITS FEET" to the file',
      );
    }
  } else {
    const unit = (unitsEntry.value.split(/\s+/)[0] ?? '').toUpperCase();
    const factor = UNIT_METRES[unit];
    if (factor === undefined) {
      if (!units.unknownWarned.has(unit)) {
        units.unknownWarned.add(unit);
        problems.warning(
          'units-unknown',
          { byteOffset: unitsEntry.byteOffset, field: UNITS_KEYWORD },
          `${UNITS_KEYWORD} "${unitsEntry.value}" at byte ${unitsEntry.byteOffset} is not a length unit this reader knows (METERS, FEET, INCHES, CENTIMETERS); locations were left in the metadata, not used as positions`,
          'give the positions in the pick table instead, or set UNITS to the unit of the locations',
        );
      }
      metadata.set(entry.keyword, entry.value);
      return null;
    }
    metres = factor;
  }
  const [x, y, z] = numbers;
  return { x: (x ?? 0) * metres, y: y == null ? null : y * metres, elevation: z == null ? null : z * metres };
}

/** The samples of a checked trace block, decoded by its format code. */
function decodeSamples(view: DataView, little: boolean, block: TraceBlock): Float32Array | Float64Array {
  const count = block.sampleCount;
  const start = block.pointer + block.descriptorBytes;
  const samples = block.format.exactInFloat32 ? new Float32Array(count) : new Float64Array(count);
  switch (block.format.code) {
    case 1:
      for (let index = 0; index < count; index += 1) samples[index] = view.getInt16(start + 2 * index, little);
      break;
    case 2:
      for (let index = 0; index < count; index += 1) samples[index] = view.getInt32(start + 4 * index, little);
      break;
    case 3:
      for (let index = 0; index < count; index += 1) {
        const group = Math.floor(index / FORMAT3_GROUP_SAMPLES);
        const within = index % FORMAT3_GROUP_SAMPLES;
        const groupStart = start + FORMAT3_GROUP_BYTES * group;
        const exponent = (view.getUint16(groupStart, little) >>> (4 * within)) & 0xf;
        const word = view.getUint16(groupStart + 2 + 2 * within, little);
        // One's complement: a set top bit means −(bitwise NOT of the word).
        const mantissa = word & 0x8000 ? word - 0xffff : word;
        samples[index] = mantissa * 2 ** exponent;
      }
      break;
    case 4:
      for (let index = 0; index < count; index += 1) samples[index] = view.getFloat32(start + 4 * index, little);
      break;
    case 5:
      for (let index = 0; index < count; index += 1) samples[index] = view.getFloat64(start + 8 * index, little);
      break;
  }
  return samples;
}
