/**
 * The physical constraints a split of one shot side into branches must meet (METHODS §4), tested
 * in this order; the first one failed is returned, or null when all pass:
 * 1. `slopes-positive` — every branch slope (apparent slowness) is > 0;
 * 2. `slopes-decreasing` — slopes strictly decrease with offset (apparent velocity increases
 *    branch by branch; a violation means dip, lateral change or a bad split);
 * 3. `intercepts-increasing` — refracted branches (index ≥ 2) have intercepts > 0 that strictly
 *    increase with branch index (this follows from q_{i,n+1} > q_{i,n}, METHODS §1);
 * 4. `crossovers-in-gaps` — consecutive lines intersect, x_c = (a_{k+1} − a_k)/(b_k − b_{k+1}),
 *    within the gap between their segments, [last offset of k, first offset of k+1], widened on
 *    each side by the larger of `crossoverTolerance` and 3 × `crossoverStandardError` (the
 *    intersection's propagated error and the zone where the lines differ by less than the scatter). The picks near a
 *    crossover differ by less than the noise, so the fitted intersection can fall a pick or so
 *    inside a segment: METHODS check case 4.1 puts it 0.68 m inside branch 2 with 2.5 m pick
 *    spacing; with noisy picks on short branches it can fall several picks inside.
 * 5. `slopes-distinct` — consecutive slopes differ by more than `DISTINCT_SLOPE_SE` standard
 *    errors of their difference (when the lines carry variances): otherwise the break splits one
 *    branch in two on noise alone.
 * Sources: Telford et al. 1990 ch. 4 (`Telford1990`); Palmer 1986 (`Palmer1986`).
 *
 * Edges: one branch can fail only constraint 1; an empty list passes; the tolerance must be ≥ 0
 * (misuse throws). The direct-wave intercept (constraint 4 of METHODS §4) is a check, not a
 * segmentation constraint, and is not tested here.
 *
 * @example
 * failedPhysicalConstraint([
 *   { slope: 1 / 400, intercept: 0, firstOffset: 2.5, lastOffset: 10 },
 *   { slope: 1 / 1600, intercept: 0.0194, firstOffset: 12.5, lastOffset: 35 },
 * ], 2.5) // null
 */

export type PhysicalConstraint = 'slopes-positive' | 'slopes-decreasing' | 'intercepts-increasing' | 'crossovers-in-gaps' | 'slopes-distinct';

/**
 * Each constraint in plain words, as a note names what a split shows when it fails it ("the split
 * has …"). The codes stay in `SegmentationCandidate.failedConstraint`; messages use these words.
 */
export const PHYSICAL_CONSTRAINT_WORDS: Readonly<Record<PhysicalConstraint, string>> = {
  'slopes-positive': 'a branch whose times do not increase with offset',
  'slopes-decreasing': 'apparent velocity falling with offset',
  'intercepts-increasing': 'intercept times out of order',
  'crossovers-in-gaps': 'lines that cross outside the gap between their picks',
  'slopes-distinct': 'neighbouring branches whose velocities cannot be told apart',
};

/** The plain words of a constraint code (`PHYSICAL_CONSTRAINT_WORDS`); an unknown code is misuse and throws. */
export function describePhysicalConstraint(code: string): string {
  if (!Object.hasOwn(PHYSICAL_CONSTRAINT_WORDS, code)) {
    throw new RangeError(`describePhysicalConstraint: unknown constraint ${code}; expected one of ${Object.keys(PHYSICAL_CONSTRAINT_WORDS).join(', ')}`);
  }
  return PHYSICAL_CONSTRAINT_WORDS[code as PhysicalConstraint];
}

/**
 * Standard errors by which consecutive slopes must differ for two branches to be two refractors
 * (choice made here: a break whose velocities cannot be told apart at 3 SE is noise, and
 * over-splitting a branch invents a layer; 3 SE keeps a false split below ~0.3 % per break).
 */
export const DISTINCT_SLOPE_SE = 3;

