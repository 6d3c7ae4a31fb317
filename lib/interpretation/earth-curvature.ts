/**
 * Earth curvature on long profiles: whether a flat-earth reading of the branches is good enough,
 * and, where it is not, the layers refit in a sphere of constant-velocity shells.
 *
 * The flat-layer formulas treat the surface as a plane. On a sphere the deep head wave (Pn) runs
 * along a shorter arc than the surface offset and arrives early, by more the longer the offset
 * (`spherical-earth.ts`; Müller1971, Chapman1973 for the equivalent earth-flattening view). For the
 * survey's own flat model this stage computes the offset at which the flat-earth error of the
 * deepest branch passes the pick uncertainty σ (`flatErrorOffset`), and then:
 *
 *   - `auto` (default): the sphere is used when the longest offset on a fitted branch passes that
 *     offset; otherwise the flat reading stands, and the offset is reported;
 *   - `flat`: the flat reading stands; when the offsets pass the limit a warning gives the bias the
 *     flat reading carries (computed, below);
 *   - `spherical`: the sphere is used whatever the offsets.
 *
 * In the sphere every fitted branch pick (offset, time, sigma, branch) of every shot side enters one
 * joint fit of v_1…v_N and h_1…h_{N−1} (`fitSphericalLayers`: Levenberg–Marquardt from the flat
 * model, SEs from σ̂²(JᵀWJ)⁻¹). The bias of the flat reading is predicted by fitting the sphere's
 * own times at the same offsets with the flat formulas (`predictedFlatBias`): flat − spherical per
 * velocity and depth. σ is the mean pick sigma where every pick has one, else the pooled residual
 * SD of the branch lines, at least the time resolution.
 *
 * Assumptions: shells concentric with the Earth, i.e. horizontal layers in the flat view, one
 * velocity per shell; dipping or undulating layers show as misfit, not as curvature. Edges: no
 * result (null) without a model of at least two layers; a fit that does not converge is reported
 * with its notes and not used (the flat reading stands, with a warning).
 */
import type { SideSegmentation } from '../branches/types.js';
import type { InterpretationWarning } from '../checks/warning.js';
import { formatQuantity } from '../checks/wording.js';
import type { LayeredModel } from '../model/layered-model.js';
import { flatEarthError, flatErrorOffset } from '../model/spherical-earth.js';
import { fitSphericalLayers, predictedFlatBias, type FlatBias, type SphericalFit, type SphericalPick } from '../depth/spherical-fit.js';
import { EARTH_MEAN_RADIUS } from '../model/earth-flattening.js';

export type EarthModelChoice = 'auto' | 'flat' | 'spherical';

export interface EarthCurvature {
  readonly choice: EarthModelChoice;
  /** The layers were refit in a sphere and the sphere's values are the ones to use. */
  readonly applied: boolean;
  /** Why the sphere was or was not used, in words. */
  readonly reason: string;
  /** Longest offset on a fitted branch, m. */
  readonly maxOffset: number;
  /** The pick uncertainty the flat-earth error is held against, s. */
  readonly pickSigma: number;
  /** Offset at which the flat-earth error of the deepest branch passes pickSigma, m; null if it never does within π·R. */
  readonly flatErrorOffset: number | null;
  /** Flat − spherical time of the deepest branch at maxOffset, s (null where the branch does not reach). */
  readonly flatErrorAtMaxOffset: number | null;
  /** The joint fit in the sphere (run whenever it is applied or the offsets pass the limit). */
  readonly fit: SphericalFit | null;
  /** What a flat reading of the sphere's times carries, flat − spherical. */
  readonly flatBias: FlatBias | null;
  readonly warnings: readonly InterpretationWarning[];
}

/** The picks of every fitted branch of every side, as the spherical fit takes them (sigmas all or none). */
export function branchPicks(segmentations: readonly SideSegmentation[], layers: number): SphericalPick[] {
  const picks: { offset: number; time: number; sigma: number | null; branch: number }[] = [];
  for (const { sidePicks, branches } of segmentations) {
    for (const branch of branches) {
      if (branch.index > layers) continue;
      for (const member of branch.members) {
        picks.push({ offset: sidePicks.offsets[member]!, time: sidePicks.times[member]!, sigma: sidePicks.sigmas?.[member] ?? null, branch: branch.index });
      }
    }
  }
  const everySigma = picks.every((pick) => pick.sigma !== null && pick.sigma > 0);
  return everySigma ? picks : picks.map((pick) => ({ ...pick, sigma: null }));
}

function pooledResidualSD(segmentations: readonly SideSegmentation[]): number {
  let squares = 0;
  let freedom = 0;
  for (const { branches } of segmentations) {
    for (const { fit } of branches) {
      if (fit.degreesOfFreedom <= 0) continue;
      squares += fit.residualSumOfSquares;
      freedom += fit.degreesOfFreedom;
    }
  }
  return freedom > 0 ? Math.sqrt(squares / freedom) : 0;
}

const km = (metres: number) => formatQuantity(metres / 1000, 'km', 4);
const kms = (metresPerSecond: number) => formatQuantity(metresPerSecond / 1000, 'km/s', 4);
const seconds = (value: number) => formatQuantity(value, 's', 3);

