/**
 * readSeg2 against files from the project's own writer (write-seg2.ts), which follows the layout
 * of seg-formats.md §3 (Pullan 1990 as summarised there; fixed fields [V], UNITS other than
 * METERS [M], format 3's sign convention verified there on one file only).
 */
import { describe, expect, it } from 'vitest';
import type { GatherOutcome, GatherProblem } from '../../../lib/gathers/gather.js';
import { SEG2_DEFAULT_MAX_PROBLEMS } from '../../../lib/gathers/seg2/problems.js';
import { readSeg2 } from '../../../lib/gathers/seg2/read.js';
import { writeSeg2, type Seg2FileSpec, type Seg2FormatCode, type Seg2TraceSpec } from './write-seg2.js';

const LAYOUT = 'seg-formats.md §3 (Pullan 1990)';

function trace(format: Seg2FormatCode, samples: readonly number[], strings: readonly string[] = ['SAMPLE_INTERVAL 0.00025']): Seg2TraceSpec {
  return { format, samples, strings };
}

function file(traces: readonly Seg2TraceSpec[], extra: Partial<Seg2FileSpec> = {}): Uint8Array {
  return writeSeg2({ littleEndian: true, fileStrings: ['UNITS METERS'], traces, ...extra });
}

function accepted(outcome: GatherOutcome) {
  if (!outcome.ok) throw new Error(`expected a gather, got ${JSON.stringify(outcome.problems, null, 1)}`);
  return outcome;
}

function refusal(outcome: GatherOutcome): readonly GatherProblem[] {
  if (outcome.ok) throw new Error('expected a refusal, got a gather');
  return outcome.problems;
}

/** The problem with `code`, asserting there is one. */
function problemOf(problems: readonly GatherProblem[], code: string): GatherProblem {
  const found = problems.find((problem) => problem.code === code);
  expect(found, `${code} in ${JSON.stringify(problems.map((problem) => problem.code))}`).toBeDefined();
  return found as GatherProblem;
}

/** Sample values per format that reach its limits. */
const VALUES: Record<Seg2FormatCode, number[]> = {
  1: [0, 1, -1, 32767, -32768, 1234, -4321, 7],
  2: [0, 1, -1, 2147483647, -2147483648, 123456789, -987654321, 5],
  3: [0, 1, -1, 32767, -32767, 32767 * 2 ** 15, -32767 * 2 ** 15, 3 * 2 ** 7],
  4: [0, 0.5, -1.25, 3.4028234663852886e38, -1.401298464324817e-45, 1e-20, 12345.678, -0],
  5: [0, 0.1, -1e300, Number.MAX_VALUE, -Number.MIN_VALUE, Math.PI, 1 / 3, -0],
};

describe('readSeg2 round-trips every data format in both byte orders (write-seg2.ts, ' + LAYOUT + ')', () => {
  for (const littleEndian of [true, false]) {
    for (const format of [1, 2, 3, 4, 5] as const) {
      it(`format ${format}, ${littleEndian ? 'little' : 'big'}-endian: samples back exactly`, () => {
        const values = VALUES[format];
        const bytes = file([trace(format, values), trace(format, [...values].reverse())], { littleEndian });
        expect([bytes[0], bytes[1]]).toEqual(littleEndian ? [0x55, 0x3a] : [0x3a, 0x55]);
        const { value, warnings } = accepted(readSeg2(bytes));
        expect(warnings).toEqual([]);
        expect(value.traces).toHaveLength(2);
        const expected = format === 4 ? values.map(Math.fround) : values;
        const [first, second] = value.traces;
        expect(first?.samples).toBeInstanceOf(format === 2 || format === 5 ? Float64Array : Float32Array);
        // Object.is through toEqual on plain arrays: −0 stays −0 where the format keeps it.
        expect([...(first?.samples ?? [])]).toEqual(expected);
        expect([...(second?.samples ?? [])]).toEqual([...expected].reverse());
      });
    }
  }
});

