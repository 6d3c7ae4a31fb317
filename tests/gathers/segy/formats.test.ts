/**
 * Sample decoding: IBM floats against known values and against segyio; the rev 2 formats against
 * sample bytes encoded by numpy (make-segyio-files.py).
 */
import { afterAll, describe, expect, it } from 'vitest';
import { ibmToNumber, SAMPLE_FORMATS } from '../../../lib/gathers/segy/formats.js';
import { readSegy, type SegyTrace } from '../../../lib/gathers/segy/read.js';
import { lazySegyioFiles, SEGYIO_SOURCE } from './segyio-files.js';

const segyioFiles = lazySegyioFiles(afterAll);

describe('ibmToNumber', () => {
  it('ibmToNumber gives −118.625 for 0xC276A000 (recalled from descriptions of the IBM System/360 format) and +118.625 for 0x4276A000', () => {
    expect(ibmToNumber(0xc276a000), 'IBM System/360 hexadecimal float example, recalled from memory').toBe(-118.625);
    expect(ibmToNumber(0x4276a000)).toBe(118.625);
  });

  it('ibmToNumber gives 118.5625 for 0x42769000 (the word sometimes misquoted as 118.625): 0x769000/2^24 · 16^2', () => {
    expect(ibmToNumber(0x42769000)).toBe((0x769000 / 2 ** 24) * 256);
    expect(ibmToNumber(0x42769000)).toBe(118.5625);
  });

  it('ibmToNumber follows the definition ±(F/2^24)·16^(E−64) at the edges: zero, negative zero, unnormalised, extremes', () => {
    expect(ibmToNumber(0x41100000)).toBe(1);
    expect(ibmToNumber(0x40800000)).toBe(0.5);
    expect(ibmToNumber(0xc1100000)).toBe(-1);
    expect(ibmToNumber(0x00000000)).toBe(0);
    expect(ibmToNumber(0x80000000)).toBe(0);
    expect(ibmToNumber(0x7f000000), 'a zero fraction is zero whatever the exponent').toBe(0);
    expect(ibmToNumber(0x42076900), 'unnormalised: leading zero digit').toBe((0x076900 / 2 ** 24) * 256);
    expect(ibmToNumber(0x7fffffff), 'largest: (1 − 16^−6)·16^63').toBe((1 - 16 ** -6) * 16 ** 63);
    expect(ibmToNumber(0x00100000), 'smallest normalised: 16^−65').toBe(16 ** -65);
  });

  it(`ibmToNumber agrees with segyio on raw IBM words patched into a segyio file (${SEGYIO_SOURCE})`, () => {
    const outcome = readSegy(segyioFiles().bytes('ibm-words'));
    if (!outcome.ok) throw new Error('refused');
    const samples = (outcome.value.traces[0] as SegyTrace).samples;
    segyioFiles().ibmWords.forEach(([word, segyioValue], index) => {
      const ours = ibmToNumber(word);
      expect(samples[index], `word ${word.toString(16)} read through readSegy`).toBe(ours);
      if (word === 0x42076900) {
        // An unnormalised fraction (leading hex digit 0): by the definition 0x076900/2^24 · 16^2
        // = 7.41015625. segyio 1.8.3's conversion assumes a normalised fraction and gives
        // 11.705078125; the reader follows the definition.
        expect(ours).toBe(7.41015625);
        expect(segyioValue).toBe(11.705078125);
      } else if (word === 0x21100000) {
        // 2^−128 is a float32 subnormal, which segyio's float32 conversion flushes to zero.
        expect(ours).toBe(2 ** -128);
        expect(segyioValue).toBe(0);
      } else {
        expect(ours, `IBM word 0x${word.toString(16)}, ${SEGYIO_SOURCE}`).toBe(segyioValue);
      }
    });
    expect(segyioFiles().ibmWords.some(([word, value]) => word === 0xc276a000 && value === -118.625), 'segyio reads 0xC276A000 as −118.625').toBe(true);
  });
});

describe('rev 2 sample formats', () => {
  for (const code of [6, 7, 9, 10, 11, 12, 15, 16]) {
    for (const order of ['be', 'le'] as const) {
      const name = `rev2-fmt${code}-${order}`;
      it(`readSegy decodes format ${code} (${SAMPLE_FORMATS.get(code)?.description}), ${order === 'be' ? 'big' : 'little'}-endian, equal to the values numpy encoded (make-segyio-files.py)`, () => {
        const outcome = readSegy(segyioFiles().bytes(name));
        if (!outcome.ok) throw new Error(`${name} refused: ${outcome.problems[0]?.message}`);
        const expected = segyioFiles().rev2[name]!;
        expect(outcome.value.traces.length).toBe(expected.length);
        outcome.value.traces.forEach((trace, t) => {
          const values = expected[t]!;
          const mismatch = values.findIndex((value, k) => trace.samples[k] !== value);
          expect(mismatch, `${name} trace ${t}: first sample differing from numpy's values`).toBe(-1);
          expect(trace.samples.length).toBe(values.length);
        });
      });
    }
  }

  it('SAMPLE_FORMATS marks a format float32-exact only when a float32 holds all its values', () => {
    const exact = [...SAMPLE_FORMATS.values()].filter((format) => format.float32Exact).map((format) => format.code);
    expect(exact.sort((a, b) => a - b)).toEqual([3, 5, 7, 8, 11, 15, 16]);
  });
});
