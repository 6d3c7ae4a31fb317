/**
 * Test-side oracle: head-wave travel times through plane dipping layers by Fermat's principle,
 * independent of the dipping-layer inversion in lib/depth/dipping-layer.ts (no apparent slowness,
 * critical-angle or stripping formula is used here).
 *
 * Model: surface z = 0 (z positive down), interface k (the top of layer k + 1) the line
 * z = depthAtOrigin_k + x·tan(dip_k), velocities V_1…V_N. A head wave along interface n − 1 from a
 * shot at x_S to a receiver at x_R (travel towards sign(x_R − x_S)) goes down through interfaces
 * 1…n−2 (crossings at x_1…x_{n−2}), reaches the refractor at P, runs along it at V_n to Q and comes
 * up through the same interfaces to R. Its time is the minimum over all crossing points of
 *
 *   Σ |leg|/V_i (down) + |PQ|/V_n + Σ |leg|/V_i (up),   with PQ in the direction of travel,
 *
 * (Fermat's principle; Červený 2001 for the variational view, Telford et al. 1990 ch. 4 for the head
 * wave). The down part and the up part separate once |PQ| is written as the difference of the
 * along-refractor coordinates of Q and P, and each part is a convex function of its crossings (sums
 * of lengths of affine maps plus a linear term), so nested golden-section searches find the
 * minimum. The head wave exists when the refractor leg is not negative.
 *
 * Units are SI (m, s, m/s, rad).
 */

export interface DippingModel {
  /** V_1…V_N, m/s. */
  readonly velocities: readonly number[];
  /** Interfaces 1…N−1: vertical depth at x = 0 (m) and dip (rad, positive deepening towards +x). */
  readonly interfaces: readonly { readonly depthAtOrigin: number; readonly dip: number }[];
}

/** Golden-section iterations: a 10⁴ m bracket shrinks to 10⁴·0.618¹²⁰ ≈ 10⁻²¹ m. */
const GOLDEN_ITERATIONS = 120;
const GOLDEN = (Math.sqrt(5) - 1) / 2;

function goldenMinimum(cost: (x: number) => number, low: number, high: number): { at: number; value: number } {
  let a = low;
  let b = high;
  let c = b - GOLDEN * (b - a);
  let d = a + GOLDEN * (b - a);
  let fc = cost(c);
  let fd = cost(d);
  for (let iteration = 0; iteration < GOLDEN_ITERATIONS; iteration += 1) {
    if (fc < fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - GOLDEN * (b - a);
      fc = cost(c);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + GOLDEN * (b - a);
      fd = cost(d);
    }
  }
  const at = (a + b) / 2;
  return { at, value: cost(at) };
}

const depthAt = (model: DippingModel, index: number, x: number): number => {
  const known = model.interfaces[index];
  if (known === undefined) throw new RangeError(`dipping oracle: no interface ${index + 1}`);
  return known.depthAtOrigin + x * Math.tan(known.dip);
};

/**
 * The least time from the surface point x_end down (or up) through interfaces 1…n−2 to the
 * refractor point whose x is `refractorX`, nested minimisation over the crossings.
 */
function legsTime(model: DippingModel, endX: number, refractorIndex: number, refractorX: number, bracket: number): number {
  const velocity = (layer: number): number => model.velocities[layer] ?? Number.NaN;
  // From interface `index` (0-based) at x up to the surface point endX, through the interfaces above.
  const upFrom = (index: number, x: number): number => {
    const z = depthAt(model, index, x);
    if (index === 0) return Math.hypot(x - endX, z) / velocity(0);
    return goldenMinimum((above) => Math.hypot(x - above, z - depthAt(model, index - 1, above)) / velocity(index) + upFrom(index - 1, above), endX - bracket, endX + bracket).value;
  };
  return upFrom(refractorIndex, refractorX);
}

/**
 * Head-wave time along interface `refractor` (1-based, the top of layer refractor + 1) from a
 * surface shot at `shotX` to a surface receiver at `receiverX`, by Fermat minimisation; null when
 * the refractor leg would be negative (receiver inside the pre-critical zone) or the layer is not
 * faster than every layer above.
 */
export function dippingHeadWaveTime(model: DippingModel, refractor: number, shotX: number, receiverX: number): number | null {
  const refractorVelocity = model.velocities[refractor] ?? Number.NaN;
  if (!model.velocities.slice(0, refractor).every((velocity) => velocity < refractorVelocity)) return null;
  const direction = Math.sign(receiverX - shotX);
  if (direction === 0) return null;
  const dip = model.interfaces[refractor - 1]?.dip ?? Number.NaN;
  const index = refractor - 1;
  const depthScale = Math.max(...model.interfaces.map((known) => Math.abs(known.depthAtOrigin))) + Math.abs(receiverX) + Math.abs(shotX);
  const bracket = 20 * depthScale + 100;
  // Along-refractor coordinate u = x/cos δ (signed in the direction of travel: u·direction).
  const along = (x: number): number => (direction * x) / Math.cos(dip);
  const down = goldenMinimum((x) => legsTime(model, shotX, index, x, bracket) - along(x) / refractorVelocity, shotX - bracket, shotX + bracket);
  const up = goldenMinimum((x) => legsTime(model, receiverX, index, x, bracket) + along(x) / refractorVelocity, receiverX - bracket, receiverX + bracket);
  if (along(up.at) < along(down.at)) return null;
  return down.value + up.value;
}

/** Slope and intercept of a head-wave branch read exactly from two of its times. */
export interface ExactBranch {
  readonly slowness: number;
  readonly intercept: number;
}

/**
 * The forward (shot A at 0) and reverse (shot B at L) head-wave branches of interface `refractor`
 * as METHODS §5 writes them, t = p_d·x + τ_A and t = p_u·(L − x) + τ_B, from two-point slopes of
 * oracle times at receivers `near` and `far` (0 < near < far < L, both past the pre-critical zone
 * of both shots): exact for plane layers, where the branch is a straight line. Null when a time is
 * missing. Also the reciprocal time t_AB, the forward time at B.
 */
export function reversedBranches(
  model: DippingModel,
  refractor: number,
  spreadLength: number,
  near: number,
  far: number,
): { forward: ExactBranch; reverse: ExactBranch; reciprocalTime: number } | null {
  const forwardNear = dippingHeadWaveTime(model, refractor, 0, near);
  const forwardFar = dippingHeadWaveTime(model, refractor, 0, far);
  const reverseNear = dippingHeadWaveTime(model, refractor, spreadLength, near);
  const reverseFar = dippingHeadWaveTime(model, refractor, spreadLength, far);
  const reciprocalTime = dippingHeadWaveTime(model, refractor, 0, spreadLength);
  if (forwardNear === null || forwardFar === null || reverseNear === null || reverseFar === null || reciprocalTime === null) return null;
  const forwardSlowness = (forwardFar - forwardNear) / (far - near);
  const reverseSlowness = (reverseNear - reverseFar) / (far - near);
  return {
    forward: { slowness: forwardSlowness, intercept: forwardNear - forwardSlowness * near },
    reverse: { slowness: reverseSlowness, intercept: reverseNear - reverseSlowness * (spreadLength - near) },
    reciprocalTime,
  };
}
