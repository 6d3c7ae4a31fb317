/**
 * The depth section as data: the ground surface (with its elevations when the table gave them),
 * each refractor's depth (or elevation) by the chosen method at every position the method gives,
 * with a ±1 standard-error band, the survey's combined layer boundaries with their own band, the
 * shot positions, and each layer's velocity written inside it. A section under every receiver
 * (plus-minus, GRM) is a line with its band, each point naming the reversed pair it comes from,
 * and its seams (where it passes from one pair to the next) are thin dotted vertical marks whose
 * hover names both pairs and the depth step between them. Pure: builds the figure.
 */
import type { Interpretation, RefractorResult, SeamResult, StoredPick } from './api-types.js';
import { branchStyle } from './branch-style.js';
import { displayFactors, plain, plotlyText, quantity } from './format.js';
import { BASE_LAYOUT, PLOT_THEME, positionAxis } from './plot-theme.js';
import type { Figure, Trace } from './travel-time-figure.js';

export type DepthMode = 'depth' | 'elevation';

/** The methods the interpretation gives refractor positions by, in its own order. */
export function refractorMethods(result: Interpretation): string[] {
  return [...new Set(result.refractors.map((refractor) => refractor.method))];
}

/** True for a method that gives positions along the line (under receivers) rather than under each shot side. */
export function isAlongLine(refractor: RefractorResult): boolean {
  return refractor.points.length > 1 && refractor.points.filter((point) => point.shot === null).length * 2 > refractor.points.length;
}

/**
 * The method a one-picture summary (the report) shows: the GRM section when there is one, else
 * another section under every receiver, else the first method. Null without refractors.
 */
export function sectionMethod(result: Interpretation): string | null {
  const alongLine = result.refractors.filter(isAlongLine).map((refractor) => refractor.method);
  return alongLine.find((method) => method.startsWith('generalized reciprocal')) ?? alongLine[0] ?? refractorMethods(result)[0] ?? null;
}

/**
 * Whether the elevation mode can show `method`: the table gave ground elevations and every point
 * of the method has the service's own refractor elevation (a section without them, or a per-shot
 * method whose shots lack elevations, stays in depth).
 */
export function elevationModeAvailable(result: Interpretation, picks: readonly StoredPick[] | null, method: string | null): boolean {
  if (groundProfile(result, picks) === null) return false;
  const points = result.refractors.filter((refractor) => refractor.method === method).flatMap((refractor) => refractor.points);
  return points.length > 0 && points.every((point) => point.elevation !== null);
}

/** The hover text of a seam: where, which two pairs, and the depth step between them (or why there is none). */
export function seamText(seam: SeamResult, layer: number, distanceUnit: string): string {
  const step = seam.step === null
    ? `no receiver in common, so no depth step measured`
    : `depth step ${seam.step >= 0 ? '+' : '\u2212'}${quantity(Math.abs(seam.step), seam.stepSE, distanceUnit)}<br>(new pair minus old, mean over ${seam.commonReceivers} common receiver${seam.commonReceivers === 1 ? '' : 's'})`;
  return `seam in the top of layer ${layer} at ${plain(seam.x, 3)} ${distanceUnit}<br>from pair ${plotlyText(seam.fromPair)}<br>to pair ${plotlyText(seam.toPair)}<br>${step}`;
}

/** A method's name on a control, where "Method" is its legend: its short name without "method" or what follows "at" ("generalized reciprocal"). */
export function methodLabel(method: string): string {
  return (shortMethodName(method).split(/\s+at\s/)[0] ?? method).replace(/\s+method$/, '');
}

/** Points per seam mark: enough that the hover finds the mark anywhere along its height. */
const SEAM_MARK_POINTS = 24;

