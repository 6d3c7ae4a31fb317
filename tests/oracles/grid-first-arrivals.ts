/**
 * Test-side oracle: first-arrival times through a 2-D section with refractors of any shape (an
 * undulating bedrock), on a fine grid by the shortest-path method (Moser 1991) of
 * lib/model/shortest-path.ts. That solver is trusted only after its own checks in tests/model/:
 * METHODS 12.1 and closed-form two-layer and dipping-layer times within 0.5 %, and node times equal
 * to scipy's `csgraph.dijkstra` on an independently built graph. Here it is run on a grid much finer
 * than the one the interpretation's forward check uses, as the acceptance asks ("test data
 * computed by a fine-grid first-arrival solver").
 *
 * Units are SI (m, s, m/s).
 */
import { shortestPathTimes, slownessGridFromSection, type LayeredSection } from '../../lib/model/shortest-path.js';

export interface GridShot {
  readonly id: string;
  readonly x: number;
  /** Source depth below ground, m (0 = surface). */
  readonly depth?: number;
  /** Receivers this shot was recorded on (its spread), m. */
  readonly receivers: readonly number[];
}

export interface GridSurveySpec {
  readonly section: LayeredSection;
  readonly shots: readonly GridShot[];
  /** Grid node spacing, m. Default 0.25. */
  readonly spacing?: number;
  /** Depth of the grid, m (below the deepest refractor point by a few metres). */
  readonly depthExtent: number;
  /** Forward-star radius. Default 5. */
  readonly radius?: number;
}

export interface GridArrival {
  readonly shot: string;
  readonly sourceX: number;
  readonly receiverX: number;
  /** s */
  readonly time: number;
}

/** Every shot's first arrival at each of its receivers (a receiver at the shot position is skipped, as a seismograph has none there). */
export function gridFirstArrivals(spec: GridSurveySpec): GridArrival[] {
  const spacing = spec.spacing ?? 0.25;
  const positions = spec.shots.flatMap((shot) => [shot.x, ...shot.receivers]);
  const originX = Math.floor(Math.min(...positions) / spacing) * spacing - 4 * spacing;
  const columns = Math.ceil((Math.max(...positions) - originX) / spacing) + 5;
  const rows = Math.ceil(spec.depthExtent / spacing) + 1;
  const grid = slownessGridFromSection(spec.section, { originX, spacing, columns, rows });
  const arrivals: GridArrival[] = [];
  for (const shot of spec.shots) {
    const field = shortestPathTimes(grid, { x: shot.x, z: shot.depth ?? 0 }, { radius: spec.radius ?? 5 });
    for (const receiverX of shot.receivers) {
      if (Math.abs(receiverX - shot.x) < 1e-9) continue;
      arrivals.push({ shot: shot.id, sourceX: shot.x, receiverX, time: field.timeAtSurface(receiverX) });
    }
  }
  return arrivals;
}
