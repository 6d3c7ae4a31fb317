/**
 * Writes the invented demo shot gathers in sample-surveys/ (run: npm run build && node
 * dist/tests/tools/make-sample-gathers.js): a SEG-2 file per shot of one line and a SEG-Y file
 * holding every shot of another. Traces are the project's own synthetic gathers
 * (tests/tools/synthetic-gather.ts: a causal wavelet starting at the first-arrival time, decaying
 * with offset, in band-limited noise), with first-arrival times from the ray-geometry oracle
 * through plane layers. Demo data only: no test treats these as truth beyond what is modelled.
 */
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { firstArrivalByRays } from '../oracles/ray-geometry.js';
import { writeSeg2 } from '../gathers/seg2/write-seg2.js';
import { syntheticGather } from './synthetic-gather.js';
import { writeSegy } from './write-segy.js';

interface GatherScenario {
  readonly name: string;
  readonly title: string;
  readonly velocities: readonly number[];
  readonly thicknesses: readonly number[];
  readonly receivers: readonly number[];
  readonly shots: readonly { readonly id: string; readonly x: number }[];
  readonly sampleInterval: number;
  readonly sampleCount: number;
  readonly frequency: number;
  readonly seed: number;
}

const range = (count: number, first: number, step: number) => Array.from({ length: count }, (_, k) => first + k * step);

/** Corran Brae: 24 geophones at 2 m, silty clay over weathered sandstone over sandstone. SEG-2. */
const CORRAN: GatherScenario = {
  name: 'corran-brae-culvert',
  title: 'Corran Brae culvert crossing, line 1 (invented demo survey): 24 geophones at 2 m, five shots',
  velocities: [380, 1100, 3200],
  thicknesses: [2.0, 4.5],
  receivers: range(24, 2, 2),
  shots: [
    { id: 'C1-OFF-W', x: -8 },
    { id: 'C1-W', x: 0 },
    { id: 'C1-MID', x: 25 },
    { id: 'C1-E', x: 50 },
    { id: 'C1-OFF-E', x: 58 },
  ],
  sampleInterval: 0.000125,
  sampleCount: 1024,
  frequency: 120,
  seed: 7101,
};

/** Tallis Moor: 48 geophones at 3 m, dry sand over saturated sand over mudstone. SEG-Y. */
const TALLIS: GatherScenario = {
  name: 'tallis-moor-water-table',
  title: 'Tallis Moor borrow pit, line W (invented demo survey): 48 geophones at 3 m, three shots',
  velocities: [450, 1550, 2700],
  thicknesses: [3.5, 12],
  receivers: range(48, 0, 3),
  shots: [
    { id: 'W-1', x: -4.5 },
    { id: 'W-2', x: 70.5 },
    { id: 'W-3', x: 145.5 },
  ],
  sampleInterval: 0.00025,
  sampleCount: 1024,
  frequency: 80,
  seed: 7202,
};

function shotTraces(scenario: GatherScenario, shotIndex: number) {
  const shot = scenario.shots[shotIndex]!;
  return syntheticGather({
    sourceX: shot.x,
    receiverXs: scenario.receivers,
    arrivalTimes: (offset) => firstArrivalByRays(scenario.velocities, scenario.thicknesses, Math.abs(offset)).time,
    sampleInterval: scenario.sampleInterval,
    sampleCount: scenario.sampleCount,
    delay: 0,
    wavelet: { shape: 'damped-sine', frequency: scenario.frequency },
    // Signal-to-noise falls from 20 near the shot to 4 at the far end (common for hammer shots).
    snr: (_trace, offset) => Math.max(4, 20 - Math.abs(offset) * 0.35),
    float32: true,
    seed: scenario.seed + shotIndex,
  });
}

function writeSeg2Line(folder: string, scenario: GatherScenario): void {
  const target = join(folder, scenario.name);
  rmSync(target, { recursive: true, force: true });
  mkdirSync(target, { recursive: true });
  scenario.shots.forEach((shot, shotIndex) => {
    const gather = shotTraces(scenario, shotIndex);
    const bytes = writeSeg2({
      littleEndian: true,
      fileStrings: ['UNITS METERS', `NOTE ${scenario.title}`, 'ACQUISITION_DATE 02/DEC/2026'],
      traces: gather.traces.map((trace, channel) => ({
        format: 4,
        samples: Array.from(trace.samples),
        strings: [
          `CHANNEL_NUMBER ${channel + 1}`,
          `SAMPLE_INTERVAL ${scenario.sampleInterval}`,
          'DELAY 0',
          `RECEIVER_LOCATION ${trace.receiver!.x}`,
          `SOURCE_LOCATION ${shot.x}`,
          `RECEIVER_STATION_NUMBER ${channel + 1}`,
        ],
      })),
    });
    writeFileSync(join(target, `${shot.id}.sg2`), bytes);
  });
}

function writeSegyLine(folder: string, scenario: GatherScenario): void {
  const traces = scenario.shots.flatMap((shot, shotIndex) =>
    shotTraces(scenario, shotIndex).traces.map((trace, channel) => ({
      samples: trace.samples, fieldRecord: 101 + shotIndex, channel: channel + 1, sourcePoint: shotIndex + 1,
      sourceX: shot.x, receiverX: trace.receiver!.x, sourceElevation: 0, receiverElevation: 0, sourceDepth: 0,
    })));
  const bytes = writeSegy({
    textLines: [
      `C 1 ${scenario.title}`,
      'C 2 Synthetic traces made by slopebreak for demonstration only.',
      `C 3 Shots: ${scenario.shots.map((shot, index) => `record ${101 + index} at ${shot.x} m`).join(', ')}`,
      'C 4 Positions in metres along the line (coordinate scalar -100).',
      'C40 END TEXTUAL HEADER',
    ],
    sampleInterval: scenario.sampleInterval,
    traces,
  });
  writeFileSync(join(folder, `${scenario.name}.sgy`), bytes);
}

const folder = process.argv[2] ?? 'sample-surveys';
writeSeg2Line(folder, CORRAN);
writeSegyLine(folder, TALLIS);
process.stdout.write(`wrote ${CORRAN.name}/ (${CORRAN.shots.length} SEG-2 files) and ${TALLIS.name}.sgy to ${folder}\n`);
