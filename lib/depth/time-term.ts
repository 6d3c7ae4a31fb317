/**
 * Time-term method (ScheideggerWillmore1957; WillmoreBancroft1960; BerryWest1966): one least-
 * squares inversion of every head-wave pick on one refractor for a time term per shot (a_i), a time
 * term per station (b_j) and the refractor slowness s (METHODS §7):
 *
 * ```
 * t_ij = a_i + b_j + Δ_ij·s  [ − κ·Δ_ij³ ]  + e_ij,     weight 1/σ_ij²
 * ```
 *
 * with Δ_ij the shot–station distance (m). It assumes a refractor of one velocity under the whole
 * survey, time terms that belong to their shot or station (not to the ray's path), and picks that
 * are all of this refractor's head wave — pass only those. The refractor velocity is V = 1/s,
 * SE(V) = SE(s)/s². Not done here: a refractor slowness per cell of a grid (Hearn1984), the
 * extension for laterally varying refractors; one slowness (and optionally one gradient) is solved.
 *
 * **Velocity gradient (option `gradient`).** In a refractor whose velocity grows linearly with
 * depth below its top, v(z) = v₀ + g·z, the ray that leaves and returns to the top at distance X
 * is a circular arc and takes T = (2/g)·asinh(g·X/(2·v₀)). With asinh u = u − u³/6 + 3u⁵/40 − …,
 * ```
 * T = X/v₀ − g²·X³/(24·v₀³) + O(u⁵),   u = g·X/(2·v₀)
 * so  κ = g²·s³/24,   g = √(24·κ/s³),   s = 1/v₀
 * SE(g)² = (g/(2κ))²·Var κ + (3g/(2s))²·Var s − 2·(g/(2κ))·(3g/(2s))·Cov(κ, s)   (delta method)
 * ```
 * The neglected term is 9u²/20 of the cubic one (≈ 0.1 % at u = 0.05, 2 % at u = 0.2). κ ≤ 0
 * (no positive curvature) gives no gradient (`velocityGradient.ok = false`); when κ is under two
 * of its SEs the linearised SE(g) is unreliable and a note says so.
 *
 * **Weights.** Rows with a sigma are weighted 1/σ²; rows without take the median of the given
 * sigmas; when no row has one, every row has unit weight (σ = 1 s, nominal). By default
 * (`varianceScale: 'residual'`) the covariance is σ̂²·(GᵀWG)⁻¹ with σ̂² = χ²/dof (divided by c(k)
 * with rejection on, below), so sigmas act as relative weights; `'absolute'` takes them as true SEs
 * (σ̂² = 1) and needs a sigma on every row. dof = picks used − independent unknowns.
 *
 * **Constraint (non-uniqueness).** a_i + c, b_j − c fit equally on each connected component of
 * the shot–station graph, so each component needs one constraint, chosen by `constraint`:
 * - `equal-sums` (default): Σa = Σb over the component's terms — the minimum-norm gauge, the one
 *   LSQR from zero returns silently; here it is imposed explicitly;
 * - `reference`: one time term per component fixed to a given value (a borehole, a known shot);
 * - `co-located`: listed shot/station pairs share one unknown (every component needs a pair; more
 *   pairs than components add real constraints and change the fit).
 * The output states the constraint. Only a_i + b_j and differences of terms within one group are
 * free of it; single terms and their SEs hold under the stated convention only. Internally, for
 * `equal-sums` the exact route fixes one term per component and then moves the solution and its
 * covariance along the null vector n (+1 on shot terms, −1 on station terms):
 * x ← x − n·(nᵀx)/m, C ← P·C·Pᵀ with P = I − n·nᵀ/m (m terms in the component).
 *
 * **Solvers.** The normal matrix GᵀWG has a diagonal station block and a diagonal shot block, so
 * the exact (`dense`) route eliminates the larger side exactly and factorises the reduced system
 * of the smaller side (plus s, κ and shared terms) by a dense Cholesky; this gives x and the exact
 * covariance. `lsqr` runs LSQR (PaigeSaunders1982) on the sparse G built once (typed arrays; row
 * weights and column scaling — every column to unit norm, so the Δ column in metres stops
 * dominating — are reapplied per rejection round; `equal-sums` rows n·x = 0 appended), warm-started
 * between rounds; the rows make the system full-rank (a well-posed problem for LSQR's stopping tests,
 * and no drift along the null vector from a warm start), and the exact projection above then
 * removes what is left of Σa − Σb at LSQR's tolerance. `auto` takes `dense` for small systems
 * (reduced size ≤ `denseLimit`, 1500, and picks × reduced size ≤ DENSE_AUTO_WORK = 2·10⁷), else
 * `lsqr`; the exact covariance is then computed once, after the last round. LSQR's own variance estimate is a
 * Krylov lower bound (lib/stats/lsqr.ts): on a 60 × 400 survey, with scipy's lsqr on the same
 * system, its median was about 2 % of the exact variance; so SEs come from the exact route
 * whenever the reduced system fits (`covarianceMethod: 'exact'`), and only beyond that from LSQR's
 * estimate, flagged `'lsqr-lower-bound'` with a note.
 *
 * **Robust rejection.** After each solve, u = r/σ for every row; the robust scale is
 * 1.4826·median|u − median u| over all rows (floored at 1e-6, a millionth of a sigma, so exact data
 * reject nothing); rows with |u| > threshold·scale (threshold 3) are rejected and the fit redone;
 * rows may return (a pick flagged only because an outlier pulled its term comes back once the
 * outlier is out). The rounds stop when the rejected set repeats, or after `maxRounds` (10) solves
 * with a note. Cutting the tails of normal errors at ±k robust SD keeps only the fraction
 * c(k) = 1 − 2kφ(k)/(2Φ(k) − 1) of their variance (0.9733 at k = 3), so with rejection on,
 * σ̂² = χ²/(dof·c(k)) (a consistency factor, common practice for trimmed estimates; without it the
 * SEs come out 1.4 % small). The rule also rejects the 0.27 % of honest picks beyond 3 SD. A
 * rejection that would split a component or leave a term without picks is undone (rows restored
 * in order of increasing |u|, as a spanning forest), and so is one that would leave
 * no degree of freedom; notes say so (a kept row is noted if it is still beyond the threshold or
 * is the only pick of its term). Rejected rows are reported with their residuals.
 *
 * Output: shot and station terms in order of first appearance in the rows, each with its SE, pick
 * and rejection counts, component, Cov(term, s) and, for `co-located`, the partner sharing it.
 *
 * Edges (each sentence has a test):
 * - Exact data: the robust-scale floor rejects nothing, and the SEs come out at rounding level.
 * - Too few picks: fewer picks than independent unknowns + 1 throws a RangeError (no σ̂).
 * - Disconnected shot–station graph: one constraint per component; the slowness is shared; the
 *   components are listed; terms of different components are not comparable.
 * - One-sided geometry: when every pick's distance is a sum of a shot and a station part
 *   (Δ_ij = f_i + g_j, as when all stations lie on one side of all shots along a line), s trades
 *   off against the terms; with the slowness free this throws a RangeError suggesting
 *   `fixedVelocity` or reversed coverage. With `fixedVelocity` it solves.
 * - A singular reduced system in the exact route (e.g. a gradient the distances cannot resolve)
 *   throws, naming the unknown.
 * Misuse throws a RangeError naming the field and the fix: no rows; an empty shot or station id;
 * a distance not finite or negative; a time not finite; a sigma not positive and finite; an unknown
 * or duplicated reference, a component with no or two references; a pair naming an unknown id, a
 * shot or station in two pairs, a pair across components, a component with no pair; a fixed
 * velocity not positive; a threshold not positive; maxRounds not a positive integer; `'absolute'`
 * without a sigma on every row; `dense` forced beyond `denseLimit`.
 *
 * @example
 * // METHODS check case 7.1: shots at 0, 200, 400 km, stations at 50 … 380 km, Δ ≥ 120 km.
 * timeTerms(rows, { constraint: { kind: 'reference', terms: [{ side: 'shot', id: 'S1', value: 3.0 }] } });
 * // → velocity 8000 m/s; shots S1–S3 3.0, 3.4, 2.8 s; stations R1–R6 3.1, 3.3, 3.6, 3.2, 2.9, 3.0 s (listed
 * //   in order of first appearance: R2 … R6, then R1, which only shot S2 reaches)
 */
import type { Estimate } from './dipping-layer.js';
import { formatQuantity } from '../checks/wording.js';
import { chiSquareSurvival } from '../stats/chi-square.js';
import { lsqr, LSQR_STOP_REASONS, type LinearOperator, type LsqrStop } from '../stats/lsqr.js';
import { unionFind } from '../stats/union-find.js';

// ---------------------------------------------------------------- public types

/** One head-wave pick on this refractor. */
export interface TimeTermPick {
  readonly shot: string;
  readonly station: string;
  /** Δ_ij, m: shot–station distance (≥ 0). */
  readonly distance: number;
  /** s. */
  readonly time: number;
  /** Pick SE, s; null: the median of the given sigmas (module comment). */
  readonly sigma: number | null;
}

export interface TimeTermReference {
  readonly side: 'shot' | 'station';
  readonly id: string;
  /** s. */
  readonly value: number;
}

export interface CoLocatedPair {
  readonly shot: string;
  readonly station: string;
}

export type TimeTermConstraint =
  | { readonly kind: 'equal-sums' }
  | { readonly kind: 'reference'; readonly terms: readonly TimeTermReference[] }
  | { readonly kind: 'co-located'; readonly pairs: readonly CoLocatedPair[] };

export interface TimeTermRejectionOptions {
  /** Reject |u| > threshold·robust scale. Default 3. */
  readonly threshold?: number;
  /** Largest number of solves. Default 10. */
  readonly maxRounds?: number;
}

export interface TimeTermOptions {
  /** Default `{ kind: 'equal-sums' }`. */
  readonly constraint?: TimeTermConstraint;
  /** Refractor velocity held fixed, m/s (its SE is then 0). Default: solved for. */
  readonly fixedVelocity?: number;
  /** Add the −κ·Δ³ linear-gradient term. Default false. */
  readonly gradient?: boolean;
  /** Robust rejection; false turns it off. Default threshold 3, maxRounds 10. */
  readonly rejection?: TimeTermRejectionOptions | false;
  /** Default 'auto'. */
  readonly solver?: 'auto' | 'dense' | 'lsqr';
  /** Default 'residual' (σ̂² = χ²/dof). */
  readonly varianceScale?: 'residual' | 'absolute';
  /** LSQR atol = btol. Default 1e-10. */
  readonly lsqrTolerance?: number;
  /** LSQR iteration limit per solve. Default 4·(unknowns) + 100. */
  readonly lsqrIterationLimit?: number;
  /** Largest reduced system for the exact route and exact SEs. Default 1500. */
  readonly denseLimit?: number;
}

export interface TimeTermEstimate extends Estimate {
  readonly id: string;
  /** Picks used (after rejection). */
  readonly picks: number;
  readonly rejected: number;
  /** 1-based component of the shot–station graph. */
  readonly component: number;
  /** Fixed by a reference (SE 0). */
  readonly fixed: boolean;
  /** The station (for a shot) or shot (for a station) sharing this unknown, for `co-located`. */
  readonly sharedWith: string | null;
  /** Cov(term, s), s²/m, under the constraint; 0 with a fixed velocity; null when SEs are LSQR's estimate. */
  readonly slownessCovariance: number | null;
}

export type VelocityGradient =
  | ({ readonly ok: true } & Estimate)
  | { readonly ok: false; readonly code: 'curvature-not-positive'; readonly message: string };

export interface TimeTermGradient {
  /** κ, s/m³, with its SE. */
  readonly curvature: Estimate;
  /** g, 1/s ((m/s) per m). */
  readonly velocityGradient: VelocityGradient;
  /** Cov(κ, s). */
  readonly curvatureSlownessCovariance: number;
}

