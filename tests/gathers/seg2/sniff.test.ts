/**
 * sniffSeg2: recognising SEG-2 by content (the file descriptor block ID of seg-formats.md §3.1,
 * [V], and the trace descriptor block ID at the first pointer, §3.2, [V]).
 */
import { describe, expect, it } from 'vitest';
import { seg2ByteOrder, sniffSeg2 } from '../../../lib/gathers/seg2/sniff.js';
import { writeSeg2 } from './write-seg2.js';

const one = (littleEndian: boolean) =>
  writeSeg2({ littleEndian, fileStrings: [], traces: [{ format: 1, samples: [1], strings: ['SAMPLE_INTERVAL 0.001'] }] });

describe('sniffSeg2', () => {
  it('says yes to both byte orders and tells which', () => {
    expect(sniffSeg2(one(true))).toEqual({ seg2: true, littleEndian: true });
    expect(sniffSeg2(one(false))).toEqual({ seg2: true, littleEndian: false });
    expect(seg2ByteOrder(new DataView(Uint8Array.of(0x55, 0x3a).buffer))).toBe('little');
    expect(seg2ByteOrder(new DataView(Uint8Array.of(0x3a, 0x55).buffer))).toBe('big');
  });

  it('says no, with the bytes it saw, to other content', () => {
    const csv = new TextEncoder().encode('shot,source_x_m,receiver_x_m,time_ms\n');
    const verdict = sniffSeg2(csv);
    expect(verdict.seg2).toBe(false);
    if (!verdict.seg2) expect(verdict.reason).toContain('0x7368');
    const segy = new Uint8Array(3600).fill(0x40);
    expect(sniffSeg2(segy).seg2).toBe(false);
  });

  it('says no to a file too short for the header, naming its length', () => {
    for (const bytes of [new Uint8Array(0), Uint8Array.of(0x55), Uint8Array.of(0x55, 0x3a, 1, 0)]) {
      const verdict = sniffSeg2(bytes);
      expect(verdict.seg2).toBe(false);
      if (!verdict.seg2) expect(verdict.reason).toContain(`${bytes.length} bytes long`);
    }
  });

  it('says no when the first pointer lands on something other than a trace descriptor block', () => {
    const bytes = one(true);
    bytes[32] = 36; // first pointer → the file strings, not the trace block
    bytes[33] = 0;
    const verdict = sniffSeg2(bytes);
    expect(verdict.seg2).toBe(false);
    if (!verdict.seg2) expect(verdict.reason).toContain('0x4422');
  });

  it('says yes to a SEG-2 file cut short after its pointers (the reader then says why it fails)', () => {
    expect(sniffSeg2(one(true).slice(0, 40)).seg2).toBe(true);
  });
});