describe('readSeg2 decodes the free-format strings (' + LAYOUT + ' §3.3)', () => {
  const strings = [
    'CHANNEL_NUMBER 7',
    'DELAY -0.010',
    'DESCALING_FACTOR 0.0125',
    'RECEIVER_LOCATION 24.0 1.5 101.25',
    'RECEIVER_STATION_NUMBER 1024',
    'SAMPLE_INTERVAL 0.000125',
    'SOURCE_LOCATION -2.0',
    'SOURCE_STATION_NUMBER S3',
    'STACK 4',
    'NOTE first\nsecond',
  ];
  const fileStrings = ['ACQUISITION_DATE 07/JAN/2013', 'COMPANY Invented Surveys', 'NOTE line one\nline two', 'TRACE_SORT AS_ACQUIRED', 'UNITS METERS'];

  it('gives the time axis, positions and stations as fields, and the rest as metadata', () => {
    const bytes = writeSeg2({ littleEndian: false, fileStrings, traces: [trace(1, [1, 2, 3, 4], strings)] });
    const { value, warnings } = accepted(readSeg2(bytes));
    expect(warnings).toEqual([]);
    const only = value.traces[0];
    expect(only?.sampleInterval).toBe(0.000125);
    expect(only?.delay).toBe(-0.01);
    expect(only?.receiver).toEqual({ x: 24, y: 1.5, elevation: 101.25 });
    expect(only?.source).toEqual({ x: -2, y: null, elevation: null });
    expect(only?.receiverStation).toBe('1024');
    expect(only?.sourceStation).toBe('S3');
    expect(Object.fromEntries(only?.metadata ?? [])).toEqual({
      CHANNEL_NUMBER: '7',
      DESCALING_FACTOR: '0.0125',
      STACK: '4',
      NOTE: 'first\nsecond',
    });
    expect(Object.fromEntries(value.metadata)).toEqual({
      ACQUISITION_DATE: '07/JAN/2013',
      COMPANY: 'Invented Surveys',
      NOTE: 'line one\nline two',
      TRACE_SORT: 'AS_ACQUIRED',
      UNITS: 'METERS',
    });
  });

  it('splits NOTE on a two-byte CR LF line terminator and reads a two-byte string terminator', () => {
    const bytes = writeSeg2({
      littleEndian: true,
      stringTerminator: [0x00, 0x00],
      lineTerminator: [0x0d, 0x0a],
      fileStrings: ['NOTE a\nb\nc', 'UNITS METERS'],
      traces: [trace(4, [1], ['NOTE x\ny', 'SAMPLE_INTERVAL 0.001'])],
    });
    const { value, warnings } = accepted(readSeg2(bytes));
    expect(warnings).toEqual([]);
    expect(value.metadata.get('NOTE')).toBe('a\nb\nc');
    expect(value.traces[0]?.metadata.get('NOTE')).toBe('x\ny');
    expect(value.traces[0]?.sampleInterval).toBe(0.001);
  });

  it('matches a two-byte string terminator as a pair, not by its first byte', () => {
    const bytes = writeSeg2({
      littleEndian: true,
      stringTerminator: [0x3b, 0x3b],
      fileStrings: ['COMPANY A;B', 'UNITS METERS'],
      traces: [trace(1, [0])],
    });
    expect(accepted(readSeg2(bytes)).value.metadata.get('COMPANY')).toBe('A;B');
  });

  it('matches the keywords it decodes whatever their case, keeping the metadata key as written', () => {
    const bytes = file([trace(1, [0], ['Sample_Interval 0.001', 'stack 3'])]);
    const only = accepted(readSeg2(bytes)).value.traces[0];
    expect(only?.sampleInterval).toBe(0.001);
    expect(only?.metadata.get('stack')).toBe('3');
  });

  it('joins a repeated metadata keyword with a line break', () => {
    const bytes = file([trace(1, [0], ['GENERAL_CONSTANT 1', 'GENERAL_CONSTANT 2', 'SAMPLE_INTERVAL 0.001'])]);
    expect(accepted(readSeg2(bytes)).value.traces[0]?.metadata.get('GENERAL_CONSTANT')).toBe('1\n2');
  });

  it('keeps the first of a decoded keyword given twice, with a warning naming both offsets', () => {
    const bytes = file([trace(1, [0], ['SAMPLE_INTERVAL 0.001', 'SAMPLE_INTERVAL 0.002'])]);
    const { value, warnings } = accepted(readSeg2(bytes));
    expect(value.traces[0]?.sampleInterval).toBe(0.001);
    expect(problemOf(warnings, 'keyword-repeated').message).toMatch(/"0\.001" at byte \d+ and "0\.002" at byte \d+/);
  });

  it('converts locations in FEET to metres (UNITS values other than METERS are [M])', () => {
    const bytes = file([trace(1, [0], ['RECEIVER_LOCATION 10 0 100', 'SAMPLE_INTERVAL 0.001'])], { fileStrings: ['UNITS FEET'] });
    const receiver = accepted(readSeg2(bytes)).value.traces[0]?.receiver;
    expect(receiver?.x).toBeCloseTo(3.048, 12);
    expect(receiver?.elevation).toBeCloseTo(30.48, 12);
  });

  it('uses a UNITS string inside the trace block over the file one (file keywords repeated in traces, §3.4)', () => {
    const bytes = file([trace(1, [0], ['RECEIVER_LOCATION 100', 'SAMPLE_INTERVAL 0.001', 'UNITS CENTIMETERS'])]);
    expect(accepted(readSeg2(bytes)).value.traces[0]?.receiver?.x).toBeCloseTo(1, 12);
  });

  it('with no UNITS reads locations as metres and warns once for the file', () => {
    const strings = ['RECEIVER_LOCATION 5', 'SAMPLE_INTERVAL 0.001', 'SOURCE_LOCATION 0'];
    const bytes = file([trace(1, [0], strings), trace(1, [0], strings)], { fileStrings: [] });
    const { value, warnings } = accepted(readSeg2(bytes));
    expect(value.traces[1]?.receiver?.x).toBe(5);
    expect(warnings.filter((warning) => warning.code === 'units-assumed-metres')).toHaveLength(1);
  });

  it('with UNITS NONE leaves locations null, kept in metadata, with a warning', () => {
    const bytes = file([trace(1, [0], ['RECEIVER_LOCATION 5', 'SAMPLE_INTERVAL 0.001'])], { fileStrings: ['UNITS NONE'] });
    const { value, warnings } = accepted(readSeg2(bytes));
    expect(value.traces[0]?.receiver).toBeNull();
    expect(value.traces[0]?.metadata.get('RECEIVER_LOCATION')).toBe('5');
    expect(problemOf(warnings, 'units-unknown').byteOffset).toBe(32 + 4);
  });

  it('a location that is not 1–3 numbers gives null and a warning, the text kept', () => {
    for (const text of ['RECEIVER_LOCATION 1 2 3 4', 'RECEIVER_LOCATION east', 'RECEIVER_LOCATION']) {
      const bytes = file([trace(1, [0], [text, 'SAMPLE_INTERVAL 0.001'])]);
      const { value, warnings } = accepted(readSeg2(bytes));
      expect(value.traces[0]?.receiver, text).toBeNull();
      expect(problemOf(warnings, 'location-invalid').field).toBe('trace 1 RECEIVER_LOCATION');
    }
  });
});

