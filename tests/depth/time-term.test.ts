/**
 * timeTerms (lib/depth/time-term.ts) against outside sources:
 * - METHODS.md §7 check case 7.1 (values computed from the stated model, not published);
 * - numpy (Debian python3-numpy): `lstsq` for the minimum-norm solution (the Σa = Σb gauge),
 *   `matrix_rank`, `pinv(GᵀWG)` and `inv` for the covariance under each constraint, the delta
 *   method for the gradient's SE;
 * - scipy.sparse.linalg.lsqr (Debian python3-scipy) on the same sparse system;
 * - closed forms (the cubic travel-time model, asinh of the linear-gradient ray);
 * - seeded synthetic surveys with known time terms (lib/random.ts seededNormal): invented data,
 *   used to check coverage of the SEs and the rejection of planted outliers.
 */
import { describe, expect, it } from 'vitest';
import { timeTerms, truncatedNormalVarianceFraction, type TimeTermOptions, type TimeTermPick, type TimeTermResult } from '../../lib/depth/time-term.js';
import { seededNormal, seededRandom } from '../../lib/random.js';
import { runPythonJson } from '../helpers/python.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';

/** METHODS 7.1: "With a_1 = 3.0 fixed everything is recovered (1e-9)". */
const CASE_7_1_TOLERANCE = 1e-9;
/** Our exact route (block elimination + Cholesky) against numpy's SVD-based lstsq/pinv: ~1e-12 seen; 1e-8 relative leaves room. */
const NUMPY_RELATIVE = 1e-8;
/** LSQR at atol = btol = 1e-10 (our default) against the exact solution: 1e-8 of the largest term. */
const LSQR_RELATIVE = 1e-8;
const SOURCE_7_1 = 'METHODS.md check case 7.1 (computed from the stated model, not published)';

// ---------------------------------------------------------------- data

interface Truth {
  readonly shots: Map<string, number>;
  readonly stations: Map<string, number>;
  readonly slowness: number;
}

interface Survey {
  readonly rows: TimeTermPick[];
  readonly truth: Truth;
}

/** METHODS 7.1: shots at 0, 200, 400 km; stations at 50, 120, 180, 250, 320, 380 km; V_Pn = 8 km/s; pairs with Δ ≥ 120 km. */
function case71(): Survey {
  const shotX = [0, 200, 400];
  const shotTerm = [3.0, 3.4, 2.8];
  const stationX = [50, 120, 180, 250, 320, 380];
  const stationTerm = [3.1, 3.3, 3.6, 3.2, 2.9, 3.0];
  const rows: TimeTermPick[] = [];
  shotX.forEach((xs, i) =>
    stationX.forEach((xr, j) => {
      const distance = Math.abs(xr - xs) * 1000;
      if (distance >= 120_000) rows.push({ shot: `S${i + 1}`, station: `R${j + 1}`, distance, time: shotTerm[i]! + stationTerm[j]! + distance / 8000, sigma: null });
    }),
  );
  return {
    rows,
    truth: {
      shots: new Map(shotTerm.map((value, i) => [`S${i + 1}`, value])),
      stations: new Map(stationTerm.map((value, j) => [`R${j + 1}`, value])),
      slowness: 1 / 8000,
    },
  };
}

/** METHODS 7.1, one-sided: shots at 0, −30, −60 km; six stations at 150 … 400 km (every 50 km). */
function case71OneSided(): Survey {
  const shotX = [0, -30, -60];
  const shotTerm = [3.0, 3.4, 2.8];
  const stationX = [150, 200, 250, 300, 350, 400];
  const stationTerm = [3.1, 3.3, 3.6, 3.2, 2.9, 3.0];
  const rows: TimeTermPick[] = [];
  shotX.forEach((xs, i) =>
    stationX.forEach((xr, j) => {
      const distance = Math.abs(xr - xs) * 1000;
      rows.push({ shot: `S${i + 1}`, station: `R${j + 1}`, distance, time: shotTerm[i]! + stationTerm[j]! + distance / 8000, sigma: null });
    }),
  );
  return {
    rows,
    truth: { shots: new Map(shotTerm.map((v, i) => [`S${i + 1}`, v])), stations: new Map(stationTerm.map((v, j) => [`R${j + 1}`, v])), slowness: 1 / 8000 },
  };
}

interface LineOptions {
  readonly shots: number;
  readonly stations: number;
  readonly seed: number;
  /** Pick noise SD, s (0: exact data). */
  readonly noise: number;
  readonly length?: number;
  readonly velocity?: number;
  readonly minDistance?: number;
  /** −κΔ³ term, s/m³. */
  readonly curvature?: number;
  /** Prefix of the ids (to build separate components). */
  readonly prefix?: string;
  /** Sigma written on the rows; default the noise SD. */
  readonly sigma?: number | null;
}

/**
 * Invented crustal line: shots spread over the whole line among the stations (reversed coverage),
 * time terms 3 ± 0.3 s (shots) and 2.5 ± 0.3 s (stations), Pn at 8 km/s, every pair with
 * Δ ≥ minDistance, seeded Gaussian pick noise.
 */
function lineSurvey(options: LineOptions): Survey {
  const { shots, stations, seed, noise } = options;
  const length = options.length ?? 300_000;
  const velocity = options.velocity ?? 8000;
  const minDistance = options.minDistance ?? 0;
  const prefix = options.prefix ?? '';
  const normal = seededNormal(seed);
  const uniform = seededRandom(seed + 7);
  const shotX = Array.from({ length: shots }, (_, i) => ((i + 0.5) * length) / shots + 500 * (uniform() - 0.5));
  const stationX = Array.from({ length: stations }, (_, j) => (j * length) / (stations - 1));
  const shotTruth = new Map<string, number>();
  const stationTruth = new Map<string, number>();
  shotX.forEach((_, i) => shotTruth.set(`${prefix}S${i + 1}`, 3 + 0.3 * normal()));
  stationX.forEach((_, j) => stationTruth.set(`${prefix}R${j + 1}`, 2.5 + 0.3 * normal()));
  const rows: TimeTermPick[] = [];
  const sigma = options.sigma === undefined ? (noise > 0 ? noise : null) : options.sigma;
  shotX.forEach((xs, i) =>
    stationX.forEach((xr, j) => {
      const distance = Math.abs(xr - xs);
      if (distance < minDistance) return;
      const shot = `${prefix}S${i + 1}`;
      const station = `${prefix}R${j + 1}`;
      const time = shotTruth.get(shot)! + stationTruth.get(station)! + distance / velocity - (options.curvature ?? 0) * distance ** 3 + noise * normal();
      rows.push({ shot, station, distance, time, sigma });
    }),
  );
  return { rows, truth: { shots: shotTruth, stations: stationTruth, slowness: 1 / velocity } };
}

/**
 * The truth in the convention of Σa = Σb: the data fix only a_i + b_j (and s), so the estimator
 * converges to the member of the family {a + c, b − c} that satisfies the constraint,
 * c = −(Σa − Σb)/(S + R).
 */
function truthUnderEqualSums(truth: Truth): Truth {
  let sum = 0;
  truth.shots.forEach((value) => (sum += value));
  truth.stations.forEach((value) => (sum -= value));
  const shift = -sum / (truth.shots.size + truth.stations.size);
  return {
    shots: new Map([...truth.shots].map(([id, value]) => [id, value + shift])),
    stations: new Map([...truth.stations].map(([id, value]) => [id, value - shift])),
    slowness: truth.slowness,
  };
}

