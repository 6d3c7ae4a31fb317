/**
 * SEG-Y data sample formats (binary header bytes 3225–3226) and their decoders.
 *
 * Codes from SEG-Y rev 1 (Norris & Faichney 2002) and rev 2.0 (Hagelund & Levin 2017), as listed
 * in `../shared/reference/seg-formats.md` §4.2 [V: segyio `SegySampleFormat`]. Formats 1, 2, 3, 5
 * and 8 are checked in the tests against files written and read by segyio 1.8.3; the rev 2 codes
 * 6, 7, 9, 10, 11, 12, 15 and 16 against sample bytes encoded by numpy (segyio 1.8.3 reads none of
 * them). Format 4 (fixed point with gain, obsolete since rev 1) is refused.
 */

export interface SampleFormat {
  readonly code: number;
  readonly bytesPerSample: number;
  readonly description: string;
  /** True when every value of the format is exact in a float32 (so samples can be a Float32Array). */
  readonly float32Exact: boolean;
  /** Decode `count` samples starting at `view` byte 0 into `out`. */
  readonly decode: (view: DataView, count: number, littleEndian: boolean, out: Float32Array | Float64Array) => void;
}

/**
 * IBM System/360 single-precision hexadecimal float to a number (exact: a double holds every IBM
 * single value). Bit 31 is the sign, bits 24–30 an excess-64 power of 16, bits 0–23 the fraction
 * F/2^24, so the value is ±(F / 2^24) · 16^(E − 64). A zero fraction is zero whatever the exponent.
 *
 * @example
 * ibmToNumber(0xc276a000) // -118.625: sign 1, exponent 0x42 (16^2), fraction 0x76A000 / 2^24
 * ibmToNumber(0x42769000) // 118.5625 (0x769000 / 2^24 · 256), as segyio also reads it
 */
export function ibmToNumber(word: number): number {
  const fraction = word & 0x00ffffff;
  if (fraction === 0) return 0;
  const exponent = (word >>> 24) & 0x7f;
  const magnitude = fraction * 2 ** (4 * (exponent - 64) - 24);
  return word >>> 31 === 1 ? -magnitude : magnitude;
}

function int24(view: DataView, at: number, littleEndian: boolean): number {
  const first = view.getUint8(at);
  const second = view.getUint8(at + 1);
  const third = view.getUint8(at + 2);
  return littleEndian ? first | (second << 8) | (third << 16) : (first << 16) | (second << 8) | third;
}

type Decoder = SampleFormat['decode'];

const decoders: Readonly<Record<number, Decoder>> = {
  1: (view, count, little, out) => { for (let k = 0; k < count; k += 1) out[k] = ibmToNumber(view.getUint32(4 * k, little)); },
  2: (view, count, little, out) => { for (let k = 0; k < count; k += 1) out[k] = view.getInt32(4 * k, little); },
  3: (view, count, little, out) => { for (let k = 0; k < count; k += 1) out[k] = view.getInt16(2 * k, little); },
  5: (view, count, little, out) => { for (let k = 0; k < count; k += 1) out[k] = view.getFloat32(4 * k, little); },
  6: (view, count, little, out) => { for (let k = 0; k < count; k += 1) out[k] = view.getFloat64(8 * k, little); },
  7: (view, count, little, out) => {
    for (let k = 0; k < count; k += 1) {
      const unsigned = int24(view, 3 * k, little);
      out[k] = unsigned >= 0x800000 ? unsigned - 0x1000000 : unsigned;
    }
  },
  8: (view, count, _little, out) => { for (let k = 0; k < count; k += 1) out[k] = view.getInt8(k); },
  9: (view, count, little, out) => { for (let k = 0; k < count; k += 1) out[k] = Number(view.getBigInt64(8 * k, little)); },
  10: (view, count, little, out) => { for (let k = 0; k < count; k += 1) out[k] = view.getUint32(4 * k, little); },
  11: (view, count, little, out) => { for (let k = 0; k < count; k += 1) out[k] = view.getUint16(2 * k, little); },
  12: (view, count, little, out) => { for (let k = 0; k < count; k += 1) out[k] = Number(view.getBigUint64(8 * k, little)); },
  15: (view, count, little, out) => { for (let k = 0; k < count; k += 1) out[k] = int24(view, 3 * k, little); },
  16: (view, count, _little, out) => { for (let k = 0; k < count; k += 1) out[k] = view.getUint8(k); },
};

function format(code: number, bytesPerSample: number, float32Exact: boolean, description: string): SampleFormat {
  const decode = decoders[code];
  if (decode === undefined) throw new Error(`formats: no decoder for SEG-Y sample format ${code}`);
  return { code, bytesPerSample, float32Exact, description, decode };
}

/** The sample formats this reader decodes, by code. */
export const SAMPLE_FORMATS: ReadonlyMap<number, SampleFormat> = new Map([
  // IBM exponents reach 16^63, beyond float32's range: doubles keep every value.
  [1, format(1, 4, false, '4-byte IBM floating point')],
  [2, format(2, 4, false, '4-byte two\'s complement integer')],
  [3, format(3, 2, true, '2-byte two\'s complement integer')],
  [5, format(5, 4, true, '4-byte IEEE floating point')],
  [6, format(6, 8, false, '8-byte IEEE floating point (rev 2)')],
  [7, format(7, 3, true, '3-byte two\'s complement integer (rev 2)')],
  [8, format(8, 1, true, '1-byte two\'s complement integer')],
  // Beyond 2^53 in magnitude an 8-byte integer becomes the nearest double.
  [9, format(9, 8, false, '8-byte two\'s complement integer (rev 2)')],
  [10, format(10, 4, false, '4-byte unsigned integer (rev 2)')],
  [11, format(11, 2, true, '2-byte unsigned integer (rev 2)')],
  [12, format(12, 8, false, '8-byte unsigned integer (rev 2)')],
  [15, format(15, 3, true, '3-byte unsigned integer (rev 2)')],
  [16, format(16, 1, true, '1-byte unsigned integer (rev 2)')],
]);

/** Codes the standard defines that this reader refuses, with the reason. */
export const REFUSED_FORMATS: ReadonlyMap<number, string> = new Map([
  [4, '4-byte fixed point with gain, obsolete since rev 1 and not decoded here'],
]);
