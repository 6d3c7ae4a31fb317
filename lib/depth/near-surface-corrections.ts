/**
 * Near-surface corrections of head-wave times: the datum correction for sources and receivers at
 * different elevations, and the uphole correction of a buried shot (Telford1990 ch. 4;
 * Sheriff1995 ch. 4; METHODS §8).
 *
 * **Datum correction.** Bringing an end of a head-wave ray (source or receiver) at elevation e down
 * to a flat datum E_d through near-surface velocity V_w removes the time the ray spends on that
 * leg *along its own path*, which for branch n is
 *
 *     Δt = (e − E_d) · cos θ / V_w,   sin θ = V_w / V_n   (θ: the ray's angle in the near surface)
 *
 * so the datum time of a pick is t′ = t − Δt_source − Δt_receiver, with offsets unchanged. It is
 * exact for plane horizontal layers (a plane-wave argument) and depends on the branch through V_n:
 * apply it after the picks are on branches. The vertical static Δe/V_w used for reflections
 * over-corrects by Δe·(1 − cos θ)/V_w.
 *
 * **Uphole correction.** A shot at depth d in layer 1 with uphole time t_uh (so V_1 = d / t_uh):
 * its branch-n head wave arrives d·cos θ/V_1 = t_uh·cos θ early; the surface-equivalent time is
 * t + t_uh·cos θ. Adding the whole uphole time over-corrects by t_uh·(1 − cos θ).
 *
 * Standard errors are first-order (JCGM2008 §5.1), from the velocities' (and uphole time's and
 * depth's) standard errors taken as independent; elevations and the datum are taken as exact.
 *
 * Edges (each is a refusal with a code and a message, never a throw, since the inputs come from
 * data and fits): a refractor velocity not above the near-surface velocity gives no head wave
 * (`no-head-wave`); a velocity, uphole time or depth not finite and positive (`not-positive`). A
 * datum above an end (negative lowering) is computed as given — it raises the end — and flagged
 * `datumAboveEnd`, since the datum is meant to lie below every source and receiver.
 *
 * @example
 * headWaveDatumCorrection({ lowering: 3, nearSurfaceVelocity: 600, refractorVelocity: 2000 })
 * // → { ok: true, time: 0.00476970 (s), cosine: 0.953939, datumAboveEnd: false, … }  (METHODS 8.2)
 * upholeCorrection({ upholeTime: 2 / 600, shotDepth: 2, refractorVelocity: 2000 })
 * // → { ok: true, time: 0.00317980 (s), cosine: 0.953939, … }  (METHODS 8.1)
 */

/** A correction, or why none can be made. Times in seconds. */
export type NearSurfaceCorrection =
  | {
      readonly ok: true;
      /** The time to remove (datum) or add (uphole), s. */
      readonly time: number;
      readonly timeSE: number;
      /** cos θ of the branch's ray in the near-surface layer. */
      readonly cosine: number;
      /** The datum lies above this end (datum corrections only). */
      readonly datumAboveEnd: boolean;
    }
  | { readonly ok: false; readonly code: 'no-head-wave' | 'not-positive'; readonly message: string };

function refuse(code: 'no-head-wave' | 'not-positive', message: string): NearSurfaceCorrection {
  return { ok: false, code, message };
}

const positive = (value: number) => Number.isFinite(value) && value > 0;

export interface DatumCorrectionInput {
  /** Elevation of the end (source or receiver) minus the datum elevation, m. */
  readonly lowering: number;
  /** Velocity of the near-surface layer the leg is removed from, m/s. */
  readonly nearSurfaceVelocity: number;
  readonly nearSurfaceVelocitySE?: number;
  /** Velocity of the refractor whose head wave the pick is (V_n), m/s. */
  readonly refractorVelocity: number;
  readonly refractorVelocitySE?: number;
}