export function earthCurvature(
  segmentations: readonly SideSegmentation[],
  model: LayeredModel | null,
  choice: EarthModelChoice,
  timeResolution: number,
): EarthCurvature | null {
  if (model === null || model.velocities.length < 2) return null;
  const layers = model.velocities.length;
  const picks = branchPicks(segmentations, layers);
  if (picks.length === 0) return null;
  const maxOffset = picks.reduce((largest, pick) => Math.max(largest, pick.offset), 0);
  const sigmas = picks.map((pick) => pick.sigma).filter((sigma): sigma is number => sigma !== null);
  const pickSigma = Math.max(sigmas.length > 0 ? sigmas.reduce((sum, sigma) => sum + sigma, 0) / sigmas.length : pooledResidualSD(segmentations), timeResolution);
  const sphere = { ...model, radius: EARTH_MEAN_RADIUS };
  const limit = flatErrorOffset(sphere, pickSigma, layers, { maxOffset: Math.PI * EARTH_MEAN_RADIUS * 0.999 });
  const beyond = limit !== null && maxOffset > limit;
  const errorAtMax = flatErrorAt(sphere, layers, maxOffset);
  const warnings: InterpretationWarning[] = [];
  const base = { choice, maxOffset, pickSigma, flatErrorOffset: limit, flatErrorAtMaxOffset: errorAtMax };
  const limitWords = limit === null ? 'the flat-earth error of the deepest branch stays within the pick sigma at every offset' : `the flat-earth error of the deepest branch passes the pick sigma ${seconds(pickSigma)} at ${km(limit)}`;

  if (choice === 'flat' && !beyond) return { ...base, applied: false, reason: `flat earth, as asked: ${limitWords}, and the offsets reach ${km(maxOffset)}`, fit: null, flatBias: null, warnings };
  if (choice === 'auto' && !beyond) return { ...base, applied: false, reason: `flat earth: the offsets reach ${km(maxOffset)}; ${limitWords}`, fit: null, flatBias: null, warnings };

  const fit = fitSphericalLayers(picks, model);
  const usable = fit.converged && fit.velocitySE !== null;
  const flatBias = usable ? predictedFlatBias(fit.model, picks) : null;
  const deepest = layers - 1;
  const biasWords = flatBias === null
    ? ''
    : `; a flat reading of these offsets errs by ${formatQuantity((flatBias.velocityBias[layers - 1] ?? 0) / 1000, 'km/s', 3)} in V_${layers}` +
      (flatBias.depthBias[deepest - 1] !== null && flatBias.depthBias[deepest - 1] !== undefined ? ` and ${formatQuantity(flatBias.depthBias[deepest - 1]! / 1000, 'km', 3)} in the depth of interface ${deepest}` : '') +
      ' (flat − spherical)';
  if (choice === 'flat') {
    warnings.push({
      code: 'flat-earth-bias',
      level: 'warning',
      message: `the offsets reach ${km(maxOffset)}, beyond ${km(limit!)} where a flat earth errs by more than the pick sigma (${seconds(errorAtMax ?? 0)} at the longest offset); the layers are read on a flat earth as asked${biasWords}; choose the spherical earth model to correct for it`,
      layer: layers,
      details: { maxOffset, flatErrorOffset: limit!, ...(flatBias ? { velocityBias: flatBias.velocityBias[layers - 1] ?? 0 } : {}) },
    });
    return { ...base, applied: false, reason: `flat earth, as asked, although ${limitWords}`, fit, flatBias, warnings };
  }
  if (!usable) {
    warnings.push({
      code: 'earth-curvature-not-applied',
      level: 'warning',
      message: `the layers could not be refit in a sphere (${fit.notes.map((note) => note.message).join('; ') || 'the fit did not converge'}); the flat-earth reading stands, ${choice === 'spherical' ? 'although a spherical earth was asked for' : `although ${limitWords}`} — check the branches of the longest offsets`,
      layer: layers,
    });
    return { ...base, applied: false, reason: 'flat earth: the spherical fit failed', fit, flatBias: null, warnings };
  }
  const moho = fit.depths[deepest - 1]!;
  warnings.push({
    code: 'earth-curvature-applied',
    level: 'info',
    message: `${choice === 'spherical' ? 'spherical earth, as asked' : `the offsets reach ${km(maxOffset)}, beyond ${km(limit!)} where a flat earth errs by more than the pick sigma`}: the layers were refit in a sphere of radius ${km(EARTH_MEAN_RADIUS)}, giving V_${layers} ${kms(fit.model.velocities[layers - 1]!)} and interface ${deepest} at ${km(moho)}${biasWords}`,
    layer: layers,
    details: { maxOffset, ...(limit !== null ? { flatErrorOffset: limit } : {}) },
  });
  return {
    ...base,
    applied: true,
    reason: choice === 'spherical' ? 'spherical earth, as asked' : `spherical earth: the offsets reach ${km(maxOffset)}, beyond ${km(limit!)}`,
    fit,
    flatBias,
    warnings,
  };
}

/** Flat − spherical time of `branch` at `offset`, or null where either geometry has no such arrival. */
function flatErrorAt(sphere: LayeredModel & { radius: number }, branch: number, offset: number): number | null {
  return flatEarthError(sphere, [offset]).find((entry) => entry.branch === branch)?.differences[0] ?? null;
}
