/**
 * readSeg2 on a file built byte by byte in this test from the layout table of seg-formats.md §3
 * (Pullan 1990 as summarised there; the fixed fields used here are all tagged [V]; format 3's
 * sign convention is verified there against one test file only). This checks the reader
 * independently of the project's own writer (write-seg2.ts): a shared misreading of the layout
 * between the reader and that writer would not show in round trips, but shows here.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { readSeg2 } from '../../../lib/gathers/seg2/read.js';

const SOURCE = 'seg-formats.md §3 (Pullan 1990), file built by hand';

/** ASCII codes of a text (the free-format strings are plain ASCII). */
function ascii(text: string): number[] {
  return [...text].map((character) => character.charCodeAt(0));
}

/**
 * A big-endian file, 2 traces. Offsets are written beside each run of bytes and the total
 * length is asserted, so a slip in this listing fails the test rather than passing silently.
 */
const HAND_BUILT: number[] = [
  // 0–31 file descriptor block
  0x3a, 0x55, // 0–1 block ID, big-endian on disk
  0x00, 0x01, // 2–3 revision 1
  0x00, 0x08, // 4–5 M = 8 bytes of trace pointers
  0x00, 0x02, // 6–7 N = 2 traces
  0x01, 0x00, 0x00, // 8 string terminator length 1; 9–10 terminator 0x00
  0x01, 0x0a, 0x00, // 11 line terminator length 1; 12–13 terminator LF
  ...new Array<number>(18).fill(0), // 14–31 reserved
  // 32–39 trace pointers
  0x00, 0x00, 0x00, 0x3c, // trace 1 at 60
  0x00, 0x00, 0x00, 0x9a, // trace 2 at 154
  // 40–56 file strings: "UNITS METERS" (offset 2 + 12 + 1 = 15), then the 0 offset
  0x00, 0x0f, ...ascii('UNITS METERS'), 0x00, // 40–54
  0x00, 0x00, // 55–56 end of the list
  0x00, 0x00, 0x00, // 57–59 padding
  // 60–91 trace 1 descriptor block, fixed part
  0x44, 0x22, // 60–61 block ID
  0x00, 0x54, // 62–63 X = 84
  0x00, 0x00, 0x00, 0x06, // 64–67 Y = 6
  0x00, 0x00, 0x00, 0x03, // 68–71 NS = 3
  0x01, // 72 format 1: 16-bit integers
  ...new Array<number>(19).fill(0), // 73–91 reserved
  // 92–143 trace 1 strings: two of 2 + 22 + 1 = 25 bytes, then the 0 offset
  0x00, 0x19, ...ascii('SAMPLE_INTERVAL 0.0005'), 0x00, // 92–116
  0x00, 0x19, ...ascii('RECEIVER_LOCATION 12.5'), 0x00, // 117–141
  0x00, 0x00, // 142–143
  // 144–149 trace 1 samples: 1, −2, 300
  0x00, 0x01, 0xff, 0xfe, 0x01, 0x2c,
  // 150–153 padding
  0x00, 0x00, 0x00, 0x00,
  // 154–185 trace 2 descriptor block, fixed part
  0x44, 0x22, // 154–155 block ID
  0x00, 0x4c, // 156–157 X = 76
  0x00, 0x00, 0x00, 0x0a, // 158–161 Y = 10
  0x00, 0x00, 0x00, 0x04, // 162–165 NS = 4
  0x03, // 166 format 3: 20-bit floating point
  ...new Array<number>(19).fill(0), // 167–185 reserved
  // 186–225 trace 2 strings: "SAMPLE_INTERVAL 0.0005" (25 bytes), "DELAY -0.010" (2 + 12 + 1 = 15), 0 offset
  0x00, 0x19, ...ascii('SAMPLE_INTERVAL 0.0005'), 0x00, // 186–210
  0x00, 0x0f, ...ascii('DELAY -0.010'), 0x00, // 211–225
  0x00, 0x00, // 226–227 end of the list
  0x00, 0x00, // 228–229 padding: the block is 154–229 (X = 76)
  // 230–239 trace 2 data: one group of four 20-bit samples.
  // Exponents word: sample 0 → 0, 1 → 1, 2 → 2, 3 → 15, lowest nibble first: 0xF210.
  0xf2, 0x10,
  0x00, 0x05, // mantissa +5            → 5 · 2^0 = 5
  0xff, 0xfc, // one's complement of 3  → −3 · 2^1 = −6
  0x7f, 0xff, // +32767                 → 32767 · 2^2 = 131068
  0xff, 0xfe, // one's complement of 1  → −1 · 2^15 = −32768
];