/** The time to remove from a head-wave pick for one end lowered to the datum (see the module comment). */
export function headWaveDatumCorrection(input: DatumCorrectionInput): NearSurfaceCorrection {
  const { lowering, nearSurfaceVelocity: nearSurface, refractorVelocity: refractor } = input;
  if (!positive(nearSurface) || !positive(refractor)) {
    return refuse('not-positive', `velocities must be positive, got near-surface ${nearSurface} m/s and refractor ${refractor} m/s`);
  }
  if (!Number.isFinite(lowering)) return refuse('not-positive', `the elevation above the datum must be a number, got ${lowering}`);
  if (refractor <= nearSurface) {
    return refuse('no-head-wave', `a refractor of ${refractor} m/s under a near-surface layer of ${nearSurface} m/s gives no head wave, so there is no datum correction for it`);
  }
  // Δt = Δe·√(1/V_w² − 1/V_n²) = Δe·cos θ / V_w.
  const slownessRoot = Math.sqrt(1 / nearSurface ** 2 - 1 / refractor ** 2);
  const time = lowering * slownessRoot;
  const byNearSurface = -lowering / (nearSurface ** 3 * slownessRoot);
  const byRefractor = lowering / (refractor ** 3 * slownessRoot);
  const timeSE = Math.hypot(byNearSurface * (input.nearSurfaceVelocitySE ?? 0), byRefractor * (input.refractorVelocitySE ?? 0));
  return { ok: true, time, timeSE, cosine: slownessRoot * nearSurface, datumAboveEnd: lowering < 0 };
}

export interface UpholeCorrectionInput {
  /** Uphole time: from the shot instant to the first break at the hole's collar, s. */
  readonly upholeTime: number;
  readonly upholeTimeSE?: number;
  /** Depth of the shot below ground, m. */
  readonly shotDepth: number;
  readonly shotDepthSE?: number;
  /** Velocity of the refractor whose head wave the pick is (V_n), m/s. */
  readonly refractorVelocity: number;
  readonly refractorVelocitySE?: number;
}

/** The time to add to a buried shot's branch-n pick to make it a surface shot's (see the module comment). */
export function upholeCorrection(input: UpholeCorrectionInput): NearSurfaceCorrection {
  const { upholeTime, shotDepth, refractorVelocity: refractor } = input;
  if (!positive(upholeTime) || !positive(shotDepth) || !positive(refractor)) {
    return refuse('not-positive', `uphole time, shot depth and refractor velocity must be positive, got ${upholeTime} s, ${shotDepth} m and ${refractor} m/s`);
  }
  const upholeVelocity = shotDepth / upholeTime;
  if (refractor <= upholeVelocity) {
    return refuse('no-head-wave', `a refractor of ${refractor} m/s is not faster than the ${upholeVelocity.toPrecision(4)} m/s between the shot and the surface (depth / uphole time), so it gives no head wave to correct`);
  }
  // Δt = t_uh·cos θ = √(t_uh² − d²/V_n²).
  const time = Math.sqrt(upholeTime ** 2 - shotDepth ** 2 / refractor ** 2);
  const byUphole = upholeTime / time;
  const byDepth = -shotDepth / (refractor ** 2 * time);
  const byRefractor = shotDepth ** 2 / (refractor ** 3 * time);
  const timeSE = Math.hypot(byUphole * (input.upholeTimeSE ?? 0), byDepth * (input.shotDepthSE ?? 0), byRefractor * (input.refractorVelocitySE ?? 0));
  return { ok: true, time, timeSE, cosine: time / upholeTime, datumAboveEnd: false };
}

/**
 * The direct wave of a buried shot: t = √(x² + d²)/V_1 (hyperbolic near the shot, where a
 * straight-line fit would show a positive intercept). `offset` and `shotDepth` in m, s returned.
 */
export function buriedShotDirectTime(offset: number, shotDepth: number, velocity: number): number {
  if (!positive(velocity)) throw new Error(`buriedShotDirectTime: the velocity must be positive, got ${velocity}`);
  return Math.hypot(offset, shotDepth) / velocity;
}

/**
 * True when a datum correction is more than half the corrected intercept time: the datum is too
 * low for the near-surface layer (METHODS §8: warn, choose a higher datum or a replacement velocity).
 */
export function datumTooLow(totalCorrection: number, correctedInterceptTime: number): boolean {
  return Math.abs(totalCorrection) > 0.5 * Math.abs(correctedInterceptTime);
}
