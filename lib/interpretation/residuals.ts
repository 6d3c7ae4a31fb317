/**
 * Forward check of the survey's layered model against every pick: synthetic first-arrival times of
 * the interpreted plane-layer model at each pick's offset (lib/model), residuals observed − model,
 * RMS per shot and χ²/ν when every pick of a shot has a sigma (METHODS §12).
 *
 * A pick the user assigned to branch n is compared with branch n's time even where it is not the
 * first arrival (a later phase supplied on purpose); where branch n does not exist at that offset
 * the first arrival is used. Excluded picks get a residual but do not count in the RMS.
 * With no model (no layer could be interpreted) every residual is null.
 */
import type { PickSet } from '../picks/types.js';
import type { LayeredModel } from '../model/layered-model.js';
import { branchTime, firstArrival } from '../model/layered-model.js';

export interface ShotResidual {
  readonly shot: string;
  readonly pickCount: number;
  readonly rms: number | null;
  readonly reducedChiSquare: number | null;
  /** RMS of the picks' sigmas, s, when every counted pick of the shot has one (what the RMS should be). */
  readonly sigmaRms: number | null;
}

export interface ForwardResiduals {
  /** Residual per pick, in PickSet order (null without a model). */
  readonly perPick: readonly (number | null)[];
  readonly perShot: readonly ShotResidual[];
  readonly overallRms: number | null;
}

export function modelTimeAt(model: LayeredModel, offset: number, branch: number | null): number {
  if (branch !== null && branch <= model.velocities.length) {
    const time = branchTime(model, branch, offset);
    if (time !== null) return time;
  }
  return firstArrival(model, offset).time;
}

export function forwardResiduals(pickSet: PickSet, model: LayeredModel | null): ForwardResiduals {
  const perPick = pickSet.picks.map((pick) =>
    model === null ? null : pick.time - modelTimeAt(model, Math.abs(pick.receiverX - pick.sourceX), pick.branch),
  );
  const groups = new Map<string, { squares: number; count: number; chi: number; sigmaSquares: number; allSigma: boolean }>();
  for (const shot of pickSet.shotIds) groups.set(shot, { squares: 0, count: 0, chi: 0, sigmaSquares: 0, allSigma: true });
  let totalSquares = 0;
  let totalCount = 0;
  pickSet.picks.forEach((pick, k) => {
    const residual = perPick[k];
    const group = groups.get(pick.shot);
    if (residual === null || residual === undefined || pick.excluded || !group) return;
    group.squares += residual * residual;
    group.count += 1;
    if (pick.sigma === null) group.allSigma = false;
    else {
      group.chi += (residual / pick.sigma) ** 2;
      group.sigmaSquares += pick.sigma * pick.sigma;
    }
    totalSquares += residual * residual;
    totalCount += 1;
  });
  const perShot = pickSet.shotIds.map((shot) => {
    const group = groups.get(shot)!;
    return {
      shot,
      pickCount: group.count,
      rms: model === null || group.count === 0 ? null : Math.sqrt(group.squares / group.count),
      reducedChiSquare: model === null || group.count === 0 || !group.allSigma ? null : group.chi / group.count,
      sigmaRms: group.count === 0 || !group.allSigma ? null : Math.sqrt(group.sigmaSquares / group.count),
    };
  });
  return { perPick, perShot, overallRms: model === null || totalCount === 0 ? null : Math.sqrt(totalSquares / totalCount) };
}
