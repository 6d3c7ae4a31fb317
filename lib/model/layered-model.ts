/**
 * Plane horizontal layered model and its first-arrival travel times: the direct wave and the head
 * waves of N homogeneous isotropic layers over a half-space, for a source and receivers on a flat
 * surface, in-line (2-D) geometry (Telford1990 ch. 4; Kearey2002 ch. 5; Palmer1986).
 *
 * Notation (layers i = 1…N from the top, N = half-space; slowness s_i = 1/V_i):
 *
 * ```
 * vertical slowness     q_{i,n} = √(s_i² − s_n²)                         (needs V_i < V_n)
 * direct wave           t_1(x)  = s_1·x
 * head wave n ≥ 2       t_n(x)  = s_n·x + τ_n,   τ_n  = 2·Σ_{i<n} h_i·q_{i,n}
 * critical distance     x*_n    = 2·s_n·Σ_{i<n} h_i / q_{i,n}            (branch n exists for x ≥ x*_n)
 * crossover n / n+1     x_{c,n} = (τ_{n+1} − τ_n)/(s_n − s_{n+1})
 * first arrival         min over the branches that exist at x
 * ```
 *
 * Branch 1 is the direct wave; branch n ≥ 2 is the head wave along the top of layer n. A head wave
 * along layer n exists only when V_n exceeds every velocity above it (Snell's law needs
 * sin θ_{i,n} = V_i/V_n < 1 in every layer crossed); such a branch is "impossible" and every
 * function here answers `null` for it instead of a NaN. Near x*_n the head wave is weak in the
 * field (it starts at the critical reflection); the model gives its kinematic time only.
 *
 * Misuse throws with a message: velocities not positive and finite, thicknesses negative or not
 * finite, a thickness count other than N − 1, a branch or layer index outside 1…N, a negative or
 * non-finite offset. A layer of zero thickness is allowed and still counts as a layer (its
 * velocity still bars head waves along slower layers below it).
 *
 * @example
 * // METHODS.md check case 1.1: 400/1600/3500 m/s over 4 m and 10 m.
 * const model = { velocities: [400, 1600, 3500], thicknesses: [4, 10] };
 * headWaveIntercept(model, 3); // 0.0309864 s
 * criticalDistance(model, 3); // 11.2002 m
 * firstArrival(model, 60); // { time: 0.0481292, branch: 3 }
 */

/** V_1…V_N, m/s (the last is the half-space), and h_1…h_{N−1}, m. */
export interface LayeredModel {
  readonly velocities: readonly number[];
  readonly thicknesses: readonly number[];
}

/** The earliest arrival at one offset and the branch that brings it (1 = direct wave). */
export interface FirstArrival {
  readonly time: number;
  readonly branch: number;
}

/** One branch as a straight line t = slowness·x + intercept, valid from `criticalDistance` on. */
interface BranchLine {
  readonly branch: number;
  readonly slowness: number;
  readonly intercept: number;
  readonly criticalDistance: number;
}

function assertModel(model: LayeredModel, caller: string): void {
  const { velocities, thicknesses } = model;
  if (velocities.length < 1) throw new RangeError(`${caller}: a layered model needs at least one velocity`);
  velocities.forEach((velocity, index) => {
    if (!(velocity > 0) || !Number.isFinite(velocity)) {
      throw new RangeError(`${caller}: velocity of layer ${index + 1} must be positive and finite, got ${velocity}`);
    }
  });
  if (thicknesses.length !== velocities.length - 1) {
    throw new RangeError(
      `${caller}: ${velocities.length} velocities need ${velocities.length - 1} thicknesses (the last layer is the half-space), got ${thicknesses.length}`,
    );
  }
  thicknesses.forEach((thickness, index) => {
    if (!(thickness >= 0) || !Number.isFinite(thickness)) {
      throw new RangeError(`${caller}: thickness of layer ${index + 1} must be zero or positive and finite, got ${thickness}`);
    }
  });
}

function assertBranch(model: LayeredModel, branch: number, caller: string): void {
  if (!Number.isInteger(branch) || branch < 1 || branch > model.velocities.length) {
    throw new RangeError(`${caller}: branch must be an integer from 1 to ${model.velocities.length}, got ${branch}`);
  }
}

function assertOffset(offset: number, caller: string): void {
  if (!(offset >= 0) || !Number.isFinite(offset)) {
    throw new RangeError(`${caller}: offset must be zero or positive and finite (|receiver − source|), got ${offset}`);
  }
}

