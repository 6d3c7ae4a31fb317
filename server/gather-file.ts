/**
 * A `ByteSource` over a file on disk, so the SEG-Y reader (`lib/gathers/segy/read.ts`) can read a
 * file of many gigabytes a trace at a time without ever holding it whole.
 *
 * `openFileByteSource(path)` opens the file once (`fs.openSync`), takes its size from the open
 * descriptor (`fs.fstatSync`), and answers every `read(offset, length)` from one read-ahead buffer
 * of `readAheadBytes` (default 4 MiB, never more than the file): a request the buffer holds is
 * copied out of it; any other refills the buffer from the requested offset with `fs.readSync`
 * (one call, more only if the kernel returns less). Reading trace after trace, as the reader does,
 * so costs one system call per 4 MiB rather than one per 240-byte trace header. Memory is the
 * buffer plus the bytes handed out, whatever the file's size.
 *
 * Why `readSync`: the `ByteSource` contract is synchronous (the reader in `lib/` is pure and
 * does no I/O, so it cannot await), and a synchronous read into one reused buffer is the
 * cheapest way Node has to pull bytes from the page cache. The cost is that a read blocks the
 * event loop: a server should read a large file in a worker thread or a child process, not in a
 * request handler.
 *
 * Why not mmap: Node has no memory mapping built in; it would take a native add-on (a compiled
 * dependency for every install). A mapped file that is truncated while mapped also raises SIGBUS
 * on the next access, which kills the process, where `readSync` simply returns fewer bytes.
 *
 * What it does at the edges:
 * - Each read returns a fresh copy, never a view of the buffer: the reader keeps the bytes of the
 *   file headers while it reads on, and the next refill would overwrite a view.
 * - The size is the file's when it was opened. A request past it returns the bytes up to it (none
 *   from `size` on); a zero-length request returns no bytes and touches no file.
 * - A file truncated after it was opened: reads beyond its new end return the bytes that are
 *   still there (possibly none), so the reader refuses the trace as cut short; bytes already in
 *   the buffer are returned as they were read. Growth after opening is not seen.
 * - A negative or fractional offset or length is a programming error (`RangeError`), and so is a
 *   read after `close()`; closing twice is harmless.
 * - A path that does not exist or cannot be read throws Node's own error (`ENOENT`, `EACCES`);
 *   a directory, device or pipe is refused with an error naming the path, and nothing stays open.
 *
 * @example
 * const source = openFileByteSource('survey/shot-001.sgy');
 * try {
 *   const opened = openSegy(source);
 *   if (opened.ok) for (let index = 0; index < opened.value.traceCount; index += 1) opened.value.readTrace(index);
 * } finally {
 *   source.close();
 * }
 */
import { closeSync, fstatSync, openSync, readSync } from 'node:fs';
import type { ByteSource } from '../lib/gathers/segy/byte-source.js';

/** Bytes of the read-ahead buffer unless the caller says otherwise: 4 MiB, about 250 traces of 4000 samples. */
export const DEFAULT_READ_AHEAD_BYTES = 4 * 1024 * 1024;

export interface FileByteSourceOptions {
  /** Bytes of the read-ahead buffer, a whole number ≥ 1; default `DEFAULT_READ_AHEAD_BYTES`. */
  readonly readAheadBytes?: number;
}

/** A `ByteSource` backed by an open file descriptor; close it when done. */
export interface FileByteSource extends ByteSource {
  /** The path it was opened with. */
  readonly path: string;
  /** Calls to `fs.readSync` so far: how often the read-ahead buffer missed. */
  readonly systemReads: number;
  /** True once `close()` has been called. */
  readonly closed: boolean;
  /** Release the file descriptor (and the buffer); later reads throw. */
  close(): void;
}

function wholeNumber(value: number, name: string, atLeast: number): void {
  if (!Number.isSafeInteger(value) || value < atLeast) {
    throw new RangeError(`FileByteSource: ${name} must be a whole number ≥ ${atLeast}, got ${value}`);
  }
}

/** Open `path` for random-access reading through a bounded read-ahead buffer. */
export function openFileByteSource(path: string, options: FileByteSourceOptions = {}): FileByteSource {
  const readAheadBytes = options.readAheadBytes ?? DEFAULT_READ_AHEAD_BYTES;
  wholeNumber(readAheadBytes, 'readAheadBytes', 1);
  const fd = openSync(path, 'r');
  let size: number;
  try {
    const stats = fstatSync(fd);
    if (!stats.isFile()) {
      throw new Error(`${path} is not a regular file (a directory, device or pipe); a gather file is read by random access, so give the path of the file itself`);
    }
    size = stats.size;
  } catch (error) {
    closeSync(fd);
    throw error;
  }

  let buffer = new Uint8Array(Math.min(readAheadBytes, size));
  /** File offset of buffer byte 0, and how many of its bytes hold the file. */
  let bufferStart = 0;
  let bufferFilled = 0;
  let systemReads = 0;
  let closed = false;

  /** Read up to `count` bytes at file `position` into `target` from byte 0; the count read. */
  const readInto = (target: Uint8Array, count: number, position: number): number => {
    let done = 0;
    while (done < count) {
      const got = readSync(fd, target, done, count - done, position + done);
      systemReads += 1;
      if (got === 0) break; // end of file: truncated since it was opened
      done += got;
    }
    return done;
  };

  const read = (offset: number, length: number): Uint8Array => {
    if (closed) throw new Error(`FileByteSource: read(${offset}, ${length}) after close() of ${path}`);
    wholeNumber(offset, 'offset', 0);
    wholeNumber(length, 'length', 0);
    const end = Math.min(offset + length, size);
    if (end <= offset) return new Uint8Array(0);
    const wanted = end - offset;
    if (offset >= bufferStart && end <= bufferStart + bufferFilled) {
      return buffer.slice(offset - bufferStart, end - bufferStart);
    }
    if (wanted > buffer.byteLength) {
      // Larger than the buffer: straight into the bytes handed back, leaving the buffer as it is.
      const bytes = new Uint8Array(wanted);
      const got = readInto(bytes, wanted, offset);
      return got === wanted ? bytes : bytes.slice(0, got);
    }
    bufferStart = offset;
    bufferFilled = readInto(buffer, Math.min(buffer.byteLength, size - offset), offset);
    return buffer.slice(0, Math.min(wanted, bufferFilled));
  };

  return {
    path,
    size,
    read,
    get systemReads() {
      return systemReads;
    },
    get closed() {
      return closed;
    },
    close() {
      if (closed) return;
      closed = true;
      buffer = new Uint8Array(0);
      bufferFilled = 0;
      closeSync(fd);
    },
  };
}