export interface RejectedPick {
  /** Index into the input rows. */
  readonly row: number;
  readonly shot: string;
  readonly station: string;
  /** t − model, s. */
  readonly residual: number;
  /** residual/σ. */
  readonly normalisedResidual: number;
}

export interface TimeTermComponent {
  /** 1-based. */
  readonly index: number;
  readonly shots: readonly string[];
  readonly stations: readonly string[];
  readonly picks: number;
}

export interface TimeTermNote {
  readonly code:
    | 'rejection-not-converged'
    | 'kept-to-connect'
    | 'rejection-stopped-degrees-of-freedom'
    | 'lsqr-not-converged'
    | 'lsqr-variance-lower-bound'
    | 'gradient-not-resolved'
    | 'several-components';
  readonly message: string;
}

export interface TimeTermResult {
  /** V = 1/s, m/s. */
  readonly velocity: Estimate;
  /** s, s/m. */
  readonly slowness: Estimate;
  readonly velocityFixed: boolean;
  readonly gradient: TimeTermGradient | null;
  readonly shotTerms: readonly TimeTermEstimate[];
  readonly stationTerms: readonly TimeTermEstimate[];
  /** t − model for every input row (rejected ones included), s. */
  readonly residuals: Float64Array;
  /** √(mean r²) over the picks used, s. */
  readonly residualRms: number;
  /** Σ r²/σ² over the picks used. */
  readonly chiSquare: number;
  readonly degreesOfFreedom: number;
  readonly reducedChiSquare: number;
  /** σ̂² applied to the covariance: χ²/dof, divided by c(threshold) with rejection on; 1 for 'absolute'. */
  readonly varianceFactor: number;
  readonly rejectedRows: readonly RejectedPick[];
  readonly rejectionRounds: number;
  readonly components: readonly TimeTermComponent[];
  readonly constraint: string;
  readonly weighting: string;
  readonly solver: 'dense' | 'lsqr';
  readonly solverText: string;
  /** LSQR iterations summed over the rounds (0 for the dense route). */
  readonly iterations: number;
  readonly covarianceMethod: 'exact' | 'lsqr-lower-bound';
  /** Terms + s + κ before the constraints. */
  readonly unknowns: number;
  /** Independent unknowns (unknowns − one per component, or fewer after sharing). */
  readonly rank: number;
  readonly notes: readonly TimeTermNote[];
  readonly references: readonly string[];
}

// ---------------------------------------------------------------- constants

export const DEFAULT_REJECTION_THRESHOLD = 3;
export const DEFAULT_REJECTION_ROUNDS = 10;
/** 1/Φ⁻¹(3/4): MAD → SD for normal errors (common practice). */
export const MAD_TO_SD = 1.4826;
/** Floor of the robust scale in units of σ: a millionth of a sigma, so exact data reject nothing. */
export const ROBUST_SCALE_FLOOR = 1e-6;
export const DEFAULT_DENSE_LIMIT = 1500;
/**
 * `auto` takes the exact route while picks × reduced size stays under this. A factorisation costs
 * about picks × reduced size multiply-adds (the Schur updates), an LSQR round picks × iterations;
 * at 400,000 picks × 201 (8·10⁷) the two routes took the same time here (≈ 0.7 s for three rounds,
 * warm), so beyond this bound LSQR is not slower and its cost does not grow with the reduced size.
 */
export const DENSE_AUTO_WORK = 2e7;
export const DEFAULT_LSQR_TOLERANCE = 1e-10;
/**
 * Distances count as a sum of shot and station parts when every cycle of the shot–station graph
 * closes to within this fraction of the largest distance (positions are rarely known to better than
 * a part per million; common practice).
 */
export const ONE_SIDED_RELATIVE_TOLERANCE = 1e-6;
/** A Cholesky pivot of the column-scaled normal matrix (unit diagonal) below this is singular. */
export const SINGULAR_PIVOT = 1e-12;

const CALLER = 'timeTerms';

// ---------------------------------------------------------------- problem setup

/** The survey as indexed arrays, shared by both routes. */
interface Problem {
  readonly rowCount: number;
  readonly shotIds: readonly string[];
  readonly stationIds: readonly string[];
  readonly rowShot: Int32Array;
  readonly rowStation: Int32Array;
  readonly distance: Float64Array;
  readonly time: Float64Array;
  readonly sigma: Float64Array;
  /** Unknown term ("unit") of each shot and station; co-located pairs share one. */
  readonly shotUnit: Int32Array;
  readonly stationUnit: Int32Array;
  readonly unitCount: number;
  /** +1 for a shot unit, −1 for a station unit (the null vector's entries), 0 for a shared one. */
  readonly unitSign: Float64Array;
  /** 0-based component of each unit. */
  readonly unitComponent: Int32Array;
  readonly componentCount: number;
  readonly slownessFree: boolean;
  readonly fixedSlowness: number;
  readonly gradient: boolean;
}

/** k-th smallest of values[0…length−1] by Hoare quickselect (median-of-three pivots); reorders `values`. */
function selectInPlace(values: Float64Array, k: number): number {
  let low = 0;
  let high = values.length - 1;
  while (high > low) {
    const middle = (low + high) >> 1;
    // Median of three as the pivot value.
    const a = values[low]!;
    const b = values[middle]!;
    const c = values[high]!;
    const pivot = a < b ? (b < c ? b : a < c ? c : a) : a < c ? a : b < c ? c : b;
    let left = low;
    let right = high;
    while (left <= right) {
      while (values[left]! < pivot) left += 1;
      while (values[right]! > pivot) right -= 1;
      if (left <= right) {
        const swap = values[left]!;
        values[left] = values[right]!;
        values[right] = swap;
        left += 1;
        right -= 1;
      }
    }
    if (k <= right) high = right;
    else if (k >= left) low = left;
    else return values[k]!;
  }
  return values[k]!;
}

/** Median of `values`, using `work` (same length) as scratch; `values` is left as it was. */
function median(values: Float64Array, work: Float64Array = new Float64Array(values.length)): number {
  work.set(values);
  const count = values.length;
  const middle = count >> 1;
  const upper = selectInPlace(work, middle);
  if (count % 2 === 1) return upper;
  // The largest of the lower half, which selectInPlace left below `middle`.
  let lower = Number.NEGATIVE_INFINITY;
  for (let index = 0; index < middle; index += 1) if (work[index]! > lower) lower = work[index]!;
  return 0.5 * (lower + upper);
}

function assertRow(row: TimeTermPick, index: number): void {
  const label = `${CALLER}: row ${index}`;
  if (typeof row.shot !== 'string' || row.shot.length === 0) throw new RangeError(`${label}: shot must be a non-empty id, got ${JSON.stringify(row.shot)}`);
  if (typeof row.station !== 'string' || row.station.length === 0) throw new RangeError(`${label}: station must be a non-empty id, got ${JSON.stringify(row.station)}`);
  if (!Number.isFinite(row.distance) || row.distance < 0) throw new RangeError(`${label} (shot ${row.shot}, station ${row.station}): distance must be a finite number of metres ≥ 0, got ${row.distance}`);
  if (!Number.isFinite(row.time)) throw new RangeError(`${label} (shot ${row.shot}, station ${row.station}): time must be a finite number of seconds, got ${row.time}`);
  if (row.sigma !== null && (typeof row.sigma !== 'number' || !Number.isFinite(row.sigma) || !(row.sigma > 0))) {
    throw new RangeError(`${label} (shot ${row.shot}, station ${row.station}): sigma must be a positive finite number of seconds or null (then the median sigma is used), got ${row.sigma}`);
  }
}

interface Weighting {
  readonly sigma: Float64Array;
  readonly text: string;
  readonly allGiven: boolean;
}

/** Sigmas for every row: `raw` holds NaN where a row has none (module comment: the rule). */
function fillSigmas(raw: Float64Array): Weighting {
  let givenCount = 0;
  for (let row = 0; row < raw.length; row += 1) if (!Number.isNaN(raw[row]!)) givenCount += 1;
  const sigma = new Float64Array(raw.length);
  if (givenCount === 0) {
    sigma.fill(1);
    return { sigma, text: 'unit weights: no pick has a sigma (σ = 1 s nominal); the covariance is scaled by the residual variance', allGiven: false };
  }
  const given = new Float64Array(givenCount);
  let cursor = 0;
  for (let row = 0; row < raw.length; row += 1) if (!Number.isNaN(raw[row]!)) given[cursor++] = raw[row]!;
  const fill = median(given);
  for (let row = 0; row < raw.length; row += 1) sigma[row] = Number.isNaN(raw[row]!) ? fill : raw[row]!;
  const missing = raw.length - givenCount;
  return {
    sigma,
    text:
      missing === 0
        ? `weights 1/σ² from the ${raw.length} pick sigmas`
        : `weights 1/σ² from the pick sigmas; ${missing} pick(s) without a sigma take the median sigma ${formatQuantity(fill * 1000, 'ms')}`,
    allGiven: missing === 0,
  };
}

// ---------------------------------------------------------------- one-sided geometry

/**
 * True when, on every component, some f exists with Δ_r = f(shot unit) + f(station unit) for every
 * row r used (the slowness column lies in the span of the term columns). Breadth-first over the unit
 * graph, carrying f = p + q·c with c the root's free value: bipartite components leave c free, a
 * cycle through a shared unit (q₁ + q₂ ≠ 0) fixes it.
 */
function distancesSeparable(problem: Problem, used: Uint8Array): boolean {
  const { unitCount, rowCount, rowShot, rowStation, shotUnit, stationUnit, distance } = problem;
  const adjacencyStart = new Int32Array(unitCount + 1);
  let maxDistance = 0;
  for (let row = 0; row < rowCount; row += 1) {
    if (used[row] === 0) continue;
    const shotSlot = shotUnit[rowShot[row]!]! + 1;
    const stationSlot = stationUnit[rowStation[row]!]! + 1;
    adjacencyStart[shotSlot] = adjacencyStart[shotSlot]! + 1;
    adjacencyStart[stationSlot] = adjacencyStart[stationSlot]! + 1;
    maxDistance = Math.max(maxDistance, distance[row]!);
  }
  for (let unit = 0; unit < unitCount; unit += 1) adjacencyStart[unit + 1] = adjacencyStart[unit + 1]! + adjacencyStart[unit]!;
  const adjacency = new Int32Array(adjacencyStart[unitCount]!);
  const fillPointer = adjacencyStart.slice(0, unitCount);
  for (let row = 0; row < rowCount; row += 1) {
    if (used[row] === 0) continue;
    adjacency[fillPointer[shotUnit[rowShot[row]!]!]!++] = row;
    adjacency[fillPointer[stationUnit[rowStation[row]!]!]!++] = row;
  }
  const tolerance = ONE_SIDED_RELATIVE_TOLERANCE * Math.max(maxDistance, Number.MIN_VALUE);
  const offset = new Float64Array(unitCount);
  const slope = new Float64Array(unitCount);
  const seen = new Uint8Array(unitCount);
  const queue = new Int32Array(unitCount);
  for (let root = 0; root < unitCount; root += 1) {
    if (seen[root] === 1 || adjacencyStart[root] === adjacencyStart[root + 1]) continue;
    seen[root] = 1;
    offset[root] = 0;
    slope[root] = 1;
    let rootValue = Number.NaN;
    let head = 0;
    let tail = 0;
    queue[tail++] = root;
    while (head < tail) {
      const unit = queue[head++]!;
      for (let entry = adjacencyStart[unit]!; entry < adjacencyStart[unit + 1]!; entry += 1) {
        const row = adjacency[entry]!;
        const first = shotUnit[rowShot[row]!]!;
        const second = stationUnit[rowStation[row]!]!;
        const other = first === unit ? second : first;
        if (seen[other] === 0) {
          seen[other] = 1;
          offset[other] = distance[row]! - offset[unit]!;
          slope[other] = -slope[unit]!;
          queue[tail++] = other;
          continue;
        }
        const constant = distance[row]! - offset[first]! - offset[second]!;
        const coefficient = slope[first]! + slope[second]!;
        if (coefficient === 0) {
          if (Math.abs(constant) > tolerance) return false;
        } else if (Number.isNaN(rootValue)) {
          rootValue = constant / coefficient;
        } else if (Math.abs(constant - coefficient * rootValue) > tolerance) {
          return false;
        }
      }
    }
  }
  return true;
}

