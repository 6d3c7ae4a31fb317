/**
 * Shapes an SI survey result into the interpretation JSON in display units (interpretation/shape.ts).
 * Pure conversion and arrangement: no numbers are computed here beyond unit changes and the
 * square roots of variances.
 */
import type { SurveyResult, SideResult } from '../interpret.js';
import type { DEFAULT_OPTIONS } from '../interpret.js';
import type { DisplayUnits } from '../units.js';
import { distanceFromSI, timeFromSI, velocityFromSI } from '../units.js';
import type { LayerDepths } from '../depth/types.js';
import type { Branch } from '../branches/types.js';
import { REFERENCES, type ReferenceKey } from '../references.js';
import { STANDING_CAUTIONS, HORIZONTAL_LAYER_ASSUMPTION } from '../cautions.js';
import { thicknessesFromDepths } from './survey-layers.js';
import type { BranchResult, Interpretation, LayerResult, RefractorResult, ShotSideResult } from './shape.js';

export interface PresentOptions {
  readonly units: DisplayUnits;
  readonly options: typeof DEFAULT_OPTIONS;
  readonly sourceName: string | null;
  readonly softwareVersion: string;
}

const VELOCITY_REFERENCES: ReferenceKey[] = ['Telford1990', 'Press2007', 'Bevington2003'];
const DEPTH_REFERENCES: ReferenceKey[] = ['Telford1990', 'Kearey2002', 'Palmer1986', 'JCGM2008'];
const FIT_REFERENCES: Record<string, ReferenceKey[]> = {
  'least-squares': ['Press2007', 'Bevington2003'],
  'theil-sen': ['Theil1950', 'Sen1968'],
  huber: ['Huber1964', 'Huber1981', 'Holland1977'],
};