describe('readSeg2 accepts what real files do beyond the standard, with warnings (' + LAYOUT + ' §3.4)', () => {
  it('a keyword prefixed with * is read without the star', () => {
    const bytes = file([trace(1, [0], ['*SAMPLE_INTERVAL 0.001'])]);
    const { value, warnings } = accepted(readSeg2(bytes));
    expect(value.traces[0]?.sampleInterval).toBe(0.001);
    expect(problemOf(warnings, 'keyword-prefixed').severity).toBe('warning');
  });

  it('non-printing bytes inside a string are removed', () => {
    const bytes = file([trace(1, [0], ['SAMPLE_INTERVAL 0.00\u00011'])]);
    const { value, warnings } = accepted(readSeg2(bytes));
    expect(value.traces[0]?.sampleInterval).toBe(0.001);
    expect(problemOf(warnings, 'string-nonprinting').message).toContain('1 non-printing byte');
  });

  it('a descriptor block size that is not a multiple of 4 (X = 197, seen in a real file)', () => {
    const bytes = file([{ format: 4, samples: [1.5, 2.5], strings: ['SAMPLE_INTERVAL 0.001'], descriptorBytes: 197 }, trace(4, [3.5])]);
    const { value, warnings } = accepted(readSeg2(bytes));
    expect([...(value.traces[0]?.samples ?? [])]).toEqual([1.5, 2.5]);
    expect([...(value.traces[1]?.samples ?? [])]).toEqual([3.5]);
    expect(problemOf(warnings, 'trace-descriptor-size-odd').message).toContain('is 197');
  });

  it('a trace pointer sub-block much larger than 4N, and not a multiple of 4', () => {
    for (const pointerBytes of [4224, 4226]) {
      const bytes = file([trace(1, [9]), trace(1, [8])], { pointerBytes });
      const { value, warnings } = accepted(readSeg2(bytes));
      expect(value.traces.map((each) => each.samples[0])).toEqual([9, 8]);
      expect(warnings.some((warning) => warning.code === 'pointer-block-size-odd')).toBe(pointerBytes % 4 !== 0);
    }
  });

  it('a revision other than 1 loads with a warning', () => {
    const { warnings } = accepted(readSeg2(file([trace(1, [0])], { revision: 2 })));
    expect(problemOf(warnings, 'revision-unexpected').byteOffset).toBe(2);
  });

  it('a data block larger than its samples loads with a warning', () => {
    const bytes = file([{ ...trace(2, [5, 6]), dataPadding: 8 }]);
    const { value, warnings } = accepted(readSeg2(bytes));
    expect([...(value.traces[0]?.samples ?? [])]).toEqual([5, 6]);
    expect(problemOf(warnings, 'data-block-larger-than-samples').severity).toBe('warning');
  });

  it('format 3 with a sample count not a multiple of 4 reads the last group in part', () => {
    const bytes = file([trace(3, [1, -2, 4, 8, 16, -32])]);
    const { value, warnings } = accepted(readSeg2(bytes));
    expect([...(value.traces[0]?.samples ?? [])]).toEqual([1, -2, 4, 8, 16, -32]);
    // The writer fills the last group: 2 groups, 20 bytes, exactly what 6 samples need.
    expect(warnings.map((warning) => warning.code)).toEqual(['format3-partial-group']);
    const short = file([trace(3, [1, -2, 4, 8, 16, -32])]);
    const pointer = new DataView(short.buffer).getUint32(32, true);
    new DataView(short.buffer).setUint32(pointer + 4, 10, true);
    expect(problemOf(refusal(readSeg2(short.slice(0, short.length - 10))), 'data-block-too-small').message).toContain('needs 20 bytes');
  });

  it('an unterminated string is read up to the next one', () => {
    const bytes = file([trace(1, [0], ['SAMPLE_INTERVAL 0.001'])]);
    // The file string "UNITS METERS" starts at 36: its terminator is at 36 + 2 + 12 = 50.
    expect(bytes[50]).toBe(0);
    bytes[50] = 0x20;
    const { value, warnings } = accepted(readSeg2(bytes));
    expect(value.metadata.get('UNITS')).toBe('METERS');
    expect(problemOf(warnings, 'string-unterminated').byteOffset).toBe(36);
  });
});

