/**
 * Benchmark: reading a 1 GiB SEG-Y file from disk trace by trace (lib/gathers/segy/read.ts over
 * server/gather-file.ts), against the fastest plain read of the same file Node offers.
 *
 * Built by `tsc -p tsconfig.build.json`, run as `node dist/tests/bench/segy-read.bench.js`
 * (`npm run bench:segy` does both). Plain Node script; no assertions on timing.
 *
 * The file is invented for the benchmark and written to the system's temporary folder (TMPDIR,
 * os.tmpdir()), which needs 3 GiB free, and deleted at the end: SEG-Y rev 1, big-endian, IEEE
 * float samples (format 5), an ASCII textual header, 275 shots × 240 channels = 66,000 traces of
 * 4000 samples at 0.25 ms (1 s records), 16,240 bytes a trace, 1,071,843,600 bytes in all. The
 * headers are those of a rolling split spread: shot and channel numbers, signed offsets,
 * receivers every 5 m, coordinates and elevations in centimetres with scalar −100, date and time.
 * The samples are seeded noise plus a decaying wavelet that arrives at 5 ms + |offset| / 2000 m/s,
 * so a picking stage added later has a first break to find.
 *
 * Measured, each pass over the whole file, RUNS times in turn:
 *   (a) raw: `fs.readSync` into one 4 MiB buffer from start to end (MB/s; 1 MB = 10⁶ bytes);
 *   (b) SEG-Y: `openSegy(openFileByteSource(path))`, then `readTrace` of every trace, which reads
 *       and decodes its header and samples (MB/s and traces/s; the `fs.readSync` calls made);
 *   (c) the ratio b / a of the medians.
 * Also (a′), to tell the byte source's share of (b) from the decoding's: every trace's bytes read
 * through `openFileByteSource` and not decoded; and (d), traces read and picked per second on the
 * first shots of the file.
 * The page cache cannot be dropped without root (and doing so would slow the whole machine), so
 * every pass reads mostly from memory: the file was just written, and 1 GiB stays cached on a
 * machine of this size. Pass 1 is printed apart from the warm passes 2 and 3 all the same.
 */
