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
import { STANDING_CAUTIONS, HORIZONTAL_LAYER_ASSUMPTION, DELAY_TIME_ASSUMPTION } from '../cautions.js';
import { FORWARD_CHECK_REFERENCES } from '../model/forward-check.js';
import type { DelayMethod } from './reversed-profile.js';
import { thicknessesFromDepths } from './survey-layers.js';
import { phaseNames } from './phase-names.js';
import { shapeEarthCurvature, shapeGeometry, shapeTimeTerms } from './present-crustal.js';
import type { BranchResult, Interpretation, LayerResult, RefractorResult, ShotSideResult } from './shape.js';

export interface PresentOptions {
  readonly units: DisplayUnits;
  readonly options: typeof DEFAULT_OPTIONS;
  readonly sourceName: string | null;
  readonly softwareVersion: string;
}

const VELOCITY_REFERENCES: ReferenceKey[] = ['Telford1990', 'Press2007', 'Bevington2003'];
const DEPTH_REFERENCES: ReferenceKey[] = ['Telford1990', 'Kearey2002', 'Palmer1986', 'JCGM2008'];
const DELAY_METHOD_WORDS: Record<DelayMethod, string> = {
  'plus-minus': 'plus-minus method',
  'generalized-reciprocal': 'generalized reciprocal method at its optimum XY',
};
const DELAY_METHOD_REFERENCES: Record<DelayMethod, ReferenceKey[]> = {
  'plus-minus': ['Hagedoorn1959', 'JCGM2008'],
  'generalized-reciprocal': ['Palmer1980', 'JCGM2008'],
};
const DIPPING_REFERENCES: ReferenceKey[] = ['Telford1990', 'Kearey2002', 'Adachi1954', 'Mota1954', 'Johnson1976'];
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
  const phases = phaseNames(combined.slownesses.map((entry) => (entry !== null && entry.value > 0 ? 1 / entry.value : Number.NaN)), units.scale);
  combined.slownesses.forEach((entry, k) => {
    if (entry === null || !(entry.value > 0)) return;
    const index = k + 1;
    const hasTop = index <= resolved;
    const hasThickness = index < resolved;
    const depthToTop = k === 0 ? 0 : (combined.depths[k - 1] ?? Number.NaN);
    const depthToTopSE = k === 0 ? 0 : Math.sqrt(combined.depthCovariance[k - 1]?.[k - 1] ?? Number.NaN);
    layers.push({
      index,
      phase: phases[k]!,
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
            depthBelowDatum: null,
            shot: sidePicks.shot,
            side: sidePicks.side,
            pair: null,
          },
        ];
      }),
      velocity: null,
      velocitySE: null,
      seams: [],
    }));
  const { reversed } = result;
  const pairId = (index: number) => {
    const pair = reversed.pairs[index]?.pair;
    if (!pair) return '';
    // The same two shots may pair on several refractors: the id then names the refractor too.
    const shared = reversed.pairs.some((other) => other.pair !== pair && other.pair.forward.shot === pair.forward.shot && other.pair.reverse.shot === pair.reverse.shot);
    return `${pair.forward.shot} → ${pair.reverse.shot}${shared ? ` (refractor ${pair.refractor})` : ''}`;
  };
  const delayRefractors: RefractorResult[] = reversed.sections.map((section) => ({
    interface: section.refractor - 1,
    method: `${DELAY_METHOD_WORDS[section.method]} under every receiver with reversed coverage (${reversed.referenceSurface === 'datum' ? 'times corrected to the datum' : 'delays below the ground at each receiver'})`,
    references: DELAY_METHOD_REFERENCES[section.method],
    velocity: section.velocity === null ? null : velocity(section.velocity.value),
    velocitySE: section.velocity === null ? null : velocity(section.velocity.standardError),
    points: section.points.map((point) => ({
      x: distance(point.x),
      // With a datum every point has its ground elevation (receivers without one are left out upstream).
      depth: distance(point.depthBelowGround ?? point.depth),
      depthSE: distance(point.depthSE),
      elevation: point.elevation === null ? null : distance(point.elevation),
      depthBelowDatum: reversed.referenceSurface === 'datum' ? distance(point.depth) : null,
      shot: null,
      side: null,
      pair: pairId(point.pair),
    })),
    seams: section.seams.map((seam) => ({
      x: distance(seam.x),
      fromPair: pairId(seam.fromPair),
      toPair: pairId(seam.toPair),
      step: seam.step === null ? null : distance(seam.step),
      stepSE: seam.stepSE === null ? null : distance(seam.stepSE),
      commonReceivers: seam.commonReceivers,
    })),
  }));
  const refractors: RefractorResult[] = [
    ...refractorsBy('intercept-time method under each shot side (plane horizontal layers)', (side) => side.interceptTime),
    ...refractorsBy('crossover-distance method under each shot side (plane horizontal layers)', (side) => side.crossoverDistance),
    ...delayRefractors,
  ].filter((refractor) => refractor.points.length > 0);
  const optionalEstimate = (estimate: { value: number; standardError: number } | null, convert: (value: number) => number) => ({
    value: estimate === null ? null : convert(estimate.value),
    se: estimate === null ? null : convert(estimate.standardError),
  });
  const range = (pair: readonly [number, number] | null): [number, number] | null => (pair === null ? null : [distance(pair[0]), distance(pair[1])]);
  const reversedPairs = reversed.pairs.map(({ pair, plusMinus, generalizedReciprocal: grm }, index) => {
    const pm = optionalEstimate(plusMinus.velocity, velocity);
    const gv = optionalEstimate(grm.velocity, velocity);
    return {
      id: pairId(index),
      forwardShot: pair.forward.shot,
      reverseShot: pair.reverse.shot,
      refractor: pair.refractor,
      chosenBy: pair.chosenBy,
      spreadLength: distance(pair.spreadLength),
      commonReceivers: pair.commonReceivers,
      overlap: [distance(pair.overlap[0]), distance(pair.overlap[1])] as [number, number],
      reciprocalTime: {
        forwardAtReverseShot: pair.forwardAtReverseShot === null ? null : time(pair.forwardAtReverseShot.value),
        reverseAtForwardShot: pair.reverseAtForwardShot === null ? null : time(pair.reverseAtForwardShot.value),
        from: [pair.forwardAtReverseShot, pair.reverseAtForwardShot].filter((reading) => reading !== null).map((reading) => reading.from),
        value: time(pair.reciprocalTime.value),
        valueSE: time(pair.reciprocalTime.standardError),
        misfit: pair.check === null ? null : time(pair.check.misfit),
        limit: pair.check === null ? null : time(pair.check.limit),
        exceeds: pair.check === null ? null : pair.check.exceeds,
      },
      plusMinus: { velocity: pm.value, velocitySE: pm.se, receiverCount: plusMinus.receivers.length, coverage: range(plusMinus.coverage) },
      generalizedReciprocal: {
        velocity: gv.value,
        velocitySE: gv.se,
        receiverCount: grm.receivers.length,
        coverage: range(grm.coverage),
        optimumXY: grm.optimum === null ? null : distance(grm.optimum.xy),
        reason: grm.optimum?.reason ?? null,
        planeLayerXY: grm.optimum?.planeLayerXY == null ? null : distance(grm.optimum.planeLayerXY),
        resolved: grm.optimum?.resolved ?? null,
        mismatch: grm.optimum?.mismatch ?? null,
        scan: grm.scan.map((row) => ({
          xy: distance(row.xy),
          pointCount: row.pointCount,
          velocity: row.velocity === null ? null : velocity(row.velocity),
          roughness: row.roughness === null ? null : time(row.roughness),
          noiseRoughness: row.noiseRoughness === null ? null : time(row.noiseRoughness),
        })),
      },
    };
  });
  const degrees = (radians: number) => (radians * 180) / Math.PI;
  const dippingLayers = reversed.dipping.map((entry) => ({
    forwardShot: entry.forwardShot,
    reverseShot: entry.reverseShot,
    spreadLength: distance(entry.spreadLength),
    interfaces: entry.result.interfaces.map((layer) => ({
      interface: layer.interface,
      trueVelocity: velocity(layer.refractorVelocity.value),
      trueVelocitySE: velocity(layer.refractorVelocity.standardError),
      dipDegrees: degrees(layer.dip.value),
      dipDegreesSE: degrees(layer.dip.standardError),
      depthUnderForwardShot: distance(layer.verticalDepthA.value),
      depthUnderForwardShotSE: distance(layer.verticalDepthA.standardError),
      depthUnderReverseShot: distance(layer.verticalDepthB.value),
      depthUnderReverseShotSE: distance(layer.verticalDepthB.standardError),
    })),
    notes: entry.result.notes.map((note) => note.message),
  }));
  const checked = reversed.forwardCheck;
  const summary = (entry: { pickCount: number; rms: number | null; mean: number | null }) => ({
    pickCount: entry.pickCount,
    rms: entry.rms === null ? null : time(entry.rms),
    mean: entry.mean === null ? null : time(entry.mean),
  });
  const forwardCheck =
    checked === null
      ? null
      : {
          model: `first arrivals on a grid through the ${DELAY_METHOD_WORDS[checked.method]} depth section (velocities: the survey's overburden and the section's refractor velocity; the section hung by its depths below the ground from a flat top, so relief enters through the depths; beyond the reversed coverage each interface runs to the shots outside it at the depth of their own delay times, and is held level past the outermost)`,
          method: 'shortest-path first arrivals on a grid',
          references: [...FORWARD_CHECK_REFERENCES],
          grid: { spacing: distance(checked.result.grid.spacing), radius: checked.result.grid.radius, columns: checked.result.grid.columns, rows: checked.result.grid.rows },
          overallRms: checked.result.overallRms === null ? null : time(checked.result.overallRms),
          perShot: checked.result.perShot.map((entry) => ({ shot: entry.shot, ...summary(entry) })),
          perReceiver: checked.result.perReceiver.map((entry) => ({ receiverX: distance(entry.receiverX), ...summary(entry) })),
          notes: checked.result.notes.map((note) => note.message),
        };

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
    ...(reversed.pairs.length > 0 ? (['Hagedoorn1959', 'Palmer1980', ...DIPPING_REFERENCES] as ReferenceKey[]) : []),
    ...(checked !== null ? FORWARD_CHECK_REFERENCES : []),
    ...(result.curvature?.fit ? (['Muller1971', 'Chapman1973', 'Moritz2000'] as ReferenceKey[]) : []),
    ...(result.placement ? (['Karney2013'] as ReferenceKey[]) : []),
    ...(result.timeTerms ? (['ScheideggerWillmore1957', 'WillmoreBancroft1960', 'BerryWest1966', ...(result.timeTerms.result.solver === 'lsqr' ? (['PaigeSaunders1982'] as ReferenceKey[]) : [])] as ReferenceKey[]) : []),
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
      reversedPairs: present.options.reversedPairs === null ? null : present.options.reversedPairs.map((choice) => ({ forwardShot: choice.forwardShot, reverseShot: choice.reverseShot })),
      datumElevation: present.options.datumElevation === null ? null : distance(present.options.datumElevation),
      forwardCheck: present.options.forwardCheck,
      earthModel: present.options.earthModel,
      timeTerms: present.options.timeTerms,
      timeTermGradient: present.options.timeTermGradient,
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
    reversedPairs,
    dippingLayers,
    forwardCheck,
    geometry: shapeGeometry(result.placement, units),
    earthCurvature: shapeEarthCurvature(result.curvature, units),
    timeTerms: shapeTimeTerms(result.timeTerms, units),
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
    cautions: [...STANDING_CAUTIONS, HORIZONTAL_LAYER_ASSUMPTION, ...(reversed.sections.length > 0 ? [DELAY_TIME_ASSUMPTION] : [])],
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