describe('readSeg2 on a hand-built big-endian file (seg-formats.md §3)', () => {
  const bytes = Uint8Array.from(HAND_BUILT);

  it('the hand listing has the length its offsets say', () => {
    expect(bytes.length).toBe(240);
  });

  it('reads both traces, their samples, times and receiver position', () => {
    const outcome = readSeg2(bytes);
    expect(outcome.ok, JSON.stringify(outcome)).toBe(true);
    if (!outcome.ok) return;
    expect(outcome.warnings).toEqual([]);
    const [first, second] = outcome.value.traces;
    expect(outcome.value.traces).toHaveLength(2);
    expect(outcome.value.format).toBe('SEG-2');
    expect(outcome.value.metadata.get('UNITS'), SOURCE).toBe('METERS');
    expect(first?.samples, SOURCE).toBeInstanceOf(Float32Array);
    expect([...(first?.samples ?? [])], SOURCE).toEqual([1, -2, 300]);
    expect(first?.sampleInterval, SOURCE).toBe(0.0005);
    expect(first?.delay, `${SOURCE}: no DELAY string means 0`).toBe(0);
    expect(first?.receiver, SOURCE).toEqual({ x: 12.5, y: null, elevation: null });
    expect(first?.source, SOURCE).toBeNull();
    expect([...(second?.samples ?? [])], `${SOURCE}: format 3, one's-complement mantissas`).toEqual([5, -6, 131068, -32768]);
    expect(second?.delay, SOURCE).toBe(-0.01);
    expect(second?.metadata.size).toBe(0);
  });

  it('the fixture file hand-built-be.sg2 holds exactly these bytes', () => {
    const fixture = readFileSync(new URL('../../fixtures/gathers/seg2/hand-built-be.sg2', import.meta.url));
    expect([...fixture]).toEqual(HAND_BUILT);
  });
});

describe('readSeg2 on python-struct-le.sg2, written by Python struct from the layout (fixture README)', () => {
  it('reads the little-endian fixture with formats 4 and 2 and its strings', () => {
    const fixture = readFileSync(new URL('../../fixtures/gathers/seg2/python-struct-le.sg2', import.meta.url));
    const outcome = readSeg2(fixture);
    expect(outcome.ok, JSON.stringify(outcome)).toBe(true);
    if (!outcome.ok) return;
    const [first, second] = outcome.value.traces;
    expect([...(first?.samples ?? [])]).toEqual([0.5, -1.25, 3.0e6, 0]);
    expect(first?.samples).toBeInstanceOf(Float32Array);
    expect([...(second?.samples ?? [])]).toEqual([2147483647, -2147483648, 7]);
    expect(second?.samples).toBeInstanceOf(Float64Array);
    expect(first?.sampleInterval).toBe(0.00025);
    expect(first?.source).toEqual({ x: 0, y: 0, elevation: 100 });
    expect(first?.receiver).toEqual({ x: 2, y: 0, elevation: 99.5 });
    expect(second?.receiver).toEqual({ x: 4, y: 0, elevation: 99 });
    expect(first?.receiverStation).toBe('101');
    expect(second?.receiverStation).toBe('102');
    expect(outcome.value.metadata.get('NOTE')).toBe('first line\nsecond line');
    expect(outcome.value.metadata.get('TRACE_SORT')).toBe('AS_ACQUIRED');
  });
});