// ---------------------------------------------------------------- design

/** The unknowns of one route and the fixed parts moved to the data side. */
interface Design {
  readonly columnCount: number;
  /** Column of each unit, −1 when fixed. */
  readonly unitColumn: Int32Array;
  /** Unit of each column (terms only; −1 for s and κ). */
  readonly columnUnit: Int32Array;
  readonly slownessColumn: number;
  readonly gradientColumn: number;
  /** Per row: first term column (−1 if fixed), its coefficient (2 when shot and station share it), second term column (−1). */
  readonly rowFirst: Int32Array;
  readonly rowFirstCoefficient: Float64Array;
  readonly rowSecond: Int32Array;
  /** t − fixed terms − fixed slowness·Δ. */
  readonly target: Float64Array;
  /** `equal-sums` rows for LSQR: per component the term columns and their signs. */
  readonly constraintRows: readonly { readonly columns: Int32Array; readonly signs: Float64Array }[];
}

function buildDesign(problem: Problem, fixedUnits: ReadonlyMap<number, number>, constraintRows: boolean): Design {
  const { unitCount, rowCount, rowShot, rowStation, shotUnit, stationUnit } = problem;
  const unitColumn = new Int32Array(unitCount).fill(-1);
  const fixedValue = new Float64Array(unitCount);
  for (const [unit, value] of fixedUnits) fixedValue[unit] = value;
  const columnUnitList: number[] = [];
  for (let unit = 0; unit < unitCount; unit += 1) {
    if (fixedUnits.has(unit)) continue;
    unitColumn[unit] = columnUnitList.length;
    columnUnitList.push(unit);
  }
  let columnCount = columnUnitList.length;
  const slownessColumn = problem.slownessFree ? columnCount++ : -1;
  const gradientColumn = problem.gradient ? columnCount++ : -1;
  const columnUnit = new Int32Array(columnCount).fill(-1);
  columnUnitList.forEach((unit, column) => {
    columnUnit[column] = unit;
  });
  const rowFirst = new Int32Array(rowCount);
  const rowFirstCoefficient = new Float64Array(rowCount);
  const rowSecond = new Int32Array(rowCount);
  const target = new Float64Array(rowCount);
  for (let row = 0; row < rowCount; row += 1) {
    const first = shotUnit[rowShot[row]!]!;
    const second = stationUnit[rowStation[row]!]!;
    let value = problem.time[row]!;
    if (!problem.slownessFree) value -= problem.fixedSlowness * problem.distance[row]!;
    value -= fixedValue[first]! + fixedValue[second]!;
    target[row] = value;
    if (first === second) {
      rowFirst[row] = unitColumn[first]!;
      rowFirstCoefficient[row] = 2;
      rowSecond[row] = -1;
    } else {
      rowFirst[row] = unitColumn[first]!;
      rowFirstCoefficient[row] = 1;
      rowSecond[row] = unitColumn[second]!;
    }
  }
  const rows: { columns: Int32Array; signs: Float64Array }[] = [];
  if (constraintRows) {
    for (let component = 0; component < problem.componentCount; component += 1) {
      const columns: number[] = [];
      const signs: number[] = [];
      for (let unit = 0; unit < unitCount; unit += 1) {
        if (problem.unitComponent[unit] !== component || unitColumn[unit]! < 0) continue;
        columns.push(unitColumn[unit]!);
        signs.push(problem.unitSign[unit]!);
      }
      rows.push({ columns: Int32Array.from(columns), signs: Float64Array.from(signs) });
    }
  }
  return { columnCount, unitColumn, columnUnit, slownessColumn, gradientColumn, rowFirst, rowFirstCoefficient, rowSecond, target, constraintRows: rows };
}

/** Column scales d_c = 1/‖column c‖ under the weights (so every scaled column has unit norm). */
function columnScales(problem: Problem, design: Design, weight: Float64Array): Float64Array {
  const squares = new Float64Array(design.columnCount);
  const { rowFirst, rowFirstCoefficient, rowSecond, slownessColumn, gradientColumn } = design;
  for (let row = 0; row < problem.rowCount; row += 1) {
    const rowWeight = weight[row]!;
    if (rowWeight === 0) continue;
    const first = rowFirst[row]!;
    if (first >= 0) squares[first] = squares[first]! + rowWeight * rowFirstCoefficient[row]! * rowFirstCoefficient[row]!;
    const second = rowSecond[row]!;
    if (second >= 0) squares[second] = squares[second]! + rowWeight;
    const distance = problem.distance[row]!;
    if (slownessColumn >= 0) squares[slownessColumn] = squares[slownessColumn]! + rowWeight * distance * distance;
    if (gradientColumn >= 0) {
      const cube = distance * distance * distance;
      squares[gradientColumn] = squares[gradientColumn]! + rowWeight * cube * cube;
    }
  }
  const scales = new Float64Array(design.columnCount);
  for (let column = 0; column < design.columnCount; column += 1) {
    const square = squares[column]!;
    if (!(square > 0)) {
      throw new RangeError(`${CALLER}: ${columnLabel(problem, design, column)} has no information (all its picks have zero weight or zero distance); remove it or add picks`);
    }
    scales[column] = 1 / Math.sqrt(square);
  }
  return scales;
}

function unitLabel(problem: Problem, unit: number): string {
  const shot = Array.prototype.indexOf.call(problem.shotUnit, unit) as number;
  const station = Array.prototype.indexOf.call(problem.stationUnit, unit) as number;
  if (shot >= 0 && station >= 0) return `the shared term of shot ${problem.shotIds[shot]} and station ${problem.stationIds[station]}`;
  if (shot >= 0) return `shot ${problem.shotIds[shot]}'s time term`;
  return `station ${problem.stationIds[station]}'s time term`;
}

function columnLabel(problem: Problem, design: Design, column: number): string {
  if (column === design.slownessColumn) return 'the refractor slowness';
  if (column === design.gradientColumn) return 'the gradient term κ';
  return unitLabel(problem, design.columnUnit[column]!);
}

// ---------------------------------------------------------------- exact route: block elimination

/** Which columns are eliminated (a diagonal block) and which are kept for the dense factorisation. */
interface BlockLayout {
  readonly eliminatedCount: number;
  /** Column → eliminated index or −1. */
  readonly eliminatedIndex: Int32Array;
  readonly keptCount: number;
  /** Column → kept index or −1. */
  readonly keptIndex: Int32Array;
  readonly keptColumns: Int32Array;
  readonly eliminatedColumns: Int32Array;
  /** Rows grouped by their eliminated column (CSR-like), and the rows with none. */
  readonly groupStart: Int32Array;
  readonly groupRows: Int32Array;
  readonly keptOnlyRows: Int32Array;
  /** Whether the eliminated column of a row is its first (shot) or second (station) term. */
  readonly eliminatedIsFirst: boolean;
  readonly eliminatedSide: 'shot' | 'station';
}

function blockLayout(problem: Problem, design: Design): BlockLayout {
  // Units of one side that are not shared: their columns never meet in a row.
  const shared = new Uint8Array(problem.unitCount);
  for (let unit = 0; unit < problem.unitCount; unit += 1) if (problem.unitSign[unit] === 0) shared[unit] = 1;
  const freeOf = (units: Int32Array): Set<number> => {
    const columns = new Set<number>();
    units.forEach((unit) => {
      const column = design.unitColumn[unit]!;
      if (column >= 0 && shared[unit] === 0) columns.add(column);
    });
    return columns;
  };
  const shotColumns = freeOf(problem.shotUnit);
  const stationColumns = freeOf(problem.stationUnit);
  const eliminateStations = stationColumns.size >= shotColumns.size;
  const eliminated = eliminateStations ? stationColumns : shotColumns;
  const eliminatedIndex = new Int32Array(design.columnCount).fill(-1);
  const keptIndex = new Int32Array(design.columnCount).fill(-1);
  const eliminatedColumns: number[] = [];
  const keptColumns: number[] = [];
  for (let column = 0; column < design.columnCount; column += 1) {
    if (eliminated.has(column)) {
      eliminatedIndex[column] = eliminatedColumns.length;
      eliminatedColumns.push(column);
    } else {
      keptIndex[column] = keptColumns.length;
      keptColumns.push(column);
    }
  }
  const eliminatedCount = eliminatedColumns.length;
  const groupStart = new Int32Array(eliminatedCount + 1);
  const rowGroup = new Int32Array(problem.rowCount);
  let keptOnly = 0;
  for (let row = 0; row < problem.rowCount; row += 1) {
    const column = eliminateStations ? design.rowSecond[row]! : design.rowFirst[row]!;
    const group = column >= 0 ? eliminatedIndex[column]! : -1;
    rowGroup[row] = group;
    if (group >= 0) groupStart[group + 1] = groupStart[group + 1]! + 1;
    else keptOnly += 1;
  }
  for (let group = 0; group < eliminatedCount; group += 1) groupStart[group + 1] = groupStart[group + 1]! + groupStart[group]!;
  const groupRows = new Int32Array(groupStart[eliminatedCount]!);
  const keptOnlyRows = new Int32Array(keptOnly);
  const pointer = groupStart.slice(0, eliminatedCount);
  let keptPointer = 0;
  for (let row = 0; row < problem.rowCount; row += 1) {
    const group = rowGroup[row]!;
    if (group >= 0) groupRows[pointer[group]!++] = row;
    else keptOnlyRows[keptPointer++] = row;
  }
  return {
    eliminatedCount,
    eliminatedIndex,
    keptCount: keptColumns.length,
    keptIndex,
    keptColumns: Int32Array.from(keptColumns),
    eliminatedColumns: Int32Array.from(eliminatedColumns),
    groupStart,
    groupRows,
    keptOnlyRows,
    eliminatedIsFirst: !eliminateStations,
    eliminatedSide: eliminateStations ? 'station' : 'shot',
  };
}

/** The factorised normal equations of the scaled system M = (W^½GD)ᵀ(W^½GD). */
interface BlockFactor {
  readonly layout: BlockLayout;
  readonly weight: Float64Array;
  readonly scales: Float64Array;
  /** Diagonal of the eliminated block. */
  readonly diagonal: Float64Array;
  /** Lower Cholesky factor of the reduced (Schur) matrix, row-major keptCount² (lower triangle). */
  readonly cholesky: Float64Array;
  /** Scaled solution y (x = D·y). */
  readonly scaledSolution: Float64Array;
}

/**
 * Scratch for one coupling row b_e: its values scattered over the kept indices (`dense`, zero
 * between uses), the distinct kept indices touched (`touched`, ascending after `couplingRow`) and
 * their marks.
 */
interface Scratch {
  readonly dense: Float64Array;
  readonly touched: Int32Array;
  readonly marked: Uint8Array;
}

function scratchFor(layout: BlockLayout): Scratch {
  return { dense: new Float64Array(layout.keptCount), touched: new Int32Array(layout.keptCount), marked: new Uint8Array(layout.keptCount) };
}

/**
 * Coupling row b_e of eliminated group e, b_e[k] = Σ_rows w·G_re·d_e·G_rk·d_k over the kept
 * columns k, scattered into scratch.dense; returns the number of distinct kept indices, listed
 * ascending in scratch.touched. Call `clearScratch` after use.
 */