/** The truth in the convention "term `id` of `side` = value": shift c = value − truth(id) (sign flipped for a station). */
function truthUnderReference(truth: Truth, side: 'shot' | 'station', id: string, value: number): Truth {
  const shift = side === 'shot' ? value - truth.shots.get(id)! : truth.stations.get(id)! - value;
  return {
    shots: new Map([...truth.shots].map(([key, v]) => [key, v + shift])),
    stations: new Map([...truth.stations].map(([key, v]) => [key, v - shift])),
    slowness: truth.slowness,
  };
}

function termMap(result: TimeTermResult, side: 'shot' | 'station'): Map<string, { value: number; standardError: number }> {
  return new Map((side === 'shot' ? result.shotTerms : result.stationTerms).map((term) => [term.id, term]));
}

// ---------------------------------------------------------------- numpy oracle

interface NumpyInput {
  readonly shots: string[];
  readonly stations: string[];
  readonly shotIndex: number[];
  readonly stationIndex: number[];
  readonly distance: number[];
  readonly time: number[];
  readonly sigma: number[];
  /** Units fixed (shot i → i, station j → shots + j) and their values. */
  readonly fixedUnits: number[];
  readonly fixedValues: number[];
  readonly gradient: boolean;
}

interface NumpyOutput {
  /** Per unit (shots then stations), fixed ones at their value; then s and κ. */
  readonly terms: number[];
  readonly termSE: number[];
  readonly termSlownessCov: number[];
  readonly slowness: number;
  readonly slownessSE: number;
  readonly curvature: number;
  readonly curvatureSE: number;
  readonly gradient: number;
  readonly gradientSE: number;
  readonly rank: number;
  readonly unknowns: number;
  readonly varianceFactor: number;
}

/**
 * Dense reference: G with columns [shots | stations | Δ in km | −Δ³ in (100 km)³] (the units only
 * condition the SVD; results are converted back), rows scaled by 1/σ. Without fixed units the
 * minimum-norm lstsq solution is the Σa = Σb solution and σ̂²·pinv(AᵀA) its covariance; with fixed
 * units their columns are removed and inv(AᵀA) is the covariance.
 */
const NUMPY_TIME_TERMS = `import sys, json, numpy as np
d = json.load(sys.stdin)
S, R = len(d['shots']), len(d['stations']); m = len(d['time'])
dist = np.array(d['distance']); t = np.array(d['time']); w = 1/np.array(d['sigma'])
ncol = S + R + 1 + (1 if d['gradient'] else 0)
G = np.zeros((m, ncol))
G[np.arange(m), d['shotIndex']] += 1; G[np.arange(m), S + np.array(d['stationIndex'])] += 1
G[:, S + R] = dist / 1e3
if d['gradient']: G[:, S + R + 1] = -(dist / 1e5) ** 3
fixed = d['fixedUnits']; keep = [c for c in range(ncol) if c not in fixed]
tt = t - G[:, fixed] @ np.array(d['fixedValues']) if fixed else t
A = G[:, keep] * w[:, None]; b = tt * w
x, _, rank, _ = np.linalg.lstsq(A, b, rcond=None)
r = b - A @ x
dof = m - rank; s2 = float(r @ r / dof)
N = A.T @ A
C = (np.linalg.pinv(N, rcond=1e-12) if not fixed else np.linalg.inv(N)) * s2
full = np.zeros(ncol); full[keep] = x; full[fixed] = d['fixedValues']
cov = np.zeros((ncol, ncol)); cov[np.ix_(keep, keep)] = C
scale = np.ones(ncol); scale[S + R] = 1e-3
if d['gradient']: scale[S + R + 1] = 1e-15
full = full * scale; cov = cov * np.outer(scale, scale)
se = np.sqrt(np.maximum(np.diag(cov), 0))
out = {'terms': full[:S + R].tolist(), 'termSE': se[:S + R].tolist(), 'termSlownessCov': cov[:S + R, S + R].tolist(),
       'slowness': float(full[S + R]), 'slownessSE': float(se[S + R]), 'rank': int(np.linalg.matrix_rank(G[:, keep] * w[:, None])),
       'unknowns': ncol, 'varianceFactor': s2, 'curvature': 0.0, 'curvatureSE': 0.0, 'gradient': 0.0, 'gradientSE': 0.0}
if d['gradient']:
    k = full[S + R + 1]; s = full[S + R]; g = np.sqrt(24 * k / s**3)
    J = np.array([-1.5 * g / s, g / (2 * k)])
    sub = cov[np.ix_([S + R, S + R + 1], [S + R, S + R + 1])]
    out.update({'curvature': float(k), 'curvatureSE': float(se[S + R + 1]), 'gradient': float(g), 'gradientSE': float(np.sqrt(J @ sub @ J))})
print(json.dumps(out))`;

function numpyInput(rows: readonly TimeTermPick[], options: { fixed?: { side: 'shot' | 'station'; id: string; value: number }[]; gradient?: boolean } = {}): NumpyInput {
  const shots = [...new Set(rows.map((row) => row.shot))];
  const stations = [...new Set(rows.map((row) => row.station))];
  const sigmas = rows.filter((row) => row.sigma !== null).map((row) => row.sigma!);
  const sorted = [...sigmas].sort((a, b) => a - b);
  const middle = sorted.length >> 1;
  const fill = sorted.length === 0 ? 1 : sorted.length % 2 === 1 ? sorted[middle]! : (sorted[middle - 1]! + sorted[middle]!) / 2;
  return {
    shots,
    stations,
    shotIndex: rows.map((row) => shots.indexOf(row.shot)),
    stationIndex: rows.map((row) => stations.indexOf(row.station)),
    distance: rows.map((row) => row.distance),
    time: rows.map((row) => row.time),
    sigma: rows.map((row) => row.sigma ?? fill),
    fixedUnits: (options.fixed ?? []).map((term) => (term.side === 'shot' ? shots.indexOf(term.id) : shots.length + stations.indexOf(term.id))),
    fixedValues: (options.fixed ?? []).map((term) => term.value),
    gradient: options.gradient === true,
  };
}

function expectMatchesNumpy(result: TimeTermResult, input: NumpyInput, reference: NumpyOutput, label: string, relative = NUMPY_RELATIVE): void {
  const shots = termMap(result, 'shot');
  const stations = termMap(result, 'station');
  const all = [...input.shots.map((id) => shots.get(id)!), ...input.stations.map((id) => stations.get(id)!)];
  const termScale = Math.max(...reference.terms.map(Math.abs));
  const seScale = Math.max(...reference.termSE);
  all.forEach((term, index) => {
    const name = index < input.shots.length ? `shot ${input.shots[index]}` : `station ${input.stations[index - input.shots.length]}`;
    expectWithin(term.value, reference.terms[index]!, relative * termScale, `numpy lstsq, ${label}: ${name}`);
    expectWithin(term.standardError, reference.termSE[index]!, relative * seScale, `numpy σ̂²·(pinv|inv)(GᵀWG), ${label}: SE of ${name}`);
  });
  expectRelative(result.slowness.value, reference.slowness, relative, `numpy lstsq, ${label}: slowness`);
  expectRelative(result.slowness.standardError, reference.slownessSE, relative, `numpy covariance, ${label}: SE(s)`);
  expectRelative(result.varianceFactor, reference.varianceFactor, relative, `numpy Σwr²/(m − rank), ${label}: σ̂²`);
}