import { closeSync, mkdtempSync, openSync, readSync, rmSync, statfsSync, writeSync } from 'node:fs';
import { availableParallelism, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { BINARY_HEADER_FIELDS, TRACE_HEADER_FIELDS, type BinaryHeaderFieldName, type TraceHeaderFieldName } from '../../lib/gathers/segy/layout.js';
import { openSegy, type SegyTrace } from '../../lib/gathers/segy/read.js';
import { seededNormal } from '../../lib/random.js';
import { openFileByteSource } from '../../server/gather-file.js';
import { pickFirstBreaks } from '../../lib/picking/index.js';
import { writeField } from '../gathers/segy/build-segy.js';

const SHOTS = 275;
const CHANNELS = 240;
const TRACES = SHOTS * CHANNELS;
const SAMPLES = 4000;
const INTERVAL_US = 250;
const TRACE_BYTES = 240 + 4 * SAMPLES;
const FILE_BYTES = 3600 + TRACES * TRACE_BYTES;
const RECEIVER_SPACING = 5;
const SHOT_SPACING = 10;
const ARRIVAL_VELOCITY = 2000;
const RUNS = 3;
const RAW_CHUNK_BYTES = 4 * 1024 * 1024;
const GIB = 1024 ** 3;
const MIN_FREE_BYTES = 3 * GIB;

// ---------------------------------------------------------------------------------------------
// The file.

/** A survey's headers for trace `index` (shot-major, channel-minor), values as the file holds them. */
function traceHeader(index: number): Partial<Record<TraceHeaderFieldName, number>> {
  const shot = Math.floor(index / CHANNELS);
  const channel = index % CHANNELS;
  const shotX = 600 + SHOT_SPACING * shot;
  const offset = (channel - (CHANNELS - 1) / 2) * RECEIVER_SPACING;
  const receiverX = shotX + offset;
  const centimetres = (metres: number) => Math.round(metres * 100);
  const ground = (x: number) => 100 + 2 * Math.sin(x / 200);
  const second = 20 * shot;
  return {
    traceSequenceNumberWithinLine: index + 1,
    traceSequenceNumberWithinFile: index + 1,
    originalFieldRecordNumber: 1001 + shot,
    traceNumberWithinOriginalFieldRecord: channel + 1,
    energySourcePointNumber: shot + 1,
    ensembleNumber: shot + 1,
    traceNumberWithinEnsemble: channel + 1,
    traceIdentificationCode: 1,
    dataUse: 1,
    distanceFromSourceToReceiverGroup: Math.round(offset),
    receiverGroupElevation: centimetres(ground(receiverX)),
    surfaceElevationAtSource: centimetres(ground(shotX)),
    sourceDepthBelowSurface: 50,
    elevationScalar: -100,
    coordinateScalar: -100,
    sourceCoordinateX: centimetres(shotX),
    sourceCoordinateY: 0,
    groupCoordinateX: centimetres(receiverX),
    groupCoordinateY: 0,
    coordinateUnits: 1,
    samplesInThisTrace: SAMPLES,
    sampleIntervalForThisTrace: INTERVAL_US,
    gainTypeOfFieldInstruments: 1,
    lowCutFrequency: 10,
    highCutFrequency: 500,
    yearDataRecorded: 2025,
    dayOfYear: 152,
    hourOfDay: 9 + Math.floor(second / 3600),
    minuteOfHour: Math.floor(second / 60) % 60,
    secondOfMinute: second % 60,
    timeBasisCode: 1,
  };
}

/** Write the benchmark file: headers, then the traces in 4 MiB writes. */
function writeSurvey(path: string): void {
  const normal = seededNormal(20_250_601);
  const noise = Float32Array.from({ length: 8192 }, () => 0.02 * normal());
  const wavelet = Float32Array.from({ length: 64 }, (_, k) => Math.sin((2 * Math.PI * k) / 16) * Math.exp(-k / 12));
  const fd = openSync(path, 'w');
  try {
    const head = new Uint8Array(3600);
    const lines = [
      'C 1 SLOPEBREAK SEG-Y READ BENCHMARK: INVENTED SURVEY, NOT REAL DATA',
      `C 2 ${SHOTS} SHOTS EVERY ${SHOT_SPACING} M, ${CHANNELS} CHANNELS EVERY ${RECEIVER_SPACING} M, SPLIT SPREAD`,
      `C 3 ${SAMPLES} SAMPLES AT ${INTERVAL_US} US, IEEE FLOAT (FORMAT 5), BIG-ENDIAN`,
      'C 4 COORDINATES AND ELEVATIONS IN CM (SCALAR -100), OFFSETS IN M',
    ];
    for (let line = 0; line < 40; line += 1) {
      const text = (lines[line] ?? `C${String(line + 1).padStart(2)}`).padEnd(80).slice(0, 80);
      for (let k = 0; k < 80; k += 1) head[80 * line + k] = text.charCodeAt(k);
    }
    const binary: Partial<Record<BinaryHeaderFieldName, number>> = {
      jobIdentificationNumber: 1,
      lineNumber: 1,
      reelNumber: 1,
      dataTracesPerEnsemble: CHANNELS,
      sampleInterval: INTERVAL_US,
      originalSampleInterval: INTERVAL_US,
      samplesPerDataTrace: SAMPLES,
      originalSamplesPerDataTrace: SAMPLES,
      dataSampleFormatCode: 5,
      ensembleFold: 1,
      traceSortingCode: 1,
      measurementSystem: 1,
      segyFormatRevisionMajor: 1,
      fixedLengthTraceFlag: 1,
    };
    const headView = new DataView(head.buffer);
    for (const [name, value] of Object.entries(binary) as Array<[BinaryHeaderFieldName, number]>) writeField(headView, 3200, BINARY_HEADER_FIELDS[name], value, false);
    writeSync(fd, head);

    const perChunk = Math.floor(RAW_CHUNK_BYTES / TRACE_BYTES);
    const chunk = new Uint8Array(perChunk * TRACE_BYTES);
    const view = new DataView(chunk.buffer);
    let inChunk = 0;
    for (let index = 0; index < TRACES; index += 1) {
      const at = inChunk * TRACE_BYTES;
      const header = traceHeader(index);
      for (const [name, value] of Object.entries(header) as Array<[TraceHeaderFieldName, number]>) writeField(view, at, TRACE_HEADER_FIELDS[name], value, false);
      const offset = Math.abs(header.distanceFromSourceToReceiverGroup ?? 0);
      const onset = Math.round((0.005 + offset / ARRIVAL_VELOCITY) / (INTERVAL_US * 1e-6));
      const amplitude = 1 / (1 + offset / 100);
      const shift = (index * 131) & 8191;
      for (let k = 0; k < SAMPLES; k += 1) {
        const arriving = k - onset;
        const signal = arriving >= 0 && arriving < wavelet.length ? amplitude * wavelet[arriving]! : 0;
        view.setFloat32(at + 240 + 4 * k, noise[(k + shift) & 8191]! + signal, false);
      }
      inChunk += 1;
      if (inChunk === perChunk || index === TRACES - 1) {
        writeSync(fd, chunk, 0, inChunk * TRACE_BYTES);
        inChunk = 0;
      }
    }
  } finally {
    closeSync(fd);
  }
}

// ---------------------------------------------------------------------------------------------
// The stages: each reads the whole file once per pass and says how much it read.

interface Pass {
  /** Wall time, seconds. */
  readonly seconds: number;
  /** CPU time of this process (user + system, every thread), seconds: less swayed by other load than wall time. */
  readonly cpuSeconds: number;
  readonly bytes: number;
  /** Traces handled, or null for a stage that does not see traces. */
  readonly traces: number | null;
  /** `fs.readSync` calls made, when the stage counts them. */
  readonly systemReads: number | null;
  /** Largest growth of resident memory during the pass, bytes. */
  readonly rssGrowth: number;
}

interface Stage {
  readonly label: string;
  run(path: string): Pass;
}

/** Time `work`, sampling resident memory when it calls `sample`. */
function timed(work: (sample: () => void) => Omit<Pass, 'seconds' | 'cpuSeconds' | 'rssGrowth'>): Pass {
  const baseline = process.memoryUsage().rss;
  let peak = baseline;
  const sample = () => {
    peak = Math.max(peak, process.memoryUsage().rss);
  };
  const cpuStart = process.cpuUsage();
  const start = process.hrtime.bigint();
  const counts = work(sample);
  const seconds = Number(process.hrtime.bigint() - start) / 1e9;
  const cpu = process.cpuUsage(cpuStart);
  sample();
  return { ...counts, seconds, cpuSeconds: (cpu.user + cpu.system) / 1e6, rssGrowth: peak - baseline };
}

/**
 * Open the file through `openFileByteSource` and `openSegy`, and hand every trace in file order
 * to `visit`. The unit a trace-by-trace stage is built on (reading here; picking later).
 */
function eachTrace(path: string, visit: (trace: SegyTrace) => void, sample: () => void): { traces: number; systemReads: number } {
  const source = openFileByteSource(path);
  try {
    const opened = openSegy(source);
    if (!opened.ok) throw new Error(`the benchmark file was refused: ${opened.problems.map((problem) => problem.message).join('; ')}`);
    const file = opened.value;
    for (let index = 0; index < file.traceCount; index += 1) {
      const outcome = file.readTrace(index);
      if (!outcome.ok) throw new Error(`trace ${index + 1} was refused: ${outcome.problems.map((problem) => problem.message).join('; ')}`);
      visit(outcome.value);
      if (index % 1024 === 0) sample();
    }
    return { traces: file.traceCount, systemReads: source.systemReads };
  } finally {
    source.close();
  }
}

/** (a) The file start to end through one 4 MiB buffer: the most a byte source could deliver. */
const rawRead: Stage = {
  label: '(a) raw: fs.readSync into a 4 MiB buffer',
  run: (path) =>
    timed(() => {
      const buffer = new Uint8Array(RAW_CHUNK_BYTES);
      const fd = openSync(path, 'r');
      let bytes = 0;
      let systemReads = 0;
      try {
        for (;;) {
          const got = readSync(fd, buffer, 0, buffer.byteLength, bytes);
          systemReads += 1;
          if (got === 0) break;
          bytes += got;
        }
      } finally {
        closeSync(fd);
      }
      return { bytes, traces: null, systemReads };
    }),
};

/** (a′) Every trace's bytes through the file source, undecoded: how much of (b) the byte source takes. */
const sourceRead: Stage = {
  label: "(a′) file source alone: openFileByteSource.read of each trace's bytes",
  run: (path) =>
    timed((sample) => {
      const source = openFileByteSource(path);
      let bytes = 0;
      try {
        for (let index = 0; index < TRACES; index += 1) {
          bytes += source.read(3600 + index * TRACE_BYTES, TRACE_BYTES).byteLength;
          if (index % 1024 === 0) sample();
        }
        if (bytes !== FILE_BYTES - 3600) throw new Error(`the file source returned ${bytes} bytes of traces, not ${FILE_BYTES - 3600}`);
        return { bytes, traces: TRACES, systemReads: source.systemReads };
      } finally {
        source.close();
      }
    }),
};

/** (b) Every trace's header and samples through the SEG-Y reader over the file source. */
const segyRead: Stage = {
  label: '(b) SEG-Y: openSegy + readTrace of every trace',
  run: (path) =>
    timed((sample) => {
      let misplaced = 0;
      let total = 0;
      const counts = eachTrace(
        path,
        (trace) => {
          if (trace.header.traceSequenceNumberWithinFile !== trace.index + 1 || trace.samples.length !== SAMPLES) misplaced += 1;
          total += trace.samples[trace.samples.length >> 1]!;
        },
        sample,
      );
      if (misplaced > 0 || !Number.isFinite(total)) throw new Error(`${misplaced} traces came back with the wrong sequence number or sample count`);
      return { bytes: FILE_BYTES, ...counts };
    }),
};

/** Shots picked by stage (d): the first PICKED_SHOTS of the file (picking every trace would take minutes a pass). */
const PICKED_SHOTS = 20;

/**
 * (d) Read and pick: the traces of the first PICKED_SHOTS shots read as in (b), each shot's 240
 * traces picked at once by `pickFirstBreaks` with the default options (band-pass, energy ratio,
 * AIC, neighbour check). traces/s here is traces read and picked per second.
 */
const readAndPick: Stage = {
  label: `(d) read + pick: the first ${PICKED_SHOTS} shots (${PICKED_SHOTS * CHANNELS} traces), pickFirstBreaks per shot with the default options`,
  run: (path) =>
    timed((sample) => {
      const source = openFileByteSource(path);
      let picked = 0;
      let found = 0;
      try {
        const opened = openSegy(source);
        if (!opened.ok) throw new Error('the benchmark file was refused');
        for (let shot = 0; shot < PICKED_SHOTS; shot += 1) {
          const traces = [];
          for (let channel = 0; channel < CHANNELS; channel += 1) {
            const outcome = opened.value.readTrace(shot * CHANNELS + channel);
            if (!outcome.ok) throw new Error(`trace ${shot * CHANNELS + channel + 1} was refused`);
            traces.push({ samples: outcome.value.samples, sampleInterval: outcome.value.sampleInterval, delay: outcome.value.delay, offset: outcome.value.offset });
          }
          const picks = pickFirstBreaks(traces);
          picked += picks.length;
          found += picks.filter((pick) => pick.time !== null && !pick.rejected).length;
          sample();
        }
        if (found < 0.9 * picked) throw new Error(`only ${found} of ${picked} traces were picked`);
        return { bytes: PICKED_SHOTS * CHANNELS * TRACE_BYTES, traces: picked, systemReads: source.systemReads };
      } finally {
        source.close();
      }
    }),
};

/** Run in this order, pass after pass. */
const STAGES: readonly Stage[] = [rawRead, sourceRead, segyRead, readAndPick];

// ---------------------------------------------------------------------------------------------
// Reporting.

function median(values: readonly number[]): number {
  const sorted = [...values].sort((left, right) => left - right);
  const middle = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[middle]! : (sorted[middle - 1]! + sorted[middle]!) / 2;
}

const megabytesPerSecond = (pass: Pass) => pass.bytes / 1e6 / pass.seconds;
const tracesPerSecond = (pass: Pass) => (pass.traces ?? Number.NaN) / pass.seconds;

function summary(values: readonly number[], digits: number): string {
  const fixed = (value: number) => value.toFixed(digits);
  const warm = values.slice(1);
  return `pass 1 ${fixed(values[0]!)}; warm ${warm.map(fixed).join(', ')}; median ${fixed(median(values))}, range ${fixed(Math.min(...values))}–${fixed(Math.max(...values))}`;
}

function report(stage: Stage, passes: readonly Pass[]): void {
  console.log(stage.label);
  console.log(`  MB/s      ${summary(passes.map(megabytesPerSecond), 0)}`);
  if (passes[0]!.traces !== null) console.log(`  traces/s  ${summary(passes.map(tracesPerSecond), 0)}`);
  console.log(`  seconds   wall ${passes.map((pass) => pass.seconds.toFixed(3)).join(', ')}; cpu ${passes.map((pass) => pass.cpuSeconds.toFixed(3)).join(', ')}`);
  const reads = passes.map((pass) => pass.systemReads);
  if (reads[0] !== null) console.log(`  fs.readSync calls per pass: ${reads.join(', ')}`);
  console.log(`  resident memory growth during the pass, MB: ${passes.map((pass) => (pass.rssGrowth / 1e6).toFixed(1)).join(', ')}`);
}

function main(): void {
  const folderParent = tmpdir();
  const space = statfsSync(folderParent);
  const free = space.bavail * space.bsize;
  if (free < MIN_FREE_BYTES) {
    console.log(
      `The SEG-Y read benchmark writes a ${(FILE_BYTES / GIB).toFixed(2)} GiB file to ${folderParent}, which has ${(free / GIB).toFixed(2)} GiB free; it wants ${MIN_FREE_BYTES / GIB} GiB ` +
        'so the machine keeps room to work. Free some space there, or point TMPDIR at a folder with more, and run it again.',
    );
    process.exitCode = 1;
    return;
  }
  const folder = mkdtempSync(join(folderParent, 'slopebreak-segy-bench-'));
  const path = join(folder, 'survey.sgy');
  try {
    const writeStart = process.hrtime.bigint();
    writeSurvey(path);
    const writeSeconds = Number(process.hrtime.bigint() - writeStart) / 1e9;
    console.log(
      `SEG-Y file: ${TRACES.toLocaleString('en')} traces × ${SAMPLES} samples, format 5, ${FILE_BYTES.toLocaleString('en')} bytes (${(FILE_BYTES / GIB).toFixed(3)} GiB), ` +
        `written in ${writeSeconds.toFixed(1)} s to ${folder}; load average ${loadavg().map((value) => value.toFixed(2)).join(', ')}`,
    );
    console.log('The page cache is warm from the writing (it cannot be dropped without root): pass 1 is shown apart, but it too reads mostly from memory.');
    console.log('');
    const passes = new Map<Stage, Pass[]>(STAGES.map((stage) => [stage, []]));
    for (let run = 0; run < RUNS; run += 1) {
      for (const stage of STAGES) passes.get(stage)!.push(stage.run(path));
    }
    for (const stage of STAGES) report(stage, passes.get(stage)!);
    const raw = passes.get(rawRead)!.map(megabytesPerSecond);
    const segy = passes.get(segyRead)!.map(megabytesPerSecond);
    console.log('');
    console.log(
      `(c) SEG-Y / raw: ${(median(segy) / median(raw)).toFixed(3)} (medians); pass 1 ${(segy[0]! / raw[0]!).toFixed(3)}; ` +
        `warm passes ${segy.slice(1).map((value, index) => (value / raw[index + 1]!).toFixed(3)).join(', ')}`,
    );
    console.log(`peak resident memory of the process: ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MiB (process.resourceUsage().maxRSS, writing included)`);
    const load = loadavg();
    const busy = load[0]! > availableParallelism();
    console.log(`load average at the end ${load.map((value) => value.toFixed(2)).join(', ')}${busy ? " (above the machine's core count: other work shared the CPUs, trust the cpu seconds more than wall)" : ''}`);
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
}

main();
