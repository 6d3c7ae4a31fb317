/**
 * The shortest-path solver's graph built again, independently, in numpy: the same nodes, the star
 * of offsets (i, j) with gcd(i, j) = 1 (Moser 1991), each edge's time as its length times the
 * slownesses of the cells it crosses weighted by the fraction of the edge in each (found by
 * clipping the edge against every cell of its bounding box, Liang–Barsky), the faster cell for an
 * edge along a grid line. Solved by scipy.sparse.csgraph.dijkstra in the test and the benchmark
 * that import this (tests/model/shortest-path.test.ts, tests/bench/shortest-path.bench.ts).
 *
 * `GRID_GRAPH_PYTHON` defines `grid_edges(d)` → (nx, nz, h, x0, cells, us, vs, ws): edge lists
 * (numpy arrays per star offset) of the grid described by the JSON `d` the TypeScript side sends.
 */
export const GRID_GRAPH_PYTHON = `
import json, math, sys, time
import numpy as np
from scipy.sparse import csr_matrix
from scipy.sparse.csgraph import dijkstra
def inside(dc, dr, a, b):
    lo, hi = 0.0, 1.0
    for step, low, high in ((dc, a, a + 1), (dr, b, b + 1)):
        if step == 0:
            if not (low <= 0 <= high):
                return 0.0
        else:
            t1, t2 = sorted((low / step, high / step))
            lo, hi = max(lo, t1), min(hi, t2)
    return max(0.0, hi - lo)
def grid_edges(d):
    nx, nz, h, x0, radius = d['columns'], d['rows'], d['spacing'], d['originX'], d['radius']
    cells = np.array(d['cellSlowness'], dtype=float).reshape(nz - 1, nx - 1)
    padded = np.full((nz + 1, nx + 1), np.inf)
    padded[1:-1, 1:-1] = cells
    col, row = np.meshgrid(np.arange(nx), np.arange(nz))
    col = col.ravel(); row = row.ravel()
    us, vs, ws = [], [], []
    for dr in range(-radius, radius + 1):
        for dc in range(-radius, radius + 1):
            if (dc, dr) == (0, 0) or math.gcd(dc, dr) != 1:
                continue
            tc, tr = col + dc, row + dr
            ok = (tc >= 0) & (tc < nx) & (tr >= 0) & (tr < nz)
            c, r = col[ok], row[ok]
            pieces = [(a, b, inside(dc, dr, a, b)) for a in range(min(0, dc) - 1, max(0, dc) + 1) for b in range(min(0, dr) - 1, max(0, dr) + 1)]
            pieces = [p for p in pieces if p[2] > 1e-12]
            if dc == 0 or dr == 0:
                w = np.full(c.shape, np.inf)
                for a, b, f in pieces:
                    w = np.minimum(w, padded[r + b + 1, c + a + 1])
            else:
                assert abs(sum(p[2] for p in pieces) - 1) < 1e-12 and len(pieces) == abs(dc) + abs(dr) - 1
                w = np.zeros(c.shape)
                for a, b, f in pieces:
                    w = w + f * padded[r + b + 1, c + a + 1]
            us.append(r * nx + c); vs.append(tr[ok] * nx + tc[ok]); ws.append(h * math.hypot(dc, dr) * w)
    return nx, nz, h, x0, cells, us, vs, ws
`;