// ---------------------------------------------------------------- tests

describe('timeTerms: METHODS.md check case 7.1', () => {
  const survey = case71();

  it('timeTerms with a_1 = 3.0 s fixed recovers every time term and V_Pn = 8 km/s to 1e-9, by both routes', () => {
    expect(survey.rows).toHaveLength(12);
    for (const solver of ['dense', 'lsqr'] as const) {
      const result = timeTerms(survey.rows, { solver, constraint: { kind: 'reference', terms: [{ side: 'shot', id: 'S1', value: 3.0 }] } });
      expect(result.solver).toBe(solver);
      survey.truth.shots.forEach((value, id) => expectWithin(termMap(result, 'shot').get(id)?.value, value, CASE_7_1_TOLERANCE, `${SOURCE_7_1}, ${solver}: shot ${id}`));
      survey.truth.stations.forEach((value, id) => expectWithin(termMap(result, 'station').get(id)?.value, value, CASE_7_1_TOLERANCE, `${SOURCE_7_1}, ${solver}: station ${id}`));
      expectWithin(result.slowness.value * 8000, 1, CASE_7_1_TOLERANCE, `${SOURCE_7_1}, ${solver}: s·V_Pn`);
      expect(result.shotTerms.find((term) => term.id === 'S1')).toMatchObject({ fixed: true, standardError: 0 });
      expect(result.constraint).toMatch(/shot S1 fixed at 3\ss \(component 1\)/);
    }
  });

  it('timeTerms under Σa = Σb (the default) gives the minimum-norm values a = 4.1, 4.5, 3.9, b = 2.0, 2.2, 2.5, 2.1, 1.8, 1.9 s, as numpy lstsq does', () => {
    const minimumNorm = { shots: [4.1, 4.5, 3.9], stations: [2.0, 2.2, 2.5, 2.1, 1.8, 1.9] };
    const input = numpyInput(survey.rows);
    const numpy = runPythonJson<NumpyOutput>(NUMPY_TIME_TERMS, input);
    for (const solver of ['dense', 'lsqr'] as const) {
      const result = timeTerms(survey.rows, { solver });
      minimumNorm.shots.forEach((value, i) => expectWithin(termMap(result, 'shot').get(`S${i + 1}`)?.value, value, CASE_7_1_TOLERANCE, `${SOURCE_7_1}, minimum norm, ${solver}: a_${i + 1}`));
      minimumNorm.stations.forEach((value, j) => expectWithin(termMap(result, 'station').get(`R${j + 1}`)?.value, value, CASE_7_1_TOLERANCE, `${SOURCE_7_1}, minimum norm, ${solver}: b_${j + 1}`));
      const sum = result.shotTerms.reduce((total, term) => total + term.value, 0) - result.stationTerms.reduce((total, term) => total + term.value, 0);
      expectWithin(sum, 0, CASE_7_1_TOLERANCE, `${SOURCE_7_1}: Σa = Σb`);
      input.shots.forEach((id, i) => expectWithin(termMap(result, 'shot').get(id)?.value, numpy.terms[i]!, CASE_7_1_TOLERANCE, `numpy lstsq minimum norm: shot ${id}`));
      expect(result.constraint).toMatch(/Σ shot terms = Σ station terms in each of the 1 component/);
    }
  });

  it('timeTerms reports rank 9 of 10 unknowns for case 7.1 (numpy matrix_rank 9 of G)', () => {
    const numpy = runPythonJson<NumpyOutput>(NUMPY_TIME_TERMS, numpyInput(survey.rows));
    expect(numpy.rank, `${SOURCE_7_1}: numpy matrix_rank`).toBe(9);
    expect(numpy.unknowns).toBe(10);
    const result = timeTerms(survey.rows);
    expect(result.unknowns).toBe(10);
    expect(result.rank).toBe(9);
    expect(result.degreesOfFreedom).toBe(12 - 9);
  });

  it('timeTerms gives a_2 + b_3 = 7.0 s under either constraint (constraint-free combination)', () => {
    const fixed = timeTerms(survey.rows, { constraint: { kind: 'reference', terms: [{ side: 'shot', id: 'S1', value: 3.0 }] } });
    const equal = timeTerms(survey.rows);
    for (const result of [fixed, equal]) {
      expectWithin(termMap(result, 'shot').get('S2')!.value + termMap(result, 'station').get('R3')!.value, 7.0, CASE_7_1_TOLERANCE, `${SOURCE_7_1}: a_2 + b_3`);
    }
  });

  it('timeTerms rejects nothing on exact data (the robust scale is floored at 1e-6 σ), and its SEs are at rounding level', () => {
    const result = timeTerms(survey.rows);
    expect(result.rejectedRows).toEqual([]);
    expect(result.rejectionRounds).toBe(1);
    for (const term of [...result.shotTerms, ...result.stationTerms]) expect(term.standardError).toBeLessThan(1e-9);
  });

  it('timeTerms refuses the one-sided geometry of case 7.1 (numpy rank 8 of 10) with the slowness free, and solves it with the velocity fixed', () => {
    const oneSided = case71OneSided();
    const numpy = runPythonJson<NumpyOutput>(NUMPY_TIME_TERMS, numpyInput(oneSided.rows));
    expect(numpy.rank, `${SOURCE_7_1}, one-sided: numpy matrix_rank`).toBe(8);
    expect(() => timeTerms(oneSided.rows)).toThrow(RangeError);
    expect(() => timeTerms(oneSided.rows)).toThrow(/slowness cannot be solved for.*one side of all shots.*fix the velocity \(options.fixedVelocity\) or add reversed coverage/);
    const fixed = timeTerms(oneSided.rows, { fixedVelocity: 8000, constraint: { kind: 'reference', terms: [{ side: 'shot', id: 'S1', value: 3.0 }] } });
    expect(fixed.velocityFixed).toBe(true);
    expect(fixed.velocity).toEqual({ value: 8000, standardError: 0 });
    oneSided.truth.stations.forEach((value, id) => expectWithin(termMap(fixed, 'station').get(id)?.value, value, CASE_7_1_TOLERANCE, `${SOURCE_7_1}, one-sided with V fixed: station ${id}`));
    expect(fixed.stationTerms.every((term) => term.slownessCovariance === 0)).toBe(true);
  });
});

