/**
 * `openFileByteSource` (server/gather-file.ts): every read checked against Node's whole-file read
 * (`fs.readFileSync`), the kernel's own list of open descriptors (`/proc/self/fd`), the SEG-Y
 * reader over the same bytes in memory, segyio's reading of files it wrote (python3-segyio, via
 * make-segyio-files.py), and the process's resident memory while a 256 MiB file is read.
 */
import {
  closeSync,
  mkdtempSync,
  openSync,
  readdirSync,
  readFileSync,
  readlinkSync,
  realpathSync,
  rmSync,
  truncateSync,
  writeFileSync,
  writeSync,
} from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { BINARY_HEADER_FIELDS, TRACE_HEADER_FIELDS } from '../../lib/gathers/segy/layout.js';
import { openSegy, type SegyFile } from '../../lib/gathers/segy/read.js';
import { seededRandom } from '../../lib/random.js';
import { DEFAULT_READ_AHEAD_BYTES, openFileByteSource, type FileByteSource } from '../../server/gather-file.js';
import { buildSegy, writeField } from './segy/build-segy.js';
import { lazySegyioFiles, SEGYIO_SOURCE } from './segy/segyio-files.js';

const READ_FILE_SYNC = "fs.readFileSync (Node's whole-file read)";
const PROC_FD = "/proc/self/fd (the kernel's list of this process's open descriptors)";

const folder = mkdtempSync(join(tmpdir(), 'slopebreak-file-source-'));
afterAll(() => rmSync(folder, { recursive: true, force: true }));
const segyioFiles = lazySegyioFiles(afterAll);

let fileCount = 0;
/** Write `bytes` to a new file in the test folder and return its path. */
function fileWith(bytes: Uint8Array): string {
  fileCount += 1;
  const path = join(folder, `file-${fileCount}.bin`);
  writeFileSync(path, bytes);
  return path;
}

function seededBytes(length: number, seed: number): Uint8Array {
  const random = seededRandom(seed);
  const bytes = new Uint8Array(length);
  for (let index = 0; index < length; index += 1) bytes[index] = Math.floor(random() * 256);
  return bytes;
}

/** First index where the two differ (a length difference counts), or −1. */
function firstDifference(actual: Uint8Array, expected: Uint8Array): number {
  const shorter = Math.min(actual.byteLength, expected.byteLength);
  for (let index = 0; index < shorter; index += 1) if (actual[index] !== expected[index]) return index;
  return actual.byteLength === expected.byteLength ? -1 : shorter;
}

/** A seeded Fisher–Yates shuffle of a copy of `items`. */
function shuffle<T>(items: readonly T[], seed: number): T[] {
  const random = seededRandom(seed);
  const out = [...items];
  for (let index = out.length - 1; index > 0; index -= 1) {
    const other = Math.floor(random() * (index + 1));
    [out[index], out[other]] = [out[other]!, out[index]!];
  }
  return out;
}

/** Descriptors of this process open on `path`, as the kernel lists them. */
function descriptorsOpenOn(path: string): number {
  const target = realpathSync(path);
  let count = 0;
  for (const entry of readdirSync('/proc/self/fd')) {
    try {
      if (readlinkSync(join('/proc/self/fd', entry)) === target) count += 1;
    } catch {
      // the descriptor readdirSync used for the listing, closed by now
    }
  }
  return count;
}

function withSource<T>(path: string, readAheadBytes: number, use: (source: FileByteSource) => T): T {
  const source = openFileByteSource(path, { readAheadBytes });
  try {
    return use(source);
  } finally {
    source.close();
  }
}

function opened(input: Parameters<typeof openSegy>[0], what: string): SegyFile {
  const outcome = openSegy(input);
  if (!outcome.ok) throw new Error(`${what}: refused: ${outcome.problems.map((problem) => problem.message).join('; ')}`);
  return outcome.value;
}