function couplingRow(problem: Problem, design: Design, layout: BlockLayout, scales: Float64Array, weight: Float64Array, group: number, scratch: Scratch): number {
  const { dense, touched, marked } = scratch;
  const { keptIndex, groupStart, groupRows, eliminatedIsFirst } = layout;
  const { rowFirst, rowFirstCoefficient, rowSecond, slownessColumn, gradientColumn } = design;
  const distance = problem.distance;
  const eliminatedScale = scales[layout.eliminatedColumns[group]!]!;
  const slownessKept = slownessColumn >= 0 ? keptIndex[slownessColumn]! : -1;
  const gradientKept = gradientColumn >= 0 ? keptIndex[gradientColumn]! : -1;
  const slownessScale = slownessColumn >= 0 ? scales[slownessColumn]! : 0;
  const gradientScale = gradientColumn >= 0 ? scales[gradientColumn]! : 0;
  let count = 0;
  let slownessSum = 0;
  let gradientSum = 0;
  for (let pointer = groupStart[group]!; pointer < groupStart[group + 1]!; pointer += 1) {
    const row = groupRows[pointer]!;
    const rowWeight = weight[row]!;
    if (rowWeight === 0) continue;
    const factor = rowWeight * eliminatedScale;
    // The row's other term column (the eliminated one is never shared, so its coefficient is 1).
    const other = eliminatedIsFirst ? rowSecond[row]! : rowFirst[row]!;
    if (other >= 0) {
      const kept = keptIndex[other]!;
      const coefficient = eliminatedIsFirst ? 1 : rowFirstCoefficient[row]!;
      if (marked[kept] === 0) {
        marked[kept] = 1;
        touched[count++] = kept;
      }
      dense[kept] = dense[kept]! + factor * coefficient * scales[other]!;
    }
    const rowDistance = distance[row]!;
    slownessSum += factor * rowDistance;
    gradientSum -= factor * rowDistance * rowDistance * rowDistance;
  }
  if (slownessKept >= 0) {
    if (marked[slownessKept] === 0) {
      marked[slownessKept] = 1;
      touched[count++] = slownessKept;
    }
    dense[slownessKept] = dense[slownessKept]! + slownessSum * slownessScale;
  }
  if (gradientKept >= 0) {
    if (marked[gradientKept] === 0) {
      marked[gradientKept] = 1;
      touched[count++] = gradientKept;
    }
    dense[gradientKept] = dense[gradientKept]! + gradientSum * gradientScale;
  }
  touched.subarray(0, count).sort();
  return count;
}

function clearScratch(scratch: Scratch, count: number): void {
  for (let entry = 0; entry < count; entry += 1) {
    const kept = scratch.touched[entry]!;
    scratch.dense[kept] = 0;
    scratch.marked[kept] = 0;
  }
}

/**
 * Solve M·u = z for the scaled normal matrix through its factor: u_K = S⁻¹(z_K − Σ_e b_e z_e/D_e),
 * u_e = (z_e − b_eᵀu_K)/D_e. `rightSide` is indexed by column; the result too.
 */
function blockSolve(problem: Problem, design: Design, factor: BlockFactor, rightSide: Float64Array, scratch: Scratch): Float64Array {
  const { layout, scales, weight, diagonal } = factor;
  const kept = new Float64Array(layout.keptCount);
  for (let index = 0; index < layout.keptCount; index += 1) kept[index] = rightSide[layout.keptColumns[index]!]!;
  for (let group = 0; group < layout.eliminatedCount; group += 1) {
    const value = rightSide[layout.eliminatedColumns[group]!]!;
    if (value === 0) continue;
    const count = couplingRow(problem, design, layout, scales, weight, group, scratch);
    const ratio = value / diagonal[group]!;
    for (let entry = 0; entry < count; entry += 1) {
      const index = scratch.touched[entry]!;
      kept[index] = kept[index]! - scratch.dense[index]! * ratio;
    }
    clearScratch(scratch, count);
  }
  choleskySolveInPlace(factor.cholesky, layout.keptCount, kept);
  const solution = new Float64Array(design.columnCount);
  for (let index = 0; index < layout.keptCount; index += 1) solution[layout.keptColumns[index]!] = kept[index]!;
  for (let group = 0; group < layout.eliminatedCount; group += 1) {
    const count = couplingRow(problem, design, layout, scales, weight, group, scratch);
    let sum = rightSide[layout.eliminatedColumns[group]!]!;
    for (let entry = 0; entry < count; entry += 1) {
      const index = scratch.touched[entry]!;
      sum -= scratch.dense[index]! * kept[index]!;
    }
    clearScratch(scratch, count);
    solution[layout.eliminatedColumns[group]!] = sum / diagonal[group]!;
  }
  return solution;
}

function choleskySolveInPlace(lower: Float64Array, size: number, vector: Float64Array): void {
  for (let row = 0; row < size; row += 1) {
    let sum = vector[row]!;
    const offset = row * size;
    for (let k = 0; k < row; k += 1) sum -= lower[offset + k]! * vector[k]!;
    vector[row] = sum / lower[offset + row]!;
  }
  for (let row = size - 1; row >= 0; row -= 1) {
    let sum = vector[row]!;
    for (let k = row + 1; k < size; k += 1) sum -= lower[k * size + row]! * vector[k]!;
    vector[row] = sum / lower[row * size + row]!;
  }
}

/** Add w·(row's kept entries)(…)ᵀ to the lower triangle of `reduced` and w·target·(entries) to `rightSide`. */
function addKeptRow(problem: Problem, design: Design, layout: BlockLayout, scales: Float64Array, row: number, rowWeight: number, reduced: Float64Array, rightSide: Float64Array, index: Int32Array, value: Float64Array): void {
  const size = layout.keptCount;
  let count = 0;
  const first = design.rowFirst[row]!;
  if (first >= 0 && layout.keptIndex[first]! >= 0) {
    index[count] = layout.keptIndex[first]!;
    value[count++] = design.rowFirstCoefficient[row]! * scales[first]!;
  }
  const second = design.rowSecond[row]!;
  if (second >= 0 && layout.keptIndex[second]! >= 0) {
    index[count] = layout.keptIndex[second]!;
    value[count++] = scales[second]!;
  }
  const distance = problem.distance[row]!;
  if (design.slownessColumn >= 0) {
    index[count] = layout.keptIndex[design.slownessColumn]!;
    value[count++] = distance * scales[design.slownessColumn]!;
  }
  if (design.gradientColumn >= 0) {
    index[count] = layout.keptIndex[design.gradientColumn]!;
    value[count++] = -distance * distance * distance * scales[design.gradientColumn]!;
  }
  const target = design.target[row]!;
  for (let p = 0; p < count; p += 1) {
    const weighted = rowWeight * value[p]!;
    const indexP = index[p]!;
    for (let q = 0; q < count; q += 1) {
      const indexQ = index[q]!;
      if (indexQ > indexP) continue;
      reduced[indexP * size + indexQ] = reduced[indexP * size + indexQ]! + weighted * value[q]!;
    }
    const column = layout.keptColumns[indexP]!;
    rightSide[column] = rightSide[column]! + weighted * target;
  }
}

/** Factorise the scaled normal equations and solve them (one rejection round of the exact route). */
function blockFactorise(problem: Problem, design: Design, layout: BlockLayout, weight: Float64Array, scratch: Scratch): BlockFactor {
  const scales = columnScales(problem, design, weight);
  const size = layout.keptCount;
  const reduced = new Float64Array(size * size);
  const rightSide = new Float64Array(design.columnCount);
  const entryIndex = new Int32Array(4);
  const entryValue = new Float64Array(4);
  // Kept–kept products of every row (lower triangle), and the right side Aᵀb.
  for (let row = 0; row < problem.rowCount; row += 1) {
    const rowWeight = weight[row]!;
    if (rowWeight === 0) continue;
    addKeptRow(problem, design, layout, scales, row, rowWeight, reduced, rightSide, entryIndex, entryValue);
    const eliminated = layout.eliminatedIsFirst ? design.rowFirst[row]! : design.rowSecond[row]!;
    if (eliminated >= 0 && layout.eliminatedIndex[eliminated]! >= 0) rightSide[eliminated] = rightSide[eliminated]! + rowWeight * scales[eliminated]! * design.target[row]!;
  }
  // Eliminated block: D_e, and the Schur complement S = M_KK − Σ_e b_e b_eᵀ / D_e (lower triangle).
  const diagonal = new Float64Array(layout.eliminatedCount);
  const { dense, touched } = scratch;
  for (let group = 0; group < layout.eliminatedCount; group += 1) {
    const column = layout.eliminatedColumns[group]!;
    const scale = scales[column]!;
    let sum = 0;
    for (let pointer = layout.groupStart[group]!; pointer < layout.groupStart[group + 1]!; pointer += 1) sum += weight[layout.groupRows[pointer]!]! * scale * scale;
    diagonal[group] = sum;
    if (!(sum > 0)) throw new RangeError(`${CALLER}: ${columnLabel(problem, design, column)} has no picks left; add picks or remove it`);
    const count = couplingRow(problem, design, layout, scales, weight, group, scratch);
    const inverse = 1 / sum;
    if (count === size) {
      // Every kept unknown touched (full coverage): contiguous rows, no indirection.
      for (let p = 0; p < size; p += 1) {
        const scaled = dense[p]! * inverse;
        const offset = p * size;
        for (let q = 0; q <= p; q += 1) reduced[offset + q] = reduced[offset + q]! - scaled * dense[q]!;
      }
      clearScratch(scratch, count);
      continue;
    }
    for (let p = 0; p < count; p += 1) {
      const indexP = touched[p]!;
      const scaled = dense[indexP]! * inverse;
      const offset = indexP * size;
      for (let q = 0; q <= p; q += 1) {
        const indexQ = touched[q]!;
        reduced[offset + indexQ] = reduced[offset + indexQ]! - scaled * dense[indexQ]!;
      }
    }
    clearScratch(scratch, count);
  }
  choleskyInPlace(reduced, size, (index) => columnLabel(problem, design, layout.keptColumns[index]!));
  const factor: BlockFactor = { layout, weight, scales, diagonal, cholesky: reduced, scaledSolution: new Float64Array(0) };
  return { ...factor, scaledSolution: blockSolve(problem, design, factor, rightSide, scratch) };
}

/** In-place lower Cholesky factor (row-major, reads and writes the lower triangle); a pivot below SINGULAR_PIVOT throws. */
function choleskyInPlace(matrix: Float64Array, size: number, label: (index: number) => string): void {
  for (let column = 0; column < size; column += 1) {
    const columnOffset = column * size;
    let pivot = matrix[columnOffset + column]!;
    for (let k = 0; k < column; k += 1) pivot -= matrix[columnOffset + k]! * matrix[columnOffset + k]!;
    if (!(pivot > SINGULAR_PIVOT)) {
      throw new RangeError(
        `${CALLER}: the normal equations are singular at ${label(column)} (pivot ${pivot.toExponential(2)} of a unit-diagonal matrix): the picks cannot separate it from the other unknowns — fix the velocity, drop the gradient term, or add picks with other distances`,
      );
    }
    const root = Math.sqrt(pivot);
    matrix[columnOffset + column] = root;
    for (let row = column + 1; row < size; row += 1) {
      const rowOffset = row * size;
      let sum = matrix[rowOffset + column]!;
      for (let k = 0; k < column; k += 1) sum -= matrix[rowOffset + k]! * matrix[columnOffset + k]!;
      matrix[rowOffset + column] = sum / root;
    }
  }
}

