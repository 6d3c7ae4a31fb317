/**
 * Random access to a file's bytes, so a SEG-Y file of many gigabytes can be read one trace at a
 * time. The reader in `lib/` never touches the file system: the caller backs a `ByteSource` with
 * whatever it has (a file descriptor in the server, a Uint8Array in tests and uploads).
 */

export interface ByteSource {
  /** Total length of the file, bytes. */
  readonly size: number;
  /**
   * The `length` bytes starting at `offset`. The reader only asks for ranges inside
   * `[0, size)`; a source that returns fewer bytes than asked makes the reader refuse the file
   * (as truncated), never read past what it got.
   */
  read(offset: number, length: number): Uint8Array;
}

/** A ByteSource over bytes already in memory (no copy: reads are views). */
export function byteSourceOf(bytes: Uint8Array): ByteSource {
  return { size: bytes.byteLength, read: (offset, length) => bytes.subarray(offset, offset + length) };
}

/** A DataView over exactly the bytes given (a Uint8Array may be a window on a larger buffer). */
export function viewOf(bytes: Uint8Array): DataView {
  return new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
}