describe('openFileByteSource: bytes', () => {
  const size = 100_003;
  const bytes = seededBytes(size, 20_250_601);
  const path = fileWith(bytes);
  const whole = new Uint8Array(readFileSync(path));

  // 1 byte: every read bigger than the buffer (read straight through); 4096: many refills and
  // ranges that straddle the buffer's end; the default: the whole file in the buffer.
  for (const readAheadBytes of [1, 4096, DEFAULT_READ_AHEAD_BYTES]) {
    it(`openFileByteSource returns what ${READ_FILE_SYNC} reads for 3,000 seeded ranges, read-ahead ${readAheadBytes} bytes`, () => {
      const random = seededRandom(readAheadBytes);
      const pick = (low: number, high: number) => low + Math.floor(random() * (high - low + 1));
      withSource(path, readAheadBytes, (source) => {
        expect(source.size, `size, ${READ_FILE_SYNC}`).toBe(whole.byteLength);
        for (let trial = 0; trial < 3000; trial += 1) {
          const kind = random();
          let offset: number;
          let length: number;
          if (kind < 0.4) [offset, length] = [pick(0, size - 1), pick(0, 300)];
          else if (kind < 0.7) [offset, length] = [pick(0, size - 1), pick(4096 - 64, 4096 + 64)];
          else if (kind < 0.9) [offset, length] = [pick(0, size - 1), pick(4097, 20_000)];
          else [offset, length] = [pick(size - 500, size), pick(0, 1000)];
          const expected = whole.subarray(offset, Math.min(offset + length, size));
          const actual = source.read(offset, length);
          expect(firstDifference(actual, expected), `read(${offset}, ${length}) trial ${trial}: first byte differing from ${READ_FILE_SYNC}`).toBe(-1);
        }
      });
    });
  }

  it(`openFileByteSource returns what ${READ_FILE_SYNC} reads for ranges ending or starting one byte either side of the buffer's end`, () => {
    const readAheadBytes = 4096;
    withSource(path, readAheadBytes, (source) => {
      for (const start of [0, 12_345, size - readAheadBytes - 1]) {
        const bufferEnd = start + readAheadBytes;
        const ranges: Array<[number, number]> = [
          [bufferEnd - 100, 99], [bufferEnd - 100, 100], [bufferEnd - 100, 101],
          [bufferEnd - 1, 1], [bufferEnd - 1, 2], [bufferEnd, 1],
        ];
        for (const [offset, length] of ranges) {
          source.read(start, 10); // refills the buffer to hold [start, start + 4096)
          const expected = whole.subarray(offset, Math.min(offset + length, size));
          expect(firstDifference(source.read(offset, length), expected), `buffer from ${start}: read(${offset}, ${length}), ${READ_FILE_SYNC}`).toBe(-1);
        }
      }
    });
  });

  it('openFileByteSource at the end of the file: the last bytes whole; past the end, only the bytes up to it; from the end on, none', () => {
    withSource(path, 4096, (source) => {
      expect(firstDifference(source.read(size - 10, 10), whole.subarray(size - 10)), READ_FILE_SYNC).toBe(-1);
      expect(firstDifference(source.read(size - 10, 20), whole.subarray(size - 10)), READ_FILE_SYNC).toBe(-1);
      expect(source.read(size - 10, 20).byteLength).toBe(10);
      expect(source.read(size, 5).byteLength).toBe(0);
      expect(source.read(size + 1000, 5).byteLength).toBe(0);
    });
  });

  it('openFileByteSource answers a zero-length read with no bytes and no system read, at the start, inside and at the end', () => {
    withSource(path, 4096, (source) => {
      for (const offset of [0, 50_000, size]) {
        expect(source.read(offset, 0).byteLength, `read(${offset}, 0)`).toBe(0);
      }
      expect(source.systemReads).toBe(0);
    });
  });

  it('openFileByteSource hands out copies: bytes read earlier survive a refill, and changing them changes nothing read later', () => {
    withSource(path, 4096, (source) => {
      const first = source.read(0, 100);
      source.read(size - 100, 100); // refills the buffer
      expect(firstDifference(first, whole.subarray(0, 100)), `bytes 0–99 after a refill, ${READ_FILE_SYNC}`).toBe(-1);
      first.fill(0);
      expect(firstDifference(source.read(0, 100), whole.subarray(0, 100)), `bytes 0–99 read again, ${READ_FILE_SYNC}`).toBe(-1);
    });
  });

  it('openFileByteSource refuses a negative or fractional offset or length and a read-ahead below 1 byte (RangeError)', () => {
    withSource(path, 4096, (source) => {
      expect(() => source.read(-1, 1)).toThrow(RangeError);
      expect(() => source.read(0.5, 1)).toThrow(RangeError);
      expect(() => source.read(0, -1)).toThrow(RangeError);
      expect(() => source.read(Number.NaN, 1)).toThrow(RangeError);
    });
    expect(() => openFileByteSource(path, { readAheadBytes: 0 })).toThrow(/readAheadBytes must be a whole number ≥ 1/);
    expect(descriptorsOpenOn(path), `descriptors left open, ${PROC_FD}`).toBe(0);
  });

  it('openFileByteSource opens an empty file: size 0, and every read returns no bytes', () => {
    withSource(fileWith(new Uint8Array(0)), 4096, (source) => {
      expect(source.size).toBe(0);
      expect(source.read(0, 0).byteLength).toBe(0);
      expect(source.read(0, 10).byteLength).toBe(0);
    });
  });
});

