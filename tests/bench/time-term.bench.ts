/**
 * Benchmark: the time-term inversion (lib/depth/time-term.ts) on 200 shots × 2,000 stations =
 * 400,000 picks, against scipy.sparse.linalg.lsqr on the same weighted, column-scaled system.
 *
 * Built by `tsc -p tsconfig.build.json`, run as `node dist/tests/bench/time-term.bench.js`
 * (`npm run bench:timeterm` does both). Plain Node script; no assertions on timing. The survey is
 * invented for the benchmark: an engineering line of 2,000 stations every 5 m, 200 shots spread
 * among them (reversed coverage), refractor 4000 m/s, time terms 10 ± 2 ms (shots) and 12 ± 3 ms
 * (stations), seeded Gaussian pick noise 0.5 ms with σ = 0.5 ms on every pick, and 400 picks made
 * 20 ms late (outliers for the rejection).
 *
 * Timed in JS (wall time and CPU time, best of three after a warm-up of both routes on 50 × 500): `timeTerms` whole with
 * the defaults (auto route — LSQR here, as picks × reduced size = 8·10⁷ is beyond DENSE_AUTO_WORK —
 * 3σ rejection rounds, exact SEs by block elimination at the end); the same with `solver: 'lsqr'`
 * and with `solver: 'dense'` (exact route every round); and, for the comparison with scipy, `solver: 'lsqr'` with rejection off,
 * which is one LSQR solve of exactly the system given to scipy (plus our exact SEs); and that
 * once more with `denseLimit: 1`, which skips the block elimination (SEs from LSQR's estimate), so
 * that row is our LSQR alone (with the setup: indexing the rows, building G) against scipy's lsqr.
 * Peak RSS is process.resourceUsage().maxRSS; the heap after each solve from process.memoryUsage().
 * scipy (Python is /usr/bin/python3 when it has numpy and scipy, tests/helpers/python.ts) reads the
 * picks from a temporary Float64 file, builds the CSR matrix with the same weights, the same
 * unit-norm column scaling and the Σa = Σb row (timed apart), runs lsqr with atol = btol = 1e-10,
 * and returns its solution, moved to Σa = Σb as ours is, so the largest difference is printed.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { timeTerms, type TimeTermOptions, type TimeTermPick, type TimeTermResult } from '../../lib/depth/time-term.js';
import { seededNormal } from '../../lib/random.js';
import { findPython } from '../helpers/python.js';

const SHOTS = 200;
const STATIONS = 2000;
const SPACING = 5;
const VELOCITY = 4000;
const NOISE = 0.5e-3;
const OUTLIERS = 400;
const RUNS = 3;

function survey(shots: number, stations: number, seed: number): TimeTermPick[] {
  const normal = seededNormal(seed);
  const length = (stations - 1) * SPACING;
  const stationX = Array.from({ length: stations }, (_, j) => j * SPACING);
  const shotX = Array.from({ length: shots }, (_, i) => ((i + 0.5) * length) / shots);
  const shotTerm = shotX.map(() => 0.01 + 0.002 * normal());
  const stationTerm = stationX.map(() => 0.012 + 0.003 * normal());
  const rows: TimeTermPick[] = [];
  for (let i = 0; i < shots; i += 1) {
    for (let j = 0; j < stations; j += 1) {
      const distance = Math.abs(stationX[j]! - shotX[i]!);
      rows.push({ shot: `S${i + 1}`, station: `R${j + 1}`, distance, time: shotTerm[i]! + stationTerm[j]! + distance / VELOCITY + NOISE * normal(), sigma: NOISE });
    }
  }
  // Every (picks/OUTLIERS)-th pick, offset by a prime so the outliers spread over shots and stations.
  for (let k = 0; k < OUTLIERS; k += 1) {
    const row = rows[(k * 997 + 13) % rows.length]!;
    rows[(k * 997 + 13) % rows.length] = { ...row, time: row.time + 0.02 };
  }
  return rows;
}

interface Timing {
  readonly wall: number;
  readonly cpu: number;
  readonly result: TimeTermResult;
  readonly heapMB: number;
}

function timed(rows: readonly TimeTermPick[], options: TimeTermOptions): Timing {
  let best: Timing | null = null;
  for (let run = 0; run < RUNS; run += 1) {
    const cpuStart = process.cpuUsage();
    const start = process.hrtime.bigint();
    const result = timeTerms(rows, options);
    const wall = Number(process.hrtime.bigint() - start) / 1e9;
    const cpuUsed = process.cpuUsage(cpuStart);
    const timing = { wall, cpu: (cpuUsed.user + cpuUsed.system) / 1e6, result, heapMB: process.memoryUsage().heapUsed / 1e6 };
    if (best === null || timing.wall < best.wall) best = timing;
  }
  return best!;
}

const SCIPY_SCRIPT = `
import json, sys, time
import numpy as np
from scipy.sparse import csr_matrix, vstack
from scipy.sparse.linalg import lsqr
raw = np.fromfile(sys.argv[1], dtype=np.float64)
m, S, R = int(raw[0]), int(raw[1]), int(raw[2])
body = raw[3:].reshape(5, m)
shot = body[0].astype(np.int64); station = body[1].astype(np.int64); dist = body[2]; t = body[3]; sigma = body[4]
start = time.perf_counter()
w = 1.0 / sigma
n = S + R + 1
rows = np.repeat(np.arange(m), 3)
cols = np.stack([shot, S + station, np.full(m, S + R)], 1).ravel()
vals = np.stack([w, w, w * dist], 1).ravel()
G = csr_matrix((vals, (rows, cols)), shape=(m, n))
scale = 1.0 / np.sqrt(np.asarray(G.multiply(G).sum(axis=0)).ravel())
sign = np.r_[np.ones(S), -np.ones(R), 0.0]
constraint = sign * scale; constraint /= np.linalg.norm(constraint)
A = vstack([G @ csr_matrix((scale, (np.arange(n), np.arange(n))), shape=(n, n)), csr_matrix(constraint)]).tocsr()
b = np.r_[t * w, 0.0]
build = time.perf_counter() - start
best = float('inf')
for _ in range(${RUNS}):
    start = time.perf_counter()
    out = lsqr(A, b, atol=1e-10, btol=1e-10, iter_lim=20000)
    best = min(best, time.perf_counter() - start)
x = out[0] * scale
terms = x[:S + R]
terms = terms - sign[:S + R] * (sign[:S + R] @ terms) / (S + R)
print(json.dumps({'build': build, 'solve': best, 'istop': int(out[1]), 'iterations': int(out[2]),
                  'shots': terms[:S].tolist(), 'stations': terms[S:].tolist(), 'slowness': float(x[S + R])}))
`;

function main(): void {
  // Warm-up (JIT) of both routes on a survey large enough for the hot loops to be optimised.
  const warm = survey(50, 500, 1);
  for (const solver of ['dense', 'lsqr'] as const) timeTerms(warm, { solver });
  const rows = survey(SHOTS, STATIONS, 20_250_101);
  console.log(`synthetic line: ${SHOTS} shots × ${STATIONS} stations = ${rows.length.toLocaleString('en')} picks (${OUTLIERS} planted outliers); load average ${loadavg().map((value) => value.toFixed(2)).join(', ')} on this machine`);

  const auto = timed(rows, {});
  const peakAfterAuto = process.resourceUsage().maxRSS / 1024;
  const exactEveryRound = timed(rows, { solver: 'dense' });
  const single = timed(rows, { solver: 'lsqr', rejection: false });
  const singleDense = timed(rows, { solver: 'dense', rejection: false });
  // denseLimit 1: no block elimination at all, SEs from LSQR's own estimate — our LSQR alone, as scipy runs it.
  const bare = timed(rows, { solver: 'lsqr', rejection: false, denseLimit: 1 });
  const peak = process.resourceUsage().maxRSS / 1024;

  // The same system for scipy: shot index, station index, Δ, t, σ as Float64 rows.
  const shotIds = single.result.shotTerms.map((term) => term.id);
  const stationIds = single.result.stationTerms.map((term) => term.id);
  const shotIndex = new Map(shotIds.map((id, index) => [id, index]));
  const stationIndex = new Map(stationIds.map((id, index) => [id, index]));
  const count = rows.length;
  const buffer = new Float64Array(3 + 5 * count);
  buffer[0] = count;
  buffer[1] = shotIds.length;
  buffer[2] = stationIds.length;
  rows.forEach((row, index) => {
    buffer[3 + index] = shotIndex.get(row.shot)!;
    buffer[3 + count + index] = stationIndex.get(row.station)!;
    buffer[3 + 2 * count + index] = row.distance;
    buffer[3 + 3 * count + index] = row.time;
    buffer[3 + 4 * count + index] = row.sigma!;
  });
  const folder = mkdtempSync(join(tmpdir(), 'slopebreak-timeterm-'));
  const file = join(folder, 'system.f64');
  writeFileSync(file, Buffer.from(buffer.buffer));
  let scipy: { build: number; solve: number; istop: number; iterations: number; shots: number[]; stations: number[]; slowness: number };
  try {
    scipy = JSON.parse(execFileSync(findPython(['numpy', 'scipy']), ['-c', SCIPY_SCRIPT, file], { encoding: 'utf8', maxBuffer: 64 * 1024 * 1024 })) as typeof scipy;
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
  let worstTerm = 0;
  single.result.shotTerms.forEach((term, index) => (worstTerm = Math.max(worstTerm, Math.abs(term.value - scipy.shots[index]!))));
  single.result.stationTerms.forEach((term, index) => (worstTerm = Math.max(worstTerm, Math.abs(term.value - scipy.stations[index]!))));
  const slownessDifference = Math.abs(single.result.slowness.value - scipy.slowness) / scipy.slowness;
  let worstDense = 0;
  singleDense.result.stationTerms.forEach((term, index) => (worstDense = Math.max(worstDense, Math.abs(term.value - single.result.stationTerms[index]!.value))));

  const line = (label: string, timing: { wall: number; cpu: number } | number, note = ''): void => {
    const wall = typeof timing === 'number' ? timing : timing.wall;
    const cpu = typeof timing === 'number' ? Number.NaN : timing.cpu;
    console.log(label.padEnd(70) + wall.toFixed(3).padStart(9) + (Number.isNaN(cpu) ? '' : cpu.toFixed(3)).padStart(9) + `   ${note}`);
  };
  console.log('');
  console.log('what'.padEnd(70) + 'wall s'.padStart(9) + 'cpu s'.padStart(9));
  line(`ours: timeTerms defaults (auto → ${auto.result.solver}, 3σ rejection, exact SEs)`, auto, `${auto.result.solver}, ${auto.result.rejectionRounds} rounds, ${auto.result.rejectedRows.length} rejected`);
  line("ours: timeTerms solver 'dense' (3σ rejection, exact route every round)", exactEveryRound, `${exactEveryRound.result.rejectionRounds} rounds`);
  line("ours: timeTerms solver 'lsqr', rejection off (one solve + exact SEs)", single, `${single.result.iterations} LSQR iterations`);
  line("ours: timeTerms solver 'dense', rejection off (one solve + exact SEs)", singleDense);
  line("ours: timeTerms solver 'lsqr', rejection off, denseLimit 1 (LSQR only)", bare, `${bare.result.iterations} LSQR iterations`);
  line('scipy: building the weighted, column-scaled CSR system', scipy.build);
  line('scipy: lsqr(atol = btol = 1e-10) on it', scipy.solve, `${scipy.iterations} iterations, istop ${scipy.istop}`);
  console.log('');
  console.log(`memory: peak RSS ${peakAfterAuto.toFixed(0)} MB after the default solve, ${peak.toFixed(0)} MB after all; heap in use after the default solve ${auto.heapMB.toFixed(0)} MB`);
  console.log(
    `ratios (wall): our default / scipy lsqr = ${(auto.wall / scipy.solve).toFixed(2)}; our LSQR-only solve (setup included) / scipy lsqr = ${(bare.wall / scipy.solve).toFixed(2)}; ` +
      `/ (scipy build + lsqr) = ${(bare.wall / (scipy.build + scipy.solve)).toFixed(2)}`,
  );
  console.log(`agreement (rejection off, Σa = Σb): largest time-term difference ours vs scipy ${worstTerm.toExponential(2)} s; slowness ${slownessDifference.toExponential(2)} relative; our LSQR vs our exact route ${worstDense.toExponential(2)} s`);
  console.log(`result: V = ${auto.result.velocity.value.toFixed(3)} ± ${auto.result.velocity.standardError.toFixed(3)} m/s (true ${VELOCITY}); χ²/dof ${auto.result.reducedChiSquare.toFixed(4)}; ${auto.result.solverText}`);
}

main();