describe('timeTerms against numpy and scipy on a noisy medium survey', () => {
  const survey = lineSurvey({ shots: 12, stations: 80, seed: 31, noise: 0.05, minDistance: 40_000 });

  it('timeTerms (exact route, Σa = Σb) gives numpy lstsq’s minimum-norm terms and σ̂²·pinv(GᵀWG) SEs', () => {
    const input = numpyInput(survey.rows);
    const numpy = runPythonJson<NumpyOutput>(NUMPY_TIME_TERMS, input);
    const result = timeTerms(survey.rows, { rejection: false, solver: 'dense' });
    expect(result.covarianceMethod).toBe('exact');
    expectMatchesNumpy(result, input, numpy, 'Σa = Σb');
    // Cov(term, s): the column numpy's pinv gives.
    const stations = termMap(result, 'station');
    const scale = Math.max(...numpy.termSlownessCov.map(Math.abs));
    input.stations.forEach((id, j) =>
      expectWithin(
        result.stationTerms.find((term) => term.id === id)!.slownessCovariance,
        numpy.termSlownessCov[input.shots.length + j]!,
        NUMPY_RELATIVE * scale,
        `numpy pinv: Cov(b_${id}, s) (${stations.get(id)!.value})`,
      ),
    );
  });

  it('timeTerms (exact route, a reference station fixed) gives numpy’s terms and σ̂²·inv(GᵀWG) SEs with that column removed', () => {
    const reference = { side: 'station' as const, id: 'R40', value: 2.5 };
    const input = numpyInput(survey.rows, { fixed: [reference] });
    const numpy = runPythonJson<NumpyOutput>(NUMPY_TIME_TERMS, input);
    const result = timeTerms(survey.rows, { rejection: false, constraint: { kind: 'reference', terms: [reference] } });
    expectMatchesNumpy(result, input, numpy, 'station R40 = 2.5 s');
    expect(result.stationTerms.find((term) => term.id === 'R40')).toMatchObject({ value: 2.5, standardError: 0, fixed: true });
  });

  it('timeTerms by LSQR agrees with the exact route on x (1e-8) and, with exact SEs, on every SE', () => {
    const dense = timeTerms(survey.rows, { rejection: false, solver: 'dense' });
    const iterative = timeTerms(survey.rows, { rejection: false, solver: 'lsqr' });
    expect(iterative.solver).toBe('lsqr');
    expect(iterative.iterations).toBeGreaterThan(0);
    expect(iterative.covarianceMethod).toBe('exact');
    const scale = Math.max(...dense.stationTerms.map((term) => Math.abs(term.value)));
    dense.stationTerms.forEach((term, index) => {
      expectWithin(iterative.stationTerms[index]!.value, term.value, LSQR_RELATIVE * scale, `exact route: station ${term.id}`);
      expectRelative(iterative.stationTerms[index]!.standardError, term.standardError, 1e-6, `exact route: SE of station ${term.id}`);
    });
    expectRelative(iterative.slowness.value, dense.slowness.value, LSQR_RELATIVE, 'exact route: slowness');
  });

  it('timeTerms by LSQR gives the solution scipy.sparse.linalg.lsqr gives on the same weighted system with a station fixed', () => {
    const reference = { side: 'station' as const, id: 'R1', value: 2.4 };
    const input = numpyInput(survey.rows, { fixed: [reference] });
    const script = `import sys, json, numpy as np
from scipy.sparse import csr_matrix
from scipy.sparse.linalg import lsqr
d = json.load(sys.stdin)
S, R = len(d['shots']), len(d['stations']); m = len(d['time'])
w = 1/np.array(d['sigma']); dist = np.array(d['distance'])
fixed = d['fixedUnits'][0]
cols = [c for c in range(S + R) if c != fixed] + [S + R]
index = {c: k for k, c in enumerate(cols)}
rows, cs, vals = [], [], []
for r in range(m):
    for c, v in ((d['shotIndex'][r], 1.0), (S + d['stationIndex'][r], 1.0), (S + R, dist[r] / 1e3)):
        if c in index: rows.append(r); cs.append(index[c]); vals.append(v * w[r])
A = csr_matrix((vals, (rows, cs)), shape=(m, len(cols)))
t = np.array(d['time']) - np.array([d['fixedValues'][0] if S + j == fixed else 0 for j in d['stationIndex']])
x = lsqr(A, t * w, atol=1e-14, btol=1e-14, iter_lim=20000)[0]
full = np.zeros(S + R + 1); full[cols] = x; full[fixed] = d['fixedValues'][0]; full[S + R] /= 1e3
print(json.dumps(full.tolist()))`;
    const scipy = runPythonJson<number[]>(script, input);
    const result = timeTerms(survey.rows, { rejection: false, solver: 'lsqr', constraint: { kind: 'reference', terms: [reference] } });
    const stations = termMap(result, 'station');
    const scale = Math.max(...scipy.map(Math.abs));
    input.stations.forEach((id, j) => expectWithin(stations.get(id)!.value, scipy[input.shots.length + j]!, LSQR_RELATIVE * scale, `scipy lsqr: station ${id}`));
    expectRelative(result.slowness.value, scipy[scipy.length - 1]!, LSQR_RELATIVE, 'scipy lsqr: slowness');
  });

  it('timeTerms auto takes LSQR once picks × reduced size exceeds 2·10⁷ (300 × 300, full coverage: 90,000 × 301) and keeps exact SEs', () => {
    const big = lineSurvey({ shots: 300, stations: 300, seed: 55, noise: 0.05 });
    expect(big.rows.length * 301).toBeGreaterThan(2e7);
    const result = timeTerms(big.rows, { rejection: false });
    expect(result.solver).toBe('lsqr');
    expect(result.covarianceMethod).toBe('exact');
    const small = timeTerms(survey.rows, { rejection: false });
    expect(small.solver).toBe('dense');
  });

  it('timeTerms falls back to LSQR’s variance estimate beyond denseLimit, says so, and that estimate lies below the exact variance', () => {
    const exact = timeTerms(survey.rows, { rejection: false });
    const bound = timeTerms(survey.rows, { rejection: false, denseLimit: 5 });
    expect(bound.solver).toBe('lsqr');
    expect(bound.covarianceMethod).toBe('lsqr-lower-bound');
    expect(bound.notes.map((note) => note.code)).toContain('lsqr-variance-lower-bound');
    expect(bound.stationTerms.every((term) => term.slownessCovariance === null)).toBe(true);
    const ratios = exact.stationTerms.map((term, index) => bound.stationTerms[index]!.standardError / term.standardError);
    // Lanczos theory: the Krylov estimate never exceeds diag((GᵀWG)⁻¹) (METHODS §7, PaigeSaunders1982).
    expect(Math.max(...ratios)).toBeLessThanOrEqual(1 + 1e-6);
    // And here it is far below: the median SE ratio is under one half.
    const median = [...ratios].sort((a, b) => a - b)[ratios.length >> 1]!;
    expect(median).toBeLessThan(0.5);
  });
});