describe('openFileByteSource: the file descriptor', () => {
  it(`openFileByteSource holds one descriptor until close(), then none (${PROC_FD}); reads after close() throw, a second close() does not`, () => {
    const path = fileWith(seededBytes(10_000, 7));
    const source = openFileByteSource(path);
    expect(descriptorsOpenOn(path), `while open, ${PROC_FD}`).toBe(1);
    source.read(0, 10);
    expect(source.closed).toBe(false);
    source.close();
    expect(descriptorsOpenOn(path), `after close(), ${PROC_FD}`).toBe(0);
    expect(source.closed).toBe(true);
    expect(() => source.read(0, 10)).toThrow(/after close\(\)/);
    expect(() => source.close()).not.toThrow();
  });

  it('openFileByteSource refuses a directory, naming it, and leaves nothing open; a missing file throws ENOENT', () => {
    const directory = mkdtempSync(join(folder, 'directory-'));
    expect(() => openFileByteSource(directory)).toThrow(/is not a regular file/);
    expect(descriptorsOpenOn(directory), `descriptors left open, ${PROC_FD}`).toBe(0);
    expect(() => openFileByteSource(join(folder, 'no-such-file.sgy'))).toThrow(expect.objectContaining({ code: 'ENOENT' }));
  });
});

describe('openFileByteSource: a file truncated after it was opened', () => {
  it('openFileByteSource returns the bytes still there: a range over the new end comes back short, one beyond it empty', () => {
    const original = seededBytes(100_000, 11);
    const path = fileWith(original);
    withSource(path, 4096, (source) => {
      truncateSync(path, 60_000);
      expect(source.size, 'the size is the one seen at open').toBe(100_000);
      const straddling = source.read(59_990, 20);
      expect(firstDifference(straddling, original.subarray(59_990, 60_000)), 'the 10 bytes left before the new end').toBe(-1);
      expect(source.read(70_000, 100).byteLength).toBe(0);
    });
  });

  it('openSegy over openFileByteSource refuses the traces cut off (segy-read-short) and reads those before the cut', () => {
    const samples = 1000;
    const traceLength = 240 + 4 * samples;
    const path = fileWith(buildSegy({ traces: 20, samples }));
    withSource(path, 8192, (source) => {
      const file = opened(source, 'before truncation');
      expect(file.traceCount).toBe(20);
      truncateSync(path, 3600 + 10 * traceLength + 100);
      for (let index = 0; index < 10; index += 1) expect(file.readTrace(index).ok, `trace ${index}, before the cut`).toBe(true);
      for (const index of [10, 15, 19]) {
        const outcome = file.readTrace(index);
        expect(outcome.ok ? 'read' : outcome.problems.map((problem) => problem.code), `trace ${index}, cut off`).toEqual(['segy-read-short']);
      }
    });
  });
});

