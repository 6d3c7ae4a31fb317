/**
 * Fuzzing the SEG-Y reader: 10 000 seeded mutations of segyio-written and built files (bit flips,
 * truncation, absurd sample counts, huge extended header counts, random format codes, byte-order
 * constants, first-trace offsets and trailer counts). Each must give a gather or a refusal with
 * problems that name a place and a fix: never an exception, never a read outside the file, never
 * more samples than the limit, and never long.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { seededRandom } from '../../../lib/random.js';
import type { ByteSource } from '../../../lib/gathers/segy/byte-source.js';
import { readSegy } from '../../../lib/gathers/segy/read.js';
import { sniffSegy } from '../../../lib/gathers/segy/sniff.js';
import { buildSegy } from './build-segy.js';
import { lazySegyioFiles } from './segyio-files.js';

const MUTATIONS = 10_000;
const SEED = 20260;
/** Limits for the fuzz run: small, so a limit that is not enforced shows at once. */
const LIMITS = { maxTotalSamples: 20_000, maxTraces: 500, maxSamplesPerTrace: 5_000, maxExtendedTextualHeaders: 4 };
/**
 * One case reads a file under 70 kB; typical cases take well under a millisecond, and warm-up or a
 * garbage collection has been seen to take 175 ms. A reader that loops on a header value would
 * take seconds or never end, so 1 s separates the two even on a loaded CI machine.
 */
const MAX_CASE_MS = 1000;

const segyioFiles = lazySegyioFiles(afterAll);

type Random = () => number;
const integer = (random: Random, low: number, high: number) => low + Math.floor(random() * (high - low + 1));

function mutate(base: Uint8Array, random: Random): { bytes: Uint8Array; kind: string } {
  const bytes = base.slice();
  const view = new DataView(bytes.buffer);
  const kind = ['bit-flips', 'truncate', 'samples', 'extended-count', 'format', 'constant', 'first-trace', 'trace-samples', 'mixed'][integer(random, 0, 8)]!;
  const flip = (low: number, high: number) => {
    const at = integer(random, low, Math.min(high, bytes.length - 1));
    bytes[at]! ^= 1 << integer(random, 0, 7);
  };
  switch (kind) {
    case 'bit-flips': {
      const flips = integer(random, 1, 16);
      for (let index = 0; index < flips; index += 1) random() < 0.7 ? flip(3200, 3600 + 240) : flip(0, bytes.length - 1);
      break;
    }
    case 'truncate':
      return { bytes: bytes.subarray(0, integer(random, 0, bytes.length)), kind };
    case 'samples':
      view.setUint16(3220, integer(random, 0, 65535), random() < 0.5);
      if (random() < 0.5) { bytes[3500] = 2; view.setInt32(3268, integer(random, -(2 ** 31), 2 ** 31 - 1), false); }
      break;
    case 'extended-count':
      view.setInt16(3504, [32767, -1, -2, -32768, integer(random, 0, 40)][integer(random, 0, 4)]!, false);
      break;
    case 'format':
      view.setInt16(3224, integer(random, -3, 20), false);
      break;
    case 'constant':
      view.setInt32(3296, [0x04030201, 0x02010403, integer(random, -(2 ** 31), 2 ** 31 - 1)][integer(random, 0, 2)]!, false);
      bytes[3500] = integer(random, 0, 3);
      break;
    case 'first-trace':
      bytes[3500] = 2;
      view.setBigUint64(3520, BigInt(integer(random, 0, 2 ** 40)) * (random() < 0.5 ? 1n : 2n ** 20n), random() < 0.5);
      view.setInt32(3528, integer(random, -5, 40), false);
      view.setInt16(3506, integer(random, -1, 2), false);
      break;
    case 'trace-samples': {
      view.setInt16(3502, integer(random, -1, 2), false); // fixed-length flag: 0, 1 or nonsense
      const traces = integer(random, 1, 5);
      for (let index = 0; index < traces; index += 1) {
        const at = 3600 + integer(random, 0, Math.max(0, bytes.length - 3600 - 240));
        if (at + 240 <= bytes.length) view.setUint16(at + 114, integer(random, 0, 65535), false);
      }
      break;
    }
    default: {
      for (let index = 0; index < 40; index += 1) flip(0, bytes.length - 1);
      if (random() < 0.3) return { bytes: bytes.subarray(0, integer(random, 3600, bytes.length)), kind };
    }
  }
  return { bytes, kind };
}