/** A fitted straight line of one branch and the offsets its picks span. */
export interface SegmentLine {
  readonly slope: number;
  readonly intercept: number;
  readonly firstOffset: number;
  readonly lastOffset: number;
  /** Variances and covariance of the line (absent: treated as exact). */
  readonly slopeVariance?: number;
  readonly interceptVariance?: number;
  readonly covariance?: number;
  /** Scatter of the picks about the line, s (absent: 0). */
  readonly residualSD?: number;
}

/** Crossover SEs within which a fitted intersection still counts as "in the gap". */
export const CROSSOVER_GAP_SE = 3;

/**
 * Half-width of the offset zone around a crossover in which two branches differ by less than the
 * picks' scatter, m: σ_t/|s_k − s_{k+1}| with σ_t the RMS of the two branches' residual SDs. A pick
 * in that zone may belong to either branch. 0 when the slownesses are equal (no crossover).
 */
export function crossoverAmbiguity(earlierResidualSD: number, laterResidualSD: number, slownessGap: number): number {
  const scatter = Math.hypot(earlierResidualSD, laterResidualSD) / Math.SQRT2;
  const ambiguity = scatter / Math.abs(slownessGap);
  return Number.isFinite(ambiguity) ? ambiguity : 0;
}

/**
 * Uncertainty of where two branches cross, m: the standard error of the intersection of the two
 * independent lines by first-order propagation, combined in quadrature with the half-width of the
 * zone in which the lines differ by less than the picks' scatter, σ_t/|s_k − s_{k+1}| (a pick
 * there may belong to either branch).
 */
export function crossoverStandardError(earlier: SegmentLine, later: SegmentLine): number {
  const slownessGap = earlier.slope - later.slope;
  const crossover = (later.intercept - earlier.intercept) / slownessGap;
  const variance =
    ((earlier.interceptVariance ?? 0) + (later.interceptVariance ?? 0)) / slownessGap ** 2 +
    (crossover * crossover * ((earlier.slopeVariance ?? 0) + (later.slopeVariance ?? 0))) / slownessGap ** 2 +
    (2 * crossover * ((earlier.covariance ?? 0) + (later.covariance ?? 0))) / slownessGap ** 2;
  const ambiguity = crossoverAmbiguity(earlier.residualSD ?? 0, later.residualSD ?? 0, slownessGap);
  return Math.sqrt(Math.max(0, variance) + ambiguity * ambiguity);
}

export function failedPhysicalConstraint(lines: readonly SegmentLine[], crossoverTolerance: number): PhysicalConstraint | null {
  if (!(crossoverTolerance >= 0)) {
    throw new RangeError(`failedPhysicalConstraint: the crossover tolerance must be ≥ 0 m, got ${crossoverTolerance}`);
  }
  if (lines.some((line) => !(line.slope > 0))) return 'slopes-positive';
  const pairs = lines.slice(1).map((later, position) => [lines[position] as SegmentLine, later] as const);
  if (pairs.some(([earlier, later]) => !(later.slope < earlier.slope))) return 'slopes-decreasing';
  const refracted = lines.slice(1);
  if (
    refracted.some(
      (line, position) => !(line.intercept > 0) || (position > 0 && !(line.intercept > (refracted[position - 1] as SegmentLine).intercept)),
    )
  ) {
    return 'intercepts-increasing';
  }
  const outsideGap = pairs.some(([earlier, later]) => {
    const crossover = (later.intercept - earlier.intercept) / (earlier.slope - later.slope);
    const tolerance = Math.max(crossoverTolerance, CROSSOVER_GAP_SE * crossoverStandardError(earlier, later));
    return !(crossover >= earlier.lastOffset - tolerance && crossover <= later.firstOffset + tolerance);
  });
  if (outsideGap) return 'crossovers-in-gaps';
  const indistinct = pairs.some(([earlier, later]) => {
    const separation = Math.sqrt((earlier.slopeVariance ?? 0) + (later.slopeVariance ?? 0));
    return earlier.slope - later.slope <= DISTINCT_SLOPE_SE * separation;
  });
  return indistinct ? 'slopes-distinct' : null;
}
