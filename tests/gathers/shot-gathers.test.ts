/**
 * Shot splitting and trace placement (lib/gathers/shot-gathers.ts) on a three-shot SEG-Y line
 * written by Debian's python3-segyio (tests/gathers/make-segyio-shots.py, the outside writer
 * and the source of every expected position), and the geometry corrections a user gives.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readGather } from '../../lib/gathers/formats.js';
import type { Gather } from '../../lib/gathers/gather.js';
import { shotGathers } from '../../lib/gathers/shot-gathers.js';
import { findPython } from '../helpers/python.js';
import { writeSegy } from '../tools/write-segy.js';

const SOURCE = 'python3-segyio via tests/gathers/make-segyio-shots.py';

interface Expected {
  traces: { record: number; sourcePoint: number; channel: number; sourceX: number; receiverX: number; receiverElevation: number; sourceElevation: number }[];
}

let folder: string;
let gather: Gather;
let expected: Expected;

beforeAll(() => {
  folder = mkdtempSync(join(tmpdir(), 'slopebreak-shots-'));
  const file = join(folder, 'line.sgy');
  const python = findPython(['numpy', 'segyio']);
  expected = JSON.parse(execFileSync(python, ['tests/gathers/make-segyio-shots.py', file], { encoding: 'utf8' })) as Expected;
  const read = readGather(new Uint8Array(readFileSync(file)));
  if (!read.ok) throw new Error(read.problems[0]!.message);
  gather = read.value;
});

afterAll(() => rmSync(folder, { recursive: true, force: true }));

describe('shotGathers on a three-shot SEG-Y line', () => {
  it('splits at each new field record and names each shot after its energy source point', () => {
    const outcome = shotGathers(gather, 'line');
    if (!outcome.ok) throw new Error(outcome.problems[0]!.message);
    const records = [...new Set(expected.traces.map((trace) => trace.sourcePoint))];
    expect(outcome.value.map((shot) => shot.shot), SOURCE).toEqual(records.map((point) => `SP${point}`));
    expect(outcome.value.map((shot) => shot.traces.length), SOURCE).toEqual([12, 12, 12]);
  });

  it('places every trace where the scaled header coordinates put it, with elevations and offsets', () => {
    const outcome = shotGathers(gather, 'line');
    if (!outcome.ok) throw new Error(outcome.problems[0]!.message);
    const placed = outcome.value.flatMap((shot) => shot.traces.map((trace) => ({ shot, trace })));
    placed.forEach(({ shot, trace }, index) => {
      const truth = expected.traces[index]!;
      expect(shot.sourceX, `${SOURCE}, trace ${index + 1}`).toBeCloseTo(truth.sourceX, 9);
      expect(trace.receiverX, `${SOURCE}, trace ${index + 1}`).toBeCloseTo(truth.receiverX, 9);
      expect(trace.offset).toBeCloseTo(truth.receiverX - truth.sourceX, 9);
      expect(trace.receiverElevation, SOURCE).toBeCloseTo(truth.receiverElevation, 9);
      expect(shot.sourceElevation, SOURCE).toBeCloseTo(truth.sourceElevation, 9);
      expect(trace.receiver).toBe(`ch${truth.channel}`);
    });
  });

  it('refuses a shot name or source position for a file of several shots, and says why', () => {
    const outcome = shotGathers(gather, 'line', { sourceX: 0 });
    expect(outcome.ok).toBe(false);
    if (!outcome.ok) expect(outcome.problems[0]!.code).toBe('gather-correction-ambiguous');
  });

  it('puts receivers at the first position plus the spacing in trace order when told to', () => {
    const outcome = shotGathers(gather, 'line', { firstReceiverX: 100, receiverSpacing: -2 });
    if (!outcome.ok) throw new Error(outcome.problems[0]!.message);
    expect(outcome.value[1]!.traces.map((trace) => trace.receiverX)).toEqual(Array.from({ length: 12 }, (_, k) => 100 - 2 * k));
    expect(outcome.value[1]!.traces[0]!.offset).toBeCloseTo(100 - expected.traces[12]!.sourceX, 9);
  });

  it('asks for both receiver corrections when given one', () => {
    const outcome = shotGathers(gather, 'line', { firstReceiverX: 100 });
    expect(outcome.ok).toBe(false);
    if (!outcome.ok) expect(outcome.problems[0]!.code).toBe('gather-receiver-correction-incomplete');
  });
});

describe('shotGathers without positions in the headers', () => {
  const blank = (withOffsets: boolean): Gather => ({
    format: 'SEG-Y',
    metadata: new Map(),
    traces: Array.from({ length: 4 }, (_, k) => ({
      samples: new Float32Array(10), sampleInterval: 0.001, delay: 0,
      receiver: { x: 0, y: 0, elevation: 0 }, source: { x: 0, y: 0, elevation: 0 },
      receiverStation: null, sourceStation: null, metadata: new Map([['originalFieldRecordNumber', '7']]),
      ...(withOffsets ? { offset: 3 * (k + 1) } : {}),
    })),
  });

  it('places receivers at their signed offsets from a source at 0 m, and warns that it did (SEG-Y rev 1, bytes 37–40)', () => {
    const outcome = shotGathers(blank(true), 'x');
    if (!outcome.ok) throw new Error(outcome.problems[0]!.message);
    expect(outcome.value[0]!.traces.map((trace) => trace.receiverX)).toEqual([3, 6, 9, 12]);
    expect(outcome.warnings.map((warning) => warning.code)).toEqual(['gather-source-position-assumed']);
    expect(outcome.value[0]!.shot, 'a lone shot without a source station is named after its file').toBe('x');
  });

  it('uses the source position the user gives, keeping the offsets', () => {
    const outcome = shotGathers(blank(true), 'x', { sourceX: 50, shot: 'S9' });
    if (!outcome.ok) throw new Error(outcome.problems[0]!.message);
    expect(outcome.value[0]!.traces.map((trace) => trace.receiverX)).toEqual([53, 56, 59, 62]);
    expect(outcome.value[0]!.shot).toBe('S9');
    expect(outcome.warnings).toEqual([]);
  });

  it('refuses traces with neither positions nor offsets, naming the correction to give', () => {
    const outcome = shotGathers(blank(false), 'x');
    expect(outcome.ok).toBe(false);
    if (!outcome.ok) {
      expect(outcome.problems[0]!.code).toBe('gather-receiver-position-missing');
      expect(outcome.problems[0]!.fix).toMatch(/first receiver position and the receiver spacing/);
    }
  });
});

describe('a SEG-Y file cut short between two traces', () => {
  // Written by tests/tools/write-segy.ts from the byte positions of SEG-Y rev 2.0 (SEG 2017):
  // bytes 3213–3214 traces per ensemble, 3513–3520 traces in the file.
  const traces = [1, 2, 3].flatMap((record) => Array.from({ length: 8 }, (_, k) => ({
    samples: new Float32Array(50), fieldRecord: record, channel: k + 1, sourcePoint: record,
    sourceX: 10 * record, receiverX: 2 * (k + 1), sourceElevation: 0, receiverElevation: 0, sourceDepth: 0,
  })));
  const whole = writeSegy({ textLines: ['C 1 test'], sampleInterval: 0.0005, traces });
  const traceBytes = 240 + 4 * 50;

  it('reads the traces there are and warns that the header declares more, naming the shot left incomplete', () => {
    const cut = whole.subarray(0, whole.length - 3 * traceBytes);
    const read = readGather(cut);
    if (!read.ok) throw new Error(read.problems[0]!.message);
    const outcome = shotGathers(read.value, 'cut');
    if (!outcome.ok) throw new Error(outcome.problems[0]!.message);
    expect(outcome.value.map((shot) => shot.traces.length)).toEqual([8, 8, 5]);
    expect(outcome.warnings.map((warning) => warning.code).sort()).toEqual(['gather-shot-incomplete', 'gather-traces-missing']);
    expect(outcome.warnings.find((warning) => warning.code === 'gather-shot-incomplete')!.message).toContain('"SP3" has 5 traces');
  });

  it('gives no such warning for the whole file', () => {
    const read = readGather(whole);
    if (!read.ok) throw new Error(read.problems[0]!.message);
    const outcome = shotGathers(read.value, 'whole');
    expect(outcome.ok && outcome.warnings).toEqual([]);
  });
});