function velocityOf(model: LayeredModel, layer: number): number {
  return model.velocities[layer - 1] ?? Number.NaN;
}

function thicknessOf(model: LayeredModel, layer: number): number {
  return model.thicknesses[layer - 1] ?? Number.NaN;
}

/** q_{i,n} from the two velocities, or null when V_i ≥ V_n. */
function verticalSlownessOf(layerVelocity: number, refractorVelocity: number): number | null {
  if (!(layerVelocity < refractorVelocity)) return null;
  const layerSlowness = 1 / layerVelocity;
  const refractorSlowness = 1 / refractorVelocity;
  return Math.sqrt(layerSlowness * layerSlowness - refractorSlowness * refractorSlowness);
}

/** The straight line of branch n, or null when the branch is impossible. */
function branchLine(model: LayeredModel, branch: number): BranchLine | null {
  const refractorVelocity = velocityOf(model, branch);
  const slowness = 1 / refractorVelocity;
  let intercept = 0;
  let horizontalSum = 0;
  for (let layer = 1; layer < branch; layer += 1) {
    const vertical = verticalSlownessOf(velocityOf(model, layer), refractorVelocity);
    if (vertical === null) return null;
    const thickness = thicknessOf(model, layer);
    intercept += 2 * thickness * vertical;
    horizontalSum += thickness / vertical;
  }
  return { branch, slowness, intercept, criticalDistance: 2 * slowness * horizontalSum };
}

function allBranchLines(model: LayeredModel): BranchLine[] {
  const lines: BranchLine[] = [];
  for (let branch = 1; branch <= model.velocities.length; branch += 1) {
    const line = branchLine(model, branch);
    if (line !== null) lines.push(line);
  }
  return lines;
}

function earliest(lines: readonly BranchLine[], offset: number): FirstArrival {
  let best: FirstArrival | null = null;
  for (const line of lines) {
    if (offset < line.criticalDistance) continue;
    const time = line.slowness * offset + line.intercept;
    if (best === null || time < best.time) best = { time, branch: line.branch };
  }
  // Branch 1 (the direct wave) exists at every offset ≥ 0, so `best` is never null here.
  return best ?? { time: Number.NaN, branch: 0 };
}

/**
 * Vertical slowness q_{i,n} = √(s_i² − s_n²) = cos θ_{i,n}/V_i of layer i for the head wave along
 * layer n (Telford1990 ch. 4), s/m.
 *
 * Edges: `null` when V_i ≥ V_n (no critical angle: q undefined). Throws unless 1 ≤ layer < branch ≤ N.
 *
 * @example
 * verticalSlowness({ velocities: [500, 2000], thicknesses: [8] }, 1, 2); // 1.93649e-3 s/m
 */
export function verticalSlowness(model: LayeredModel, layer: number, branch: number): number | null {
  assertModel(model, 'verticalSlowness');
  assertBranch(model, branch, 'verticalSlowness');
  if (!Number.isInteger(layer) || layer < 1 || layer >= branch) {
    throw new RangeError(`verticalSlowness: layer must be an integer from 1 to branch − 1 = ${branch - 1}, got ${layer}`);
  }
  return verticalSlownessOf(velocityOf(model, layer), velocityOf(model, branch));
}

/**
 * Whether branch n can exist at all: the direct wave always; head wave n only when V_n exceeds
 * every velocity above it (Kearey2002 ch. 5).
 */
export function branchExists(model: LayeredModel, branch: number): boolean {
  assertModel(model, 'branchExists');
  assertBranch(model, branch, 'branchExists');
  return branchLine(model, branch) !== null;
}

/**
 * Intercept time τ_n = 2·Σ_{i<n} h_i·q_{i,n} of branch n, s (Telford1990 ch. 4).
 *
 * Edges: 0 for branch 1 (the direct wave passes through the origin); `null` for an impossible branch.
 */
export function headWaveIntercept(model: LayeredModel, branch: number): number | null {
  assertModel(model, 'headWaveIntercept');
  assertBranch(model, branch, 'headWaveIntercept');
  return branchLine(model, branch)?.intercept ?? null;
}

/**
 * Critical distance x*_n = 2·s_n·Σ_{i<n} h_i/q_{i,n} = Σ 2·h_i·tan θ_{i,n}: the nearest offset at
 * which head wave n emerges, m (Kearey2002 ch. 5).
 *
 * Edges: 0 for branch 1; `null` for an impossible branch.
 */
