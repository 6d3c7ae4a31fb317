/**
 * Benchmark: the shortest-path first-arrival solver (lib/model/shortest-path.ts) against
 * scipy.sparse.csgraph.dijkstra on the same graph.
 *
 * Built by `tsc -p tsconfig.build.json`, run as `node dist/tests/bench/shortest-path.bench.js`.
 * Plain Node script; no assertions on timing. The section is invented for the benchmark: three
 * layers (450 m/s, 1500 m/s, 3200 m/s) under undulating interfaces, a 200 × 60 node grid at 0.5 m,
 * forward star r = 5 (80 offsets), one surface source.
 *
 * Timed in JS: `shortestPathTimes` whole (star table, weights computed on the fly, binary-heap
 * Dijkstra), best and median of several runs after a warm-up. Python (numpy builds the graph's
 * edges and weights independently, as the reference test does) times the graph build and
 * `dijkstra` separately, best of several runs, and returns its times so the agreement is printed.
 * Python is /usr/bin/python3 when it has numpy and scipy, else python3 (tests/helpers/python.ts).
 */
import { execFileSync } from 'node:child_process';
import { shortestPathTimes, slownessGridFromSection } from '../../lib/model/shortest-path.js';
import { findPython } from '../helpers/python.js';
import { GRID_GRAPH_PYTHON } from '../oracles/scipy-grid-graph.js';

const COLUMNS = 200;
const ROWS = 60;
const SPACING = 0.5;
const RADIUS = 5;
const SOURCE = { x: 20, z: 0 };
const RUNS = 7;

const SCIPY_SCRIPT = `${GRID_GRAPH_PYTHON}
d = json.load(sys.stdin)
runs = d['runs']
def build():
    nx, nz, h, x0, cells, us, vs, ws = grid_edges(d)
    n = nx * nz
    return nx, h, x0, csr_matrix((np.concatenate(ws), (np.concatenate(us), np.concatenate(vs))), shape=(n, n))
nx, h, x0, graph = build()
source = int(round(d['sourceZ'] / h)) * nx + int(round((d['sourceX'] - x0) / h))
build_best = math.inf
for _ in range(3):
    start = time.perf_counter(); nx, h, x0, graph = build(); build_best = min(build_best, time.perf_counter() - start)
solve = []
for _ in range(runs):
    start = time.perf_counter(); times = dijkstra(graph, directed=True, indices=source); solve.append(time.perf_counter() - start)
print(json.dumps({'build': build_best, 'solveBest': min(solve), 'solveMedian': float(np.median(solve)), 'edges': int(graph.nnz), 'times': times.tolist()}))
`;

function seconds(start: bigint): number {
  return Number(process.hrtime.bigint() - start) / 1e9;
}

function median(values: readonly number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.floor(sorted.length / 2)] as number;
}

function main(): void {
  const grid = slownessGridFromSection(
    {
      velocities: [450, 1500, 3200],
      interfaces: [(x) => 3 + 1.2 * Math.sin(x / 4), (x) => 12 + 0.05 * x + 2 * Math.cos(x / 9)],
    },
    { originX: 0, spacing: SPACING, columns: COLUMNS, rows: ROWS },
  );
  shortestPathTimes(grid, SOURCE, { radius: RADIUS }); // warm-up (JIT)
  const ours: number[] = [];
  let nodeTimes: Float64Array = new Float64Array(0);
  for (let run = 0; run < RUNS; run += 1) {
    const start = process.hrtime.bigint();
    nodeTimes = shortestPathTimes(grid, SOURCE, { radius: RADIUS }).nodeTimes;
    ours.push(seconds(start));
  }

  const input = JSON.stringify({
    columns: COLUMNS,
    rows: ROWS,
    spacing: SPACING,
    originX: 0,
    radius: RADIUS,
    runs: RUNS,
    sourceX: SOURCE.x,
    sourceZ: SOURCE.z,
    cellSlowness: Array.from(grid.cellSlowness),
  });
  const scipy = JSON.parse(execFileSync(findPython(['numpy', 'scipy']), ['-c', SCIPY_SCRIPT], { input, encoding: 'utf8', maxBuffer: 256 * 1024 * 1024 })) as {
    build: number;
    solveBest: number;
    solveMedian: number;
    edges: number;
    times: number[];
  };
  const worst = scipy.times.reduce((largest, time, node) => (time === 0 ? largest : Math.max(largest, Math.abs((nodeTimes[node] as number) - time) / time)), 0);

  const ourBest = Math.min(...ours);
  const ourMedian = median(ours);
  console.log(`grid ${COLUMNS} × ${ROWS} nodes at ${SPACING} m, forward star r = ${RADIUS}: ${scipy.edges.toLocaleString('en')} edges; ${RUNS} runs each`);
  console.log('');
  console.log('what'.padEnd(60) + 'best s'.padStart(10) + 'median s'.padStart(10) + '   ÷ ours (median)');
  const rows: [string, number, number][] = [
    ['ours: shortestPathTimes (weights on the fly + Dijkstra)', ourBest, ourMedian],
    ['scipy: csgraph.dijkstra on the prebuilt CSR graph', scipy.solveBest, scipy.solveMedian],
    ['numpy: building that graph (edges and weights), best of 3', scipy.build, scipy.build],
  ];
  for (const [label, best, middle] of rows) {
    console.log(label.padEnd(60) + best.toFixed(4).padStart(10) + middle.toFixed(4).padStart(10) + `   ${(middle / ourMedian).toFixed(2)}`);
  }
  console.log('');
  console.log(`ratio ours / scipy dijkstra (median): ${(ourMedian / scipy.solveMedian).toFixed(2)}; ours / (scipy build + dijkstra): ${(ourMedian / (scipy.build + scipy.solveMedian)).toFixed(2)}`);
  console.log(`agreement: largest relative node-time difference ours vs scipy ${worst.toExponential(2)}`);
}

main();