export function shapeInterpretation(result: SurveyResult, present: PresentOptions): Interpretation {
  const { units } = present;
  const distance = (metres: number) => distanceFromSI(metres, units);
  const time = (seconds: number) => timeFromSI(seconds, units);
  const velocity = (metresPerSecond: number) => velocityFromSI(metresPerSecond, units);
  const { combined, pickSet } = result;

  const { thicknesses, covariance: thicknessCovariance } = thicknessesFromDepths(combined.depths, combined.depthCovariance);
  // The survey model decides what is resolved: layers 1…M with the last one the half-space; a layer
  // seen beyond it has a velocity but no depth (the warnings say why).
  const resolved = result.model?.velocities.length ?? 0;
  const layers: LayerResult[] = [];
  combined.slownesses.forEach((entry, k) => {
    if (entry === null || !(entry.value > 0)) return;
    const index = k + 1;
    const hasTop = index <= resolved;
    const hasThickness = index < resolved;
    const depthToTop = k === 0 ? 0 : (combined.depths[k - 1] ?? Number.NaN);
    const depthToTopSE = k === 0 ? 0 : Math.sqrt(combined.depthCovariance[k - 1]?.[k - 1] ?? Number.NaN);
    layers.push({
      index,
      velocity: velocity(1 / entry.value),
      velocitySE: velocity(entry.standardError / (entry.value * entry.value)),
      thickness: hasThickness ? distance(thicknesses[k] ?? Number.NaN) : null,
      thicknessSE: hasThickness ? distance(Math.sqrt(thicknessCovariance[k]?.[k] ?? Number.NaN)) : null,
      depthToTop: hasTop ? distance(depthToTop) : null,
      depthToTopSE: hasTop ? distance(depthToTopSE) : null,
      shotSides: entry.contributors,
      velocityFrom: {
        method: `weighted mean of the branch-${index} slownesses of ${entry.contributors} shot side(s)`,
        references: VELOCITY_REFERENCES,
      },
      depthFrom: {
        method: !hasTop
          ? 'not resolved (see the warnings)'
          : k === 0
            ? 'ground surface'
            : `intercept-time method (plane horizontal layers) under ${combined.depthSides[k - 1] ?? 0} shot side(s), weighted by their full covariance`,
        references: hasTop && k > 0 ? DEPTH_REFERENCES : [],
      },
    });
  });

  // One pass each over the sides and the picks, not one per shot (surveys run to 10^5 picks and more).
  const sidesByShot = new Map<string, SideResult[]>();
  for (const side of result.sides) {
    const shot = side.segmentation.sidePicks.shot;
    sidesByShot.set(shot, [...(sidesByShot.get(shot) ?? []), side]);
  }
  const firstPickByShot = new Map<string, (typeof pickSet.picks)[number]>();
  for (const pick of pickSet.picks) if (!firstPickByShot.has(pick.shot)) firstPickByShot.set(pick.shot, pick);
  const shots = pickSet.shotIds.map((id) => {
    const sides = sidesByShot.get(id) ?? [];
    const first = firstPickByShot.get(id);
    return {
      id,
      sourceX: distance(first?.sourceX ?? Number.NaN),
      sourceElevation: first?.sourceElevation == null ? null : distance(first.sourceElevation),
      sourceDepth: first?.sourceDepth == null ? null : distance(first.sourceDepth),
      sides: sides.map((side) => shapeSide(side, result, units)),
    };
  });

  /** Depth under each shot side by one per-side method, as one refractor entry per interface. */
  const refractorsBy = (method: string, depthsOf: (side: SideResult) => LayerDepths | null): RefractorResult[] =>
    combined.depths.map((_, k) => ({
      interface: k + 1,
      method,
      references: DEPTH_REFERENCES,
      points: result.sides.flatMap((side) => {
        const depths = depthsOf(side);
        const depth = depths?.depths[k];
        if (!depths || depth === undefined) return [];
        const { sidePicks } = side.segmentation;
        const elevation = pickSet.picks[sidePicks.pickIndices[0] ?? -1]?.sourceElevation ?? null;
        return [
          {
            x: distance(sidePicks.sourceX),
            depth: distance(depth),
            depthSE: distance(depths.depthSE[k] ?? Number.NaN),
            elevation: elevation === null ? null : distance(elevation - depth),
            shot: sidePicks.shot,
            side: sidePicks.side,
          },
        ];
      }),
    }));
  const refractors: RefractorResult[] = [
    ...refractorsBy('intercept-time method under each shot side (plane horizontal layers)', (side) => side.interceptTime),
    ...refractorsBy('crossover-distance method under each shot side (plane horizontal layers)', (side) => side.crossoverDistance),
  ].filter((refractor) => refractor.points.length > 0);

  const usedReferences = new Set<ReferenceKey>([
    ...VELOCITY_REFERENCES,
    ...DEPTH_REFERENCES,
    ...(FIT_REFERENCES[present.options.fitMethod] ?? []),
    'Bellman1961',
    'Jackson2005',
    'Schwarz1978',
    'Soske1959',
    'Redpath1973',
    ...(present.options.bootstrapReplicates > 0 ? (['Efron1979', 'Efron1993'] as ReferenceKey[]) : []),
  ]);

  return {
    schemaVersion: 1,
    software: { name: 'slopebreak', version: present.softwareVersion },
    source: present.sourceName,
    units: { scale: units.scale, distance: units.distance, time: units.time, velocity: units.velocity },
    options: {
      fitMethod: present.options.fitMethod,
      bootstrapReplicates: present.options.bootstrapReplicates,
      seed: present.options.seed,
      minPicksPerBranch: present.options.minPicksPerBranch,
      maxBranches: present.options.maxBranches,
    },
    summary: {
      shotCount: pickSet.shotIds.length,
      pickCount: pickSet.picks.length,
      excludedPickCount: pickSet.picks.filter((pick) => pick.excluded).length,
      shotSideCount: result.sides.length,
      layerCount: layers.length,
    },
    layers,
    shots,
    refractors,
    residuals: {
      model: 'first arrivals of the survey layered model (plane horizontal layers, the velocities and depths in `layers`)',
      overallRms: result.residuals.overallRms === null ? null : time(result.residuals.overallRms),
      perShot: result.residuals.perShot.map((entry) => ({
        shot: entry.shot,
        pickCount: entry.pickCount,
        rms: entry.rms === null ? null : time(entry.rms),
        reducedChiSquare: entry.reducedChiSquare,
      })),
    },
    warnings: result.warnings.map((warning) => ({ ...warning, details: warning.details ? { ...warning.details } : undefined })).map(dropUndefined),
    cautions: [...STANDING_CAUTIONS, HORIZONTAL_LAYER_ASSUMPTION],
    references: [...usedReferences].sort().map((key) => ({ key, citation: REFERENCES[key] })),
  };
}

