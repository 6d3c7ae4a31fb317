/**
 * A refractor's depth under the shots that lie beyond the ends of its delay-time section, from
 * each shot's own delay time (the shot's half of the plus time; Hagedoorn1959, Palmer1980): the
 * forward check needs the refractor between the last covered receiver and every shot, and a
 * level interface held from the section's end, or a plane dipping-layer depth, can be metres off
 * there over undulating rock.
 *
 * With s_k = 1/V_k and q_{k,n} = √(s_k² − s_n²), a shot S's head-wave time at a covered receiver x
 * is t_S(x) = |x − x_S|·s_n + δ_S + δ(x) (time-term form of the head-wave time, METHODS §6–7), the
 * receiver's delay δ(x) = Σ_{k<n} h_k(x)·q_{k,n} from the section's own depths at x. Then
 *
 * ```
 * δ_S     = median over S's picks on the covered receivers of  t_S(x) − |x − x_S|·s_n − δ(x)
 * h_{n−1} = (δ_S − Σ_{k<n−1} h_k(S)·q_{k,n}) / q_{n−1,n},   z_n(S) = z_{n−1}(S) + h_{n−1}
 * ```
 *
 * with the upper layers' thicknesses at S from the shallower interfaces (their own anchors, or
 * their ends held). Times and depths are those of the reference surface (the ground, or the
 * datum, `refractor-arrivals.ts`); the median keeps a few wild picks from moving the anchor. A
 * shot gets no anchor with fewer than MIN_ANCHOR_PICKS picks on covered receivers, or when the
 * thickness comes out not positive (a wrong pick or a layer the section misses); the interface is
 * then held at the section's end depth, as the forward check does beyond an interface's points.
 */
import { median } from '../branches/median.js';
import type { SideRefractorArrivals } from './refractor-arrivals.js';

/** Fewest picks of a shot on covered receivers for its own delay time (common practice: more than a pair). */
export const MIN_ANCHOR_PICKS = 3;

/** An interface as depths below the reference surface at ascending x (m). */
export interface ReferenceInterface {
  readonly x: readonly number[];
  readonly depth: readonly number[];
}

/** Depth at x, linear between the points and held beyond the ends. */
export function heldDepthAt(surface: ReferenceInterface, x: number): number {
  const { x: xs, depth } = surface;
  const last = xs.length - 1;
  if (x <= xs[0]!) return depth[0]!;
  if (x >= xs[last]!) return depth[last]!;
  let low = 0;
  let high = last;
  while (high - low > 1) {
    const middle = (low + high) >> 1;
    if (xs[middle]! <= x) low = middle;
    else high = middle;
  }
  const weight = (x - xs[low]!) / (xs[high]! - xs[low]!);
  return (1 - weight) * depth[low]! + weight * depth[high]!;
}

export interface ShotAnchor {
  readonly shot: string;
  readonly x: number;
  /** Depth of the refractor under the shot below the reference surface, m. */
  readonly depth: number;
  /** The shot's delay time δ_S, s. */
  readonly delay: number;
  readonly picks: number;
}

/**
 * The section of refractor n (`section`, below the reference) carried to the shots beyond its
 * ends. `upper` are the shallower interfaces 2…n−1 already carried (top first), `velocities`
 * V_1…V_n of the model, `arrivals` the corrected head-wave arrivals of refractor n of every side.
 */
export function carryToShots(
  section: ReferenceInterface,
  upper: readonly ReferenceInterface[],
  velocities: readonly number[],
  arrivals: readonly SideRefractorArrivals[],
): { interface: ReferenceInterface; anchors: ShotAnchor[] } {
  const n = velocities.length;
  const slowness = velocities.map((velocity) => 1 / velocity);
  const sn = slowness[n - 1]!;
  const q = slowness.slice(0, n - 1).map((sk) => Math.sqrt(Math.max(0, sk * sk - sn * sn)));
  const first = section.x[0]!;
  const last = section.x[section.x.length - 1]!;
  // Thickness of layer k (1-based, k < n) at x from the interfaces above refractor n.
  const thicknesses = (x: number, bottom: number): number[] => {
    const depths = [0, ...upper.map((surface) => heldDepthAt(surface, x)), bottom];
    return depths.slice(1).map((depth, k) => Math.max(0, depth - depths[k]!));
  };
  const receiverDelay = (x: number) => thicknesses(x, heldDepthAt(section, x)).reduce((sum, h, k) => sum + h * q[k]!, 0);

  const byShot = new Map<string, { x: number; residuals: number[] }>();
  for (const side of arrivals) {
    if (side.sourceX >= first && side.sourceX <= last) continue;
    const entry = byShot.get(side.shot) ?? { x: side.sourceX, residuals: [] };
    side.receiverX.forEach((x, k) => {
      if (x < first || x > last) return;
      entry.residuals.push(side.times[k]! - Math.abs(x - side.sourceX) * sn - receiverDelay(x));
    });
    byShot.set(side.shot, entry);
  }
  const anchors: ShotAnchor[] = [];
  for (const [shot, { x, residuals }] of byShot) {
    if (residuals.length < MIN_ANCHOR_PICKS) continue;
    const delay = median(residuals);
    const upperThicknesses = thicknesses(x, upper.length > 0 ? heldDepthAt(upper[upper.length - 1]!, x) : 0).slice(0, n - 2);
    const above = upperThicknesses.reduce((sum, h, k) => sum + h * q[k]!, 0);
    const lowest = (delay - above) / q[n - 2]!;
    if (!(lowest > 0) || !Number.isFinite(lowest)) continue;
    const top = upper.length > 0 ? heldDepthAt(upper[upper.length - 1]!, x) : 0;
    anchors.push({ shot, x, depth: top + lowest, delay, picks: residuals.length });
  }
  anchors.sort((left, right) => left.x - right.x);
  // One anchor per position (two shots at one x: their mean).
  const merged: { x: number; depth: number[] }[] = [];
  for (const anchor of anchors) {
    const previous = merged[merged.length - 1];
    if (previous && previous.x === anchor.x) previous.depth.push(anchor.depth);
    else merged.push({ x: anchor.x, depth: [anchor.depth] });
  }
  const mean = (values: readonly number[]) => values.reduce((sum, value) => sum + value, 0) / values.length;
  const left = merged.filter((entry) => entry.x < first);
  const right = merged.filter((entry) => entry.x > last);
  return {
    interface: {
      x: [...left.map((entry) => entry.x), ...section.x, ...right.map((entry) => entry.x)],
      depth: [...left.map((entry) => mean(entry.depth)), ...section.depth, ...right.map((entry) => mean(entry.depth))],
    },
    anchors,
  };
}