describe('timeTerms: acceptance on a synthetic survey with known time terms', () => {
  const noise = 0.05;
  const survey = lineSurvey({ shots: 60, stations: 400, seed: 20_240_611, noise, minDistance: 20_000 });

  function coverage(result: TimeTermResult, truth: Truth): { stations: number; shots: number } {
    const inside = (terms: TimeTermResult['stationTerms'], reference: Map<string, number>): number =>
      terms.filter((term) => Math.abs(term.value - reference.get(term.id)!) <= 2 * term.standardError).length / terms.length;
    return { stations: inside(result.stationTerms, truth.stations), shots: inside(result.shotTerms, truth.shots) };
  }

  it('timeTerms recovers ≥ 95 % of the 400 station terms within 2 SE of the truth under Σa = Σb (truth moved to that convention), and V within 2 SE', () => {
    const result = timeTerms(survey.rows);
    expect(result.solver).toBe('dense');
    const truth = truthUnderEqualSums(survey.truth);
    const { stations } = coverage(result, truth);
    expect(stations, `station terms within 2 SE of the truth: ${(stations * 100).toFixed(1)} %`).toBeGreaterThanOrEqual(0.95);
    expect(Math.abs(result.velocity.value - 8000)).toBeLessThanOrEqual(2 * result.velocity.standardError);
    // The untransformed truth is not what Σa = Σb estimates: most stations miss it.
    const raw = coverage(result, survey.truth).stations;
    expect(raw).toBeLessThan(0.5);
  });

  it('timeTerms SEs are calibrated over 8 more seeded surveys (3,200 station terms): mean z² = 1 ± 0.1 and 2-SE coverage 95.45 ± 1.5 % (4 SD each)', () => {
    // The ≥ 95 % criterion above sits just under its own expectation (2Φ(2) − 1 = 95.45 %), so a
    // single survey of 400 stations meets it for about 19 seeds in 30; this pooled check is the
    // one that cannot pass by luck: SD of mean z² ≈ √(2/3200) = 0.025, of the coverage ≈ 0.37 %.
    let sumSquares = 0;
    let inside = 0;
    let count = 0;
    for (let seed = 1; seed <= 8; seed += 1) {
      const other = lineSurvey({ shots: 60, stations: 400, seed, noise, minDistance: 20_000 });
      const result = timeTerms(other.rows);
      const truth = truthUnderEqualSums(other.truth);
      for (const term of result.stationTerms) {
        const z = (term.value - truth.stations.get(term.id)!) / term.standardError;
        sumSquares += z * z;
        if (Math.abs(z) <= 2) inside += 1;
        count += 1;
      }
    }
    expectWithin(sumSquares / count, 1, 0.1, 'normal theory: E[z²] = 1 for calibrated SEs');
    expectWithin(inside / count, 0.9545, 0.015, 'normal theory: P(|z| ≤ 2) = 0.9545');
  });

  it('timeTerms with the default threshold rejects ≈ 2Φ(−3) = 0.27 % of purely Gaussian picks (4 SD of the binomial count)', () => {
    const result = timeTerms(survey.rows);
    const expected = 0.0027 * survey.rows.length;
    expectWithin(result.rejectedRows.length, expected, 4 * Math.sqrt(expected), 'closed form: two-sided normal tail beyond 3 SD');
  });

  it('timeTerms scales the covariance by σ̂² = χ²/(dof·c(3)) with rejection on and χ²/dof with it off (module comment)', () => {
    const robust = timeTerms(survey.rows);
    expectRelative(robust.varianceFactor, robust.reducedChiSquare / truncatedNormalVarianceFraction(3), 1e-12, 'documented consistency factor c(3)');
    const plain = timeTerms(survey.rows, { rejection: false });
    expectRelative(plain.varianceFactor, plain.reducedChiSquare, 1e-12, 'no rejection, no factor');
  });

  it('timeTerms under a reference term is the Σa = Σb solution moved along the null vector: a + c, b − c with c = value − â_ref (1e-9)', () => {
    // Coverage of single terms is not checked under a reference: every station term then carries
    // the reference shot's own estimation error, so their errors share one random shift and the
    // fraction inside 2 SE scatters far more than a binomial count would.
    const reference = { side: 'shot' as const, id: 'S30', value: 3.0 };
    const fixed = timeTerms(survey.rows, { constraint: { kind: 'reference', terms: [reference] } });
    const equal = timeTerms(survey.rows);
    const shift = reference.value - termMap(equal, 'shot').get('S30')!.value;
    equal.stationTerms.forEach((term) => expectWithin(termMap(fixed, 'station').get(term.id)!.value, term.value - shift, 1e-9, `gauge change: station ${term.id}`));
    equal.shotTerms.forEach((term) => expectWithin(termMap(fixed, 'shot').get(term.id)!.value, term.value + shift, 1e-9, `gauge change: shot ${term.id}`));
    expectRelative(fixed.velocity.standardError, equal.velocity.standardError, 1e-9, 'the slowness does not depend on the constraint');
    // Single SEs do depend on it.
    expect(termMap(fixed, 'station').get('R200')!.standardError).toBeGreaterThan(termMap(equal, 'station').get('R200')!.standardError);
  });

  it('timeTerms gives χ²/dof near 1 when the sigmas are the noise SD (3-sigma rejection trims it by ≈ 2.7 %)', () => {
    const result = timeTerms(survey.rows);
    // Normal errors truncated at ±3σ keep 1 − 2·3·φ(3)/(1 − 2Φ(−3)) ≈ 0.9733 of their variance (closed form).
    expectWithin(result.reducedChiSquare, 0.9733, 4 * Math.sqrt(2 / result.degreesOfFreedom) + 0.01, 'closed form: truncated-normal variance at 3σ');
    expectWithin(result.residualRms, noise * Math.sqrt(0.9733), 0.05 * noise, 'stated noise SD 50 ms');
    // The consistency factor c(3) = 0.9733 undoes the trimming in σ̂².
    expectWithin(result.varianceFactor, 1, 4 * Math.sqrt(2 / result.degreesOfFreedom) + 0.01, 'σ̂² = χ²/(dof·c(3)) ≈ 1 with the true sigmas');
  });
});

describe('timeTerms: robust rejection', () => {
  const base = lineSurvey({ shots: 20, stations: 120, seed: 77, noise: 0.02, minDistance: 20_000 });
  const planted = new Set(Array.from({ length: 30 }, (_, k) => (k * 97 + 13) % base.rows.length));
  const withOutliers = base.rows.map((row, index) => (planted.has(index) ? { ...row, time: row.time + 0.5 } : row));

  it('timeTerms rejects and reports every planted +0.5 s outlier (25 σ) and keeps the terms within 2 SE', () => {
    const result = timeTerms(withOutliers);
    const rejected = new Set(result.rejectedRows.map((row) => row.row));
    planted.forEach((row) => expect(rejected.has(row), `planted row ${row} rejected`).toBe(true));
    const report = result.rejectedRows.find((row) => planted.has(row.row))!;
    expectWithin(report.residual, 0.5, 0.1, 'planted offset 0.5 s');
    expectWithin(report.normalisedResidual, 25, 5, 'planted offset / σ');
    // Gaussian tails beyond 3σ are rejected too (≈ 0.27 % of the clean picks).
    expect(result.rejectedRows.length).toBeLessThan(planted.size + 0.01 * base.rows.length);
    const truth = truthUnderEqualSums(base.truth);
    const inside = result.stationTerms.filter((term) => Math.abs(term.value - truth.stations.get(term.id)!) <= 2 * term.standardError).length;
    expect(inside / result.stationTerms.length).toBeGreaterThanOrEqual(0.9);
    expect(result.stationTerms.reduce((sum, term) => sum + term.rejected, 0)).toBe(result.rejectedRows.length);
  });

  it('timeTerms without rejection keeps the outliers and the fit is worse (χ²/dof far above 1)', () => {
    const robust = timeTerms(withOutliers);
    const plain = timeTerms(withOutliers, { rejection: false });
    expect(plain.rejectedRows).toEqual([]);
    expect(plain.reducedChiSquare).toBeGreaterThan(10 * robust.reducedChiSquare);
  });

  it('timeTerms rejects a 5 σ pick at threshold 3 but not at threshold 6', () => {
    const rows = base.rows.map((row, index) => (index === 100 ? { ...row, time: row.time + 5 * 0.02 } : row));
    expect(timeTerms(rows, { rejection: { threshold: 3 } }).rejectedRows.map((row) => row.row)).toContain(100);
    expect(timeTerms(rows, { rejection: { threshold: 6 } }).rejectedRows.map((row) => row.row)).not.toContain(100);
  });

  it('timeTerms keeps one of a station’s two picks when both are outliers (rejecting both would leave the term without picks) and says so', () => {
    // A new station with true delay 2.5 s and two picks, 20 σ early and 20 σ late.
    const expected = (shot: string, distance: number): number => base.truth.shots.get(shot)! + 2.5 + distance / 8000;
    const rows = [
      ...withOutliers,
      { shot: 'S3', station: 'PAIR', distance: 150_000, time: expected('S3', 150_000) + 0.4, sigma: 0.02 },
      { shot: 'S4', station: 'PAIR', distance: 140_000, time: expected('S4', 140_000) - 0.4, sigma: 0.02 },
    ];
    const result = timeTerms(rows);
    const pair = result.stationTerms.find((term) => term.id === 'PAIR')!;
    expect(pair.picks).toBe(1);
    expect(pair.rejected).toBe(1);
    expect(result.notes.map((note) => note.code)).toContain('kept-to-connect');
    expect(result.components).toHaveLength(1);
  });

  it('timeTerms lets a pick return once the outlier that pulled its station term is rejected', () => {
    // A new station with true delay 2.5 s and three picks, one of them 100 σ late: in the first round
    // the term is pulled up and all three look bad; the two honest picks are back in the end.
    const expected = (shot: string, distance: number): number => base.truth.shots.get(shot)! + 2.5 + distance / 8000;
    const start = withOutliers.length;
    const rows = [
      ...withOutliers,
      { shot: 'S3', station: 'TRIO', distance: 150_000, time: expected('S3', 150_000) + 2, sigma: 0.02 },
      { shot: 'S5', station: 'TRIO', distance: 120_000, time: expected('S5', 120_000), sigma: 0.02 },
      { shot: 'S7', station: 'TRIO', distance: 100_000, time: expected('S7', 100_000), sigma: 0.02 },
    ];
    // After one rejection round (the set used by the second solve) an honest TRIO pick is out too …
    const early = timeTerms(rows, { rejection: { maxRounds: 2 } });
    expect(early.rejectedRows.filter((row) => row.station === 'TRIO').length).toBeGreaterThan(1);
    // … and in the end only the outlier is.
    const result = timeTerms(rows);
    const trio = result.rejectedRows.filter((row) => row.station === 'TRIO').map((row) => row.row);
    expect(trio).toEqual([start]);
    expect(result.rejectionRounds).toBeGreaterThanOrEqual(3);
    expect(result.stationTerms.find((term) => term.id === 'TRIO')!.picks).toBe(2);
    expect(result.notes.map((note) => note.code)).not.toContain('kept-to-connect');
  });

  it('timeTerms stops after maxRounds solves with a note when the rejected set still changes', () => {
    const result = timeTerms(withOutliers, { rejection: { maxRounds: 1 } });
    expect(result.rejectionRounds).toBe(1);
    expect(result.rejectedRows).toEqual([]);
    expect(result.notes.map((note) => note.code)).toContain('rejection-not-converged');
  });
});

