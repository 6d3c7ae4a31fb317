/**
 * The travel-time plot as data: picks of every shown shot as points (colour and shape by branch),
 * each branch's fitted line, the fitted crossover points, apparent velocity and intercept time
 * written beside each branch, and the residuals of the picks against their branch lines in a
 * panel underneath. Optionally in reduced time, t − |x − xs| / V_red, the way long profiles are
 * read. Pure: builds the figure, draws nothing.
 *
 * Past `WEBGL_POINT_COUNT` points the pick traces use WebGL (when the browser has it), so a
 * survey of many thousands of picks still pans and zooms smoothly.
 */
import type { Interpretation, StoredPick } from './api-types.js';
import { placesByLine, sideOfStoredPick } from './branch-editing.js';
import { branchStyle, EXCLUDED_STYLE, SELECTED_STYLE, UNASSIGNED_STYLE } from './branch-style.js';
import { displayFactors, plain, plotlyText, reductionFactor } from './format.js';
import { BASE_LAYOUT, PLOT_THEME, positionAxis } from './plot-theme.js';

/** Points past which the pick traces are drawn with WebGL (SVG slows down beyond a few thousand). */
export const WEBGL_POINT_COUNT = 3000;

export interface TravelTimeOptions {
  /** Shots not drawn. */
  readonly hiddenShots: ReadonlySet<string>;
  /** Reduction velocity in display units (m/s or km/s), or null for plain travel time. */
  readonly reductionVelocity: number | null;
  /** Write apparent velocity and intercept time beside each branch. */
  readonly showLabels: boolean;
  /** What dragging on the plot does. */
  readonly dragMode: 'zoom' | 'pan' | 'select' | 'lasso';
  /** Keeps zoom and pan across redraws of the same survey. */
  readonly uiRevision: string;
  /** WebGL may be used (the browser has it; a report image is always SVG). */
  readonly allowWebgl: boolean;
  /** Changes whenever a dragged shape must go back to its place (a draw counter). */
  readonly editRevision?: number;
  /** A breakpoint drawn as a vertical line the user can drag (position along the line), or none. */
  readonly breakpointMarker?: { readonly x: number; readonly label: string } | null;
}

export type Trace = Record<string, unknown>;

export interface Figure {
  readonly data: Trace[];
  readonly layout: Record<string, unknown>;
  /** Pick traces use WebGL. */
  readonly webgl: boolean;
  readonly pointCount: number;
}

/**
 * Plotly dims unselected points after a box or lasso selection and keeps them dimmed; the
 * client draws its own selection rings instead, so points keep full strength.
 */
const NO_DIMMING = { selected: { marker: { opacity: 1 } }, unselected: { marker: { opacity: 1 } } } as const;

interface PointSet {
  x: number[];
  y: number[];
  residual: number[];
  line: number[];
  text: string[];
}

const emptyPoints = (): PointSet => ({ x: [], y: [], residual: [], line: [], text: [] });