/** A short name for a method: its words before "under" or "(": "intercept-time method". */
export function shortMethodName(method: string): string {
  return method.split(/\s+(?:under\s|\()/)[0] ?? method;
}

/** Ground elevation along the line, from the receivers' (and sources') elevations, by position. */
export function groundProfile(result: Interpretation, picks: readonly StoredPick[] | null): { x: number[]; elevation: number[] } | null {
  if (!picks) return null;
  const factor = displayFactors(result.units).distance;
  const byPosition = new Map<number, number>();
  for (const pick of picks) {
    if (pick.receiverElevation !== null) byPosition.set(pick.receiverX * factor, pick.receiverElevation * factor);
    if (pick.sourceElevation !== null && !byPosition.has(pick.sourceX * factor)) byPosition.set(pick.sourceX * factor, pick.sourceElevation * factor);
  }
  if (byPosition.size === 0) return null;
  const x = [...byPosition.keys()].sort((left, right) => left - right);
  return { x, elevation: x.map((position) => byPosition.get(position)!) };
}

function interpolate(xs: readonly number[], ys: readonly number[], at: number): number {
  if (at <= xs[0]!) return ys[0]!;
  for (let k = 1; k < xs.length; k += 1) {
    if (at <= xs[k]!) {
      const fraction = (at - xs[k - 1]!) / (xs[k]! - xs[k - 1]!);
      return ys[k - 1]! + fraction * (ys[k]! - ys[k - 1]!);
    }
  }
  return ys[ys.length - 1]!;
}

/** Extent of the line: every receiver and source position. */
function lineExtent(result: Interpretation): [number, number] {
  // A loop, not Math.min(...positions): spreading 10^5 picks as arguments overflows the stack.
  let low = Infinity;
  let high = -Infinity;
  const include = (x: number) => {
    if (x < low) low = x;
    if (x > high) high = x;
  };
  for (const shot of result.shots) {
    include(shot.sourceX);
    for (const side of shot.sides) for (const branch of side.branches) for (const pick of branch.picks) include(pick.receiverX);
  }
  return Number.isFinite(low) ? [low, high] : [0, 1];
}

/** Width of one label character as a fraction of the plot width (11 px text on a plot about 1000 px wide). */
const LABEL_CHARACTER_FRACTION = 0.007;
/** Room kept between two labels, as a fraction of the plot width. */
const LABEL_GAP_FRACTION = 0.01;

/**
 * Where each shot's label goes: above its star, or below when it would overlap the label of the
 * nearest shot to its left that is written above (labels are centred, so two overlap when their
 * distance is less than half their widths together).
 */
export function shotLabelPositions(shots: readonly { readonly id: string; readonly sourceX: number }[], extent: number): string[] {
  const positions: string[] = shots.map(() => 'top center');
  const order = shots.map((_, k) => k).sort((left, right) => shots[left]!.sourceX - shots[right]!.sourceX);
  let lastAbove: number | null = null;
  for (const k of order) {
    const shot = shots[k]!;
    if (lastAbove !== null && extent > 0) {
      const other = shots[lastAbove]!;
      const needed = (LABEL_CHARACTER_FRACTION * (shot.id.length + other.id.length)) / 2 + LABEL_GAP_FRACTION;
      if ((shot.sourceX - other.sourceX) / extent < needed) {
        positions[k] = 'bottom center';
        continue;
      }
    }
    lastAbove = k;
  }
  return positions;
}

export function depthFigure(result: Interpretation, picks: readonly StoredPick[] | null, method: string | null, mode: DepthMode, uiRevision: string): Figure {
  const { units } = result;
  const ground = groundProfile(result, picks);
  const useElevation = mode === 'elevation' && ground !== null;
  const [xMin, xMax] = lineExtent(result);
  const groundAt = (x: number) => (useElevation ? interpolate(ground!.x, ground!.elevation, x) : 0);
  const toY = (x: number, depth: number) => (useElevation ? groundAt(x) - depth : depth);
  const data: Trace[] = [];
  const annotations: Record<string, unknown>[] = [];

  // Ground surface.
  const groundX = useElevation ? ground!.x : [xMin, xMax];
  data.push({
    type: 'scatter', mode: 'lines', name: useElevation ? 'ground surface (elevations from the table)' : 'ground surface',
    x: groundX, y: groundX.map((x) => groundAt(x)), line: { color: '#6b4f2a', width: 2.5 }, hoverinfo: 'skip', meta: { role: 'ground' },
  });

  // The survey's combined boundaries (one depth for the whole spread), each with a ±1 SE band.
  const boundaryX = useElevation ? ground!.x : [xMin, xMax];
  result.layers.forEach((layer) => {
    if (layer.index === 1 || layer.depthToTop === null) return;
    const depth = layer.depthToTop;
    const se = layer.depthToTopSE ?? 0;
    const color = branchStyle(layer.index).color;
    data.push({
      type: 'scatter', mode: 'lines', name: `top of layer ${layer.index}, survey ±1 SE`, legendgroup: `s${layer.index}`,
      x: [...boundaryX, ...[...boundaryX].reverse()],
      y: [...boundaryX.map((x) => toY(x, depth - se)), ...[...boundaryX].reverse().map((x) => toY(x, depth + se))],
      fill: 'toself', fillcolor: `${color}22`, line: { width: 0 }, hoverinfo: 'skip', showlegend: false, meta: { role: 'survey-band', layer: layer.index },
    });
    data.push({
      type: 'scatter', mode: 'lines', name: `top of layer ${layer.index}, all sides combined (${shortMethodName(layer.depthFrom.method)}): ${quantity(depth, se, units.distance)}`, legendgroup: `s${layer.index}`,
      x: boundaryX, y: boundaryX.map((x) => toY(x, depth)), line: { color, width: 1.5, dash: 'dash' },
      hovertemplate: `top of layer ${layer.index}: ${quantity(depth, se, units.distance)} below ground (all shot sides combined)<extra></extra>`,
      meta: { role: 'survey-boundary', layer: layer.index },
    });
  });

  // The chosen method's refractor positions, with ±1 SE bars and band.
  const chosen: RefractorResult[] = method === null ? [] : result.refractors.filter((refractor) => refractor.method === method);
  let seamLegendShown = false;
  // Deepest depth (+1 SE) a section under every receiver reaches: the half-space's label goes below it.
  let sectionDeepest: number | null = null;
  for (const refractor of chosen) {
    const color = branchStyle(refractor.interface + 1).color;
    const points = [...refractor.points].sort((left, right) => left.x - right.x);
    const x = points.map((point) => point.x);
    // The service's own elevation of each point when it gives one (source elevation − depth).
    const y = points.map((point) => (useElevation && point.elevation !== null ? point.elevation : toY(point.x, point.depth)));
    // One SE shallower and deeper than each point: up is + in elevation, − in depth.
    const up = useElevation ? 1 : -1;
    const upper = points.map((point, k) => y[k]! + up * point.depthSE);
    const lower = points.map((point, k) => y[k]! - up * point.depthSE);
    // Positions under every receiver (delay-time methods) are joined into a line with a band (the
    // band carries the SE, so no bars); positions under each shot side only are shown as they
    // are, with SE bars, without joining them.
    const alongLine = isAlongLine(refractor);
    if (alongLine) {
      for (const point of points) sectionDeepest = Math.max(sectionDeepest ?? 0, point.depth + point.depthSE);
      data.push({
        type: 'scatter', mode: 'lines', x: [...x, ...[...x].reverse()], y: [...upper, ...[...lower].reverse()], fill: 'toself',
        fillcolor: `${color}33`, line: { width: 0 }, hoverinfo: 'skip', showlegend: false, name: `interface ${refractor.interface} ±1 SE`,
        meta: { role: 'refractor-band', interface: refractor.interface },
      });
    }
    const velocity = refractor.velocity !== undefined && refractor.velocity !== null ? `: refractor velocity ${quantity(refractor.velocity, refractor.velocitySE, units.velocity)}` : '';
    data.push({
      type: 'scatter', mode: alongLine ? 'lines+markers' : 'markers',
      name: `top of layer ${refractor.interface + 1} · ${shortMethodName(refractor.method)}${alongLine ? ` ±1 SE${velocity}` : ''}`,
      x, y, line: { color, width: alongLine ? 2 : 1.5 },
      marker: { color, symbol: branchStyle(refractor.interface + 1).symbol, size: alongLine ? 5 : 9 },
      ...(alongLine ? {} : { error_y: { type: 'data', array: points.map((point) => point.depthSE), visible: true, color, thickness: 1.5, width: 5 } }),
      text: points.map((point) => {
        const where = point.shot ? `shot ${plotlyText(point.shot)}${point.side ? `, ${point.side}` : ''}: ` : point.pair ? `pair ${plotlyText(point.pair)}, at ${plain(point.x, 3)} ${units.distance}: ` : '';
        return `${where}depth ${quantity(point.depth, point.depthSE, units.distance)}` +
          `${point.depthBelowDatum !== undefined && point.depthBelowDatum !== null ? `, ${plain(point.depthBelowDatum)} ${units.distance} below the datum` : ''}` +
          `${point.elevation !== null ? `, elevation ${plain(point.elevation)} ${units.distance}` : ''}`;
      }),
      hovertemplate: '%{text}<extra></extra>',
      meta: { role: 'refractor', interface: refractor.interface },
    });

    // Seams: thin dotted vertical marks from the ground to just past the deepest side of the band.
    const seams = refractor.seams ?? [];
    if (seams.length > 0 && points.length > 0) {
      const edges = [...upper, ...lower];
      const deepest = edges.reduce((far, value) => (useElevation ? Math.min(far, value) : Math.max(far, value)), edges[0]!);
      const seamX: (number | null)[] = [];
      const seamY: (number | null)[] = [];
      const seamHover: (string | null)[] = [];
      for (const seam of seams) {
        const top = groundAt(seam.x);
        const bottom = useElevation ? deepest - 0.05 * (top - deepest) : deepest * 1.05;
        const text = seamText(seam, refractor.interface + 1, units.distance);
        for (let k = 0; k < SEAM_MARK_POINTS; k += 1) {
          seamX.push(seam.x);
          seamY.push(top + ((bottom - top) * k) / (SEAM_MARK_POINTS - 1));
          seamHover.push(text);
        }
        seamX.push(null);
        seamY.push(null);
        seamHover.push(null);
      }
      data.push({
        type: 'scatter', mode: 'lines', name: 'seams: the section passes to another reversed pair', legendgroup: 'seams',
        showlegend: !seamLegendShown, x: seamX, y: seamY, text: seamHover, hovertemplate: '%{text}<extra></extra>',
        line: { color: PLOT_THEME.muted, width: 1, dash: 'dot' }, connectgaps: false,
        meta: { role: 'seams', interface: refractor.interface, count: seams.length },
      });
      seamLegendShown = true;
    }
  }

  // Shots on the surface, a label crowding its neighbour's written under the ground instead.
  const shotX = result.shots.map((shot) => shot.sourceX);
  data.push({
    type: 'scatter', mode: 'markers+text', name: 'shots', x: shotX,
    y: result.shots.map((shot) => (useElevation && shot.sourceElevation !== null ? shot.sourceElevation : groundAt(shot.sourceX))),
    text: result.shots.map((shot) => plotlyText(shot.id)), textposition: shotLabelPositions(result.shots, xMax - xMin), textfont: { size: 11, color: PLOT_THEME.ink },
    marker: { symbol: 'star', size: 12, color: PLOT_THEME.ink }, hovertemplate: 'shot %{text} at %{x}<extra></extra>', cliponaxis: false,
    meta: { role: 'shots' },
  });

  // Layer velocities written inside each layer, in the middle of the spread.
  const middle = (xMin + xMax) / 2;
  const tops = result.layers.map((layer) => (layer.index === 1 ? 0 : layer.depthToTop));
  const deepest = Math.max(0, ...tops.filter((top): top is number => top !== null));
  result.layers.forEach((layer, k) => {
    const top = tops[k];
    if (top === null || top === undefined) return;
    const bottom = tops[k + 1] ?? null;
    let labelDepth = bottom !== null ? (top + bottom) / 2 : top + Math.max(deepest * 0.25, 1);
    if (bottom === null && sectionDeepest !== null && labelDepth < sectionDeepest * 1.1) {
      // Below the section, not over it; an invisible point keeps room for the label inside the axis range.
      labelDepth = sectionDeepest * 1.1;
      data.push({
        type: 'scatter', mode: 'markers', x: [middle], y: [toY(middle, labelDepth * 1.06)], marker: { opacity: 0 },
        hoverinfo: 'skip', showlegend: false, name: 'room for the label', meta: { role: 'label-room' },
      });
    }
    annotations.push({
      x: middle, y: toY(middle, labelDepth), xref: 'x', yref: 'y', showarrow: false,
      text: `layer ${layer.index}: ${quantity(layer.velocity, layer.velocitySE, units.velocity)}`,
      font: { size: 13, color: PLOT_THEME.ink }, bgcolor: 'rgba(255,255,255,0.8)', borderpad: 3,
    });
  });

  const layout: Record<string, unknown> = {
    uirevision: uiRevision,
    ...BASE_LAYOUT,
    xaxis: positionAxis(units.distance),
    yaxis: useElevation
      ? { title: { text: `Elevation (${units.distance})` }, gridcolor: PLOT_THEME.grid, zeroline: false }
      : { title: { text: `Depth below ground (${units.distance})` }, gridcolor: PLOT_THEME.grid, zeroline: false, autorange: 'reversed' },
    annotations,
  };
  return { data, layout, webgl: false, pointCount: chosen.reduce((sum, refractor) => sum + refractor.points.length, 0) };
}
