/**
 * Benchmark: automatic branch segmentation and line fits on a synthetic survey of 1,000 shots ×
 * 1,000 receivers (10⁶ picks), against numpy doing the same least-squares fits.
 *
 * Run by `npm run bench` (builds first). Plain Node script; no assertions on timing. The survey is
 * invented for the benchmark: three horizontal layers (500 m/s over 10 m, 1800 m/s over 40 m,
 * 4000 m/s), receivers every 5 m, shots half-way between receivers all along the line (so both
 * sides exist), first arrivals plus seeded Gaussian noise of 0.5 ms.
 *
 * Timed in JS: splitShotSides, segmentSide on every side (its reported fits included), and the
 * fits alone (fitBranchMembers on every free-intercept branch found). Then the (offset, time)
 * arrays of those branches with their labels go to numpy through a temporary Float64 file; Python
 * times only (a) numpy.polyfit(deg=1, cov=True) per branch in a loop and (b) one fully vectorised
 * fit of all branches (centred sums by numpy.add.reduceat), and reports how far its slopes are
 * from ours. Python is /usr/bin/python3 when it has numpy, else python3 (tests/helpers/python.ts).
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fitBranchMembers } from '../../lib/branches/branch-fit.js';
import { segmentSide } from '../../lib/branches/segment.js';
import { splitShotSides } from '../../lib/branches/sides.js';
import type { SideSegmentation } from '../../lib/branches/types.js';
import type { Pick, PickSet } from '../../lib/picks/types.js';
import { seededNormal } from '../../lib/random.js';
import { makePickSet } from '../branches/build.js';
import { findPython } from '../helpers/python.js';

const SHOTS = 1000;
const RECEIVERS = 1000;
const SPACING = 5;
const VELOCITIES = [500, 1800, 4000];
const THICKNESSES = [10, 40];
const NOISE = 0.5e-3;

function firstArrival(offset: number): number {
  const slowness = VELOCITIES.map((velocity) => 1 / velocity);
  let best = offset * (slowness[0] as number);
  for (let refractor = 1; refractor < VELOCITIES.length; refractor += 1) {
    let intercept = 0;
    for (let layer = 0; layer < refractor; layer += 1) {
      intercept += 2 * (THICKNESSES[layer] as number) * Math.sqrt((slowness[layer] as number) ** 2 - (slowness[refractor] as number) ** 2);
    }
    best = Math.min(best, intercept + offset * (slowness[refractor] as number));
  }
  return best;
}

function syntheticSurvey(): PickSet {
  const normal = seededNormal(20_241_202);
  const picks: Partial<Pick>[] = [];
  for (let shot = 0; shot < SHOTS; shot += 1) {
    const sourceX = (shot + 0.5) * SPACING * (RECEIVERS / SHOTS);
    for (let receiver = 0; receiver < RECEIVERS; receiver += 1) {
      const receiverX = receiver * SPACING;
      picks.push({ shot: `S${shot + 1}`, sourceX, receiverX, time: firstArrival(Math.abs(receiverX - sourceX)) + NOISE * normal() });
    }
  }
  return makePickSet(picks);
}

function seconds(start: bigint): number {
  return Number(process.hrtime.bigint() - start) / 1e9;
}

const NUMPY_SCRIPT = `
import json, sys, time
import numpy as np
raw = np.fromfile(sys.argv[1], dtype=np.float64)
n = int(raw[0]); groups = int(raw[1])
x = raw[2:2 + n]; t = raw[2 + n:2 + 2 * n]; label = raw[2 + 2 * n:2 + 3 * n].astype(np.int64)
starts = np.flatnonzero(np.r_[True, label[1:] != label[:-1]])
bounds = np.r_[starts, n]
assert len(starts) == groups
start = time.perf_counter()
slopes_loop = np.empty(groups)
for g in range(groups):
    a, b = bounds[g], bounds[g + 1]
    coef, cov = np.polyfit(x[a:b], t[a:b], 1, cov=True)
    slopes_loop[g] = coef[0]
loop_seconds = time.perf_counter() - start
start = time.perf_counter()
counts = np.diff(bounds)
xm = np.add.reduceat(x, starts) / counts
tm = np.add.reduceat(t, starts) / counts
xc = x - np.repeat(xm, counts); tc = t - np.repeat(tm, counts)
sxx = np.add.reduceat(xc * xc, starts); sxt = np.add.reduceat(xc * tc, starts)
slope = sxt / sxx; intercept = tm - slope * xm
resid = tc - np.repeat(slope, counts) * xc
s2 = np.add.reduceat(resid * resid, starts) / (counts - 2)
slope_se = np.sqrt(s2 / sxx); intercept_se = np.sqrt(s2 * (1 / counts + xm * xm / sxx)); cov_ab = -xm * s2 / sxx
vector_seconds = time.perf_counter() - start
print(json.dumps({'loop': loop_seconds, 'vector': vector_seconds, 'slopes': slope.tolist(),
                  'loopVsVector': float(np.max(np.abs(slopes_loop - slope) / np.abs(slope)))}))
`;

function main(): void {
  const survey = syntheticSurvey();
  console.log(`synthetic survey: ${SHOTS} shots × ${RECEIVERS} receivers = ${survey.picks.length.toLocaleString('en')} picks`);

  let start = process.hrtime.bigint();
  const sides = splitShotSides(survey);
  const splitSeconds = seconds(start);

  start = process.hrtime.bigint();
  const segmentations: SideSegmentation[] = sides.map((side) => segmentSide(side));
  const segmentSeconds = seconds(start);

  // The free-intercept branches (branch 1 of these surface shots goes through the origin) are
  // refitted alone, and the same set goes to numpy.
  const branches = segmentations.flatMap((segmentation) => segmentation.branches.map((branch) => ({ segmentation, branch })));
  const free = branches.filter(({ branch }) => !branch.fit.throughOrigin);
  start = process.hrtime.bigint();
  for (const { segmentation, branch } of free) fitBranchMembers(segmentation.sidePicks, branch.members);
  const fitSeconds = seconds(start);

  const pickTotal = free.reduce((sum, { branch }) => sum + branch.members.length, 0);
  const buffer = new Float64Array(2 + 3 * pickTotal);
  buffer[0] = pickTotal;
  buffer[1] = free.length;
  let cursor = 0;
  free.forEach(({ segmentation, branch }, group) => {
    for (const member of branch.members) {
      buffer[2 + cursor] = segmentation.sidePicks.offsets[member] as number;
      buffer[2 + pickTotal + cursor] = segmentation.sidePicks.times[member] as number;
      buffer[2 + 2 * pickTotal + cursor] = group % 2; // alternating labels mark where each branch starts
      cursor += 1;
    }
  });
  const folder = mkdtempSync(join(tmpdir(), 'slopebreak-bench-'));
  const file = join(folder, 'branches.f64');
  writeFileSync(file, Buffer.from(buffer.buffer));
  let numpy: { loop: number; vector: number; slopes: number[]; loopVsVector: number };
  try {
    numpy = JSON.parse(execFileSync(findPython(['numpy']), ['-c', NUMPY_SCRIPT, file], { encoding: 'utf8', maxBuffer: 256 * 1024 * 1024 })) as typeof numpy;
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
  const worst = free.reduce((largest, { branch }, group) => Math.max(largest, Math.abs(branch.fit.slope - (numpy.slopes[group] as number)) / Math.abs(branch.fit.slope)), 0);

  const branchCounts = new Map<number, number>();
  segmentations.forEach((segmentation) => branchCounts.set(segmentation.branches.length, (branchCounts.get(segmentation.branches.length) ?? 0) + 1));
  const ourTotal = splitSeconds + segmentSeconds;
  const rows: [string, number, string][] = [
    ['ours: splitShotSides + segmentSide (all sides, fits included)', ourTotal, '1.00'],
    ['  of which splitShotSides', splitSeconds, ''],
    ['ours: fits only (fitBranchMembers, free-intercept branches)', fitSeconds, (fitSeconds / ourTotal).toFixed(3)],
    ['numpy: polyfit(cov=True) per branch, Python loop', numpy.loop, (numpy.loop / ourTotal).toFixed(3)],
    ['numpy: all branches vectorised (reduceat)', numpy.vector, (numpy.vector / ourTotal).toFixed(4)],
  ];
  console.log(`${sides.length} sides; branches per side: ${[...branchCounts].sort((a, b) => a[0] - b[0]).map(([count, sides]) => `${count}: ${sides}`).join(', ')}`);
  console.log(`${branches.length} branches; ${free.length} with a free intercept (${pickTotal.toLocaleString('en')} picks) refitted by us and by numpy`);
  console.log('');
  console.log('what'.padEnd(64) + 'seconds'.padStart(10) + '   ÷ ours');
  for (const [label, value, ratio] of rows) console.log(label.padEnd(64) + value.toFixed(3).padStart(10) + `   ${ratio}`);
  console.log('');
  console.log(`ratios: our fits / numpy loop = ${(fitSeconds / numpy.loop).toFixed(2)}, our fits / numpy vectorised = ${(fitSeconds / numpy.vector).toFixed(1)}`);
  console.log(`agreement: largest relative slope difference ours vs numpy ${worst.toExponential(2)} (numpy loop vs vectorised ${numpy.loopVsVector.toExponential(2)})`);
}

main();