describe('openFileByteSource under the SEG-Y reader', () => {
  it('openFileByteSource: reading 200 traces of 4000 samples one after another takes one system read per read-ahead buffer, not one per trace', () => {
    const samples = 4000;
    const traces = 200;
    const traceLength = 240 + 4 * samples;
    const readAheadBytes = 64 * 1024;
    const path = fileWith(buildSegy({ traces, samples }));
    withSource(path, readAheadBytes, (source) => {
      const file = opened(source, 'built file');
      for (let index = 0; index < traces; index += 1) {
        file.readTraceHeader(index);
        expect(file.readTrace(index).ok).toBe(true);
      }
      // One read for the file headers' buffer, then one per whole group of traces the buffer holds.
      const bound = 1 + Math.ceil(traces / Math.floor(readAheadBytes / traceLength));
      expect(source.systemReads, `system reads for ${traces} traces (bound ${bound})`).toBeLessThanOrEqual(bound);
    });
  });

  it(`openSegy over openFileByteSource reads every trace of every segyio-written file as openSegy over its bytes in memory, and as segyio does (${SEGYIO_SOURCE})`, () => {
    const made = segyioFiles();
    const names = Object.keys(made.files);
    expect(names.length, 'segyio-written files').toBeGreaterThanOrEqual(7);
    for (const name of names) {
      const reading = made.files[name]!;
      const inMemory = opened(made.bytes(name), `${name} in memory`);
      // 5000 bytes: refills every two or three traces and traces that straddle the buffer's end.
      for (const readAheadBytes of [DEFAULT_READ_AHEAD_BYTES, 5000]) {
        withSource(join(made.dir, `${name}.sgy`), readAheadBytes, (source) => {
          const what = `${name}, read-ahead ${readAheadBytes}`;
          const fromFile = opened(source, what);
          expect(fromFile.traceCount, `${what}: traces, ${SEGYIO_SOURCE}`).toBe(reading.tracecount);
          expect(fromFile.binaryHeader, `${what}: binary header`).toEqual(inMemory.binaryHeader);
          expect([fromFile.textualHeader, ...fromFile.extendedTextualHeaders], `${what}: textual headers`).toEqual([inMemory.textualHeader, ...inMemory.extendedTextualHeaders]);
          // Forward, then in a seeded shuffled order (random access refills the buffer backwards too).
          const order = Array.from({ length: fromFile.traceCount }, (_, index) => index);
          const shuffled = shuffle(order, readAheadBytes);
          for (const index of [...order, ...shuffled]) {
            const fileTrace = fromFile.readTrace(index);
            expect(fileTrace, `${what}: trace ${index} as read in memory`).toEqual(inMemory.readTrace(index));
            expect(fromFile.readTraceHeader(index), `${what}: trace header ${index}`).toEqual(inMemory.readTraceHeader(index));
            if (!fileTrace.ok) throw new Error(`${what}: trace ${index} refused`);
            const expected = reading.traces[index]!;
            const mismatch = expected.findIndex((value, k) => fileTrace.value.samples[k] !== value);
            expect(mismatch, `${what}: trace ${index}, first sample differing from ${SEGYIO_SOURCE}`).toBe(-1);
          }
        });
      }
    }
  });
});