export function criticalDistance(model: LayeredModel, branch: number): number | null {
  assertModel(model, 'criticalDistance');
  assertBranch(model, branch, 'criticalDistance');
  return branchLine(model, branch)?.criticalDistance ?? null;
}

/**
 * Crossover distance x_{c,n} = (τ_{n+1} − τ_n)/(s_n − s_{n+1}) where the lines of branches n and
 * n + 1 intersect, m (Telford1990 ch. 4).
 *
 * Edges: `null` when either branch is impossible. Throws unless 1 ≤ n < N. The crossover is the
 * intersection of the two lines; whether either branch is first there is for `firstArrival` to say
 * (a masked branch gives crossovers that do not increase with n).
 */
export function crossoverDistance(model: LayeredModel, branch: number): number | null {
  assertModel(model, 'crossoverDistance');
  if (!Number.isInteger(branch) || branch < 1 || branch >= model.velocities.length) {
    throw new RangeError(`crossoverDistance: branch must be an integer from 1 to N − 1 = ${model.velocities.length - 1}, got ${branch}`);
  }
  const upper = branchLine(model, branch);
  const lower = branchLine(model, branch + 1);
  if (upper === null || lower === null) return null;
  return (lower.intercept - upper.intercept) / (upper.slowness - lower.slowness);
}

/**
 * Travel time of branch n at one offset, s: s_1·x for the direct wave, s_n·x + τ_n for a head wave.
 *
 * Edges: `null` when the branch does not exist at this offset — an impossible branch, or x < x*_n
 * (the pre-critical zone); at x = x*_n exactly the head wave exists. Throws for a branch outside
 * 1…N or a negative offset.
 */
export function branchTime(model: LayeredModel, branch: number, offset: number): number | null {
  assertModel(model, 'branchTime');
  assertBranch(model, branch, 'branchTime');
  assertOffset(offset, 'branchTime');
  const line = branchLine(model, branch);
  if (line === null || offset < line.criticalDistance) return null;
  return line.slowness * offset + line.intercept;
}

/**
 * First arrival at one offset: the minimum of the branch times over the branches that exist there
 * (Telford1990 ch. 4).
 *
 * Edges: impossible branches (V_n not above every V_i over it) and branches short of their critical
 * distance are skipped, never turned into NaN; the direct wave always exists, so there is always an
 * answer (time 0 at offset 0). On an exact tie the shallower branch (lower index) is reported.
 */
export function firstArrival(model: LayeredModel, offset: number): FirstArrival {
  assertModel(model, 'firstArrival');
  assertOffset(offset, 'firstArrival');
  return earliest(allBranchLines(model), offset);
}

/**
 * First-arrival times at many offsets, s, aligned with `offsets` (the forward model of METHODS §12
 * for plane layers). Edges as `firstArrival`; an empty offset list gives an empty list.
 */
export function syntheticTimes(model: LayeredModel, offsets: readonly number[]): number[] {
  assertModel(model, 'syntheticTimes');
  offsets.forEach((offset) => assertOffset(offset, 'syntheticTimes'));
  const lines = allBranchLines(model);
  return offsets.map((offset) => earliest(lines, offset).time);
}

/**
 * Root-mean-square residual √(Σ (t_obs − t_calc)²/n) of observed first arrivals against the model,
 * s (METHODS §12: the misfit reported per shot).
 *
 * Edges: throws when `offsets` and `observedTimes` differ in length, when there are no picks (an
 * RMS of nothing is not zero), or when an observed time is not finite.
 */
export function rmsResidual(model: LayeredModel, offsets: readonly number[], observedTimes: readonly number[]): number {
  if (offsets.length !== observedTimes.length) {
    throw new RangeError(`rmsResidual: ${offsets.length} offsets but ${observedTimes.length} observed times; give one time per offset`);
  }
  if (offsets.length === 0) throw new RangeError('rmsResidual: no picks given; an RMS needs at least one pick');
  observedTimes.forEach((time, index) => {
    if (!Number.isFinite(time)) throw new RangeError(`rmsResidual: observed time ${index + 1} is not finite (${time})`);
  });
  const calculated = syntheticTimes(model, offsets);
  const sumOfSquares = calculated.reduce((sum, time, index) => sum + ((observedTimes[index] ?? Number.NaN) - time) ** 2, 0);
  return Math.sqrt(sumOfSquares / offsets.length);
}
