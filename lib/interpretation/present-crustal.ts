/**
 * Shapes the crustal-profile results (earth curvature; later the geometry and time terms) into the
 * interpretation JSON in display units. Pure conversion: nothing is computed beyond unit changes.
 */
import type { DisplayUnits } from '../units.js';
import { distanceFromSI, timeFromSI, velocityFromSI } from '../units.js';
import { EARTH_MEAN_RADIUS } from '../model/earth-flattening.js';
import type { EarthCurvature } from './earth-curvature.js';
import type { EarthCurvatureResult, GeometryResult, TimeTermsResult } from './shape.js';
import type { SurveyTimeTerms } from './survey-time-terms.js';
import type { LinePlacement } from '../geodesy/place-on-line.js';
import { phaseNames } from './phase-names.js';

export function shapeEarthCurvature(curvature: EarthCurvature | null, units: DisplayUnits): EarthCurvatureResult | null {
  if (curvature === null) return null;
  const distance = (metres: number) => distanceFromSI(metres, units);
  const time = (seconds: number) => timeFromSI(seconds, units);
  const velocity = (metresPerSecond: number) => velocityFromSI(metresPerSecond, units);
  const { fit, flatBias } = curvature;
  const phases = fit ? phaseNames(fit.model.velocities, units.scale) : [];
  return {
    choice: curvature.choice,
    applied: curvature.applied,
    reason: curvature.reason,
    radius: distance(EARTH_MEAN_RADIUS),
    maxOffset: distance(curvature.maxOffset),
    pickSigma: time(curvature.pickSigma),
    flatErrorOffset: curvature.flatErrorOffset === null ? null : distance(curvature.flatErrorOffset),
    flatErrorAtMaxOffset: curvature.flatErrorAtMaxOffset === null ? null : time(curvature.flatErrorAtMaxOffset),
    sphericalLayers: fit
      ? fit.model.velocities.map((value, k) => {
          const seV = fit.velocitySE?.[k];
          const top = k === 0 ? 0 : fit.depths[k - 1]!;
          const topSE = k === 0 ? 0 : fit.depthSE?.[k - 1];
          const thickness = fit.model.thicknesses[k];
          const thicknessSE = fit.thicknessSE?.[k];
          return {
            index: k + 1,
            phase: phases[k]!,
            velocity: velocity(value),
            velocitySE: seV === undefined ? null : velocity(seV),
            thickness: thickness === undefined ? null : distance(thickness),
            thicknessSE: thickness === undefined || thicknessSE === undefined ? null : distance(thicknessSE),
            depthToTop: distance(top),
            depthToTopSE: topSE === undefined ? null : distance(topSE),
          };
        })
      : [],
    fit: fit
      ? { pickCount: fit.residuals.length, rms: time(fit.rms), iterations: fit.iterations, converged: fit.converged, notes: fit.notes.map((note) => note.message) }
      : null,
    flatBias: flatBias
      ? { velocity: flatBias.velocityBias.map(velocity), depth: flatBias.depthBias.map((value) => (value === null ? null : distance(value))) }
      : null,
  };
}

export function shapeGeometry(placement: LinePlacement | null, units: DisplayUnits): GeometryResult | null {
  if (placement === null) return null;
  const distance = (metres: number) => distanceFromSI(metres, units);
  const { line } = placement;
  return {
    line: { origin: { lat: line.origin.lat, lon: line.origin.lon }, end: { lat: line.end.lat, lon: line.end.lon }, azimuth: line.azimuth, length: distance(line.length) },
    offLineLimit: distance(placement.offLineLimit),
    shots: placement.shots.map((shot) => ({ shot: shot.shot, lat: shot.lat, lon: shot.lon, position: distance(shot.position), offLineDistance: distance(shot.offLineDistance) })),
    stations: placement.stations.map((station) => ({
      station: station.station,
      lat: station.lat,
      lon: station.lon,
      position: distance(station.position),
      offLineDistance: distance(station.offLineDistance),
      receiverXSpread: distance(station.receiverXSpread),
      recordedBy: station.recordedBy,
    })),
  };
}

export function shapeTimeTerms(delays: SurveyTimeTerms | null, units: DisplayUnits): TimeTermsResult | null {
  if (delays === null) return null;
  const distance = (metres: number) => distanceFromSI(metres, units);
  const time = (seconds: number) => timeFromSI(seconds, units);
  const velocity = (metresPerSecond: number) => velocityFromSI(metresPerSecond, units);
  const { result } = delays;
  const term = (entry: (typeof result.shotTerms)[number]) => ({
    id: entry.id,
    term: time(entry.value),
    termSE: time(entry.standardError),
    picks: entry.picks,
    rejected: entry.rejected,
    sharedWith: entry.sharedWith,
  });
  const byStation = new Map(result.stationTerms.map((entry) => [entry.id, entry]));
  const phases = phaseNames(Array.from({ length: delays.branch }, (_, k) => (k === delays.branch - 1 ? delays.velocity.value : Number.NaN)), units.scale);
  return {
    branch: delays.branch,
    phase: phases[delays.branch - 1]!,
    velocity: velocity(delays.velocity.value),
    velocitySE: velocity(delays.velocity.standardError),
    lineVelocity: velocity(delays.lineVelocity.value),
    // g in 1/s is the same number in (m/s)/m and (km/s)/km.
    velocityGradient: result.gradient?.velocityGradient.ok ? result.gradient.velocityGradient.value : null,
    velocityGradientSE: result.gradient?.velocityGradient.ok ? result.gradient.velocityGradient.standardError : null,
    constraint: result.constraint,
    solver: result.solverText,
    pickCount: result.shotTerms.reduce((sum, entry) => sum + entry.picks, 0),
    rejectedCount: result.rejectedRows.length,
    rms: time(result.residualRms),
    reducedChiSquare: result.reducedChiSquare,
    shots: result.shotTerms.map(term),
    stations: delays.stations.map((station) => {
      const depth = station.depth;
      return {
        ...term(byStation.get(station.station)!),
        position: distance(station.position),
        depth: depth.ok ? distance(depth.depth.value) : null,
        depthSE: depth.ok ? distance(depth.depth.standardError) : null,
        depthBelowSeaLevel: depth.ok && depth.depthBelowSeaLevel !== null ? distance(depth.depthBelowSeaLevel.value) : null,
        depthNote: depth.ok ? null : depth.message,
      };
    }),
  };
}