describe('truncatedNormalVarianceFraction', () => {
  it('truncatedNormalVarianceFraction gives the variance of a standard normal cut at ±k as scipy.stats.truncnorm does (k = 2, 2.5, 3, 4)', () => {
    const thresholds = [2, 2.5, 3, 4];
    const scipy = runPythonJson<number[]>('import sys, json\nfrom scipy.stats import truncnorm\nprint(json.dumps([float(truncnorm(-k, k).var()) for k in json.load(sys.stdin)]))', thresholds);
    thresholds.forEach((k, index) => expectRelative(truncatedNormalVarianceFraction(k), scipy[index]!, 1e-12, `scipy.stats.truncnorm(−${k}, ${k}).var()`));
  });
});

describe('timeTerms: components, constraints and sharing', () => {
  const first = lineSurvey({ shots: 6, stations: 30, seed: 5, noise: 0.03, prefix: 'A', minDistance: 30_000 });
  const second = lineSurvey({ shots: 5, stations: 25, seed: 6, noise: 0.03, prefix: 'B', minDistance: 30_000 });
  const rows = [...first.rows, ...second.rows];

  it('timeTerms on a disconnected graph lists 2 components, puts Σa = Σb on each, shares the slowness and notes it', () => {
    const result = timeTerms(rows);
    expect(result.components.map((component) => [component.index, component.shots.length, component.stations.length, component.picks])).toEqual([
      [1, 6, 30, first.rows.length],
      [2, 5, 25, second.rows.length],
    ]);
    for (const component of [1, 2]) {
      const sum =
        result.shotTerms.filter((term) => term.component === component).reduce((total, term) => total + term.value, 0) -
        result.stationTerms.filter((term) => term.component === component).reduce((total, term) => total + term.value, 0);
      expectWithin(sum, 0, 1e-9, `Σa = Σb in component ${component}`);
    }
    expect(result.rank).toBe(6 + 30 + 5 + 25 + 1 - 2);
    expect(result.notes.map((note) => note.code)).toContain('several-components');
    expect(result.constraint).toMatch(/each of the 2 component/);
    // numpy on the joint system (minimum norm is Σa = Σb on each component).
    const input = numpyInput(rows);
    expectMatchesNumpy(timeTerms(rows, { rejection: false }), input, runPythonJson<NumpyOutput>(NUMPY_TIME_TERMS, input), 'two components');
  });

  it('timeTerms with references needs one per component, naming the one without', () => {
    expect(() => timeTerms(rows, { constraint: { kind: 'reference', terms: [{ side: 'shot', id: 'AS1', value: 3 }] } })).toThrow(
      /component 2 \(shots BS1, BS2, BS3 … \(5\); stations BR1, .* … \(25\)\) has no reference term/,
    );
    expect(() =>
      timeTerms(rows, {
        constraint: {
          kind: 'reference',
          terms: [
            { side: 'shot', id: 'AS1', value: 3 },
            { side: 'station', id: 'AR2', value: 2 },
          ],
        },
      }),
    ).toThrow(/has two references \(shot AS1 and station AR2\)/);
    const result = timeTerms(rows, {
      constraint: {
        kind: 'reference',
        terms: [
          { side: 'shot', id: 'AS1', value: 3 },
          { side: 'station', id: 'BR2', value: 2 },
        ],
      },
    });
    expect(result.constraint).toMatch(/shot AS1 fixed at 3\ss \(component 1\); station BR2 fixed at 2\ss \(component 2\)/);
  });

  it('timeTerms with a co-located shot and station shares one unknown and recovers exact data to 1e-9', () => {
    // Station R15 sits at shot S3's site: give them the same true delay.
    const exact = lineSurvey({ shots: 6, stations: 30, seed: 9, noise: 0, minDistance: 30_000 });
    const delay = exact.truth.shots.get('S3')!;
    const rows = exact.rows.map((row) => (row.station === 'R15' ? { ...row, time: row.time - exact.truth.stations.get('R15')! + delay } : row));
    const result = timeTerms(rows, { constraint: { kind: 'co-located', pairs: [{ shot: 'S3', station: 'R15' }] } });
    const shared = result.shotTerms.find((term) => term.id === 'S3')!;
    expect(shared.sharedWith).toBe('R15');
    expect(result.stationTerms.find((term) => term.id === 'R15')!.sharedWith).toBe('S3');
    expectWithin(shared.value, delay, 1e-9, 'closed form: the shared true delay');
    exact.truth.shots.forEach((value, id) => expectWithin(termMap(result, 'shot').get(id)!.value, value, 1e-9, `invented truth: shot ${id}`));
    exact.truth.stations.forEach((value, id) => id !== 'R15' && expectWithin(termMap(result, 'station').get(id)!.value, value, 1e-9, `invented truth: station ${id}`));
    expect(result.unknowns).toBe(6 + 30 + 1);
    expect(result.rank).toBe(6 + 30 + 1 - 1);
    expect(result.constraint).toMatch(/shot S3 = station R15/);
  });

  it('timeTerms refuses co-located pairs that name unknown ids, repeat a partner, cross components, or leave a component without a pair', () => {
    expect(() => timeTerms(rows, { constraint: { kind: 'co-located', pairs: [{ shot: 'X', station: 'AR1' }] } })).toThrow(/names shot "X", which has no pick/);
    expect(() => timeTerms(rows, { constraint: { kind: 'co-located', pairs: [{ shot: 'AS1', station: 'BR1' }] } })).toThrow(/a pair must share a component/);
    expect(() => timeTerms(rows, { constraint: { kind: 'co-located', pairs: [{ shot: 'AS1', station: 'AR1' }] } })).toThrow(/component 2 .* has no co-located pair/);
    expect(() =>
      timeTerms(rows, {
        constraint: {
          kind: 'co-located',
          pairs: [
            { shot: 'AS1', station: 'AR1' },
            { shot: 'AS1', station: 'AR2' },
          ],
        },
      }),
    ).toThrow(/already in another pair/);
    expect(() => timeTerms(rows, { constraint: { kind: 'co-located', pairs: [] } })).toThrow(/pairs is empty/);
  });
});