describe('readSeg2 input forms and limits', () => {
  const bytes = file([trace(1, [1, 2, 3])]);

  it('reads a Uint8Array that is a window on a larger buffer, and an ArrayBuffer', () => {
    const larger = new Uint8Array(bytes.length + 20).fill(0xee);
    larger.set(bytes, 7);
    const window = larger.subarray(7, 7 + bytes.length);
    expect([...(accepted(readSeg2(window)).value.traces[0]?.samples ?? [])]).toEqual([1, 2, 3]);
    const buffer = new ArrayBuffer(bytes.length);
    new Uint8Array(buffer).set(bytes);
    expect([...(accepted(readSeg2(buffer)).value.traces[0]?.samples ?? [])]).toEqual([1, 2, 3]);
  });

  it('refuses a file larger than maxBytes before reading it', () => {
    const problems = refusal(readSeg2(bytes, { maxBytes: bytes.length - 1 }));
    expect(problems.map((problem) => problem.code)).toEqual(['file-too-large']);
  });

  it('lists at most maxProblems, then one entry counting the rest', () => {
    const traces = Array.from({ length: 10 }, () => trace(1, [0], ['STACK 1']));
    const problems = refusal(readSeg2(file(traces), { maxProblems: 3 }));
    expect(problems).toHaveLength(4);
    expect(problems.slice(0, 3).every((problem) => problem.code === 'sample-interval-missing')).toBe(true);
    expect(problems[3]?.code).toBe('problems-left-off');
    expect(problems[3]?.message).toContain('7 more problems (7 of them errors)');
  });

  it('refuses 16383 trace pointers to one block quickly, listing a capped number of problems', () => {
    const one = file([trace(1, Array.from({ length: 1000 }, (_, index) => index))]);
    const pointer = new DataView(one.buffer).getUint32(32, true);
    const pointerBytes = 4 * 16383;
    const shift = pointerBytes - 4;
    const bytes = new Uint8Array(one.length + shift);
    bytes.set(one.subarray(0, 32));
    bytes.set(one.subarray(36), 32 + pointerBytes);
    const view = new DataView(bytes.buffer);
    view.setUint16(4, pointerBytes, true);
    view.setUint16(6, 16383, true);
    for (let index = 0; index < 16383; index += 1) view.setUint32(32 + 4 * index, pointer + shift, true);
    const started = performance.now();
    const problems = refusal(readSeg2(bytes));
    // Generous: the refusal takes a few milliseconds; 2 s only guards against work per trace pair.
    expect(performance.now() - started).toBeLessThan(2000);
    expect(problems).toHaveLength(SEG2_DEFAULT_MAX_PROBLEMS + 1);
    expect(problems[0]?.code).toBe('trace-blocks-overlap');
    expect(problems.at(-1)?.message).toContain('16182 more problems');
  });

  it('does not change the bytes it reads', () => {
    const copy = Uint8Array.from(bytes);
    readSeg2(bytes);
    expect(bytes).toEqual(copy);
  });
});