/** S⁻¹ from its lower Cholesky factor, full row-major. */
function choleskyInverse(lower: Float64Array, size: number): Float64Array {
  // L⁻¹ (lower), then S⁻¹ = L⁻ᵀ·L⁻¹.
  const inverseLower = new Float64Array(size * size);
  for (let column = 0; column < size; column += 1) {
    inverseLower[column * size + column] = 1 / lower[column * size + column]!;
    for (let row = column + 1; row < size; row += 1) {
      let sum = 0;
      const rowOffset = row * size;
      for (let k = column; k < row; k += 1) sum -= lower[rowOffset + k]! * inverseLower[k * size + column]!;
      inverseLower[rowOffset + column] = sum / lower[rowOffset + row]!;
    }
  }
  const inverse = new Float64Array(size * size);
  for (let row = 0; row < size; row += 1) {
    for (let column = 0; column <= row; column += 1) {
      let sum = 0;
      for (let k = row; k < size; k += 1) sum += inverseLower[k * size + row]! * inverseLower[k * size + column]!;
      inverse[row * size + column] = sum;
      inverse[column * size + row] = sum;
    }
  }
  return inverse;
}

/** Unscaled covariance pieces (before σ̂²): the diagonal, and the column of s and of κ. */
interface CovariancePieces {
  readonly diagonal: Float64Array;
  /** Cov(·, s) per column, or null with a fixed slowness. */
  readonly slownessColumn: Float64Array | null;
  readonly gradientColumn: Float64Array | null;
}

/**
 * diag(M⁻¹) and the columns of s and κ, unscaled: kept columns from S⁻¹; an eliminated column e
 * has Var = 1/D_e + b_eᵀS⁻¹b_e/D_e² and Cov(e, k) = −(b_eᵀS⁻¹)_k/D_e.
 */
function exactCovariance(problem: Problem, design: Design, factor: BlockFactor, scratch: Scratch): CovariancePieces {
  const { layout, scales, weight, diagonal } = factor;
  const size = layout.keptCount;
  const inverse = choleskyInverse(factor.cholesky, size);
  const variance = new Float64Array(design.columnCount);
  for (let index = 0; index < size; index += 1) variance[layout.keptColumns[index]!] = inverse[index * size + index]!;
  const parameterColumn = (column: number): Float64Array | null => {
    if (column < 0) return null;
    const kept = layout.keptIndex[column]!;
    const out = new Float64Array(design.columnCount);
    for (let index = 0; index < size; index += 1) out[layout.keptColumns[index]!] = inverse[index * size + kept]!;
    return out;
  };
  const slownessColumn = parameterColumn(design.slownessColumn);
  const gradientColumn = parameterColumn(design.gradientColumn);
  const slownessKept = design.slownessColumn >= 0 ? layout.keptIndex[design.slownessColumn]! : -1;
  const gradientKept = design.gradientColumn >= 0 ? layout.keptIndex[design.gradientColumn]! : -1;
  const { dense, touched } = scratch;
  for (let group = 0; group < layout.eliminatedCount; group += 1) {
    const count = couplingRow(problem, design, layout, scales, weight, group, scratch);
    let quadratic = 0;
    let towardsSlowness = 0;
    let towardsGradient = 0;
    for (let p = 0; p < count; p += 1) {
      const indexP = touched[p]!;
      const offset = indexP * size;
      const value = dense[indexP]!;
      // Symmetric: the diagonal once, the lower triangle twice.
      let sum = 0.5 * inverse[offset + indexP]! * value;
      if (count === size) {
        for (let q = 0; q < p; q += 1) sum += inverse[offset + q]! * dense[q]!;
      } else {
        for (let q = 0; q < p; q += 1) {
          const indexQ = touched[q]!;
          sum += inverse[offset + indexQ]! * dense[indexQ]!;
        }
      }
      quadratic += 2 * value * sum;
      if (slownessKept >= 0) towardsSlowness += value * inverse[offset + slownessKept]!;
      if (gradientKept >= 0) towardsGradient += value * inverse[offset + gradientKept]!;
    }
    clearScratch(scratch, count);
    const inverseDiagonal = 1 / diagonal[group]!;
    const column = layout.eliminatedColumns[group]!;
    variance[column] = inverseDiagonal + quadratic * inverseDiagonal * inverseDiagonal;
    if (slownessColumn !== null) slownessColumn[column] = -towardsSlowness * inverseDiagonal;
    if (gradientColumn !== null) gradientColumn[column] = -towardsGradient * inverseDiagonal;
  }
  // Unscale: Cov(x) = D·M⁻¹·D.
  for (let column = 0; column < design.columnCount; column += 1) {
    const scale = scales[column]!;
    variance[column] = variance[column]! * scale * scale;
    if (slownessColumn !== null) slownessColumn[column] = slownessColumn[column]! * scale * scales[design.slownessColumn]!;
    if (gradientColumn !== null) gradientColumn[column] = gradientColumn[column]! * scale * scales[design.gradientColumn]!;
  }
  return { diagonal: variance, slownessColumn, gradientColumn };
}

// ---------------------------------------------------------------- LSQR route

interface LsqrSystem {
  readonly operator: LinearOperator;
  readonly rightSide: Float64Array;
  readonly scales: Float64Array;
}

/** The column-scaled, row-weighted operator of G (built arrays reused; coefficients refreshed per round). */
function lsqrSystem(problem: Problem, design: Design, weight: Float64Array, coefficients: { first: Float64Array; second: Float64Array; slowness: Float64Array; gradient: Float64Array }): LsqrSystem {
  const scales = columnScales(problem, design, weight);
  const { rowCount, distance } = problem;
  const { rowFirst, rowSecond, rowFirstCoefficient, slownessColumn, gradientColumn, target } = design;
  const rightSide = new Float64Array(rowCount + design.constraintRows.length);
  const slownessScale = slownessColumn >= 0 ? scales[slownessColumn]! : 0;
  const gradientScale = gradientColumn >= 0 ? scales[gradientColumn]! : 0;
  for (let row = 0; row < rowCount; row += 1) {
    const root = Math.sqrt(weight[row]!);
    const first = rowFirst[row]!;
    const second = rowSecond[row]!;
    const rowDistance = distance[row]!;
    coefficients.first[row] = first >= 0 ? root * rowFirstCoefficient[row]! * scales[first]! : 0;
    coefficients.second[row] = second >= 0 ? root * scales[second]! : 0;
    coefficients.slowness[row] = root * rowDistance * slownessScale;
    coefficients.gradient[row] = -root * rowDistance * rowDistance * rowDistance * gradientScale;
    rightSide[row] = root * target[row]!;
  }
  // Constraint rows n·x = 0, each scaled to unit norm in the scaled unknowns.
  const constraintValues = design.constraintRows.map(({ columns, signs }) => {
    const values = new Float64Array(columns.length);
    let square = 0;
    columns.forEach((column, index) => {
      values[index] = signs[index]! * scales[column]!;
      square += values[index]! * values[index]!;
    });
    const normalise = 1 / Math.sqrt(square);
    for (let index = 0; index < values.length; index += 1) values[index] = values[index]! * normalise;
    return values;
  });
  const hasSlowness = slownessColumn >= 0;
  const hasGradient = gradientColumn >= 0;
  const { first: firstCoefficient, second: secondCoefficient, slowness: slownessCoefficient, gradient: gradientCoefficient } = coefficients;
  const operator: LinearOperator = {
    rows: rowCount + design.constraintRows.length,
    columns: design.columnCount,
    multiplyAdd(input, output) {
      const slowness = hasSlowness ? input[slownessColumn]! : 0;
      const gradient = hasGradient ? input[gradientColumn]! : 0;
      for (let row = 0; row < rowCount; row += 1) {
        const first = rowFirst[row]!;
        const second = rowSecond[row]!;
        let sum = slownessCoefficient[row]! * slowness + gradientCoefficient[row]! * gradient;
        if (first >= 0) sum += firstCoefficient[row]! * input[first]!;
        if (second >= 0) sum += secondCoefficient[row]! * input[second]!;
        output[row] = output[row]! + sum;
      }
      design.constraintRows.forEach(({ columns }, index) => {
        const values = constraintValues[index]!;
        let sum = 0;
        for (let entry = 0; entry < columns.length; entry += 1) sum += values[entry]! * input[columns[entry]!]!;
        output[rowCount + index] = output[rowCount + index]! + sum;
      });
    },
    multiplyTransposeAdd(input, output) {
      let slowness = 0;
      let gradient = 0;
      for (let row = 0; row < rowCount; row += 1) {
        const value = input[row]!;
        const first = rowFirst[row]!;
        const second = rowSecond[row]!;
        if (first >= 0) output[first] = output[first]! + firstCoefficient[row]! * value;
        if (second >= 0) output[second] = output[second]! + secondCoefficient[row]! * value;
        slowness += slownessCoefficient[row]! * value;
        gradient += gradientCoefficient[row]! * value;
      }
      if (hasSlowness) output[slownessColumn] = output[slownessColumn]! + slowness;
      if (hasGradient) output[gradientColumn] = output[gradientColumn]! + gradient;
      design.constraintRows.forEach(({ columns }, index) => {
        const values = constraintValues[index]!;
        const value = input[rowCount + index]!;
        for (let entry = 0; entry < columns.length; entry += 1) output[columns[entry]!] = output[columns[entry]!]! + values[entry]! * value;
      });
    },
  };
  return { operator, rightSide, scales };
}

// ---------------------------------------------------------------- helpers on solutions

/** Full unknown vector per unit (fixed units at their value) plus s and κ. */
interface Solution {
  readonly unitValue: Float64Array;
  readonly slowness: number;
  readonly curvature: number;
}

function solutionOf(problem: Problem, design: Design, columnValues: Float64Array, fixedUnits: ReadonlyMap<number, number>): Solution {
  const unitValue = new Float64Array(problem.unitCount);
  for (let unit = 0; unit < problem.unitCount; unit += 1) {
    const column = design.unitColumn[unit]!;
    unitValue[unit] = column >= 0 ? columnValues[column]! : (fixedUnits.get(unit) ?? 0);
  }
  return {
    unitValue,
    slowness: design.slownessColumn >= 0 ? columnValues[design.slownessColumn]! : problem.fixedSlowness,
    curvature: design.gradientColumn >= 0 ? columnValues[design.gradientColumn]! : 0,
  };
}

function residualsOf(problem: Problem, solution: Solution, out: Float64Array): void {
  const { unitValue, slowness, curvature } = solution;
  for (let row = 0; row < problem.rowCount; row += 1) {
    const distance = problem.distance[row]!;
    const model =
      unitValue[problem.shotUnit[problem.rowShot[row]!]!]! +
      unitValue[problem.stationUnit[problem.rowStation[row]!]!]! +
      slowness * distance -
      curvature * distance * distance * distance;
    out[row] = problem.time[row]! - model;
  }
}

/** Move each component's terms along its null vector so that Σa = Σb (x ← x − n·(nᵀx)/m). */
function projectEqualSums(problem: Problem, unitValue: Float64Array): void {
  const sums = new Float64Array(problem.componentCount);
  const counts = new Float64Array(problem.componentCount);
  for (let unit = 0; unit < problem.unitCount; unit += 1) {
    const component = problem.unitComponent[unit]!;
    sums[component] = sums[component]! + problem.unitSign[unit]! * unitValue[unit]!;
    counts[component] = counts[component]! + 1;
  }
  for (let unit = 0; unit < problem.unitCount; unit += 1) {
    const component = problem.unitComponent[unit]!;
    unitValue[unit] = unitValue[unit]! - (problem.unitSign[unit]! * sums[component]!) / counts[component]!;
  }
}

// ---------------------------------------------------------------- validation of options

interface Setup {
  readonly problem: Problem;
  readonly weighting: Weighting;
  /** User references (unit → value). */
  readonly references: ReadonlyMap<number, number>;
  readonly constraintText: string;
  readonly components: readonly TimeTermComponent[];
}

