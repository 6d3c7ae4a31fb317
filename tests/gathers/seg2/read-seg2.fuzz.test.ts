/**
 * readSeg2 under 10,000 seeded mutations of a valid file (bit flips, truncations, count and size
 * fields set huge, pointers past the end, random bytes, appended junk): each read must return a
 * gather or a refusal, never throw, within a bounded time, and allocate samples totalling at
 * most twice the file's size (the reader's stated bound: a 16-bit sample becomes a 4-byte float).
 * Seeded with lib/random.ts, so a failure reproduces from its index.
 */
import { describe, expect, it } from 'vitest';
import type { GatherOutcome } from '../../../lib/gathers/gather.js';
import { readSeg2 } from '../../../lib/gathers/seg2/read.js';
import { seededRandom, type RandomSource } from '../../../lib/random.js';
import { writeSeg2 } from './write-seg2.js';

const MUTATIONS = 10_000;
/** Per-read time limit: the base file reads in well under 1 ms; 250 ms leaves room for a slow CI machine and GC pauses. */
const MAX_MS_PER_READ = 250;

const BASE = writeSeg2({
  littleEndian: true,
  fileStrings: ['NOTE a\nb', 'TRACE_SORT AS_ACQUIRED', 'UNITS METERS'],
  traces: [
    { format: 1, samples: [1, -2, 3, -4, 5], strings: ['DELAY -0.010', 'RECEIVER_LOCATION 2', 'SAMPLE_INTERVAL 0.00025', 'SOURCE_LOCATION 0'] },
    { format: 2, samples: [10, -20, 30], strings: ['RECEIVER_LOCATION 4 0 1', 'SAMPLE_INTERVAL 0.00025'] },
    { format: 3, samples: [1, 2, -4, 8, 16, 32, -64, 128], strings: ['RECEIVER_STATION_NUMBER 3', 'SAMPLE_INTERVAL 0.00025'] },
    { format: 4, samples: [0.5, 1.5], strings: ['SAMPLE_INTERVAL 0.00025', 'STACK 2'] },
    { format: 5, samples: [Math.PI], strings: ['*SAMPLE_INTERVAL 0.00025'] },
    // Samples dominate the file, so a reader that decoded one block twice would break the bound below.
    { format: 1, samples: Array.from({ length: 400 }, (_, index) => index - 200), strings: ['SAMPLE_INTERVAL 0.00025'] },
  ],
});

const TRACES = 6;

/** Offsets of the u16/u32 fields that hold counts, sizes and pointers in BASE. */
function sizeFields(): { offset: number; size: 2 | 4 }[] {
  const view = new DataView(BASE.buffer, BASE.byteOffset, BASE.byteLength);
  const fields: { offset: number; size: 2 | 4 }[] = [{ offset: 4, size: 2 }, { offset: 6, size: 2 }];
  for (let index = 0; index < TRACES; index += 1) {
    fields.push({ offset: 32 + 4 * index, size: 4 });
    const pointer = view.getUint32(32 + 4 * index, true);
    fields.push({ offset: pointer + 2, size: 2 }, { offset: pointer + 4, size: 4 }, { offset: pointer + 8, size: 4 }, { offset: pointer + 32, size: 2 });
  }
  return fields;
}
const FIELDS = sizeFields();

function pick<T>(random: RandomSource, items: readonly T[]): T {
  return items[Math.floor(random() * items.length)] as T;
}