describe('readSegy under fuzzing', () => {
  it(`readSegy gives a gather or a refusal for each of ${MUTATIONS} seeded mutations, reading only inside the file and within the limits`, () => {
    const bases = [
      segyioFiles().bytes('ibm-be'), segyioFiles().bytes('ieee-le-rev2'), segyioFiles().bytes('ext2-be'), segyioFiles().bytes('int16-be'), segyioFiles().bytes('rev2-fmt7-le'),
      buildSegy({ samples: [5, 40, 1, 17], format: 3 }),
      buildSegy({ extended: ['C A', '((SEG: EndText))'], binary: { extendedTextualHeaders: -1 }, samples: 30, traces: 6 }),
      buildSegy({ littleEndian: true, format: 2, samples: 64, traces: 8 }),
    ];
    const random = seededRandom(SEED);
    const outcomes = new Map<string, number>();
    const failures: string[] = [];
    let slowest = 0;
    for (let run = 0; run < MUTATIONS; run += 1) {
      const base = bases[run % bases.length]!;
      const { bytes, kind } = mutate(base, random);
      let outOfBounds = '';
      const source: ByteSource = {
        size: bytes.length,
        read: (offset, length) => {
          if (!(Number.isSafeInteger(offset) && Number.isSafeInteger(length) && offset >= 0 && length >= 0 && offset + length <= bytes.length)) {
            outOfBounds = `read(${offset}, ${length}) of a ${bytes.length}-byte file`;
          }
          return bytes.subarray(offset, offset + length);
        },
      };
      const started = performance.now();
      let label: string;
      try {
        sniffSegy(bytes);
        const outcome = readSegy(source, LIMITS);
        if (outcome.ok) {
          const total = outcome.value.traces.reduce((sum, trace) => sum + trace.samples.length, 0);
          if (outcome.value.traces.length === 0) failures.push(`run ${run} (${kind}): a gather with no traces`);
          if (total > LIMITS.maxTotalSamples) failures.push(`run ${run} (${kind}): ${total} samples beyond the limit`);
          for (const trace of outcome.value.traces) {
            if (!(trace.sampleInterval > 0)) failures.push(`run ${run} (${kind}): sample interval ${trace.sampleInterval}`);
          }
          label = 'gather';
        } else {
          if (outcome.problems.length === 0) failures.push(`run ${run} (${kind}): a refusal without problems`);
          for (const problem of outcome.problems) {
            const placed = problem.byteOffset === null || (Number.isSafeInteger(problem.byteOffset) && problem.byteOffset >= 0);
            if (!placed || problem.message.length < 20 || problem.fix.length < 10 || problem.severity !== 'error') {
              failures.push(`run ${run} (${kind}): a problem without place, message or fix: ${JSON.stringify(problem)}`);
            }
          }
          label = outcome.problems[0]?.code ?? 'none';
        }
      } catch (error) {
        failures.push(`run ${run} (${kind}): threw ${String(error)}`);
        label = 'threw';
      }
      const elapsed = performance.now() - started;
      slowest = Math.max(slowest, elapsed);
      if (elapsed > MAX_CASE_MS) failures.push(`run ${run} (${kind}): took ${elapsed.toFixed(0)} ms`);
      if (outOfBounds !== '') failures.push(`run ${run} (${kind}): ${outOfBounds}`);
      outcomes.set(label, (outcomes.get(label) ?? 0) + 1);
    }
    console.info(`SEG-Y fuzz: ${MUTATIONS} mutations, slowest ${slowest.toFixed(1)} ms; outcomes ${JSON.stringify(Object.fromEntries([...outcomes].sort()))}`);
    expect(failures.slice(0, 10), `${failures.length} failing mutations`).toEqual([]);
    // The mutations reach both ends: many files still read, many are refused for several reasons.
    expect(outcomes.get('gather') ?? 0).toBeGreaterThan(MUTATIONS / 10);
    expect([...outcomes.keys()].filter((key) => key.startsWith('segy-')).length).toBeGreaterThanOrEqual(8);
  });
});
