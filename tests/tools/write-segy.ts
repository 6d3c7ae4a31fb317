/**
 * A small SEG-Y rev 2.0 writer for the sample gathers and tests: ASCII textual header,
 * big-endian binary and trace headers, IEEE float samples (format 5), fixed-length traces.
 * Written from the byte positions of the SEG-Y rev 2.0 standard (SEG 2017) and deliberately not
 * from the reader's layout table, so a wrong offset in one is not shared by the other.
 * Positions and elevations are written in centimetres with scalar −100 (SEG 2017 bytes 69–72).
 */

export interface SegyTraceToWrite {
  readonly samples: ArrayLike<number>;
  /** Field record number (bytes 9–12): one per shot. */
  readonly fieldRecord: number;
  /** Channel within the record (bytes 13–16), from 1. */
  readonly channel: number;
  /** Energy source point number (bytes 17–20), 0 for none. */
  readonly sourcePoint: number;
  readonly sourceX: number;
  readonly receiverX: number;
  readonly sourceElevation: number;
  readonly receiverElevation: number;
  /** Source depth below the surface, m (bytes 49–52). */
  readonly sourceDepth: number;
}

export interface SegyFileToWrite {
  /** Up to 40 lines of up to 80 characters (ASCII). */
  readonly textLines: readonly string[];
  /** Sample interval, s (written in whole microseconds). */
  readonly sampleInterval: number;
  readonly traces: readonly SegyTraceToWrite[];
}

const TEXT_BYTES = 3200;
const BINARY_BYTES = 400;
const TRACE_HEADER_BYTES = 240;
const COORDINATE_SCALAR = -100;

export function writeSegy(spec: SegyFileToWrite): Uint8Array {
  const sampleCount = spec.traces[0]?.samples.length ?? 0;
  if (spec.traces.some((trace) => trace.samples.length !== sampleCount)) throw new Error('writeSegy: every trace needs the same sample count');
  const interval = Math.round(spec.sampleInterval * 1e6);
  const traceBytes = TRACE_HEADER_BYTES + 4 * sampleCount;
  const bytes = new Uint8Array(TEXT_BYTES + BINARY_BYTES + spec.traces.length * traceBytes);
  const view = new DataView(bytes.buffer);

  // Textual header: 40 lines of 80 ASCII characters, padded with spaces.
  bytes.fill(0x20, 0, TEXT_BYTES);
  spec.textLines.slice(0, 40).forEach((line, index) => {
    const text = line.slice(0, 80);
    for (let k = 0; k < text.length; k += 1) bytes[index * 80 + k] = text.charCodeAt(k) & 0x7f;
  });

  // Binary header; SEG 2017 byte numbers are 1-based from the start of the file.
  const at = (byte: number) => byte - 1;
  const records = new Set(spec.traces.map((trace) => trace.fieldRecord)).size;
  view.setInt16(at(3213), Math.round(spec.traces.length / Math.max(1, records)), false); // traces per ensemble
  view.setUint16(at(3217), interval, false);
  view.setUint16(at(3221), sampleCount, false);
  view.setInt16(at(3225), 5, false); // 4-byte IEEE float
  view.setInt16(at(3227), 1, false); // ensemble fold
  view.setInt16(at(3229), 1, false); // as recorded
  view.setInt16(at(3255), 1, false); // metres
  view.setUint32(at(3297), 0x01020304, false); // byte-order constant (rev 2)
  bytes[at(3501)] = 2; // revision 2.0
  bytes[at(3502)] = 0;
  view.setInt16(at(3503), 1, false); // fixed-length traces
  view.setInt16(at(3505), 0, false); // no extended textual headers
  view.setBigUint64(at(3513), BigInt(spec.traces.length), false); // traces in the file (rev 2)

  spec.traces.forEach((trace, index) => {
    const start = TEXT_BYTES + BINARY_BYTES + index * traceBytes;
    const put32 = (byte: number, value: number) => view.setInt32(start + byte - 1, Math.round(value), false);
    const put16 = (byte: number, value: number) => view.setInt16(start + byte - 1, Math.round(value), false);
    const scaled = (metres: number) => metres * -COORDINATE_SCALAR;
    put32(1, index + 1);
    put32(5, index + 1);
    put32(9, trace.fieldRecord);
    put32(13, trace.channel);
    put32(17, trace.sourcePoint);
    put16(29, 1); // seismic data
    put32(37, trace.receiverX - trace.sourceX);
    put32(41, scaled(trace.receiverElevation));
    put32(45, scaled(trace.sourceElevation));
    put32(49, scaled(trace.sourceDepth));
    put16(69, COORDINATE_SCALAR);
    put16(71, COORDINATE_SCALAR);
    put32(73, scaled(trace.sourceX));
    put32(81, scaled(trace.receiverX));
    put16(89, 1); // length
    put16(109, 0);
    view.setUint16(start + 114, sampleCount, false);
    view.setUint16(start + 116, interval, false);
    for (let k = 0; k < sampleCount; k += 1) view.setFloat32(start + TRACE_HEADER_BYTES + 4 * k, trace.samples[k]!, false);
  });
  return bytes;
}