/** Write a u16/u32 in place, little-endian (the `file` helper's order). */
function put(bytes: Uint8Array, offset: number, value: number, size: 1 | 2 | 4): void {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (size === 1) view.setUint8(offset, value);
  else if (size === 2) view.setUint16(offset, value, true);
  else view.setUint32(offset, value, true);
}

describe('readSeg2 refuses damaged files whole, naming the byte offset, the field and a fix', () => {
  // Two traces of format 2, little-endian; the layout puts trace 1's pointer at 32 and trace 2's at 36.
  const good = (): Uint8Array => file([trace(2, [1, 2, 3, 4]), trace(2, [5, 6, 7, 8])]);
  const view = (bytes: Uint8Array) => new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const firstTrace = (bytes: Uint8Array) => view(bytes).getUint32(32, true);
  const secondTrace = (bytes: Uint8Array) => view(bytes).getUint32(36, true);

  /** Refusal with exactly one error of `code` at `offset`, whose message names that offset. */
  function expectRefused(bytes: Uint8Array, code: string, offset: number | null, field?: RegExp): GatherProblem {
    const problems = refusal(readSeg2(bytes));
    const problem = problemOf(problems, code);
    expect(problem.severity).toBe('error');
    expect(problem.byteOffset).toBe(offset);
    expect(problem.line).toBe(0);
    expect(problem.fix.length).toBeGreaterThan(10);
    if (field !== undefined) expect(problem.field).toMatch(field);
    if (offset !== null) expect(problem.message).toMatch(/byte/);
    return problem;
  }

  it('the unmodified file is accepted (so each refusal below is the edit\'s doing)', () => {
    expect(accepted(readSeg2(good())).value.traces).toHaveLength(2);
  });

  it('wrong magic', () => {
    const bytes = good();
    bytes[0] = 0x50;
    bytes[1] = 0x4b;
    expect(expectRefused(bytes, 'not-seg2', 0).message).toContain('0x504B');
    expect(refusal(readSeg2(new Uint8Array(0)))[0]?.code).toBe('not-seg2');
  });

  it('truncated inside the file descriptor block, the pointers, a descriptor and the samples', () => {
    const bytes = good();
    expectRefused(bytes.slice(0, 20), 'file-truncated', 20, /file descriptor block/);
    expectRefused(bytes.slice(0, 34), 'file-truncated', 34, /trace pointer/);
    expect(expectRefused(bytes.slice(0, firstTrace(bytes) + 10), 'trace-pointer-past-end', 32).message).toContain('gives offset');
    expectRefused(bytes.slice(0, secondTrace(bytes) + 40), 'trace-descriptor-past-end', secondTrace(bytes) + 2, /trace 2/);
    expectRefused(bytes.slice(0, bytes.length - 1), 'data-block-past-end', secondTrace(bytes) + 4, /data block size/);
  });

  it('no traces', () => {
    const bytes = good();
    put(bytes, 6, 0, 2);
    expectRefused(bytes, 'trace-count-zero', 6);
  });

  it('an absurd trace count: more traces than the pointer block holds', () => {
    const bytes = good();
    put(bytes, 6, 0xffff, 2);
    expect(expectRefused(bytes, 'pointer-block-too-small', 4).message).toContain('65535 traces');
  });

  it('a trace pointer past the end or into the file header', () => {
    const past = good();
    put(past, 36, 0xfffffff0, 4);
    expectRefused(past, 'trace-pointer-past-end', 36, /trace 2 pointer/);
    const inside = good();
    put(inside, 32, 8, 4);
    expectRefused(inside, 'trace-pointer-in-file-header', 32);
    // Past the 32 fixed bytes but still inside the pointer sub-block (bytes 32–39 here).
    const inPointers = good();
    put(inPointers, 32, 36, 4);
    expect(expectRefused(inPointers, 'trace-pointer-in-file-header', 32).message).toContain('bytes 0–39');
  });

  it('a trace pointer onto something other than a trace descriptor block', () => {
    const bytes = good();
    const target = secondTrace(bytes) + 4;
    put(bytes, 36, target, 4);
    expectRefused(bytes, 'trace-block-id-wrong', target);
  });

  it('descriptor sizes inconsistent: X below 32, samples beyond Y, blocks overlapping', () => {
    const small = good();
    put(small, firstTrace(small) + 2, 30, 2);
    expectRefused(small, 'trace-descriptor-too-small', firstTrace(small) + 2);
    const beyond = good();
    put(beyond, firstTrace(beyond) + 8, 5, 4);
    expect(expectRefused(beyond, 'data-block-too-small', firstTrace(beyond) + 8).message).toContain('needs 20 bytes');
    const huge = good();
    put(huge, firstTrace(huge) + 8, 0xffffffff, 4);
    expectRefused(huge, 'data-block-too-small', firstTrace(huge) + 8);
    const hugeData = good();
    put(hugeData, firstTrace(hugeData) + 4, 0xffffffff, 4);
    expectRefused(hugeData, 'data-block-past-end', firstTrace(hugeData) + 4);
    const overlap = good();
    put(overlap, 36, firstTrace(overlap), 4);
    expect(expectRefused(overlap, 'trace-blocks-overlap', firstTrace(overlap)).message).toContain('inside trace');
    // Trace 1's data block one byte longer: it now covers trace 2's first byte.
    const byOne = good();
    put(byOne, firstTrace(byOne) + 4, 17, 4);
    expect(expectRefused(byOne, 'trace-blocks-overlap', secondTrace(byOne)).message).toContain('inside trace 1');
  });

  it('an unknown data format code', () => {
    for (const code of [0, 6, 255]) {
      const bytes = good();
      put(bytes, secondTrace(bytes) + 12, code, 1);
      expect(expectRefused(bytes, 'format-code-unknown', secondTrace(bytes) + 12).message).toContain(`is ${code}`);
    }
  });

  it('a terminator length other than 1 or 2', () => {
    const bytes = good();
    put(bytes, 8, 3, 1);
    expectRefused(bytes, 'terminator-length-invalid', 8);
    const line = good();
    put(line, 11, 0, 1);
    expectRefused(line, 'terminator-length-invalid', 11);
  });

  it('a free-format string that runs past its block, or an offset of 1', () => {
    const bytes = good();
    const stringAt = firstTrace(bytes) + 32;
    put(bytes, stringAt, 0x7fff, 2);
    expect(expectRefused(bytes, 'string-past-block', stringAt).message).toContain('trace 1 descriptor block');
    const one = good();
    put(one, 36 + 4, 1, 2);
    expectRefused(one, 'string-offset-invalid', 40, /file descriptor block/);
  });

  it('a trace without a usable SAMPLE_INTERVAL, or with a DELAY that is not a number', () => {
    expectRefused(file([trace(1, [0], ['STACK 1'])]), 'sample-interval-missing', 36 + 17 + 32, /trace 1 SAMPLE_INTERVAL/);
    for (const text of ['SAMPLE_INTERVAL 0', 'SAMPLE_INTERVAL -0.001', 'SAMPLE_INTERVAL 0,25', 'SAMPLE_INTERVAL']) {
      const problems = refusal(readSeg2(file([trace(1, [0], [text])])));
      expect(problemOf(problems, 'sample-interval-invalid').message, text).toContain('not a positive number of seconds');
    }
    const delay = refusal(readSeg2(file([trace(1, [0], ['DELAY 10ms', 'SAMPLE_INTERVAL 0.001'])])));
    expect(problemOf(delay, 'delay-invalid').message).toContain('"10ms"');
  });

  it('every problem of a refused file is reported, not only the first trace\'s', () => {
    const bytes = good();
    put(bytes, firstTrace(bytes) + 12, 9, 1);
    put(bytes, secondTrace(bytes) + 12, 9, 1);
    const problems = refusal(readSeg2(bytes));
    expect(problems.filter((problem) => problem.code === 'format-code-unknown').map((problem) => problem.field)).toEqual([
      'trace 1 data format code',
      'trace 2 data format code',
    ]);
  });
});