describe('timeTerms: weights and variance scale', () => {
  const survey = lineSurvey({ shots: 10, stations: 50, seed: 41, noise: 0.04, minDistance: 30_000 });

  it('timeTerms gives rows without a sigma the median sigma (the same fit as writing it in)', () => {
    const sigmas = survey.rows.map((_, index) => 0.02 + (index % 5) * 0.01);
    const given = survey.rows.map((row, index) => ({ ...row, sigma: sigmas[index]! }));
    const sorted = [...sigmas].filter((_, index) => index % 7 !== 0).sort((a, b) => a - b);
    const middle = sorted.length >> 1;
    const fill = sorted.length % 2 === 1 ? sorted[middle]! : (sorted[middle - 1]! + sorted[middle]!) / 2;
    const missing = given.map((row, index) => (index % 7 === 0 ? { ...row, sigma: null } : row));
    const filled = given.map((row, index) => (index % 7 === 0 ? { ...row, sigma: fill } : row));
    const a = timeTerms(missing, { rejection: false });
    const b = timeTerms(filled, { rejection: false });
    a.stationTerms.forEach((term, index) => expectWithin(term.value, b.stationTerms[index]!.value, 1e-12, `median sigma ${fill} written in: station ${term.id}`));
    expect(a.weighting).toMatch(/pick\(s\) without a sigma take the median sigma/);
  });

  it('timeTerms with no sigma at all uses unit weights, says so, and refuses varianceScale absolute', () => {
    const rows = survey.rows.map((row) => ({ ...row, sigma: null }));
    const result = timeTerms(rows, { rejection: false });
    expect(result.weighting).toMatch(/unit weights/);
    expectRelative(result.varianceFactor, result.residualRms ** 2 * (rows.length / result.degreesOfFreedom), 1e-9, 'closed form: σ̂² = Σr²/dof with unit weights');
    expect(() => timeTerms(rows, { varianceScale: 'absolute' })).toThrow(/'absolute' takes the sigmas as true SEs, but some picks have none/);
  });

  it('timeTerms SEs scale by √(χ²/dof) between varianceScale absolute and residual (closed form)', () => {
    const residual = timeTerms(survey.rows, { rejection: false });
    const absolute = timeTerms(survey.rows, { rejection: false, varianceScale: 'absolute' });
    expect(absolute.varianceFactor).toBe(1);
    const factor = Math.sqrt(residual.reducedChiSquare);
    residual.stationTerms.forEach((term, index) => expectRelative(term.standardError, absolute.stationTerms[index]!.standardError * factor, 1e-12, `√(χ²/dof) scaling: station ${term.id}`));
    expectRelative(residual.slowness.standardError, absolute.slowness.standardError * factor, 1e-12, '√(χ²/dof) scaling: slowness');
  });
});

describe('timeTerms: the linear-gradient term', () => {
  it('timeTerms recovers κ and g = √(24κ/s³) to 1e-9 from exact cubic data (closed form)', () => {
    const gradient = 0.004; // 1/s
    const curvature = (gradient ** 2 * (1 / 8000) ** 3) / 24;
    const survey = lineSurvey({ shots: 8, stations: 40, seed: 3, noise: 0, curvature, minDistance: 40_000 });
    const result = timeTerms(survey.rows, { gradient: true });
    expect(result.gradient).not.toBeNull();
    expectRelative(result.gradient!.curvature.value, curvature, 1e-8, 'closed form: κ = g²s³/24');
    expect(result.gradient!.velocityGradient.ok).toBe(true);
    if (result.gradient!.velocityGradient.ok) expectRelative(result.gradient!.velocityGradient.value, gradient, 1e-8, 'closed form: g');
    expectRelative(result.velocity.value, 8000, 1e-10, 'closed form: v₀');
  });

  it('timeTerms recovers g within 1 % from travel times of the linear-gradient ray T = (2/g)·asinh(gX/(2v₀)) (neglected term 9u²/20 ≈ 0.3 %)', () => {
    const gradient = 0.004;
    const velocity = 8000;
    const survey = lineSurvey({ shots: 8, stations: 60, seed: 4, noise: 0, minDistance: 40_000 });
    const rows = survey.rows.map((row) => ({
      ...row,
      time: row.time - row.distance / velocity + (2 / gradient) * Math.asinh((gradient * row.distance) / (2 * velocity)),
    }));
    const result = timeTerms(rows, { gradient: true, rejection: false });
    const fitted = result.gradient!.velocityGradient;
    expect(fitted.ok).toBe(true);
    if (fitted.ok) expectRelative(fitted.value, gradient, 0.01, 'closed form: asinh ray of v = v₀ + g·z');
    expectRelative(result.velocity.value, velocity, 1e-3, 'closed form: v₀ at the refractor top');
  });

  it('timeTerms gives κ, g and SE(g) by the delta method as numpy does from its full covariance', () => {
    const gradient = 0.004;
    const curvature = (gradient ** 2 * (1 / 8000) ** 3) / 24;
    const survey = lineSurvey({ shots: 10, stations: 60, seed: 8, noise: 0.02, curvature, minDistance: 40_000 });
    const input = numpyInput(survey.rows, { gradient: true });
    const numpy = runPythonJson<NumpyOutput>(NUMPY_TIME_TERMS, input);
    const result = timeTerms(survey.rows, { gradient: true, rejection: false });
    expectMatchesNumpy(result, input, numpy, 'with gradient', 1e-7);
    expectRelative(result.gradient!.curvature.value, numpy.curvature, 1e-7, 'numpy: κ');
    expectRelative(result.gradient!.curvature.standardError, numpy.curvatureSE, 1e-7, 'numpy: SE(κ)');
    const fitted = result.gradient!.velocityGradient;
    expect(fitted.ok).toBe(true);
    if (fitted.ok) {
      expectRelative(fitted.value, numpy.gradient, 1e-7, 'numpy: g');
      expectRelative(fitted.standardError, numpy.gradientSE, 1e-6, 'numpy: delta-method SE(g) with Cov(κ, s)');
    }
  });

  it('timeTerms gives no gradient when κ ≤ 0 (times bending the wrong way)', () => {
    const bent = lineSurvey({ shots: 8, stations: 40, seed: 3, noise: 0, curvature: -1e-19, minDistance: 40_000 });
    const result = timeTerms(bent.rows, { gradient: true });
    expect(result.gradient!.velocityGradient).toMatchObject({ ok: false, code: 'curvature-not-positive' });
  });

  it('timeTerms notes an unresolved gradient when κ is under 2 SE (κ moved to 1 SE by adding −c·Δ³, which leaves the residuals alone)', () => {
    const noisy = lineSurvey({ shots: 8, stations: 40, seed: 12, noise: 0.05, minDistance: 40_000 });
    const first = timeTerms(noisy.rows, { gradient: true, rejection: false });
    const shift = first.gradient!.curvature.standardError - first.gradient!.curvature.value;
    const moved = noisy.rows.map((row) => ({ ...row, time: row.time - shift * row.distance ** 3 }));
    const result = timeTerms(moved, { gradient: true, rejection: false });
    expectRelative(result.gradient!.curvature.value, first.gradient!.curvature.standardError, 1e-6, 'linearity of least squares: κ̂ + c');
    expect(result.gradient!.velocityGradient.ok).toBe(true);
    expect(result.notes.map((note) => note.code)).toContain('gradient-not-resolved');
  });

  it('timeTerms throws, naming κ, when the distances cannot resolve the gradient (two distances only: Δ³ is affine in Δ)', () => {
    const rows: TimeTermPick[] = [];
    for (let i = 1; i <= 4; i += 1) {
      for (let j = 1; j <= 4; j += 1) {
        const distance = (i + j) % 2 === 0 ? 100_000 : 160_000;
        rows.push({ shot: `S${i}`, station: `R${j}`, distance, time: 5 + distance / 8000 + 0.01 * Math.sin(i * 7 + j), sigma: 0.01 });
      }
    }
    expect(() => timeTerms(rows, { gradient: true, rejection: false })).toThrow(/singular at the gradient term κ/);
    expect(() => timeTerms(rows, { rejection: false })).not.toThrow();
  });
});