export function travelTimeFigure(result: Interpretation, picks: readonly StoredPick[] | null, selection: ReadonlySet<number>, options: TravelTimeOptions): Figure {
  const { units } = result;
  const toTime = reductionFactor(units);
  const reduce = (offset: number) => (options.reductionVelocity ? (offset * toTime) / options.reductionVelocity : 0);
  const shown = (shot: string) => !options.hiddenShots.has(shot);

  const byBranch = new Map<number, PointSet>();
  const where = new Map<number, { x: number; y: number }>();
  for (const shot of result.shots) {
    if (!shown(shot.id)) continue;
    for (const side of shot.sides) {
      for (const branch of side.branches) {
        const points = byBranch.get(branch.index) ?? emptyPoints();
        byBranch.set(branch.index, points);
        for (const pick of branch.picks) {
          const y = pick.time - reduce(pick.offset);
          points.x.push(pick.receiverX);
          points.y.push(y);
          points.residual.push(pick.fitResidual);
          points.line.push(pick.line);
          points.text.push(
            `shot ${plotlyText(shot.id)}, ${side.side} · branch ${branch.index}<br>receiver at ${plain(pick.receiverX)} ${units.distance}, offset ${plain(pick.offset)} ${units.distance}` +
              `<br>t = ${plain(pick.time, 3)} ${units.time} · residual ${plain(pick.fitResidual, 3)} ${units.time}<br>table line ${pick.line}`,
          );
          where.set(pick.line, { x: pick.receiverX, y });
        }
      }
    }
  }

  // Picks on no branch: excluded by the user, or left over by the segmentation.
  const excluded = emptyPoints();
  const unassigned = emptyPoints();
  if (picks) {
    const places = placesByLine(result);
    const factor = displayFactors(units);
    for (const pick of picks) {
      if (places.has(pick.line) || !shown(pick.shot)) continue;
      const x = pick.receiverX * factor.distance;
      const offset = Math.abs(pick.receiverX - pick.sourceX) * factor.distance;
      const time = pick.time * factor.time;
      const target = pick.excluded ? excluded : unassigned;
      const y = time - reduce(offset);
      target.x.push(x);
      target.y.push(y);
      target.line.push(pick.line);
      target.text.push(`shot ${plotlyText(pick.shot)}, ${sideOfStoredPick(pick) ?? 'at the source'} · ${pick.excluded ? 'excluded from the fits' : 'on no branch'}<br>offset ${plain(offset)} ${units.distance}, t = ${plain(time, 3)} ${units.time}<br>table line ${pick.line}`);
      where.set(pick.line, { x, y });
    }
  }

  const pointCount = [...byBranch.values()].reduce((sum, points) => sum + points.x.length, 0) + excluded.x.length + unassigned.x.length;
  const webgl = options.allowWebgl && pointCount > WEBGL_POINT_COUNT;
  const pointType = webgl ? 'scattergl' : 'scatter';
  const data: Trace[] = [];

  const branchIndices = [...byBranch.keys()].sort((left, right) => left - right);
  for (const index of branchIndices) {
    const points = byBranch.get(index)!;
    const style = branchStyle(index);
    const name = index === 1 ? 'branch 1 · direct wave' : `branch ${index} · head wave, top of layer ${index}`;
    data.push({
      type: pointType, mode: 'markers', name, legendgroup: `b${index}`,
      x: points.x, y: points.y, customdata: points.line, text: points.text, hovertemplate: '%{text}<extra></extra>',
      marker: { color: style.color, symbol: style.symbol, size: 7, line: { width: 0.5, color: '#ffffff' } },
      ...NO_DIMMING,
      meta: { role: 'picks', branch: index },
    });
    data.push({
      type: pointType, mode: 'markers', name: `${name} residuals`, legendgroup: `b${index}`, showlegend: false,
      x: points.x, y: points.residual, customdata: points.line, text: points.text, hovertemplate: '%{text}<extra></extra>',
      xaxis: 'x', yaxis: 'y2', marker: { color: style.color, symbol: style.symbol, size: 5 },
      ...NO_DIMMING,
      meta: { role: 'residuals', branch: index },
    });
  }
  if (excluded.x.length > 0) {
    data.push({
      type: pointType, mode: 'markers', name: 'excluded from the fits', x: excluded.x, y: excluded.y, customdata: excluded.line,
      text: excluded.text, hovertemplate: '%{text}<extra></extra>',
      marker: { color: EXCLUDED_STYLE.color, symbol: EXCLUDED_STYLE.symbol, size: 8, line: { width: 1.5, color: EXCLUDED_STYLE.color } },
      ...NO_DIMMING,
      meta: { role: 'excluded' },
    });
  }
  if (unassigned.x.length > 0) {
    data.push({
      type: pointType, mode: 'markers', name: 'on no branch', x: unassigned.x, y: unassigned.y, customdata: unassigned.line,
      text: unassigned.text, hovertemplate: '%{text}<extra></extra>',
      marker: { color: UNASSIGNED_STYLE.color, symbol: UNASSIGNED_STYLE.symbol, size: 7 },
      ...NO_DIMMING,
      meta: { role: 'unassigned' },
    });
  }

  // Fitted lines, extended to the fitted crossovers on either side, and the crossover points.
  const annotations: Record<string, unknown>[] = [];
  const lines = new Map<number, { x: (number | null)[]; y: (number | null)[] }>();
  const crossovers = { x: [] as number[], y: [] as number[], text: [] as string[] };
  result.shots.forEach((shot, shotNumber) => {
    if (!shown(shot.id)) return;
    // Labels of neighbouring shots at three heights, so that they overlap less.
    const labelRise = 24 + 14 * (shotNumber % 3);
    for (const side of shot.sides) {
      const direction = side.side === 'forward' ? 1 : -1;
      const position = (offset: number) => shot.sourceX + direction * offset;
      const lineTime = (branch: (typeof side.branches)[number], offset: number) =>
        branch.apparentVelocity ? branch.interceptTime + (offset * toTime) / branch.apparentVelocity : branch.interceptTime;
      for (const branch of side.branches) {
        if (branch.apparentVelocity === null) continue;
        const below = side.crossovers.find((crossover) => crossover.upperBranch === branch.index)?.fitted;
        const above = side.crossovers.find((crossover) => crossover.lowerBranch === branch.index)?.fitted;
        const reach = branch.lastOffset - branch.firstOffset;
        const start = below !== null && below !== undefined && below >= branch.firstOffset - reach && below < branch.firstOffset ? below : branch.firstOffset;
        const end = above !== null && above !== undefined && above <= branch.lastOffset + reach && above > branch.lastOffset ? above : branch.lastOffset;
        const from = branch.index === 1 && start > 0 && start < reach * 0.5 ? 0 : start;
        const segment = lines.get(branch.index) ?? { x: [], y: [] };
        lines.set(branch.index, segment);
        segment.x.push(position(from), position(end), null);
        segment.y.push(lineTime(branch, from) - reduce(from), lineTime(branch, end) - reduce(end), null);
        if (options.showLabels) {
          const middle = (branch.firstOffset + branch.lastOffset) / 2;
          const velocity = `${plain(branch.apparentVelocity, units.velocity === 'km/s' ? 2 : 0)} ${units.velocity}`;
          const intercept = branch.index > 1 ? `<br>t<sub>i</sub> ${plain(branch.interceptTime, units.time === 'ms' ? 1 : 3)} ${units.time}` : '';
          annotations.push({
            x: position(middle), y: lineTime(branch, middle) - reduce(middle), xref: 'x', yref: 'y',
            text: `${velocity}${intercept}`, showarrow: true, arrowhead: 0, arrowwidth: 1, arrowcolor: branchStyle(branch.index).color,
            // Forward sides labelled above their lines, reverse sides below: the two sets cross mid-line.
            ax: 0, ay: direction > 0 ? -labelRise : labelRise, font: { size: 10, color: PLOT_THEME.ink }, bgcolor: 'rgba(255,255,255,0.85)',
            bordercolor: branchStyle(branch.index).color, borderwidth: 1, borderpad: 2, align: 'left',
          });
        }
      }
      for (const crossover of side.crossovers) {
        const lower = side.branches.find((branch) => branch.index === crossover.lowerBranch);
        if (crossover.fitted === null || !lower) continue;
        crossovers.x.push(position(crossover.fitted));
        crossovers.y.push(lineTime(lower, crossover.fitted) - reduce(crossover.fitted));
        crossovers.text.push(
          `shot ${plotlyText(shot.id)}, ${side.side}: crossover of branches ${crossover.lowerBranch} and ${crossover.upperBranch}<br>` +
            `at offset ${plain(crossover.fitted)}${crossover.fittedSE !== null ? ` ± ${plain(crossover.fittedSE)}` : ''} ${units.distance}` +
            `<br>picks change branch between offsets ${plain(crossover.observedBracket[0])} and ${plain(crossover.observedBracket[1])} ${units.distance}`,
        );
      }
    }
  });
  for (const index of [...lines.keys()].sort((left, right) => left - right)) {
    const segment = lines.get(index)!;
    const style = branchStyle(index);
    data.push({
      type: 'scatter', mode: 'lines', name: `branch ${index} fitted line`, legendgroup: `b${index}`, showlegend: false,
      x: segment.x, y: segment.y, hoverinfo: 'skip', line: { color: style.color, width: 1.8, dash: style.dash },
      meta: { role: 'fitted-lines', branch: index },
    });
  }
  if (crossovers.x.length > 0) {
    data.push({
      type: 'scatter', mode: 'markers', name: 'crossover (fitted)', x: crossovers.x, y: crossovers.y, text: crossovers.text,
      hovertemplate: '%{text}<extra></extra>',
      marker: { symbol: 'circle-open-dot', size: 13, color: PLOT_THEME.ink, line: { width: 2, color: PLOT_THEME.ink } },
      meta: { role: 'crossovers' },
    });
  }

  const selected = [...selection].flatMap((line) => {
    const point = where.get(line);
    return point ? [{ line, ...point }] : [];
  });
  if (selected.length > 0) {
    data.push({
      type: pointType, mode: 'markers', name: `selected (${selected.length})`, x: selected.map((point) => point.x), y: selected.map((point) => point.y),
      customdata: selected.map((point) => point.line), hoverinfo: 'skip',
      marker: { symbol: SELECTED_STYLE.symbol, size: 16, color: SELECTED_STYLE.color, line: { width: 3, color: SELECTED_STYLE.color } },
      meta: { role: 'selection' },
    });
  }

  const reducedTitle = options.reductionVelocity
    ? `Reduced time (${units.time}), V<sub>red</sub> ${plain(options.reductionVelocity, 2)} ${units.velocity}`
    : `Travel time (${units.time})`;
  const layout: Record<string, unknown> = {
    uirevision: options.uiRevision,
    // A new value on every draw: a dragged breakpoint line goes back to where the data put it.
    editrevision: options.editRevision ?? 0,
    // Likewise plotly's own selection box: the client's selection is drawn as rings.
    selectionrevision: options.editRevision ?? 0,
    selections: [],
    dragmode: options.dragMode,
    ...BASE_LAYOUT,
    xaxis: { ...positionAxis(units.distance), anchor: 'y2' },
    yaxis: { title: { text: reducedTitle }, gridcolor: PLOT_THEME.grid, zeroline: false, domain: [0.3, 1] },
    yaxis2: {
      title: { text: `Residual (${units.time})` }, gridcolor: PLOT_THEME.grid, domain: [0, 0.22],
      zeroline: true, zerolinecolor: PLOT_THEME.muted, zerolinewidth: 1,
    },
    annotations,
    shapes: options.breakpointMarker
      ? [{
          type: 'line', xref: 'x', yref: 'paper', x0: options.breakpointMarker.x, x1: options.breakpointMarker.x, y0: 0.3, y1: 1,
          line: { color: PLOT_THEME.ink, width: 2, dash: 'dot' }, editable: true,
          label: { text: plotlyText(options.breakpointMarker.label), textposition: 'end', font: { size: 11, color: PLOT_THEME.ink } },
        }]
      : [],
  };
  return { data, layout, webgl, pointCount };
}