function setUp(rows: readonly TimeTermPick[], options: TimeTermOptions): Setup {
  if (rows.length === 0) throw new RangeError(`${CALLER}: no picks given; pass the head-wave picks of one refractor, one row per shot–station pair`);
  const constraint = options.constraint ?? { kind: 'equal-sums' as const };
  if (!['equal-sums', 'reference', 'co-located'].includes(constraint.kind)) {
    throw new RangeError(`${CALLER}: options.constraint.kind must be 'equal-sums', 'reference' or 'co-located', got ${JSON.stringify((constraint as { kind: unknown }).kind)}`);
  }
  if (options.fixedVelocity !== undefined && (!Number.isFinite(options.fixedVelocity) || !(options.fixedVelocity > 0))) {
    throw new RangeError(`${CALLER}: options.fixedVelocity must be a positive finite velocity in m/s, got ${options.fixedVelocity}; omit it to solve for the velocity`);
  }
  const shotIndex = new Map<string, number>();
  const stationIndex = new Map<string, number>();
  const rowShot = new Int32Array(rows.length);
  const rowStation = new Int32Array(rows.length);
  const distance = new Float64Array(rows.length);
  const time = new Float64Array(rows.length);
  const rawSigma = new Float64Array(rows.length);
  for (let index = 0; index < rows.length; index += 1) {
    const row = rows[index]!;
    assertRow(row, index);
    let shot = shotIndex.get(row.shot);
    if (shot === undefined) {
      shot = shotIndex.size;
      shotIndex.set(row.shot, shot);
    }
    let station = stationIndex.get(row.station);
    if (station === undefined) {
      station = stationIndex.size;
      stationIndex.set(row.station, station);
    }
    rowShot[index] = shot;
    rowStation[index] = station;
    distance[index] = row.distance;
    time[index] = row.time;
    rawSigma[index] = row.sigma ?? Number.NaN;
  }
  const shotIds = [...shotIndex.keys()];
  const stationIds = [...stationIndex.keys()];
  const shotCount = shotIds.length;
  const stationCount = stationIds.length;

  // Components of the shot–station graph (nodes: shots 0…S−1, stations S…S+R−1).
  const graph = unionFind(shotCount + stationCount);
  for (let row = 0; row < rows.length; row += 1) graph.union(rowShot[row]!, shotCount + rowStation[row]!);
  const rootComponent = new Map<number, number>();
  const nodeComponent = new Int32Array(shotCount + stationCount);
  for (let node = 0; node < shotCount + stationCount; node += 1) {
    const root = graph.find(node);
    if (!rootComponent.has(root)) rootComponent.set(root, rootComponent.size);
    nodeComponent[node] = rootComponent.get(root)!;
  }
  const componentCount = rootComponent.size;
  const componentPicks = new Array<number>(componentCount).fill(0);
  for (let row = 0; row < rows.length; row += 1) {
    const component = nodeComponent[rowShot[row]!]!;
    componentPicks[component] = componentPicks[component]! + 1;
  }
  const components: TimeTermComponent[] = Array.from({ length: componentCount }, (_, component) => ({
    index: component + 1,
    shots: shotIds.filter((_, shot) => nodeComponent[shot] === component),
    stations: stationIds.filter((_, station) => nodeComponent[shotCount + station] === component),
    picks: componentPicks[component]!,
  }));
  const describeComponent = (component: number): string => {
    const { shots, stations } = components[component]!;
    const list = (ids: readonly string[]): string => (ids.length <= 4 ? ids.join(', ') : `${ids.slice(0, 3).join(', ')} … (${ids.length})`);
    return `component ${component + 1} (shots ${list(shots)}; stations ${list(stations)})`;
  };

  // Units: one per shot and station, shared for co-located pairs.
  const shotUnit = new Int32Array(shotCount);
  const stationUnit = new Int32Array(stationCount).fill(-1);
  for (let shot = 0; shot < shotCount; shot += 1) shotUnit[shot] = shot;
  const sharedStation = new Map<number, number>(); // station → shot
  let constraintText: string;
  const references = new Map<number, number>();
  if (constraint.kind === 'co-located') {
    if (constraint.pairs.length === 0) throw new RangeError(`${CALLER}: options.constraint.pairs is empty; list at least one co-located shot/station pair per component`);
    const pairedShots = new Set<number>();
    constraint.pairs.forEach((pair, index) => {
      const shot = shotIndex.get(pair.shot);
      const station = stationIndex.get(pair.station);
      if (shot === undefined) throw new RangeError(`${CALLER}: options.constraint.pairs[${index}] names shot ${JSON.stringify(pair.shot)}, which has no pick; use a shot id of the rows`);
      if (station === undefined) throw new RangeError(`${CALLER}: options.constraint.pairs[${index}] names station ${JSON.stringify(pair.station)}, which has no pick; use a station id of the rows`);
      if (pairedShots.has(shot) || sharedStation.has(station)) {
        throw new RangeError(`${CALLER}: options.constraint.pairs[${index}]: shot ${pair.shot} or station ${pair.station} is already in another pair; each shot and station can share its term with one partner only`);
      }
      if (nodeComponent[shot] !== nodeComponent[shotCount + station]) {
        throw new RangeError(
          `${CALLER}: options.constraint.pairs[${index}]: shot ${pair.shot} lies in ${describeComponent(nodeComponent[shot]!)} but station ${pair.station} in ${describeComponent(nodeComponent[shotCount + station]!)}; a pair must share a component — pick a pair in one component or join them with picks`,
        );
      }
      pairedShots.add(shot);
      sharedStation.set(station, shot);
    });
    for (let component = 0; component < componentCount; component += 1) {
      const hasPair = [...pairedShots].some((shot) => nodeComponent[shot] === component);
      if (!hasPair) throw new RangeError(`${CALLER}: ${describeComponent(component)} has no co-located pair, so its terms are not unique; list a pair in it or use another constraint`);
    }
    constraintText = `co-located shots and stations share one time term: ${constraint.pairs.map((pair) => `shot ${pair.shot} = station ${pair.station}`).join('; ')} (${constraint.pairs.length} pair(s) over ${componentCount} component(s))`;
  } else if (constraint.kind === 'reference') {
    constraintText = '';
  } else {
    constraintText =
      `Σ shot terms = Σ station terms in each of the ${componentCount} component(s) of the shot–station graph (the minimum-norm convention); ` +
      'single time terms and their SEs hold under this convention only — a_i + b_j and differences within one group do not depend on it';
  }
  let unitCount = shotCount;
  for (let station = 0; station < stationCount; station += 1) {
    const partner = sharedStation.get(station);
    stationUnit[station] = partner !== undefined ? shotUnit[partner]! : unitCount++;
  }
  const unitSign = new Float64Array(unitCount);
  const unitComponent = new Int32Array(unitCount);
  for (let shot = 0; shot < shotCount; shot += 1) {
    unitSign[shotUnit[shot]!] = 1;
    unitComponent[shotUnit[shot]!] = nodeComponent[shot]!;
  }
  for (let station = 0; station < stationCount; station += 1) {
    const unit = stationUnit[station]!;
    unitSign[unit] = sharedStation.has(station) ? 0 : -1;
    unitComponent[unit] = nodeComponent[shotCount + station]!;
  }

  if (constraint.kind === 'reference') {
    const perComponent = new Map<number, TimeTermReference>();
    constraint.terms.forEach((term, index) => {
      if (term.side !== 'shot' && term.side !== 'station') throw new RangeError(`${CALLER}: options.constraint.terms[${index}].side must be 'shot' or 'station', got ${JSON.stringify(term.side)}`);
      const found = term.side === 'shot' ? shotIndex.get(term.id) : stationIndex.get(term.id);
      if (found === undefined) throw new RangeError(`${CALLER}: options.constraint.terms[${index}] names ${term.side} ${JSON.stringify(term.id)}, which has no pick; use an id of the rows`);
      if (!Number.isFinite(term.value)) throw new RangeError(`${CALLER}: options.constraint.terms[${index}] (${term.side} ${term.id}): value must be a finite time in s, got ${term.value}`);
      const unit = term.side === 'shot' ? shotUnit[found]! : stationUnit[found]!;
      const component = unitComponent[unit]!;
      const previous = perComponent.get(component);
      if (previous !== undefined) {
        throw new RangeError(
          `${CALLER}: options.constraint.terms: ${describeComponent(component)} has two references (${previous.side} ${previous.id} and ${term.side} ${term.id}); give exactly one per component — two would over-constrain it`,
        );
      }
      perComponent.set(component, term);
      references.set(unit, term.value);
    });
    for (let component = 0; component < componentCount; component += 1) {
      if (!perComponent.has(component)) {
        throw new RangeError(`${CALLER}: ${describeComponent(component)} has no reference term, so its terms are not unique; add one of its shots or stations to options.constraint.terms or use { kind: 'equal-sums' }`);
      }
    }
    constraintText = `reference time terms: ${[...perComponent.entries()]
      .sort((a, b) => a[0] - b[0])
      .map(([component, term]) => `${term.side} ${term.id} fixed at ${formatQuantity(term.value, 's', 6)} (component ${component + 1})`)
      .join('; ')}; single time terms and their SEs are relative to these`;
  }

  const weighting = fillSigmas(rawSigma);
  const problem: Problem = {
    rowCount: rows.length,
    shotIds,
    stationIds,
    rowShot,
    rowStation,
    distance,
    time,
    sigma: weighting.sigma,
    shotUnit,
    stationUnit,
    unitCount,
    unitSign,
    unitComponent,
    componentCount,
    slownessFree: options.fixedVelocity === undefined,
    fixedSlowness: options.fixedVelocity === undefined ? 0 : 1 / options.fixedVelocity,
    gradient: options.gradient === true,
  };
  return { problem, weighting, references, constraintText, components };
}

// ---------------------------------------------------------------- main

interface RoundOutcome {
  readonly columnValues: Float64Array;
  readonly iterations: number;
  readonly istop: LsqrStop | null;
}

/**
 * Time terms of every shot and station and the refractor velocity from the head-wave picks of one
 * refractor, with standard errors under the stated constraint (module comment: model, weights,
 * constraints, solvers, rejection, edges and misuse).
 */