describe('openFileByteSource: memory', () => {
  const SAMPLES = 4000;
  const TRACE_LENGTH = 240 + 4 * SAMPLES;
  const TARGET_BYTES = 256 * 1024 * 1024;
  const TRACES = Math.ceil(TARGET_BYTES / TRACE_LENGTH);
  /** Sample k of trace t: whole quarters below 2000, so exact as an IEEE float32. */
  const sampleValue = (trace: number, k: number) => (trace % 1000) + k * 0.25;
  /**
   * Resident memory the read may add: 64 MiB, a quarter of what reading the whole file first
   * would add. The file source itself keeps its 4 MiB buffer; the rest is garbage not yet
   * collected (every trace's copy and samples). Measured: about 21 MiB, with or without a
   * forced collection (node --expose-gc, called when it is there).
   */
  const MAX_GROWTH_BYTES = 64 * 1024 * 1024;

  /** A big-endian IEEE-float (format 5) file, written header, then traces, in 1 MiB writes. */
  function writeLargeSegy(path: string): void {
    const fd = openSync(path, 'w');
    try {
      const head = new Uint8Array(3600);
      head.fill(0x20, 0, 3200); // an ASCII textual header of spaces
      head.set(new TextEncoder().encode('C 1 SLOPEBREAK FILE-SOURCE MEMORY TEST'), 0);
      const headView = new DataView(head.buffer);
      const binary = { sampleInterval: 250, samplesPerDataTrace: SAMPLES, dataSampleFormatCode: 5, measurementSystem: 1, segyFormatRevisionMajor: 1, fixedLengthTraceFlag: 1 };
      for (const [name, value] of Object.entries(binary)) writeField(headView, 3200, BINARY_HEADER_FIELDS[name as keyof typeof binary], value, false);
      writeSync(fd, head);
      const perChunk = Math.floor((1024 * 1024) / TRACE_LENGTH);
      const chunk = new Uint8Array(perChunk * TRACE_LENGTH);
      const view = new DataView(chunk.buffer);
      let inChunk = 0;
      for (let trace = 0; trace < TRACES; trace += 1) {
        const at = inChunk * TRACE_LENGTH;
        writeField(view, at, TRACE_HEADER_FIELDS.traceSequenceNumberWithinFile, trace + 1, false);
        writeField(view, at, TRACE_HEADER_FIELDS.samplesInThisTrace, SAMPLES, false);
        writeField(view, at, TRACE_HEADER_FIELDS.sampleIntervalForThisTrace, 250, false);
        writeField(view, at, TRACE_HEADER_FIELDS.coordinateUnits, 1, false);
        for (let k = 0; k < SAMPLES; k += 1) view.setFloat32(at + 240 + 4 * k, sampleValue(trace, k), false);
        inChunk += 1;
        if (inChunk === perChunk || trace === TRACES - 1) {
          writeSync(fd, chunk, 0, inChunk * TRACE_LENGTH);
          inChunk = 0;
        }
      }
    } finally {
      closeSync(fd);
    }
  }

  it(`openSegy over openFileByteSource reads every trace of a 256 MiB file with resident memory growing less than ${MAX_GROWTH_BYTES / 2 ** 20} MiB`, () => {
    const path = join(folder, 'large.sgy');
    try {
      writeLargeSegy(path);
      globalThis.gc?.();
      const baseline = process.memoryUsage().rss;
      let peak = baseline;
      let wrong = 0;
      let traceCount = 0;
      withSource(path, DEFAULT_READ_AHEAD_BYTES, (source) => {
        const file = opened(source, 'the 256 MiB file');
        traceCount = file.traceCount;
        for (let index = 0; index < file.traceCount; index += 1) {
          const outcome = file.readTrace(index);
          if (!outcome.ok) throw new Error(`trace ${index} refused: ${outcome.problems[0]?.message}`);
          const { samples, header } = outcome.value;
          if (header.traceSequenceNumberWithinFile !== index + 1 || samples[0] !== sampleValue(index, 0) || samples[SAMPLES - 1] !== sampleValue(index, SAMPLES - 1)) wrong += 1;
          if (index % 128 === 0) peak = Math.max(peak, process.memoryUsage().rss);
        }
      });
      peak = Math.max(peak, process.memoryUsage().rss);
      expect(traceCount, 'traces written').toBe(TRACES);
      expect(wrong, 'traces whose sequence number or first or last sample differs from what was written').toBe(0);
      expect(peak - baseline, `resident memory growth, bytes (process.memoryUsage().rss; a whole-file read would add ${TRACES * TRACE_LENGTH})`).toBeLessThan(MAX_GROWTH_BYTES);
    } finally {
      rmSync(path, { force: true });
    }
  });
});