function shapeSide(side: SideResult, result: SurveyResult, units: DisplayUnits): ShotSideResult {
  const distance = (metres: number) => distanceFromSI(metres, units);
  const { segmentation } = side;
  const { sidePicks } = segmentation;
  const chosenCount = segmentation.assignedBy === 'automatic' ? segmentation.branches.length : -1;
  return {
    side: sidePicks.side,
    pickCount: sidePicks.offsets.length,
    excludedPickCount: segmentation.excluded.length,
    assignedBy: segmentation.assignedBy,
    branches: segmentation.branches.map((branch) => shapeBranch(branch, side, result, units)),
    crossovers: segmentation.branches.slice(0, -1).map((lower, k) => {
      const upper = segmentation.branches[k + 1]!;
      const fitted = lower.index + 1 === upper.index && upper.index <= side.stackBranchCount ? side.fittedCrossovers[lower.index - 1] ?? null : null;
      return {
        lowerBranch: lower.index,
        upperBranch: upper.index,
        fitted: fitted && Number.isFinite(fitted.distance) ? distance(fitted.distance) : null,
        fittedSE: fitted && Number.isFinite(fitted.variance) ? distance(Math.sqrt(fitted.variance)) : null,
        observedBracket: [distance(lower.lastOffset), distance(upper.firstOffset)],
      };
    }),
    depths: {
      interceptTime: shapeDepths(side.interceptTime, units),
      crossoverDistance: shapeDepths(side.crossoverDistance, units),
      bootstrap: side.bootstrap
        ? side.bootstrap.interfaces.map((entry) => ({
            interface: entry.interface,
            depthSE: distance(entry.depthSE),
            low95: distance(entry.low95),
            high95: distance(entry.high95),
            replicates: side.bootstrap!.replicates,
            droppedReplicates: side.bootstrap!.droppedReplicates,
          }))
        : null,
    },
    segmentation: segmentation.candidates.map((candidate) => ({
      branchCount: candidate.branchCount,
      bic: candidate.bic,
      residualSumOfSquares: candidate.residualSumOfSquares,
      failedConstraint: candidate.failedConstraint,
      chosen: candidate.branchCount === chosenCount,
    })),
  };
}

function shapeBranch(branch: Branch, side: SideResult, result: SurveyResult, units: DisplayUnits): BranchResult {
  const distance = (metres: number) => distanceFromSI(metres, units);
  const time = (seconds: number) => timeFromSI(seconds, units);
  const velocity = (metresPerSecond: number) => velocityFromSI(metresPerSecond, units);
  const { fit } = branch;
  const { sidePicks } = side.segmentation;
  const correlation =
    fit.throughOrigin || !(fit.slopeSE > 0) || !(fit.interceptSE > 0) ? null : fit.covariance / (fit.slopeSE * fit.interceptSE);
  return {
    index: branch.index,
    assignedBy: branch.assignedBy,
    pickCount: fit.count,
    firstOffset: distance(branch.firstOffset),
    lastOffset: distance(branch.lastOffset),
    apparentVelocity: fit.slope > 0 ? velocity(fit.apparentVelocity) : null,
    apparentVelocitySE: fit.slope > 0 ? velocity(fit.apparentVelocitySE) : null,
    apparentVelocityInterval95: fit.velocityInterval95 ? [velocity(fit.velocityInterval95[0]), velocity(fit.velocityInterval95[1])] : null,
    interceptTime: time(fit.intercept),
    interceptTimeSE: time(fit.interceptSE),
    slopeInterceptCorrelation: correlation,
    residualSD: time(fit.residualSD),
    chiSquare: fit.chiSquare,
    degreesOfFreedom: fit.degreesOfFreedom,
    fitMethod: fit.method,
    weighted: fit.weighted,
    throughOrigin: fit.throughOrigin,
    picks: branch.members.map((position, k) => {
      const pick = result.pickSet.picks[sidePicks.pickIndices[position] ?? -1];
      return {
        line: pick?.line ?? 0,
        receiver: pick?.receiver ?? null,
        receiverX: distance(pick?.receiverX ?? Number.NaN),
        offset: distance(sidePicks.offsets[position] ?? Number.NaN),
        time: time(sidePicks.times[position] ?? Number.NaN),
        fitResidual: time(fit.residuals[k] ?? Number.NaN),
        robustWeight: fit.robustWeights ? (fit.robustWeights[k] ?? null) : null,
      };
    }),
  };
}

function shapeDepths(depths: LayerDepths | null, units: DisplayUnits) {
  if (!depths) return [];
  const distance = (metres: number) => distanceFromSI(metres, units);
  return depths.depths.map((depth, k) => ({
    interface: k + 1,
    thickness: distance(depths.thicknesses[k] ?? Number.NaN),
    thicknessSE: distance(depths.thicknessSE[k] ?? Number.NaN),
    depth: distance(depth),
    depthSE: distance(depths.depthSE[k] ?? Number.NaN),
  }));
}

function dropUndefined<T extends object>(value: T): T {
  return Object.fromEntries(Object.entries(value).filter(([, entry]) => entry !== undefined)) as T;
}