describe('timeTerms: edges and misuse', () => {
  const survey = lineSurvey({ shots: 4, stations: 10, seed: 2, noise: 0.02, minDistance: 30_000 });

  it('timeTerms throws "too few picks" when no degree of freedom is left', () => {
    const rows: TimeTermPick[] = [
      { shot: 'S1', station: 'R1', distance: 100_000, time: 17, sigma: null },
      { shot: 'S1', station: 'R2', distance: 150_000, time: 23, sigma: null },
      { shot: 'S2', station: 'R1', distance: 120_000, time: 20, sigma: null },
      { shot: 'S2', station: 'R2', distance: 110_000, time: 19, sigma: null },
    ];
    // 4 terms − 1 + s = 4 independent unknowns for 4 picks.
    expect(() => timeTerms(rows)).toThrow(/too few picks: 4 pick\(s\) for 4 independent unknowns.*at least 5/);
    expect(() => timeTerms(rows, { fixedVelocity: 8000 })).not.toThrow();
  });

  it('timeTerms stops rejecting when the flagged picks would leave no degree of freedom, and says so', () => {
    // One cycle S1–R1–S2–R2 (4 picks, one 0.5 s late) and six stations with a single pick: the
    // late pick spreads ±0.125 s over the cycle while the single picks fit exactly (MAD 0), so the
    // cycle is flagged, and rejecting it would leave 6 picks for 9 unknowns.
    const distance = (i: number, j: number): number => 100_000 + 20_000 * i + 7000 * j * j;
    const pairs = [[1, 1], [1, 2], [2, 1], [2, 2], [1, 3], [2, 4], [1, 5], [2, 6], [1, 7], [2, 8]] as const;
    const rows = pairs.map(([i, j], index) => ({ shot: `S${i}`, station: `R${j}`, distance: distance(i, j), time: 5 + distance(i, j) / 8000 + (index === 0 ? 0.5 : 0), sigma: 0.01 }));
    const result = timeTerms(rows, { fixedVelocity: 8000 });
    expect(result.degreesOfFreedom).toBe(1);
    expect(result.rejectedRows).toEqual([]);
    expect(result.notes.map((note) => note.code)).toContain('rejection-stopped-degrees-of-freedom');
  });

  it('timeTerms notes when LSQR stops at its iteration limit', () => {
    const result = timeTerms(survey.rows, { solver: 'lsqr', lsqrIterationLimit: 1, rejection: false });
    expect(result.notes.map((note) => note.code)).toContain('lsqr-not-converged');
  });

  it('timeTerms names the field and the fix on misuse', () => {
    const row = survey.rows[0]!;
    expect(() => timeTerms([])).toThrow(/no picks given/);
    expect(() => timeTerms([{ ...row, shot: '' }])).toThrow(/row 0: shot must be a non-empty id/);
    expect(() => timeTerms([{ ...row, station: '' }])).toThrow(/row 0: station must be a non-empty id/);
    expect(() => timeTerms([{ ...row, distance: -1 }])).toThrow(/distance must be a finite number of metres ≥ 0, got -1/);
    expect(() => timeTerms([{ ...row, time: Number.NaN }])).toThrow(/time must be a finite number of seconds, got NaN/);
    expect(() => timeTerms([{ ...row, sigma: 0 }])).toThrow(/sigma must be a positive finite number of seconds or null/);
    expect(() => timeTerms(survey.rows, { fixedVelocity: 0 })).toThrow(/fixedVelocity must be a positive finite velocity/);
    expect(() => timeTerms(survey.rows, { rejection: { threshold: 0 } })).toThrow(/threshold must be a positive number of robust SDs/);
    expect(() => timeTerms(survey.rows, { rejection: { maxRounds: 0 } })).toThrow(/maxRounds must be a positive integer/);
    expect(() => timeTerms(survey.rows, { solver: 'qr' as TimeTermOptions['solver'] })).toThrow(/options.solver must be 'auto', 'dense' or 'lsqr'/);
    expect(() => timeTerms(survey.rows, { solver: 'dense', denseLimit: 2 })).toThrow(/solver 'dense' needs a reduced system of at most denseLimit = 2 unknowns/);
    expect(() => timeTerms(survey.rows, { constraint: { kind: 'reference', terms: [{ side: 'shot', id: 'nope', value: 1 }] } })).toThrow(/names shot "nope", which has no pick/);
    expect(() => timeTerms(survey.rows, { constraint: { kind: 'reference', terms: [{ side: 'shot', id: 'S1', value: Number.NaN }] } })).toThrow(/value must be a finite time/);
    expect(() => timeTerms(survey.rows, { constraint: { kind: 'nope' } as unknown as TimeTermOptions['constraint'] })).toThrow(/constraint.kind must be/);
    expect(() => timeTerms(survey.rows, { lsqrTolerance: 0 })).toThrow(/lsqrTolerance must be a positive number/);
    expect(() => timeTerms(survey.rows, { varianceScale: 'relative' as 'residual' })).toThrow(/varianceScale must be 'residual' or 'absolute'/);
    expect(() => timeTerms(survey.rows, { denseLimit: 0 })).toThrow(/denseLimit must be a positive integer/);
    expect(() => timeTerms(survey.rows, { constraint: { kind: 'reference', terms: [{ side: 'receiver' as 'shot', id: 'S1', value: 1 }] } })).toThrow(/side must be 'shot' or 'station'/);
  });

  it('timeTerms does not change its input rows', () => {
    const copy = structuredClone(survey.rows);
    timeTerms(survey.rows);
    expect(survey.rows).toEqual(copy);
  });
});
