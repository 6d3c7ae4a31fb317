/**
 * openSegy / readSegy at the edges the module comment of lib/gathers/segy/read.ts lists, on
 * files built in memory by build-segy.ts.
 */
import { describe, expect, it } from 'vitest';
import type { GatherProblem } from '../../../lib/gathers/gather.js';
import type { ByteSource } from '../../../lib/gathers/segy/byte-source.js';
import { applyScalar, openSegy, readSegy, type SegyTrace } from '../../../lib/gathers/segy/read.js';
import { buildSegy } from './build-segy.js';

function refusal(outcome: { ok: boolean; problems?: readonly GatherProblem[] }): GatherProblem {
  expect(outcome.ok, 'expected a refusal').toBe(false);
  const first = outcome.problems?.[0];
  if (first === undefined) throw new Error('refusal without problems');
  expect(first.severity).toBe('error');
  expect(first.fix.length).toBeGreaterThan(10);
  return first;
}

function gather(bytes: Uint8Array) {
  const outcome = readSegy(bytes);
  if (!outcome.ok) throw new Error(`refused: ${outcome.problems[0]?.message}`);
  return { traces: outcome.value.traces as readonly SegyTrace[], warnings: outcome.warnings, metadata: outcome.value.metadata };
}

/** A source that counts what is read, to show the reader reads trace by trace. */
function countingSource(bytes: Uint8Array): ByteSource & { readonly reads: Array<[number, number]> } {
  const reads: Array<[number, number]> = [];
  return { size: bytes.byteLength, reads, read: (offset, length) => { reads.push([offset, length]); return bytes.slice(offset, offset + length); } };
}

describe('applyScalar', () => {
  it('applyScalar multiplies by a positive scalar, divides by a negative one, and leaves a value alone for 0', () => {
    expect(applyScalar(12345, -100)).toBe(123.45);
    expect(applyScalar(12, 10)).toBe(120);
    expect(applyScalar(7, 0)).toBe(7);
    expect(applyScalar(7, 1)).toBe(7);
    expect(applyScalar(7, -1)).toBe(7);
  });
});

