/**
 * Test-side oracle: first-arrival times through plane horizontal layers by explicit ray geometry,
 * independent of the intercept-time formula that lib/model uses. It is the slow twin that the
 * production forward model and the depth methods are checked against (STYLE: an oracle twin for
 * every clever algorithm), and the source of synthetic surveys for other tests.
 *
 * A head wave along the top of layer n is drawn as a ray: in each layer i above, a down-going and
 * an up-going slant leg at the Snell angle θ_i = asin(V_i/V_n) (Snell's law, Telford et al. 1990
 * ch. 4), each of length h_i/cos θ_i and horizontal run h_i·tan θ_i, plus a refractor leg along the
 * interface of length x − Σ 2·h_i·tan θ_i, travelled at V_n:
 *
 *   t_n(x) = Σ 2·h_i/(V_i·cos θ_i) + (x − Σ 2·h_i·tan θ_i)/V_n
 *
 * The ray exists when every V_i < V_n and the refractor leg is not negative. The direct wave is
 * x/V_1. The first arrival is the earliest existing ray; ties go to the lower branch index.
 *
 * Units are SI throughout (m, s, m/s).
 */

/** The earliest arrival at one offset and its branch (1 = direct wave, n = head wave along layer n). */
export interface RayArrival {
  readonly time: number;
  readonly branch: number;
}

/** An offset interval over which one branch is the first arrival, found by a scan. */
export interface FirstArrivalRun {
  readonly branch: number;
  /** First and last scanned offsets of the run, m. */
  readonly from: number;
  readonly to: number;
}

function checkStack(velocities: readonly number[], thicknesses: readonly number[]): void {
  if (velocities.length < 1 || thicknesses.length !== velocities.length - 1) {
    throw new RangeError(`ray oracle: ${velocities.length} velocities need ${velocities.length - 1} thicknesses, got ${thicknesses.length}`);
  }
}

/** Slant legs of a head wave along layer `branch`: total leg time and total horizontal run, or null. */
function slantLegs(velocities: readonly number[], thicknesses: readonly number[], branch: number): { time: number; run: number } | null {
  const refractorVelocity = velocities[branch - 1] ?? Number.NaN;
  let time = 0;
  let run = 0;
  for (let layer = 0; layer < branch - 1; layer += 1) {
    const velocity = velocities[layer] ?? Number.NaN;
    const thickness = thicknesses[layer] ?? Number.NaN;
    if (!(velocity < refractorVelocity)) return null;
    const angle = Math.asin(velocity / refractorVelocity);
    const legLength = thickness / Math.cos(angle);
    time += (2 * legLength) / velocity;
    run += 2 * thickness * Math.tan(angle);
  }
  return { time, run };
}

/**
 * Travel time of one branch at one offset by ray geometry, or null when the ray does not exist
 * (a layer above at least as fast, or an offset shorter than the slant legs' horizontal run).
 */
export function branchTimeByRays(
  velocities: readonly number[],
  thicknesses: readonly number[],
  branch: number,
  offset: number,
): number | null {
  checkStack(velocities, thicknesses);
  if (branch === 1) return offset / (velocities[0] ?? Number.NaN);
  const legs = slantLegs(velocities, thicknesses, branch);
  if (legs === null) return null;
  const refractorLeg = offset - legs.run;
  if (refractorLeg < 0) return null;
  return legs.time + refractorLeg / (velocities[branch - 1] ?? Number.NaN);
}

/**
 * Intercept time of head wave `branch` by ray geometry: the time of the ray with no refractor leg
 * less its horizontal run travelled at V_n (the straight line t − x/V_n is constant along the
 * branch). Null when the ray cannot exist.
 */
export function interceptByRays(velocities: readonly number[], thicknesses: readonly number[], branch: number): number | null {
  checkStack(velocities, thicknesses);
  if (branch === 1) return 0;
  const legs = slantLegs(velocities, thicknesses, branch);
  if (legs === null) return null;
  return legs.time - legs.run / (velocities[branch - 1] ?? Number.NaN);
}

/** Critical distance by ray geometry: the horizontal run of the slant legs Σ 2·h_i·tan θ_i. */
export function criticalDistanceByRays(velocities: readonly number[], thicknesses: readonly number[], branch: number): number | null {
  checkStack(velocities, thicknesses);
  if (branch === 1) return 0;
  return slantLegs(velocities, thicknesses, branch)?.run ?? null;
}

/** First arrival at one offset: the earliest of the rays that exist (the direct wave always does). */
export function firstArrivalByRays(velocities: readonly number[], thicknesses: readonly number[], offset: number): RayArrival {
  checkStack(velocities, thicknesses);
  let best: RayArrival = { time: offset / (velocities[0] ?? Number.NaN), branch: 1 };
  for (let branch = 2; branch <= velocities.length; branch += 1) {
    const time = branchTimeByRays(velocities, thicknesses, branch, offset);
    if (time !== null && time < best.time) best = { time, branch };
  }
  return best;
}

/**
 * Offset where the rays of two branches arrive together, by bisection on their time difference
 * between `low` and `high` (both rays must exist over the bracket and change order inside it).
 */
export function crossoverByRays(
  velocities: readonly number[],
  thicknesses: readonly number[],
  earlierBranch: number,
  laterBranch: number,
  low: number,
  high: number,
): number {
  const difference = (offset: number): number =>
    (branchTimeByRays(velocities, thicknesses, laterBranch, offset) ?? Number.NaN) -
    (branchTimeByRays(velocities, thicknesses, earlierBranch, offset) ?? Number.NaN);
  let below = low;
  let above = high;
  if (!(difference(below) > 0 && difference(above) < 0)) {
    throw new RangeError(`crossoverByRays: branches ${earlierBranch} and ${laterBranch} do not change order between ${low} and ${high} m`);
  }
  for (let iteration = 0; iteration < 200 && above - below > 1e-13 * Math.max(1, above); iteration += 1) {
    const middle = (below + above) / 2;
    if (difference(middle) > 0) below = middle;
    else above = middle;
  }
  return (below + above) / 2;
}

/**
 * Brute-force scan of the first arrival on the grid 0, step, 2·step, … ≤ maxOffset (METHODS §9's
 * check cases use a 1 mm grid): the runs of consecutive grid offsets over which each branch is
 * first, in order of offset.
 */
export function scanFirstArrivals(
  velocities: readonly number[],
  thicknesses: readonly number[],
  maxOffset: number,
  step: number,
): FirstArrivalRun[] {
  const runs: FirstArrivalRun[] = [];
  const count = Math.floor(maxOffset / step + 1e-9);
  let current: { branch: number; from: number; to: number } | null = null;
  for (let index = 0; index <= count; index += 1) {
    const offset = index * step;
    const { branch } = firstArrivalByRays(velocities, thicknesses, offset);
    if (current !== null && current.branch === branch) {
      current.to = offset;
      continue;
    }
    if (current !== null) runs.push(current);
    current = { branch, from: offset, to: offset };
  }
  if (current !== null) runs.push(current);
  return runs;
}

/** The branches that are first anywhere on the scan, each with its total width (m). */
export function branchesSeen(runs: readonly FirstArrivalRun[]): Map<number, number> {
  const seen = new Map<number, number>();
  for (const run of runs) seen.set(run.branch, (seen.get(run.branch) ?? 0) + (run.to - run.from));
  return seen;
}
