/**
 * Benchmark: the stateless `POST /api/interpret` endpoint under load over loopback, driven by a real
 * HTTP load generator (autocannon), against the same interpretation run in-process.
 *
 * Run: `npm run build && node dist/tests/bench/http-interpret.bench.js` (a plain Node script, no
 * assertions on timing). The script forks itself: the child builds `createApp` over a temporary
 * data folder and listens on 127.0.0.1, port 0 (so the load generator and the server do not share
 * one event loop); the parent drives it and prints requests/s and latency p50/p99.
 *
 * The survey is invented for the benchmark: 10 shots × 100 receivers = 1,000 picks on a plane
 * three-layer model (400 m/s over 4 m, 1600 m/s over 10 m, 3500 m/s — the model of METHODS.md
 * check case 1.1), receivers every 2 m from 0 to 198 m, shots half-way between receivers every
 * 22 m from −1 m, first arrivals from lib/model `firstArrival` plus seeded Gaussian noise of
 * 0.2 ms, written as a CSV pick table in metres and milliseconds.
 */
import { fork } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import autocannon from 'autocannon';
import { interpret } from '../../lib/interpret.js';
import { firstArrival, type LayeredModel } from '../../lib/model/layered-model.js';
import { readPickTable } from '../../lib/picks/index.js';
import { seededNormal } from '../../lib/random.js';
import { createApp } from '../../server/app.js';

const MODEL: LayeredModel = { velocities: [400, 1600, 3500], thicknesses: [4, 10] };
const SHOTS = 10;
const RECEIVERS = 100;
const RECEIVER_SPACING_M = 2;
const SHOT_SPACING_M = 22;
const FIRST_SHOT_M = -1;
const NOISE_S = 0.2e-3;
const NOISE_SEED = 20_250_302;
/** Load: connections kept open and the time they are driven. */
const CONNECTIONS = 8;
const DURATION_S = 10;
/** In-process reference: warm-up calls (JIT), then timed calls whose median is reported. */
const WARM_UP_CALLS = 5;
const TIMED_CALLS = 20;
const SERVER_MODE = '--serve';

/** The invented 1,000-pick survey as CSV text. */
function benchmarkSurveyCsv(): string {
  const noise = seededNormal(NOISE_SEED);
  const rows = ['shot,source_x_m,receiver_x_m,time_ms'];
  for (let shot = 0; shot < SHOTS; shot += 1) {
    const sourceX = FIRST_SHOT_M + shot * SHOT_SPACING_M;
    for (let receiver = 0; receiver < RECEIVERS; receiver += 1) {
      const receiverX = receiver * RECEIVER_SPACING_M;
      const time = firstArrival(MODEL, Math.abs(receiverX - sourceX)).time + NOISE_S * noise();
      rows.push(`S${shot + 1},${sourceX},${receiverX},${(time * 1000).toFixed(4)}`);
    }
  }
  return `${rows.join('\n')}\n`;
}

/** Child: the server, over a temporary data folder; reports its port to the parent and serves until killed. */
async function serve(): Promise<void> {
  const dataDir = mkdtempSync(join(tmpdir(), 'slopebreak-bench-'));
  const app = createApp({ host: '127.0.0.1', port: 0, dataDir }, { logSink: () => {} });
  const server = http.createServer(app);
  server.listen(0, '127.0.0.1', () => process.send?.({ port: (server.address() as AddressInfo).port }));
  process.on('SIGTERM', () => server.close(() => {
    rmSync(dataDir, { recursive: true, force: true });
    process.exit(0);
  }));
}

function milliseconds(start: bigint): number {
  return Number(process.hrtime.bigint() - start) / 1e6;
}

function median(values: readonly number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const middle = Math.floor(sorted.length / 2);
  return sorted.length % 2 === 1 ? (sorted[middle] as number) : ((sorted[middle - 1] as number) + (sorted[middle] as number)) / 2;
}

function inProcessMilliseconds(csv: string): number {
  const once = () => {
    const outcome = readPickTable(csv);
    if (!outcome.ok) throw new Error(`the benchmark survey does not read: ${outcome.problems[0]?.message ?? ''}`);
    return interpret(outcome.value);
  };
  for (let call = 0; call < WARM_UP_CALLS; call += 1) once();
  const times: number[] = [];
  for (let call = 0; call < TIMED_CALLS; call += 1) {
    const start = process.hrtime.bigint();
    once();
    times.push(milliseconds(start));
  }
  return median(times);
}

async function main(): Promise<void> {
  const csv = benchmarkSurveyCsv();
  const pickCount = csv.trimEnd().split('\n').length - 1;
  const child = fork(fileURLToPath(import.meta.url), [SERVER_MODE], { stdio: ['ignore', 'inherit', 'inherit', 'ipc'] });
  const port = await new Promise<number>((resolve, reject) => {
    child.once('message', (message) => resolve((message as { port: number }).port));
    child.once('exit', (code) => reject(new Error(`the benchmark server stopped before listening (exit ${code})`)));
  });
  try {
    const url = `http://127.0.0.1:${port}/api/interpret`;
    const check = await fetch(url, { method: 'POST', headers: { 'content-type': 'text/csv' }, body: csv });
    const checked = (await check.json()) as { layers?: unknown[] };
    if (check.status !== 200) throw new Error(`POST /api/interpret answered ${check.status}: ${JSON.stringify(checked).slice(0, 300)}`);

    const result = await autocannon({
      url, method: 'POST', headers: { 'content-type': 'text/csv' }, body: csv,
      connections: CONNECTIONS, duration: DURATION_S,
    });
    const reference = inProcessMilliseconds(csv);

    console.log(`POST /api/interpret, ${pickCount} picks (${csv.length} bytes of CSV), ${CONNECTIONS} connections for ${DURATION_S} s over loopback (autocannon)`);
    console.log(`  requests: ${result.requests.total} total, ${result.non2xx} non-2xx, ${result.errors} errors, ${result.timeouts} timeouts; layers found: ${checked.layers?.length ?? '?'}`);
    console.log(`  throughput: ${result.requests.average.toFixed(1)} requests/s (mean over ${DURATION_S} s)`);
    console.log(`  latency: p50 ${result.latency.p50.toFixed(1)} ms, p99 ${result.latency.p99.toFixed(1)} ms, max ${result.latency.max.toFixed(1)} ms`);
    console.log(`in-process reference: one interpret(readPickTable(csv)) call takes ${reference.toFixed(2)} ms (median of ${TIMED_CALLS} after ${WARM_UP_CALLS} warm-up calls)`);
    console.log(`  ratio: HTTP p50 latency / in-process = ${(result.latency.p50 / reference).toFixed(2)}; throughput × in-process time = ${(result.requests.average * reference / 1000).toFixed(2)} (1.00 = one core fully used by interpretation alone)`);
  } finally {
    child.kill('SIGTERM');
  }
}

if (process.argv.includes(SERVER_MODE)) await serve();
else await main();