describe('openSegy and readSegy at the edges', () => {
  it('readSegy refuses a file shorter than 3600 bytes, naming the length and the fix', () => {
    const problem = refusal(readSegy(new Uint8Array(100)));
    expect(problem.code).toBe('segy-too-short');
    expect(problem.message).toMatch(/100 bytes long/);
    expect(problem.line).toBe(0);
    expect(problem.column).toBeNull();
  });

  it('readSegy refuses format 4 (obsolete) and an unknown code, naming bytes 3225–3226 and file offset 3224', () => {
    const obsolete = refusal(readSegy(buildSegy({ binary: { dataSampleFormatCode: 4 } })));
    expect(obsolete.code).toBe('segy-format-unsupported');
    expect(obsolete.byteOffset).toBe(3224);
    expect(obsolete.message).toMatch(/3225–3226.*fixed point with gain/);
    const unknown = refusal(readSegy(buildSegy({ binary: { dataSampleFormatCode: 99 } })));
    expect(unknown.code).toBe('segy-format-unknown');
    expect(unknown.field).toBe('dataSampleFormatCode');
  });

  it('readSegy refuses a huge extended textual header count that runs past the end of the file, naming bytes 3505–3506', () => {
    const problem = refusal(readSegy(buildSegy({ binary: { extendedTextualHeaders: 32767 } })));
    expect(problem.code).toBe('segy-extended-headers-beyond-file');
    expect(problem.byteOffset).toBe(3504);
    expect(problem.message).toMatch(/3505–3506.*32767 extended textual headers/);
  });

  it('readSegy refuses a negative extended header count other than −1', () => {
    expect(refusal(readSegy(buildSegy({ binary: { extendedTextualHeaders: -2 } }))).code).toBe('segy-extended-headers-invalid');
  });

  it('readSegy reads two extended headers, and −1 up to the ((SEG: EndText)) stanza', () => {
    const counted = gather(buildSegy({ extended: ['C FIRST', 'C SECOND'] }));
    expect(counted.metadata.get('extendedTextualHeader2')?.startsWith('C SECOND')).toBe(true);
    expect(counted.traces).toHaveLength(3);
    const ended = buildSegy({ extended: ['C FIRST', '((SEG: EndText))'], binary: { extendedTextualHeaders: -1 } });
    const opened = openSegy(ended);
    if (!opened.ok) throw new Error('refused');
    expect(opened.value.extendedTextualHeaderCount).toBe(2);
    expect(opened.value.traceCount).toBe(3);
    expect(opened.value.readTrace(0).ok).toBe(true);
  });

  it('readSegy refuses −1 extended headers when no EndText stanza comes within the limit', () => {
    const problem = refusal(readSegy(buildSegy({ extended: ['C ONE', 'C TWO'], binary: { extendedTextualHeaders: -1 } }), { maxExtendedTextualHeaders: 2 }));
    expect(problem.code).toBe('segy-extended-headers-unterminated');
  });

  it('openSegy decodes only maxExtendedTextualHeaders of them and warns, yet finds the traces after all', () => {
    const opened = openSegy(buildSegy({ extended: ['C A', 'C B', 'C C'] }), { maxExtendedTextualHeaders: 1 });
    if (!opened.ok) throw new Error('refused');
    expect(opened.value.extendedTextualHeaders).toHaveLength(1);
    expect(opened.value.traceOffset(0)).toBe(3600 + 3 * 3200);
    expect(opened.warnings.map((w) => w.code)).toContain('segy-extended-headers-skipped');
  });

  it('readSegy refuses zero samples per trace in the binary and first trace headers, naming bytes 3221–3222', () => {
    const problem = refusal(readSegy(buildSegy({ samples: 0 })));
    expect(problem.code).toBe('segy-samples-per-trace-zero');
    expect(problem.message).toMatch(/3221–3222/);
  });

  it('readSegy takes the first trace header count when the binary header gives 0 samples, and warns', () => {
    const bytes = buildSegy({ samples: 10, binary: { samplesPerDataTrace: 0 } });
    const { traces, warnings } = gather(bytes);
    expect(traces[2]?.samples.length).toBe(10);
    expect(warnings.map((w) => w.code)).toContain('segy-samples-per-trace-from-trace');
  });

  it('readSegy reads the binary header count in a fixed-length file and warns when a trace header disagrees (115–116)', () => {
    const { traces, warnings } = gather(buildSegy({ samples: 10, trace: (t) => (t === 1 ? { samplesInThisTrace: 7 } : {}) }));
    expect(traces[1]?.samples.length).toBe(10);
    const warning = warnings.find((w) => w.code === 'segy-trace-sample-count-differs');
    expect(warning?.byteOffset).toBe(3600 + 280 + 114);
    expect(warning?.message).toMatch(/trace 2, trace header bytes 115–116.*gives 7 samples/);
  });

  it('readSegy puts the textual header, byte order and every binary header field in the gather metadata', () => {
    const { metadata } = gather(buildSegy({ textual: 'ascii' }));
    expect(metadata.get('textualHeader')?.split('\n')[0]).toBe('C 1 SLOPEBREAK EDGE CASE');
    expect(metadata.get('textualEncoding')).toBe('ascii');
    expect(metadata.get('byteOrder')).toBe('big-endian');
    expect(metadata.get('dataSampleFormatCode')).toBe('5');
  });

  it('readSegy refuses absurd sample counts beyond maxSamplesPerTrace, and files with more samples than maxTotalSamples', () => {
    const tooLong = refusal(readSegy(buildSegy({ samples: 50 }), { maxSamplesPerTrace: 49 }));
    expect(tooLong.code).toBe('segy-samples-per-trace-too-many');
    const tooMany = refusal(readSegy(buildSegy({ samples: 50, traces: 4 }), { maxTotalSamples: 199 }));
    expect(tooMany.code).toBe('segy-too-many-samples');
    expect(readSegy(buildSegy({ samples: 50, traces: 4 }), { maxTotalSamples: 200 }).ok).toBe(true);
  });

  it('openSegy opens a fixed-length file of more than maxTraces traces (no index needed); readSegy and a variable-length index refuse it', () => {
    const fixed = buildSegy({ traces: 3 });
    const opened = openSegy(fixed, { maxTraces: 2 });
    expect(opened.ok && opened.value.traceCount).toBe(3);
    expect(refusal(readSegy(fixed, { maxTraces: 2 })).code).toBe('segy-too-many-traces');
    expect(refusal(openSegy(buildSegy({ samples: [3, 4, 5] }), { maxTraces: 2 })).code).toBe('segy-too-many-traces');
    expect(readSegy(fixed, { maxTraces: 3 }).ok).toBe(true);
  });

  it('readSegy refuses a file with a sample count that leaves no whole trace, naming the sizes', () => {
    const problem = refusal(readSegy(buildSegy({ samples: 10, binary: { samplesPerDataTrace: 60000 } })));
    expect(problem.code).toBe('segy-no-traces');
    expect(problem.message).toMatch(/takes 240240/);
  });

  it('readSegy ignores a cut-off last trace with a warning that names its byte offset', () => {
    const whole = buildSegy({ samples: 10, traces: 3 });
    const cut = whole.subarray(0, whole.length - 7);
    const { traces, warnings } = gather(cut);
    expect(traces).toHaveLength(2);
    const trailing = warnings.find((w) => w.code === 'segy-trailing-bytes');
    expect(trailing?.byteOffset).toBe(3600 + 2 * (240 + 40));
  });

  it('readSegy reads traces of different lengths when the fixed-length flag is 0', () => {
    const { traces } = gather(buildSegy({ samples: [5, 12, 1], sample: (t, k) => t * 1000 + k }));
    expect(traces.map((trace) => trace.samples.length)).toEqual([5, 12, 1]);
    expect(Array.from(traces[1]!.samples)).toEqual(Array.from({ length: 12 }, (_, k) => 1000 + k));
  });

  it('readSegy keeps a variable-length trace of 0 samples, with a warning', () => {
    const { traces, warnings } = gather(buildSegy({ samples: [4, 0, 2] }));
    expect(traces.map((trace) => trace.samples.length)).toEqual([4, 0, 2]);
    expect(warnings.find((w) => w.code === 'segy-trace-empty')?.message).toMatch(/trace 2/);
  });

  it('readSegy reads big- and little-endian the same values, with the rev 2 constant', () => {
    const options = { format: 2, sample: (t: number, k: number) => (t - 1) * 1_000_000_007 + k, trace: (t: number) => ({ groupCoordinateX: 100 * t + 5, coordinateScalar: -10 }) };
    const big = gather(buildSegy({ ...options, binary: { byteOrderConstant: 0x01020304, segyFormatRevisionMajor: 2 } }));
    const little = gather(buildSegy({ ...options, littleEndian: true, binary: { byteOrderConstant: 0x01020304, segyFormatRevisionMajor: 2 } }));
    expect(Array.from(little.traces[0]!.samples)).toEqual(Array.from(big.traces[0]!.samples));
    expect(big.traces[0]!.samples[3]).toBe(-1_000_000_004);
    expect(little.traces[2]!.receiver?.x).toBe(20.5);
  });

  it('readSegy converts feet to metres when the measurement system (3255–3256) is 2', () => {
    const { traces } = gather(buildSegy({ binary: { measurementSystem: 2 }, trace: () => ({ groupCoordinateX: 100, receiverGroupElevation: 10, distanceFromSourceToReceiverGroup: 10 }) }));
    expect(traces[0]?.receiver?.x).toBeCloseTo(30.48, 12);
    expect(traces[0]?.receiver?.elevation).toBeCloseTo(3.048, 12);
    expect(traces[0]?.offset).toBeCloseTo(3.048, 12);
  });

  it('readSegy warns and reads metres when the measurement system is neither 1 nor 2', () => {
    const { traces, warnings } = gather(buildSegy({ binary: { measurementSystem: 0 }, trace: () => ({ groupCoordinateX: 100 }) }));
    expect(traces[0]?.receiver?.x).toBe(100);
    expect(warnings.map((w) => w.code)).toContain('segy-measurement-system-unknown');
  });

  it('readSegy gives no positions for geographic coordinate units (89–90 = 3) and says so once for all traces', () => {
    const { traces, warnings } = gather(buildSegy({ trace: () => ({ coordinateUnits: 3 }) }));
    expect(traces.every((trace) => trace.receiver === null && trace.source === null)).toBe(true);
    const warning = warnings.filter((w) => w.code === 'segy-coordinates-not-length');
    expect(warning).toHaveLength(1);
    expect(warning[0]?.message).toMatch(/89–90.*\(and 2 more like it\)/);
  });

  it('readSegy applies an unusual scalar as given, with a warning naming bytes 71–72', () => {
    const { traces, warnings } = gather(buildSegy({ traces: 1, trace: () => ({ coordinateScalar: -3, groupCoordinateX: 9 }) }));
    expect(traces[0]?.receiver?.x).toBe(3);
    expect(warnings.find((w) => w.code === 'segy-scalar-unusual')?.message).toMatch(/71–72/);
  });

  it('readSegy takes the file interval when a trace gives 0, and refuses when neither gives one', () => {
    const { traces } = gather(buildSegy({ binary: { sampleInterval: 500 }, trace: () => ({ sampleIntervalForThisTrace: 0 }) }));
    expect(traces[0]?.sampleInterval).toBe(500e-6);
    const problem = refusal(readSegy(buildSegy({ binary: { sampleInterval: 0 }, trace: () => ({ sampleIntervalForThisTrace: 0 }) })));
    expect(problem.code).toBe('segy-sample-interval-missing');
    expect(problem.byteOffset).toBe(3600 + 116);
  });

  it('readSegy uses the rev 2 extended sample interval and sample count (3273–3280, 3269–3272) when set', () => {
    const { traces } = gather(buildSegy({ samples: 10, binary: { segyFormatRevisionMajor: 2, samplesPerDataTrace: 3, extendedSamplesPerDataTrace: 10, extendedSampleInterval: 125.5 }, trace: () => ({ sampleIntervalForThisTrace: 0 }) }));
    expect(traces[0]?.samples.length).toBe(10);
    expect(traces[0]?.sampleInterval).toBeCloseTo(125.5e-6, 18);
  });

  it('readSegy honours the rev 2 byte offset of the first trace, and refuses one inside the headers', () => {
    const plain = buildSegy({ samples: 4, traces: 2, binary: { segyFormatRevisionMajor: 2 } });
    const padded = new Uint8Array(plain.length + 100);
    padded.set(plain.subarray(0, 3600));
    padded.set(plain.subarray(3600), 3700);
    new DataView(padded.buffer).setBigUint64(3200 + 320, 3700n, false);
    const { traces } = gather(padded);
    expect(traces).toHaveLength(2);
    expect(traces[1]?.byteOffset).toBe(3700 + 256);
    const inside = plain.slice();
    new DataView(inside.buffer).setBigUint64(3200 + 320, 100n, false);
    expect(refusal(readSegy(inside)).code).toBe('segy-first-trace-offset-invalid');
  });

  it('readSegy refuses rev 2 additional trace headers (3507–3508)', () => {
    const problem = refusal(readSegy(buildSegy({ binary: { segyFormatRevisionMajor: 2, maximumAdditionalTraceHeaders: 1 } })));
    expect(problem.code).toBe('segy-additional-trace-headers');
    expect(problem.message).toMatch(/3507–3508/);
  });

  it('readSegy refuses pairwise-swapped files at the byte-order constant (3297–3300)', () => {
    const problem = refusal(readSegy(buildSegy({ binary: { byteOrderConstant: 0x02010403 } })));
    expect(problem.code).toBe('segy-byte-order-unknown');
    expect(problem.byteOffset).toBe(3296);
  });

  it('readSegy warns when it reads a file without the constant little-endian because only that gives a format code', () => {
    const { traces, warnings } = gather(buildSegy({ littleEndian: true, format: 3, sample: (_t, k) => -k }));
    expect(Array.from(traces[0]!.samples.subarray(0, 3))).toEqual([0, -1, -2]);
    expect(warnings.map((w) => w.code)).toContain('segy-byte-order-guessed');
  });

  it('openSegy reads one trace with one read of its own bytes, after reading only the file headers', () => {
    const bytes = buildSegy({ samples: 100, traces: 50 });
    const source = countingSource(bytes);
    const opened = openSegy(source);
    if (!opened.ok) throw new Error('refused');
    expect(source.reads).toEqual([[0, 3600]]);
    const trace = opened.value.readTrace(37);
    expect(trace.ok).toBe(true);
    expect(source.reads[1]).toEqual([3600 + 37 * 640, 640]);
    expect(source.reads).toHaveLength(2);
  });

  it('openSegy refuses, not throws, when the source returns fewer bytes than asked', () => {
    const bytes = buildSegy();
    const short: ByteSource = { size: bytes.length, read: (offset, length) => bytes.subarray(offset, offset + Math.min(length, 100)) };
    expect(refusal(openSegy(short)).code).toBe('segy-read-short');
  });

  it('SegyFile.readTrace throws a RangeError for an index outside the file (a programming error)', () => {
    const opened = openSegy(buildSegy({ traces: 2 }));
    if (!opened.ok) throw new Error('refused');
    expect(() => opened.value.readTrace(2)).toThrow(RangeError);
    expect(() => opened.value.readTrace(-1)).toThrow(/outside 0…1/);
  });
});
