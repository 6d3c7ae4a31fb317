/**
 * Types of the branch stage: the picks of one shot side, the straight-line fits through them and
 * their split into the direct branch and head-wave branches. All values SI (m, s, s/m, m/s).
 */

/** Forward = receivers beyond the source (x_r > x_s); reverse = receivers before it (x_r < x_s). */
export type Side = 'forward' | 'reverse';

/** How a line is fitted. `least-squares` is OLS, or WLS when every pick has a sigma. */
export type FitMethod = 'least-squares' | 'theil-sen' | 'huber';

export interface FitOptions {
  /** Default `least-squares`. */
  readonly method?: FitMethod;
  /** Force the line through t = 0 at x = 0 (direct wave of a surface shot). Default false. */
  readonly throughOrigin?: boolean;
}

/**
 * A straight-line fit t = intercept + slope·x through the picks of one branch, with the full
 * uncertainty a depth calculation needs.
 */
export interface LineFit {
  readonly method: FitMethod;
  /** True when weights 1/σ² from the picks' sigmas were used. */
  readonly weighted: boolean;
  readonly throughOrigin: boolean;
  /** Apparent slowness, s/m. */
  readonly slope: number;
  /** Intercept time, s (exactly 0 when `throughOrigin`). */
  readonly intercept: number;
  readonly slopeSE: number;
  /** 0 when `throughOrigin`. */
  readonly interceptSE: number;
  /** Cov(intercept, slope), s²/m; 0 when `throughOrigin`. */
  readonly covariance: number;
  readonly count: number;
  /** count − number of fitted parameters. */
  readonly degreesOfFreedom: number;
  /** Residual standard deviation σ̂, s (unweighted residuals). */
  readonly residualSD: number;
  /** Σ r², s² (unweighted). */
  readonly residualSumOfSquares: number;
  /** Σ (r/σ)² when weighted, else null. */
  readonly chiSquare: number | null;
  /** Residuals t − fitted, s, in the order of the input. */
  readonly residuals: readonly number[];
  /** Final IRLS weights (Huber) in input order, else null. */
  readonly robustWeights: readonly number[] | null;
  /** 1/slope, m/s. */
  readonly apparentVelocity: number;
  /** SE(b)/b², m/s. */
  readonly apparentVelocitySE: number;
  /** 95 % interval of the velocity from the Student-t slope interval; null when unbounded. */
  readonly velocityInterval95: readonly [number, number] | null;
}

/** Why a fit could not be made (a value, never a throw). */
export type FitRefusal = {
  readonly ok: false;
  readonly code: 'too-few-picks' | 'offsets-all-equal' | 'not-finite';
  readonly message: string;
};
export type FitOutcome = { readonly ok: true; readonly fit: LineFit } | FitRefusal;

/** The picks of one shot on one side, sorted by offset. */
export interface SidePicks {
  readonly shot: string;
  readonly side: Side;
  /** Source position, m. */
  readonly sourceX: number;
  /** |receiverX − sourceX|, m, ascending (ties kept in file order). */
  readonly offsets: readonly number[];
  /** First-arrival times, s, aligned with `offsets`. */
  readonly times: readonly number[];
  /** Pick sigmas, s, aligned with `offsets`, when every pick on this side has one; else null. */
  readonly sigmas: readonly number[] | null;
  /** User-assigned branch per pick (null = automatic), aligned with `offsets`. */
  readonly userBranches: readonly (number | null)[];
  /** Index of each pick in `PickSet.picks`, aligned with `offsets`. */
  readonly pickIndices: readonly number[];
  /** True when the source is at the surface (no source depth given or depth 0). */
  readonly surfaceShot: boolean;
}

export interface Branch {
  /** 1 = direct wave; n ≥ 2 = head wave along the top of layer n. */
  readonly index: number;
  /** Positions within the SidePicks arrays of the picks this branch holds, ascending. */
  readonly members: readonly number[];
  readonly fit: LineFit;
  /** Offsets of the nearest and farthest pick on the branch, m. */
  readonly firstOffset: number;
  readonly lastOffset: number;
  readonly assignedBy: 'automatic' | 'user';
}

/** One candidate number of branches considered by model selection. */
export interface SegmentationCandidate {
  readonly branchCount: number;
  /** Breakpoints as positions in the side arrays where each branch after the first starts. */
  readonly starts: readonly number[];
  readonly residualSumOfSquares: number;
  readonly bic: number;
  /** The physical constraint it failed, or null when it passed them all. */
  readonly failedConstraint: string | null;
}

export interface SegmentOptions {
  /** Fewest picks per automatic branch. Default 3. */
  readonly minPicksPerBranch?: number;
  /** Most branches tried. Default 5. */
  readonly maxBranches?: number;
  /** Fit method for the reported fits. Default `least-squares`. */
  readonly fitMethod?: FitMethod;
  /**
   * Smallest time resolution of the picks, s (sample interval); the RSS floor n·(dt²/12) keeps
   * noise-free data finite in the BIC. Default 1e-4 s at engineering scale.
   */
  readonly timeResolution?: number;
}

export interface SideSegmentation {
  readonly sidePicks: SidePicks;
  /** Branches in order of offset, indices 1, 2, … (gaps possible only when the user assigns them). */
  readonly branches: readonly Branch[];
  /** Positions (in side arrays) of picks the user excluded. */
  readonly excluded: readonly number[];
  readonly assignedBy: 'automatic' | 'user';
  /** Every candidate tried, in order of branch count (empty when the user assigned branches). */
  readonly candidates: readonly SegmentationCandidate[];
  /** Notes for the checks: e.g. the BIC-best candidate failed a constraint. */
  readonly notes: readonly SegmentationNote[];
}

export interface SegmentationNote {
  readonly code: 'segmentation-constraint-failed' | 'user-branch-gap' | 'fit-refused' | 'outliers-screened';
  readonly message: string;
  readonly branch?: number;
}
