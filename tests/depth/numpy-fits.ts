/**
 * Straight-line fits made by numpy (an outside reference library), so that the depth tests take
 * their branch parameters from a fit that is not slopebreak's own. Ordinary least squares
 * t = τ + s·x by numpy.linalg.lstsq; the covariance σ̂²·(AᵀA)⁻¹ with σ̂² = Σr²/(n − p)
 * (Draper & Smith 1998 ch. 1); through the origin, A has the single column x.
 */
import type { BranchParameters } from '../../lib/depth/types.js';
import { runPythonJson } from '../helpers/python.js';

export interface PickBranch {
  readonly offsets: readonly number[];
  readonly times: readonly number[];
  readonly throughOrigin: boolean;
}

const SCRIPT = `
import json, sys
import numpy as np
out = []
for branch in json.load(sys.stdin):
    x = np.array(branch['offsets'], dtype=float)
    t = np.array(branch['times'], dtype=float)
    A = x[:, None] if branch['throughOrigin'] else np.column_stack([np.ones_like(x), x])
    coef, *_ = np.linalg.lstsq(A, t, rcond=None)
    r = t - A @ coef
    dof = len(x) - A.shape[1]
    sigma2 = float(r @ r) / dof if dof > 0 else 0.0
    C = sigma2 * np.linalg.inv(A.T @ A)
    if branch['throughOrigin']:
        out.append(dict(slowness=float(coef[0]), intercept=0.0, slownessVariance=float(C[0, 0]), interceptVariance=0.0, covariance=0.0))
    else:
        out.append(dict(slowness=float(coef[1]), intercept=float(coef[0]), slownessVariance=float(C[1, 1]), interceptVariance=float(C[0, 0]), covariance=float(C[0, 1])))
print(json.dumps(out))
`;

/** Fit every branch with numpy; one `BranchParameters` per branch, in order. */
export function numpyLineFits(branches: readonly PickBranch[]): BranchParameters[] {
  return runPythonJson<BranchParameters[]>(SCRIPT, branches, ['numpy']);
}
