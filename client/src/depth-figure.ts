/**
 * The depth section as data: the ground surface (with its elevations when the table gave them),
 * each refractor's depth (or elevation) by the chosen method at every position the method gives,
 * with a ±1 standard-error band, the survey's combined layer boundaries with their own band, the
 * shot positions, and each layer's velocity written inside it. Pure: builds the figure.
 */
import type { Interpretation, RefractorResult, StoredPick } from './api-types.js';
import { branchStyle } from './branch-style.js';
import { displayFactors, plain, plotlyText, quantity } from './format.js';
import { BASE_LAYOUT, PLOT_THEME, positionAxis } from './plot-theme.js';
import type { Figure, Trace } from './travel-time-figure.js';

export type DepthMode = 'depth' | 'elevation';

/** The methods the interpretation gives refractor positions by, in its own order. */
export function refractorMethods(result: Interpretation): string[] {
  return [...new Set(result.refractors.map((refractor) => refractor.method))];
}

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
    // Positions under every receiver (delay-time methods) are joined into a line with a band;
    // positions under each shot side only are shown as they are, without joining them.
    const alongLine = points.length > 1 && points.filter((point) => point.shot === null).length * 2 > points.length;
    if (alongLine) {
      data.push({
        type: 'scatter', mode: 'lines', x: [...x, ...[...x].reverse()], y: [...upper, ...[...lower].reverse()], fill: 'toself',
        fillcolor: `${color}33`, line: { width: 0 }, hoverinfo: 'skip', showlegend: false, name: `interface ${refractor.interface} ±1 SE`,
        meta: { role: 'refractor-band', interface: refractor.interface },
      });
    }
    data.push({
      type: 'scatter', mode: alongLine ? 'lines+markers' : 'markers',
      name: `top of layer ${refractor.interface + 1} · ${shortMethodName(refractor.method)}`,
      x, y, line: { color, width: 1.5 },
      marker: { color, symbol: branchStyle(refractor.interface + 1).symbol, size: 9 },
      error_y: { type: 'data', array: points.map((point) => point.depthSE), visible: true, color, thickness: 1.5, width: 5 },
      text: points.map((point) => `${point.shot ? `shot ${plotlyText(point.shot)}${point.side ? `, ${point.side}` : ''}: ` : ''}depth ${quantity(point.depth, point.depthSE, units.distance)}` +
        `${point.elevation !== null ? `, elevation ${plain(point.elevation)} ${units.distance}` : ''}`),
      hovertemplate: '%{text}<extra></extra>',
      meta: { role: 'refractor', interface: refractor.interface },
    });
  }

  // Shots on the surface.
  const shotX = result.shots.map((shot) => shot.sourceX);
  data.push({
    type: 'scatter', mode: 'markers+text', name: 'shots', x: shotX,
    y: result.shots.map((shot) => (useElevation && shot.sourceElevation !== null ? shot.sourceElevation : groundAt(shot.sourceX))),
    text: result.shots.map((shot) => plotlyText(shot.id)), textposition: 'top center', textfont: { size: 11, color: PLOT_THEME.ink },
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
    const labelDepth = bottom !== null ? (top + bottom) / 2 : top + Math.max(deepest * 0.25, 1);
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