/** One mutated copy of BASE; `kind` names the mutation for the failure message. */
function mutate(random: RandomSource): { bytes: Uint8Array; kind: string } {
  const bytes = Uint8Array.from(BASE);
  const view = new DataView(bytes.buffer);
  const choice = Math.floor(random() * 7);
  if (choice === 6) {
    const from = Math.floor(random() * TRACES);
    const to = Math.floor(random() * TRACES);
    view.setUint32(32 + 4 * to, view.getUint32(32 + 4 * from, true), true);
    return { bytes, kind: `pointer ${to + 1} set to pointer ${from + 1}` };
  }
  if (choice === 0) {
    const flips = 1 + Math.floor(random() * 8);
    for (let flip = 0; flip < flips; flip += 1) {
      const at = Math.floor(random() * bytes.length);
      bytes[at] = (bytes[at] ?? 0) ^ (1 << Math.floor(random() * 8));
    }
    return { bytes, kind: `${flips} bit flips` };
  }
  if (choice === 1) {
    const length = Math.floor(random() * bytes.length);
    return { bytes: bytes.slice(0, length), kind: `truncated to ${length}` };
  }
  if (choice === 2 || choice === 3) {
    const field = pick(random, FIELDS);
    const huge = choice === 2;
    const value = huge
      ? pick(random, field.size === 2 ? [0xffff, 0xfffe, 0x8000, 0] : [0xffffffff, 0x7fffffff, 0x80000000, 0])
      : bytes.length + Math.floor(random() * 64) - 32; // near or past the end
    if (field.size === 2) view.setUint16(field.offset, value & 0xffff, true);
    else view.setUint32(field.offset, value >>> 0, true);
    return { bytes, kind: `field at ${field.offset} set to ${value}` };
  }
  if (choice === 4) {
    const count = 1 + Math.floor(random() * 16);
    for (let index = 0; index < count; index += 1) bytes[Math.floor(random() * bytes.length)] = Math.floor(random() * 256);
    return { bytes, kind: `${count} random bytes` };
  }
  const junk = Uint8Array.from({ length: Math.floor(random() * 200) }, () => Math.floor(random() * 256));
  const joined = new Uint8Array(bytes.length + junk.length);
  joined.set(bytes);
  joined.set(junk, bytes.length);
  return { bytes: joined, kind: `${junk.length} junk bytes appended` };
}

function sampleBytes(outcome: GatherOutcome): number {
  if (!outcome.ok) return 0;
  return outcome.value.traces.reduce((total, trace) => total + trace.samples.byteLength, 0);
}

/** Samples decoded in all; every sample takes at least 2 bytes of its own in the file (format 1). */
function sampleCount(outcome: GatherOutcome): number {
  if (!outcome.ok) return 0;
  return outcome.value.traces.reduce((total, trace) => total + trace.samples.length, 0);
}

describe('readSeg2 under seeded mutations', () => {
  it('the base file reads whole', () => {
    const outcome = readSeg2(BASE);
    expect(outcome.ok).toBe(true);
    if (outcome.ok) expect(outcome.value.traces).toHaveLength(TRACES);
  });

  it(`${MUTATIONS} mutations each give a gather or a refusal, in bounded time and memory`, () => {
    const random = seededRandom(20240611);
    let refused = 0;
    let slowest = 0;
    for (let index = 0; index < MUTATIONS; index += 1) {
      const { bytes, kind } = mutate(random);
      const started = performance.now();
      let outcome: GatherOutcome;
      try {
        outcome = readSeg2(bytes);
      } catch (error) {
        throw new Error(`mutation ${index} (${kind}) threw: ${String(error)}`);
      }
      const elapsed = performance.now() - started;
      slowest = Math.max(slowest, elapsed);
      expect(elapsed, `mutation ${index} (${kind}) took ${elapsed} ms`).toBeLessThan(MAX_MS_PER_READ);
      expect(sampleBytes(outcome), `mutation ${index} (${kind}) allocated too much`).toBeLessThanOrEqual(2 * bytes.length);
      expect(sampleCount(outcome), `mutation ${index} (${kind}) decoded bytes twice`).toBeLessThanOrEqual(bytes.length / 2);
      if (outcome.ok) {
        expect(outcome.value.traces.length).toBeGreaterThan(0);
        for (const trace of outcome.value.traces) expect(trace.sampleInterval).toBeGreaterThan(0);
      } else {
        refused += 1;
        expect(outcome.problems.length, `mutation ${index} (${kind}) refused without a problem`).toBeGreaterThan(0);
        expect(outcome.problems.some((problem) => problem.severity === 'error')).toBe(true);
        for (const problem of outcome.problems) {
          expect(problem.message.length).toBeGreaterThan(0);
          expect(problem.fix.length).toBeGreaterThan(0);
        }
      }
    }
    // The mutations must actually exercise the refusals (and not all of them).
    expect(refused).toBeGreaterThan(MUTATIONS / 4);
    expect(refused).toBeLessThan(MUTATIONS);
  });
});
