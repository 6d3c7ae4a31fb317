/**
 * A SEG-2 writer for tests only, written from the byte layout in the project's reference notes
 * (`../shared/reference/seg-formats.md` §3, which summarises Pullan 1990; its fixed fields are
 * tagged [V] there). It deliberately does not import the reader's `layout.ts`, so that a wrong
 * offset in one is not silently shared by the other. It can also write the quirks of §3.4
 * (odd block sizes, an oversized pointer block) and a few faults, for the reader's tests.
 */

export type Seg2FormatCode = 1 | 2 | 3 | 4 | 5;

export interface Seg2TraceSpec {
  readonly format: Seg2FormatCode;
  /** Sample values; for format 3 each must be m·2^e with |m| ≤ 32767 and 0 ≤ e ≤ 15. */
  readonly samples: readonly number[];
  /** Free-format strings, `KEYWORD value` each; '\n' inside one is written as the line terminator. */
  readonly strings: readonly string[];
  /** Descriptor block size X to write instead of the computed one (rounded up to 4 by default). */
  readonly descriptorBytes?: number;
  /** Extra bytes after the samples, counted in the data block size Y. */
  readonly dataPadding?: number;
}

export interface Seg2FileSpec {
  /** True: ID bytes 55 3A and every integer little-endian; false: 3A 55, big-endian. */
  readonly littleEndian: boolean;
  readonly revision?: number;
  /** M, the trace pointer sub-block size; default 4N. */
  readonly pointerBytes?: number;
  /** String terminator, 1 or 2 bytes; default [0x00]. */
  readonly stringTerminator?: readonly number[];
  /** Line terminator, 1 or 2 bytes; default [0x0a]. */
  readonly lineTerminator?: readonly number[];
  readonly fileStrings: readonly string[];
  readonly traces: readonly Seg2TraceSpec[];
}

/** Bytes of the free-format strings (each: u16 offset to the next, text, terminator), then a 0 offset. */
function stringBytes(strings: readonly string[], spec: Seg2FileSpec): number[] {
  const terminator = spec.stringTerminator ?? [0x00];
  const lineTerminator = spec.lineTerminator ?? [0x0a];
  const out: number[] = [];
  for (const text of strings) {
    const body: number[] = [];
    for (const character of text) {
      if (character === '\n') body.push(...lineTerminator);
      else body.push(character.charCodeAt(0) & 0xff);
    }
    const entryLength = 2 + body.length + terminator.length;
    // The offset to the next string counts from the start of this one.
    out.push(...u16(entryLength, spec.littleEndian), ...body, ...terminator);
  }
  out.push(0, 0);
  return out;
}

function u16(value: number, little: boolean): number[] {
  const low = value & 0xff;
  const high = (value >>> 8) & 0xff;
  return little ? [low, high] : [high, low];
}

function u32(value: number, little: boolean): number[] {
  const bytes = [value & 0xff, (value >>> 8) & 0xff, (value >>> 16) & 0xff, (value >>> 24) & 0xff];
  return little ? bytes : bytes.reverse();
}

/** Encode one sample value in format 3's one's-complement mantissa and exponent. */
export function format3Parts(value: number): { mantissa: number; exponent: number } {
  for (let exponent = 0; exponent <= 15; exponent += 1) {
    const mantissa = value / 2 ** exponent;
    if (Number.isInteger(mantissa) && Math.abs(mantissa) <= 32767) return { mantissa, exponent };
  }
  throw new Error(`format3Parts: ${value} is not m·2^e with |m| ≤ 32767, 0 ≤ e ≤ 15`);
}

function sampleBytes(trace: Seg2TraceSpec, little: boolean): number[] {
  const values = trace.samples;
  if (trace.format === 3) {
    const out: number[] = [];
    for (let start = 0; start < values.length; start += 4) {
      let exponents = 0;
      const words: number[] = [];
      for (let within = 0; within < 4; within += 1) {
        const { mantissa, exponent } = format3Parts(values[start + within] ?? 0);
        exponents |= exponent << (4 * within);
        // One's complement: a negative mantissa is the bitwise NOT of its magnitude.
        words.push(mantissa >= 0 ? mantissa : ~-mantissa & 0xffff);
      }
      out.push(...u16(exponents, little));
      for (const word of words) out.push(...u16(word, little));
    }
    return out;
  }
  const size = { 1: 2, 2: 4, 4: 4, 5: 8 }[trace.format];
  const buffer = new DataView(new ArrayBuffer(size * values.length));
  values.forEach((value, index) => {
    const at = index * size;
    if (trace.format === 1) buffer.setInt16(at, value, little);
    else if (trace.format === 2) buffer.setInt32(at, value, little);
    else if (trace.format === 4) buffer.setFloat32(at, value, little);
    else buffer.setFloat64(at, value, little);
  });
  return [...new Uint8Array(buffer.buffer)];
}

/** The bytes of a SEG-2 file per `spec`. */
export function writeSeg2(spec: Seg2FileSpec): Uint8Array {
  const little = spec.littleEndian;
  const count = spec.traces.length;
  const pointerBytes = spec.pointerBytes ?? 4 * count;
  const stringTerminator = spec.stringTerminator ?? [0x00];
  const lineTerminator = spec.lineTerminator ?? [0x0a];
  const header: number[] = [
    ...u16(0x3a55, little),
    ...u16(spec.revision ?? 1, little),
    ...u16(pointerBytes, little),
    ...u16(count, little),
    stringTerminator.length,
    stringTerminator[0] ?? 0,
    stringTerminator[1] ?? 0,
    lineTerminator.length,
    lineTerminator[0] ?? 0,
    lineTerminator[1] ?? 0,
    ...new Array<number>(18).fill(0),
  ];
  const fileStrings = stringBytes(spec.fileStrings, spec);
  let position = 32 + pointerBytes + fileStrings.length;
  const blocks: number[][] = [];
  const pointers: number[] = [];
  for (const trace of spec.traces) {
    const strings = stringBytes(trace.strings, spec);
    const descriptorBytes = trace.descriptorBytes ?? Math.ceil((32 + strings.length) / 4) * 4;
    const samples = sampleBytes(trace, little);
    const padding = trace.dataPadding ?? 0;
    const dataBytes = samples.length + padding;
    const fixed = [
      ...u16(0x4422, little),
      ...u16(descriptorBytes, little),
      ...u32(dataBytes, little),
      ...u32(trace.samples.length, little),
      trace.format,
      ...new Array<number>(19).fill(0),
    ];
    const descriptor = [...fixed, ...strings];
    while (descriptor.length < descriptorBytes) descriptor.push(0);
    descriptor.length = descriptorBytes;
    pointers.push(position);
    const block = [...descriptor, ...samples, ...new Array<number>(padding).fill(0)];
    blocks.push(block);
    position += block.length;
  }
  const pointerBlock: number[] = [];
  for (const pointer of pointers) pointerBlock.push(...u32(pointer, little));
  while (pointerBlock.length < pointerBytes) pointerBlock.push(0);
  return Uint8Array.from([...header, ...pointerBlock, ...fileStrings, ...blocks.flat()]);
}