export function timeTerms(rows: readonly TimeTermPick[], options: TimeTermOptions = {}): TimeTermResult {
  const { problem, weighting, references, constraintText, components } = setUp(rows, options);
  const constraintKind = options.constraint?.kind ?? 'equal-sums';
  const rejection = options.rejection === false ? null : options.rejection ?? {};
  const threshold = rejection?.threshold ?? DEFAULT_REJECTION_THRESHOLD;
  const maxRounds = rejection?.maxRounds ?? DEFAULT_REJECTION_ROUNDS;
  if (rejection !== null) {
    if (!Number.isFinite(threshold) || !(threshold > 0)) throw new RangeError(`${CALLER}: options.rejection.threshold must be a positive number of robust SDs, got ${threshold}; the default is 3`);
    if (!Number.isInteger(maxRounds) || maxRounds < 1) throw new RangeError(`${CALLER}: options.rejection.maxRounds must be a positive integer, got ${maxRounds}; the default is 10`);
  }
  const varianceScale = options.varianceScale ?? 'residual';
  if (varianceScale !== 'residual' && varianceScale !== 'absolute') throw new RangeError(`${CALLER}: options.varianceScale must be 'residual' or 'absolute', got ${JSON.stringify(varianceScale)}`);
  if (varianceScale === 'absolute' && !weighting.allGiven) {
    throw new RangeError(`${CALLER}: options.varianceScale 'absolute' takes the sigmas as true SEs, but some picks have none; give every pick a sigma or use 'residual'`);
  }
  const solverOption = options.solver ?? 'auto';
  if (!['auto', 'dense', 'lsqr'].includes(solverOption)) throw new RangeError(`${CALLER}: options.solver must be 'auto', 'dense' or 'lsqr', got ${JSON.stringify(solverOption)}`);
  const denseLimit = options.denseLimit ?? DEFAULT_DENSE_LIMIT;
  if (!Number.isInteger(denseLimit) || denseLimit < 1) throw new RangeError(`${CALLER}: options.denseLimit must be a positive integer, got ${denseLimit}`);
  const tolerance = options.lsqrTolerance ?? DEFAULT_LSQR_TOLERANCE;
  if (!Number.isFinite(tolerance) || !(tolerance > 0)) throw new RangeError(`${CALLER}: options.lsqrTolerance must be a positive number, got ${tolerance}; the default is 1e-10`);

  // One-sided geometry: s lies in the span of the terms.
  const allRows = new Uint8Array(problem.rowCount).fill(1);
  if (problem.slownessFree && distancesSeparable(problem, allRows)) {
    throw new RangeError(
      `${CALLER}: the refractor slowness cannot be solved for: every pick's distance is a sum of a shot part and a station part (Δ_ij = f_i + g_j — all stations on one side of all shots along a line), so the slowness trades off against the time terms; fix the velocity (options.fixedVelocity) or add reversed coverage (shots beyond the other end of the stations)`,
    );
  }

  // Internal gauge for the exact route under equal sums: the first term of each component fixed at 0.
  const internalGauge = new Map<number, number>();
  if (constraintKind === 'equal-sums') {
    for (let unit = 0; unit < problem.unitCount; unit += 1) {
      const component = problem.unitComponent[unit]!;
      if (![...internalGauge.keys()].some((fixed) => problem.unitComponent[fixed] === component)) internalGauge.set(unit, 0);
    }
  }
  const exactFixed: ReadonlyMap<number, number> = constraintKind === 'equal-sums' ? internalGauge : references;
  const exactDesign = buildDesign(problem, exactFixed, false);
  const rank = exactDesign.columnCount;
  const unknowns = problem.unitCount + (constraintKind === 'co-located' ? sharedCount(problem) : 0) + (problem.slownessFree ? 1 : 0) + (problem.gradient ? 1 : 0);
  if (problem.rowCount < rank + 1) {
    throw new RangeError(
      `${CALLER}: too few picks: ${problem.rowCount} pick(s) for ${rank} independent unknowns leave no degree of freedom to estimate the scatter; add picks (at least ${rank + 1}), fix the velocity, or drop the gradient term`,
    );
  }
  const layout = blockLayout(problem, exactDesign);
  const reducedSize = layout.keptCount;
  const denseAffordable = reducedSize <= denseLimit && problem.rowCount * reducedSize <= DENSE_AUTO_WORK;
  const solver: 'dense' | 'lsqr' = solverOption === 'auto' ? (denseAffordable ? 'dense' : 'lsqr') : solverOption;
  if (solver === 'dense' && reducedSize > denseLimit) {
    throw new RangeError(`${CALLER}: options.solver 'dense' needs a reduced system of at most denseLimit = ${denseLimit} unknowns, but it has ${reducedSize}; use 'lsqr' or 'auto', or raise options.denseLimit`);
  }
  const exactCovariancePossible = reducedSize <= denseLimit;
  const lsqrDesign = solver === 'lsqr' ? buildDesign(problem, constraintKind === 'equal-sums' ? new Map() : references, constraintKind === 'equal-sums') : null;
  const scratch = exactCovariancePossible ? scratchFor(layout) : null;
  const lsqrCoefficients =
    lsqrDesign === null
      ? null
      : { first: new Float64Array(problem.rowCount), second: new Float64Array(problem.rowCount), slowness: new Float64Array(problem.rowCount), gradient: new Float64Array(problem.rowCount) };
  const lsqrLimit = options.lsqrIterationLimit ?? 4 * (lsqrDesign?.columnCount ?? 0) + 100;

  const baseWeight = new Float64Array(problem.rowCount);
  for (let row = 0; row < problem.rowCount; row += 1) baseWeight[row] = 1 / (problem.sigma[row]! * problem.sigma[row]!);
  const weight = Float64Array.from(baseWeight);
  const rejected = new Uint8Array(problem.rowCount);
  const residuals = new Float64Array(problem.rowCount);
  const normalised = new Float64Array(problem.rowCount);
  const deviations = new Float64Array(problem.rowCount);
  const work = new Float64Array(problem.rowCount);
  const notes: TimeTermNote[] = [];
  let totalIterations = 0;
  let lastIstop: LsqrStop | null = null;
  let lastFactor: BlockFactor | null = null;
  let lsqrWarm: Float64Array | null = null;
  let lsqrScales: Float64Array | null = null;
  let lastVariance: Float64Array | null = null;
  let solution: Solution | null = null;
  let rounds = 0;
  // Rows a rejection round kept to hold the graph together (a term left with one pick then fits it exactly).
  const everRestored = new Uint8Array(problem.rowCount);
  let lastLimit = Number.POSITIVE_INFINITY;

  const solveRound = (): RoundOutcome => {
    if (solver === 'dense') {
      lastFactor = blockFactorise(problem, exactDesign, layout, weight, scratch!);
      const columnValues = new Float64Array(exactDesign.columnCount);
      for (let column = 0; column < exactDesign.columnCount; column += 1) columnValues[column] = lastFactor.scaledSolution[column]! * lastFactor.scales[column]!;
      return { columnValues, iterations: 0, istop: null };
    }
    const design = lsqrDesign!;
    const system = lsqrSystem(problem, design, weight, lsqrCoefficients!);
    let initialGuess: Float64Array | undefined;
    if (lsqrWarm !== null && lsqrScales !== null) {
      initialGuess = new Float64Array(design.columnCount);
      for (let column = 0; column < design.columnCount; column += 1) initialGuess[column] = (lsqrWarm[column]! * lsqrScales[column]!) / system.scales[column]!;
    }
    const result = lsqr(system.operator, system.rightSide, {
      atol: tolerance,
      btol: tolerance,
      conlim: 1e14,
      iterationLimit: lsqrLimit,
      computeVariance: !exactCovariancePossible,
      ...(initialGuess === undefined ? {} : { initialGuess }),
    });
    lsqrWarm = result.x;
    lsqrScales = system.scales;
    const columnValues = new Float64Array(design.columnCount);
    for (let column = 0; column < design.columnCount; column += 1) columnValues[column] = result.x[column]! * system.scales[column]!;
    if (result.variance !== null) {
      lastVariance = new Float64Array(design.columnCount);
      for (let column = 0; column < design.columnCount; column += 1) lastVariance[column] = result.variance[column]! * system.scales[column]! * system.scales[column]!;
    }
    return { columnValues, iterations: result.iterations, istop: result.istop };
  };

  let converged = rejection === null;
  let stoppedForDegrees = false;
  for (;;) {
    rounds += 1;
    const outcome = solveRound();
    totalIterations += outcome.iterations;
    lastIstop = outcome.istop;
    const design = solver === 'dense' ? exactDesign : lsqrDesign!;
    solution = solutionOf(problem, design, outcome.columnValues, solver === 'dense' ? exactFixed : constraintKind === 'equal-sums' ? new Map() : references);
    if (constraintKind === 'equal-sums') projectEqualSums(problem, solution.unitValue);
    residualsOf(problem, solution, residuals);
    for (let row = 0; row < problem.rowCount; row += 1) normalised[row] = residuals[row]! / problem.sigma[row]!;
    if (rejection === null) break;

    // New rejected set from all rows' residuals.
    const centre = median(normalised, work);
    for (let row = 0; row < problem.rowCount; row += 1) deviations[row] = Math.abs(normalised[row]! - centre);
    const scale = Math.max(MAD_TO_SD * median(deviations, work), ROBUST_SCALE_FLOOR);
    const limit = threshold * scale;
    lastLimit = limit;
    const candidate = new Uint8Array(problem.rowCount);
    const candidates: number[] = [];
    for (let row = 0; row < problem.rowCount; row += 1) {
      if (Math.abs(normalised[row]!) > limit) {
        candidate[row] = 1;
        candidates.push(row);
      }
    }
    // Keep the graph connected: restore, in order of increasing |u|, candidates that join two parts.
    const forest = unionFind(problem.unitCount);
    for (let row = 0; row < problem.rowCount; row += 1) {
      if (candidate[row] === 0) forest.union(problem.shotUnit[problem.rowShot[row]!]!, problem.stationUnit[problem.rowStation[row]!]!);
    }
    candidates.sort((a, b) => Math.abs(normalised[a]!) - Math.abs(normalised[b]!));
    let restored = 0;
    for (const row of candidates) {
      if (forest.union(problem.shotUnit[problem.rowShot[row]!]!, problem.stationUnit[problem.rowStation[row]!]!)) {
        candidate[row] = 0;
        everRestored[row] = 1;
        restored += 1;
      }
    }
    let candidateCount = candidates.length - restored;
    if (problem.rowCount - candidateCount < rank + 1) {
      candidate.fill(0);
      candidateCount = 0;
      stoppedForDegrees = true;
    }
    let same = true;
    for (let row = 0; row < problem.rowCount; row += 1) {
      if (candidate[row] !== rejected[row]) {
        same = false;
        break;
      }
    }
    if (same) {
      converged = true;
      break;
    }
    if (rounds >= maxRounds) break;
    rejected.set(candidate);
    for (let row = 0; row < problem.rowCount; row += 1) weight[row] = rejected[row] === 1 ? 0 : baseWeight[row]!;
  }
  const finalSolution = solution!;

  if (rejection !== null && !converged) {
    notes.push({
      code: 'rejection-not-converged',
      message: `robust rejection did not settle in ${maxRounds} solve(s): the rejected set still changes; the result uses the last set — inspect the rejected rows, raise options.rejection.maxRounds or the threshold`,
    });
  }
  // A row once kept to connect counts if it is still beyond the threshold, or if it is now the only
  // pick of its shot or station (a single pick is fitted exactly, so its residual says nothing).
  const keptPerShot = new Int32Array(problem.shotIds.length);
  const keptPerStation = new Int32Array(problem.stationIds.length);
  for (let row = 0; row < problem.rowCount; row += 1) {
    if (rejected[row] === 1) continue;
    keptPerShot[problem.rowShot[row]!] = keptPerShot[problem.rowShot[row]!]! + 1;
    keptPerStation[problem.rowStation[row]!] = keptPerStation[problem.rowStation[row]!]! + 1;
  }
  let keptToConnect = 0;
  for (let row = 0; row < problem.rowCount; row += 1) {
    if (everRestored[row] === 0 || rejected[row] === 1) continue;
    const alone = keptPerShot[problem.rowShot[row]!] === 1 || keptPerStation[problem.rowStation[row]!] === 1;
    if (alone || Math.abs(normalised[row]!) > lastLimit) keptToConnect += 1;
  }
  if (keptToConnect > 0) {
    notes.push({
      code: 'kept-to-connect',
      message: `${keptToConnect} pick(s) flagged by the rejection were kept because rejecting them would split the shot–station graph or leave a term without picks; a term left with one pick fits it exactly, so check those picks by hand`,
    });
  }
  if (stoppedForDegrees) {
    notes.push({ code: 'rejection-stopped-degrees-of-freedom', message: 'rejection stopped: rejecting the flagged picks would leave no degree of freedom; add picks or turn rejection off' });
  }
  if (lastIstop !== null && (lastIstop === 3 || lastIstop === 6 || lastIstop === 7)) {
    notes.push({ code: 'lsqr-not-converged', message: `LSQR stopped with istop ${lastIstop}: ${LSQR_STOP_REASONS[lastIstop]}; the solution may be inaccurate — raise options.lsqrIterationLimit or use the dense route` });
  }
  if (problem.componentCount > 1) {
    notes.push({
      code: 'several-components',
      message: `the shot–station graph has ${problem.componentCount} components that share no pick; each has its own constraint, so time terms of different components cannot be compared; add picks linking them`,
    });
  }

  // ------------------------------------------------------------ statistics and covariance
  let chiSquare = 0;
  let squares = 0;
  let used = 0;
  const shotPicks = new Int32Array(problem.shotIds.length);
  const stationPicks = new Int32Array(problem.stationIds.length);
  const shotRejected = new Int32Array(problem.shotIds.length);
  const stationRejected = new Int32Array(problem.stationIds.length);
  for (let row = 0; row < problem.rowCount; row += 1) {
    if (rejected[row] === 1) {
      shotRejected[problem.rowShot[row]!] = shotRejected[problem.rowShot[row]!]! + 1;
      stationRejected[problem.rowStation[row]!] = stationRejected[problem.rowStation[row]!]! + 1;
      continue;
    }
    used += 1;
    shotPicks[problem.rowShot[row]!] = shotPicks[problem.rowShot[row]!]! + 1;
    stationPicks[problem.rowStation[row]!] = stationPicks[problem.rowStation[row]!]! + 1;
    chiSquare += normalised[row]! * normalised[row]!;
    squares += residuals[row]! * residuals[row]!;
  }
  const degreesOfFreedom = used - rank;
  const reducedChiSquare = chiSquare / degreesOfFreedom;
  const consistency = rejection === null ? 1 : truncatedNormalVarianceFraction(threshold);
  const varianceFactor = varianceScale === 'residual' ? reducedChiSquare / consistency : 1;

  const unitVariance = new Float64Array(problem.unitCount);
  const unitSlownessCovariance = new Float64Array(problem.unitCount);
  let slownessVariance = 0;
  let curvatureVariance = 0;
  let curvatureSlownessCovariance = 0;
  let covarianceMethod: 'exact' | 'lsqr-lower-bound';
  if (exactCovariancePossible) {
    covarianceMethod = 'exact';
    const factor: BlockFactor = lastFactor ?? blockFactorise(problem, exactDesign, layout, weight, scratch!);
    const pieces = exactCovariance(problem, exactDesign, factor, scratch!);
    const diagonal = pieces.diagonal;
    for (let unit = 0; unit < problem.unitCount; unit += 1) {
      const column = exactDesign.unitColumn[unit]!;
      unitVariance[unit] = column >= 0 ? diagonal[column]! : 0;
      unitSlownessCovariance[unit] = column >= 0 && pieces.slownessColumn !== null ? pieces.slownessColumn[column]! : 0;
    }
    if (exactDesign.slownessColumn >= 0) slownessVariance = diagonal[exactDesign.slownessColumn]!;
    if (exactDesign.gradientColumn >= 0) {
      curvatureVariance = diagonal[exactDesign.gradientColumn]!;
      curvatureSlownessCovariance = pieces.slownessColumn !== null ? pieces.slownessColumn[exactDesign.gradientColumn]! : 0;
    }
    if (constraintKind === 'equal-sums') {
      // C_eq = P·C·Pᵀ per component, P = I − n·nᵀ/m: needs C·n = D·M⁻¹·D·n.
      for (let component = 0; component < problem.componentCount; component += 1) {
        const rightSide = new Float64Array(exactDesign.columnCount);
        let members = 0;
        for (let unit = 0; unit < problem.unitCount; unit += 1) {
          if (problem.unitComponent[unit] !== component) continue;
          members += 1;
          const column = exactDesign.unitColumn[unit]!;
          if (column >= 0) rightSide[column] = problem.unitSign[unit]! * factor.scales[column]!;
        }
        const scaled = blockSolve(problem, exactDesign, factor, rightSide, scratch!);
        const covarianceTimesNull = new Float64Array(exactDesign.columnCount);
        for (let column = 0; column < exactDesign.columnCount; column += 1) covarianceTimesNull[column] = scaled[column]! * factor.scales[column]!;
        let quadratic = 0;
        for (let unit = 0; unit < problem.unitCount; unit += 1) {
          const column = exactDesign.unitColumn[unit]!;
          if (problem.unitComponent[unit] === component && column >= 0) quadratic += problem.unitSign[unit]! * covarianceTimesNull[column]!;
        }
        const towardsSlowness = exactDesign.slownessColumn >= 0 ? covarianceTimesNull[exactDesign.slownessColumn]! : 0;
        for (let unit = 0; unit < problem.unitCount; unit += 1) {
          if (problem.unitComponent[unit] !== component) continue;
          const sign = problem.unitSign[unit]!;
          const column = exactDesign.unitColumn[unit]!;
          const cross = column >= 0 ? covarianceTimesNull[column]! : 0;
          unitVariance[unit] = unitVariance[unit]! - (2 * sign * cross) / members + (sign * sign * quadratic) / (members * members);
          unitSlownessCovariance[unit] = unitSlownessCovariance[unit]! - (sign * towardsSlowness) / members;
        }
      }
    }
  } else {
    covarianceMethod = 'lsqr-lower-bound';
    const design = lsqrDesign!;
    const variance = lastVariance ?? new Float64Array(design.columnCount);
    for (let unit = 0; unit < problem.unitCount; unit += 1) {
      const column = design.unitColumn[unit]!;
      unitVariance[unit] = column >= 0 ? variance[column]! : 0;
    }
    if (design.slownessColumn >= 0) slownessVariance = variance[design.slownessColumn]!;
    if (design.gradientColumn >= 0) curvatureVariance = variance[design.gradientColumn]!;
    notes.push({
      code: 'lsqr-variance-lower-bound',
      message: `standard errors are LSQR's Krylov estimate of diag((GᵀWG)⁻¹) because the reduced system (${reducedSize} unknowns) exceeds denseLimit = ${denseLimit}; it is a lower bound and can be several times too small; raise options.denseLimit for exact SEs or treat these SEs as minimum values`,
    });
  }

  const seOf = (variance: number): number => Math.sqrt(Math.max(0, variance * varianceFactor));
  const slowness: Estimate = { value: finalSolution.slowness, standardError: problem.slownessFree ? seOf(slownessVariance) : 0 };
  const velocity: Estimate = { value: 1 / slowness.value, standardError: slowness.standardError / (slowness.value * slowness.value) };

  const hasExactCovariance = covarianceMethod === 'exact';
  const termEstimate = (side: 'shot' | 'station', index: number): TimeTermEstimate => {
    const unit = side === 'shot' ? problem.shotUnit[index]! : problem.stationUnit[index]!;
    const fixed = constraintKind === 'reference' && references.has(unit);
    let sharedWith: string | null = null;
    if (problem.unitSign[unit] === 0) {
      sharedWith = side === 'shot' ? problem.stationIds[Array.prototype.indexOf.call(problem.stationUnit, unit) as number]! : problem.shotIds[Array.prototype.indexOf.call(problem.shotUnit, unit) as number]!;
    }
    return {
      id: side === 'shot' ? problem.shotIds[index]! : problem.stationIds[index]!,
      value: finalSolution.unitValue[unit]!,
      standardError: fixed ? 0 : seOf(unitVariance[unit]!),
      picks: side === 'shot' ? shotPicks[index]! : stationPicks[index]!,
      rejected: side === 'shot' ? shotRejected[index]! : stationRejected[index]!,
      component: problem.unitComponent[unit]! + 1,
      fixed,
      sharedWith,
      slownessCovariance: !problem.slownessFree ? 0 : hasExactCovariance ? (fixed ? 0 : unitSlownessCovariance[unit]! * varianceFactor) : null,
    };
  };

  let gradient: TimeTermGradient | null = null;
  if (problem.gradient) {
    const kappa = finalSolution.curvature;
    const curvature: Estimate = { value: kappa, standardError: seOf(curvatureVariance) };
    const covariance = curvatureSlownessCovariance * varianceFactor;
    let velocityGradient: VelocityGradient;
    if (!(kappa > 0)) {
      velocityGradient = {
        ok: false,
        code: 'curvature-not-positive',
        message: `the fitted curvature κ = ${kappa.toExponential(3)} s/m³ is not positive, so the travel times bend the wrong way for a velocity that grows with depth and no gradient follows; drop the gradient term or check the picks of the far stations`,
      };
    } else {
      const value = Math.sqrt((24 * kappa) / (slowness.value * slowness.value * slowness.value));
      const byCurvature = value / (2 * kappa);
      const bySlowness = (-3 * value) / (2 * slowness.value);
      const variance = byCurvature * byCurvature * curvature.standardError * curvature.standardError + bySlowness * bySlowness * slowness.standardError * slowness.standardError + 2 * byCurvature * bySlowness * covariance;
      velocityGradient = { ok: true, value, standardError: Math.sqrt(Math.max(0, variance)) };
      if (kappa < 2 * curvature.standardError) {
        notes.push({
          code: 'gradient-not-resolved',
          message: `the curvature κ is only ${(kappa / curvature.standardError).toFixed(1)} SE from zero, so the gradient ${value.toExponential(3)} 1/s and its linearised SE are unreliable; longer distances or more picks resolve it`,
        });
      }
    }
    gradient = { curvature, velocityGradient, curvatureSlownessCovariance: covariance };
  }

  const rejectedRows: RejectedPick[] = [];
  for (let row = 0; row < problem.rowCount; row += 1) {
    if (rejected[row] === 1) {
      rejectedRows.push({
        row,
        shot: problem.shotIds[problem.rowShot[row]!]!,
        station: problem.stationIds[problem.rowStation[row]!]!,
        residual: residuals[row]!,
        normalisedResidual: normalised[row]!,
      });
    }
  }

  const solverText =
    solver === 'dense'
      ? `dense: normal equations with the ${layout.eliminatedCount} ${layout.eliminatedSide} terms eliminated (their block is diagonal) and a ${reducedSize} × ${reducedSize} Cholesky factorisation; exact covariance`
      : `lsqr: ${totalIterations} iterations over ${rounds} round(s) (last stop ${lastIstop}: ${LSQR_STOP_REASONS[lastIstop ?? 0]}) on the ${lsqrDesign!.columnCount}-column column-scaled sparse system of ${problem.rowCount} picks${
          constraintKind === 'equal-sums' ? ` and ${problem.componentCount} constraint row(s)` : ''
        }; covariance ${covarianceMethod === 'exact' ? `exact, by block elimination (${reducedSize} × ${reducedSize})` : "from LSQR's estimate (a lower bound)"}`;

  return {
    velocity,
    slowness,
    velocityFixed: !problem.slownessFree,
    gradient,
    shotTerms: problem.shotIds.map((_, index) => termEstimate('shot', index)),
    stationTerms: problem.stationIds.map((_, index) => termEstimate('station', index)),
    residuals,
    residualRms: Math.sqrt(squares / used),
    chiSquare,
    degreesOfFreedom,
    reducedChiSquare,
    varianceFactor,
    rejectedRows,
    rejectionRounds: rounds,
    components,
    constraint: constraintText,
    weighting: weighting.text,
    solver,
    solverText,
    iterations: totalIterations,
    covarianceMethod,
    unknowns,
    rank,
    notes,
    references: ['ScheideggerWillmore1957', 'WillmoreBancroft1960', 'BerryWest1966', ...(solver === 'lsqr' ? ['PaigeSaunders1982'] : [])],
  };
}

/**
 * Fraction of a normal variance kept when the tails beyond ±k SD are cut: c(k) = 1 − 2kφ(k)/(2Φ(k) − 1)
 * (0.9733 at k = 3); 2Φ(k) − 1 = P(χ²₁ ≤ k²).
 */
export function truncatedNormalVarianceFraction(threshold: number): number {
  const inside = 1 - chiSquareSurvival(threshold * threshold, 1);
  const density = Math.exp(-0.5 * threshold * threshold) / Math.sqrt(2 * Math.PI);
  return 1 - (2 * threshold * density) / inside;
}

function sharedCount(problem: Problem): number {
  let count = 0;
  for (let unit = 0; unit < problem.unitCount; unit += 1) if (problem.unitSign[unit] === 0) count += 1;
  return count;
}
