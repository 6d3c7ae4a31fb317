/**
 * The shot-gather figure, without the DOM: where each trace and each time falls on the canvas,
 * the wiggle of a trace (with its positive lobes filled) and the variable-density raster, which
 * trace and time a click lands on, the markers of the picks, and the hand edits of picks kept
 * until they are saved. Everything here is a pure function of its arguments, so that
 * gather-view.ts only draws and listens, and the tests check the arithmetic without a browser.
 *
 * Coordinates: CSS pixels of the canvas, x to the right, y downward; times in seconds after the
 * shot (as the service sends them), positions in metres.
 */
import type { DisplayPick, DisplayTrace, GatherDisplay, PickEdit } from './api-types.js';

// ---------------------------------------------------------------- layout

/** Which coordinate of a trace sets its place across the figure. */
export type TraceAxis = 'offset' | 'receiver';
export type GatherDisplayMode = 'wiggle' | 'density';

export interface PlotBox {
  readonly left: number;
  readonly top: number;
  readonly width: number;
  readonly height: number;
}

/** Room around the traces for the time labels (left) and the position labels (top). */
export const GATHER_MARGINS = { left: 62, top: 40, right: 14, bottom: 14 } as const;

/** One trace's place across the figure. */
export interface TraceColumn {
  /** `DisplayTrace.traceIndex`. */
  readonly traceIndex: number;
  /** Position of the trace in `GatherDisplay.traces`. */
  readonly arrayIndex: number;
  /** Offset or receiver position, metres, as recorded. */
  readonly position: number;
  /** The trace's zero line, px. */
  readonly x: number;
  /** The column a click selects this trace in: from `left` (inclusive) to `right` (exclusive), px. */
  readonly left: number;
  readonly right: number;
}

export interface GatherLayout {
  readonly box: PlotBox;
  readonly axis: TraceAxis;
  /** Columns left to right. */
  readonly columns: readonly TraceColumn[];
  /** The usual distance between neighbouring traces (median of the positive gaps), metres. */
  readonly spacing: number;
  /** The same in pixels: a wiggle is clipped at this excursion. */
  readonly spacingPx: number;
  /** Scale across: pixels per metre, and the position (metres) at the box's left edge (see `positionToX`). */
  readonly pxPerMetre: number;
  readonly positionAtLeft: number;
  /** Times at the top and the bottom of the box, seconds. */
  readonly timeTop: number;
  readonly timeBottom: number;
  /** Of the displayed samples (from the display): the first sample's time and the interval, seconds. */
  readonly startTime: number;
  readonly sampleInterval: number;
}

export interface LayoutOptions {
  readonly axis: TraceAxis;
  /** Seconds shown at the bottom of the figure; null: the end of the longest trace. */
  readonly timeBottom?: number | null;
  readonly margins?: { readonly left: number; readonly top: number; readonly right: number; readonly bottom: number };
}

type LayoutInput = Pick<GatherDisplay, 'startTime' | 'sampleInterval'> & { readonly traces: readonly Pick<DisplayTrace, 'traceIndex' | 'offset' | 'receiverX' | 'samples'>[] };

/** Relative size under which two positions count as one (rounding in the recorded coordinates). */
const SAME_POSITION = 1e-9;

/**
 * Lay out a gather on a canvas of `size` CSS pixels: traces side by side at their true offset or
 * receiver position (so a gap in the spread shows as space and the slope of the first breaks
 * reads as an apparent velocity), time downward from the first displayed sample.
 *
 * Position of trace i: x = left + (pᵢ − p_min + s/2) · w / (p_max − p_min + s), where s is the
 * median of the positive gaps between neighbouring positions (the trace spacing) and w the box
 * width; the half spacing at each end keeps the outer wiggles inside. Each trace owns the column
 * from the midpoint to its left neighbour to the midpoint to its right one (the outer columns reach
 * the box edges), so any click across the figure selects exactly one trace.
 *
 * Edges: traces at the same position (a repeated receiver) are spread across one spacing in the
 * order of their trace index, k traces at p put at p + (j − (k − 1)/2) · s/k; with a single
 * position (one trace, or every trace at one place) the spacing is taken as 1 m. A gather with no
 * traces has no columns. Without samples, or with a requested bottom time at or above the start,
 * one displayed sample interval is shown. Throws on a box with no room (programming error).
 *
 * @example
 * // Four receivers every 2 m from 2 m, shot at 0, on a 460 × 340 canvas (box 384 × 286 px):
 * // spacing 2 m; columns at x = 62 + (1, 3, 5, 7) · 384/8 = 110, 206, 302, 398 px.
 */
export function gatherLayout(display: LayoutInput, size: { readonly width: number; readonly height: number }, options: LayoutOptions): GatherLayout {
  const margins = options.margins ?? GATHER_MARGINS;
  const box: PlotBox = { left: margins.left, top: margins.top, width: size.width - margins.left - margins.right, height: size.height - margins.top - margins.bottom };
  if (!(box.width > 0 && box.height > 0)) {
    throw new Error(`gatherLayout: a canvas of ${size.width} × ${size.height} px leaves no room for the traces inside margins of ${margins.left}/${margins.top}/${margins.right}/${margins.bottom} px; give the canvas a size first`);
  }
  if (!(display.sampleInterval > 0)) {
    throw new Error(`gatherLayout: the displayed sample interval must be positive, got ${display.sampleInterval}; the service sends it with the gather`);
  }
  const recorded = display.traces.map((trace, arrayIndex) => ({
    traceIndex: trace.traceIndex, arrayIndex, position: options.axis === 'offset' ? trace.offset : trace.receiverX,
  })).sort((left, right) => left.position - right.position || left.traceIndex - right.traceIndex);
  const spacing = traceSpacing(recorded.map((trace) => trace.position));
  const placed = spreadTies(recorded, spacing);
  const first = placed[0]?.place ?? 0;
  const last = placed[placed.length - 1]?.place ?? 0;
  const pxPerMetre = box.width / (last - first + spacing);
  const xs = placed.map((trace) => box.left + (trace.place - first + spacing / 2) * pxPerMetre);
  const columns = placed.map((trace, k): TraceColumn => ({
    traceIndex: trace.traceIndex,
    arrayIndex: trace.arrayIndex,
    position: trace.position,
    x: xs[k]!,
    left: k === 0 ? box.left : (xs[k - 1]! + xs[k]!) / 2,
    right: k === placed.length - 1 ? box.left + box.width : (xs[k]! + xs[k + 1]!) / 2,
  }));

  const longest = Math.max(0, ...display.traces.map((trace) => trace.samples.length));
  const end = display.startTime + Math.max(1, longest - 1) * display.sampleInterval;
  const requested = options.timeBottom ?? null;
  const timeBottom = requested !== null && Number.isFinite(requested) && requested > display.startTime ? requested : end;
  return {
    box, axis: options.axis, columns, spacing, spacingPx: spacing * pxPerMetre, pxPerMetre, positionAtLeft: first - spacing / 2,
    timeTop: display.startTime, timeBottom, startTime: display.startTime, sampleInterval: display.sampleInterval,
  };
}

/** Median of the positive gaps between sorted positions, metres; 1 when there is none. */
export function traceSpacing(sortedPositions: readonly number[]): number {
  const scale = Math.max(1, ...sortedPositions.map(Math.abs));
  const gaps: number[] = [];
  for (let k = 1; k < sortedPositions.length; k += 1) {
    const gap = sortedPositions[k]! - sortedPositions[k - 1]!;
    if (gap > SAME_POSITION * scale) gaps.push(gap);
  }
  if (gaps.length === 0) return 1;
  gaps.sort((left, right) => left - right);
  const middle = Math.floor(gaps.length / 2);
  return gaps.length % 2 === 1 ? gaps[middle]! : (gaps[middle - 1]! + gaps[middle]!) / 2;
}

/** Traces that share a position, spread across one spacing (see gatherLayout). */
function spreadTies<T extends { readonly position: number }>(sorted: readonly T[], spacing: number): (T & { readonly place: number })[] {
  const scale = Math.max(1, ...sorted.map((trace) => Math.abs(trace.position)));
  const out: (T & { readonly place: number })[] = [];
  for (let start = 0; start < sorted.length;) {
    let end = start + 1;
    while (end < sorted.length && sorted[end]!.position - sorted[start]!.position <= SAME_POSITION * scale) end += 1;
    const count = end - start;
    for (let j = 0; j < count; j += 1) {
      const trace = sorted[start + j]!;
      out.push({ ...trace, place: trace.position + (j - (count - 1) / 2) * (spacing / count) });
    }
    start = end;
  }
  return out;
}

/** x of a position (metres, offset or receiver position as the layout's axis) in px: for the position labels. */
export function positionToX(layout: GatherLayout, position: number): number {
  return layout.box.left + (position - layout.positionAtLeft) * layout.pxPerMetre;
}

/** y of time `time` (seconds) in px: linear from the box top (`timeTop`) to its bottom (`timeBottom`). */
export function timeToY(layout: GatherLayout, time: number): number {
  return layout.box.top + ((time - layout.timeTop) / (layout.timeBottom - layout.timeTop)) * layout.box.height;
}

/** The time at height y (px), the inverse of `timeToY`. */
export function yToTime(layout: GatherLayout, y: number): number {
  return layout.timeTop + ((y - layout.box.top) / layout.box.height) * (layout.timeBottom - layout.timeTop);
}

/** The column under x, or null outside the box (or when there are no traces). Binary search over the columns. */
export function columnAt(layout: GatherLayout, x: number): TraceColumn | null {
  const { box, columns } = layout;
  if (columns.length === 0 || x < box.left || x >= box.left + box.width) return null;
  let low = 0;
  let high = columns.length - 1;
  while (low < high) {
    const middle = (low + high) >> 1;
    if (x >= columns[middle]!.right) low = middle + 1;
    else high = middle;
  }
  return columns[low] ?? null;
}

/**
 * The displayed sample time nearest `time` on a trace of `sampleCount` samples: startTime +
 * round((time − startTime)/Δt)·Δt, kept between the trace's first and last sample. Edges: a trace
 * without samples snaps to the first sample's time.
 */
export function snapTime(layout: Pick<GatherLayout, 'startTime' | 'sampleInterval'>, time: number, sampleCount: number): number {
  const last = Math.max(0, sampleCount - 1);
  const index = Math.min(last, Math.max(0, Math.round((time - layout.startTime) / layout.sampleInterval)));
  return layout.startTime + index * layout.sampleInterval;
}

/** The time `steps` displayed samples after `time` (before, when negative), snapped and kept on the trace. */
export function stepTime(layout: Pick<GatherLayout, 'startTime' | 'sampleInterval'>, time: number, steps: number, sampleCount: number): number {
  return snapTime(layout, snapTime(layout, time, sampleCount) + steps * layout.sampleInterval, sampleCount);
}

export interface GatherHit {
  readonly traceIndex: number;
  /** The clicked time snapped to the nearest displayed sample of that trace, seconds. */
  readonly time: number;
}

/**
 * What a click at (x, y) means: the trace whose column holds x (the click need not touch the
 * wiggle), and the clicked time snapped to that trace's nearest displayed sample. Null outside the
 * box of traces.
 */
export function hitTest(layout: GatherLayout, traces: readonly Pick<DisplayTrace, 'samples'>[], x: number, y: number): GatherHit | null {
  if (y < layout.box.top || y > layout.box.top + layout.box.height) return null;
  const column = columnAt(layout, x);
  if (!column) return null;
  const sampleCount = traces[column.arrayIndex]?.samples.length ?? 0;
  return { traceIndex: column.traceIndex, time: snapTime(layout, yToTime(layout, y), sampleCount) };
}

/** The column `steps` places to the right of the trace (left when negative), kept at the ends; null when the trace is not laid out. */
export function neighbourColumn(layout: GatherLayout, traceIndex: number, steps: number): TraceColumn | null {
  const at = layout.columns.findIndex((column) => column.traceIndex === traceIndex);
  if (at < 0) return null;
  return layout.columns[Math.min(layout.columns.length - 1, Math.max(0, at + steps))] ?? null;
}

// ---------------------------------------------------------------- gain

/** The gain slider runs in doublings (log₂ of the gain), so that each step looks alike. */
export const GAIN_SLIDER = { min: -2, max: 5, step: 0.25, initial: 1 } as const;

/** Gain of a slider setting: 2^setting (the slider's −2…5 is ×¼…×32). */
export function gainFromSlider(setting: number): number {
  return 2 ** setting;
}

/** A sample times the gain, clipped to [−1, 1]: one unit is one trace spacing on a wiggle and the end of the colour ramp. */
export function clippedAmplitude(sample: number, gain: number): number {
  const value = sample * gain;
  if (!Number.isFinite(value)) return 0;
  return Math.min(1, Math.max(-1, value));
}

// ---------------------------------------------------------------- wiggle

export interface WigglePath {
  /** The trace as a polyline, flat [x₀, y₀, x₁, y₁, …] px. */
  readonly line: readonly number[];
  /** The positive lobes, each a closed polygon flat [x, y, …] px along the curve and back up the zero line. */
  readonly fills: readonly (readonly number[])[];
}

/**
 * The wiggle of one trace in its column: sample k of value aₖ at x = x₀ + clip(aₖ · gain) · s and
 * y = y(startTime + k·Δt), where x₀ is the trace's zero line and s the trace spacing in pixels (so
 * the largest excursion is one trace spacing). Only the samples in the time window, with one on
 * each side so the line reaches the box edges, are returned.
 *
 * Positive fill: every run of samples above zero becomes a polygon from the zero crossing before
 * it to the one after it (crossings found by linear interpolation between the two samples either
 * side of zero) and back along the zero line. Edges: a run that starts at the first sample or ends
 * at the last starts or ends on the zero line at that sample; a trace with no samples in the window
 * gives an empty line and no fills; a sample that is not finite is drawn as zero.
 */
export function wigglePath(layout: GatherLayout, column: Pick<TraceColumn, 'x'>, samples: readonly number[], gain: number): WigglePath {
  const { startTime, sampleInterval } = layout;
  const firstIndex = Math.max(0, Math.floor((layout.timeTop - startTime) / sampleInterval) - 1);
  const lastIndex = Math.min(samples.length - 1, Math.ceil((layout.timeBottom - startTime) / sampleInterval) + 1);
  const line: number[] = [];
  const fills: number[][] = [];
  let lobe: number[] | null = null;
  let previous: { value: number; y: number } | null = null;
  for (let k = firstIndex; k <= lastIndex; k += 1) {
    const value = clippedAmplitude(samples[k] ?? 0, gain);
    const y = timeToY(layout, startTime + k * sampleInterval);
    const x = column.x + value * layout.spacingPx;
    line.push(x, y);
    if (value > 0) {
      if (lobe === null) {
        // Into a positive lobe: from the crossing between the previous sample and this one, or from this sample on the zero line.
        const crossing = previous !== null ? previous.y + (y - previous.y) * (previous.value / (previous.value - value)) : y;
        lobe = [column.x, crossing];
      }
      lobe.push(x, y);
    } else if (lobe !== null && previous !== null) {
      const crossing = previous.y + (y - previous.y) * (previous.value / (previous.value - value));
      lobe.push(column.x, crossing);
      fills.push(lobe);
      lobe = null;
    }
    previous = { value, y };
  }
  if (lobe !== null && previous !== null) {
    lobe.push(column.x, previous.y);
    fills.push(lobe);
  }
  return { line, fills };
}

// ---------------------------------------------------------------- variable density

/** The ramp of the variable-density display: a deep teal for troughs, the paper for zero, earth brown for peaks. */
export const DENSITY_RAMP = {
  negative: [0x15, 0x5e, 0x63],
  zero: [0xfb, 0xfa, 0xf7],
  positive: [0x6b, 0x4f, 0x2a],
} as const satisfies Record<string, readonly [number, number, number]>;

/** The ramp colour of a clipped amplitude in [−1, 1]: linear from `zero` towards `negative` or `positive`, channels rounded. */
export function densityColour(amplitude: number): [number, number, number] {
  const value = Math.min(1, Math.max(-1, Number.isFinite(amplitude) ? amplitude : 0));
  const end = value < 0 ? DENSITY_RAMP.negative : DENSITY_RAMP.positive;
  const weight = Math.abs(value);
  return [0, 1, 2].map((channel) => Math.round(DENSITY_RAMP.zero[channel]! + (end[channel]! - DENSITY_RAMP.zero[channel]!) * weight)) as [number, number, number];
}

export interface DensityRaster {
  /** Device pixels across and down the box. */
  readonly width: number;
  readonly height: number;
  /** RGBA, row by row from the top (as ImageData holds it). */
  readonly pixels: Uint8ClampedArray<ArrayBuffer>;
}

/**
 * The variable-density picture of the box at `scale` device pixels per CSS pixel: each pixel column
 * takes the trace whose column holds its centre, each pixel row the trace's amplitude at the row
 * centre's time (linear between the two displayed samples around it), times the gain, clipped, in
 * the ramp colour. Edges: rows before the first or after the last sample of a trace, and any pixel
 * outside every column, are left transparent; the result is at least 1 × 1 pixel.
 */
export function densityRaster(layout: GatherLayout, traces: readonly Pick<DisplayTrace, 'samples'>[], gain: number, scale = 1): DensityRaster {
  const width = Math.max(1, Math.round(layout.box.width * scale));
  const height = Math.max(1, Math.round(layout.box.height * scale));
  const pixels = new Uint8ClampedArray(width * height * 4);
  const columnOfPixel = Array.from({ length: width }, (_, px) => columnAt(layout, layout.box.left + (px + 0.5) / scale));
  const { startTime, sampleInterval } = layout;
  for (let row = 0; row < height; row += 1) {
    const where = (yToTime(layout, layout.box.top + (row + 0.5) / scale) - startTime) / sampleInterval;
    const below = Math.floor(where);
    const fraction = where - below;
    let cachedTrace = -1;
    let colour: [number, number, number] | null = null;
    for (let px = 0; px < width; px += 1) {
      const column = columnOfPixel[px];
      if (!column) continue;
      if (column.arrayIndex !== cachedTrace) {
        cachedTrace = column.arrayIndex;
        const samples = traces[column.arrayIndex]?.samples ?? [];
        colour = null;
        if (below >= 0 && below < samples.length && (below + 1 < samples.length || fraction === 0)) {
          const upper = samples[below] ?? 0;
          const lower = below + 1 < samples.length ? samples[below + 1] ?? 0 : upper;
          colour = densityColour(clippedAmplitude(upper + (lower - upper) * fraction, gain));
        }
      }
      if (!colour) continue;
      const at = (row * width + px) * 4;
      pixels[at] = colour[0];
      pixels[at + 1] = colour[1];
      pixels[at + 2] = colour[2];
      pixels[at + 3] = 255;
    }
  }
  return { width, height, pixels };
}

// ---------------------------------------------------------------- axes

/**
 * About `count` round tick values from `low` to `high` (steps of 1, 2 or 5 times a power of ten),
 * every tick inside the range. Edges: an empty or reversed range, or a count below 1, gives the
 * single value `low`; non-finite input gives no ticks.
 */
export function niceTicks(low: number, high: number, count: number): number[] {
  if (!Number.isFinite(low) || !Number.isFinite(high)) return [];
  if (!(high > low) || count < 1) return [low];
  const rough = (high - low) / count;
  const power = 10 ** Math.floor(Math.log10(rough));
  const step = [1, 2, 5, 10].map((factor) => factor * power).find((candidate) => candidate >= rough) ?? 10 * power;
  const ticks: number[] = [];
  for (let value = Math.ceil(low / step - 1e-9) * step; value <= high + step * 1e-9; value += step) {
    ticks.push(Number(value.toPrecision(12)));
  }
  return ticks;
}

/**
 * A time (seconds) in the display unit, to the precision the displayed samples carry: one decimal
 * more than the sample interval needs (0.5 ms → 2 places: "14.25"), between 0 and 6 places.
 */
export function gatherTimeText(time: number, unit: 'ms' | 's', sampleInterval: number): string {
  const factor = unit === 'ms' ? 1000 : 1;
  const interval = sampleInterval * factor;
  const places = interval > 0 && Number.isFinite(interval) ? Math.min(6, Math.max(0, Math.ceil(-Math.log10(interval) - 1e-9) + 1)) : 2;
  return (time * factor).toFixed(places);
}

/**
 * The number a person calls a trace by: its place in the gather counted from 1, as channels are
 * numbered in the field (the service's `traceIndex` counts from 0).
 */
export function traceNumber(traceIndex: number): number {
  return traceIndex + 1;
}

// ---------------------------------------------------------------- picks and hand edits

/** How a pick is drawn; each has its own shape, so they stay apart without colour too. */
export type MarkerKind = 'automatic' | 'low-confidence' | 'user' | 'unsaved' | 'rejected' | 'removed' | 'unsaved-removal';

export type MarkerShape = 'disc' | 'triangle' | 'square' | 'square-dot' | 'ring' | 'cross' | 'cross-ring';

export interface MarkerStyle {
  readonly label: string;
  readonly shape: MarkerShape;
  readonly fill: string | null;
  readonly stroke: string;
  readonly description: string;
}

/**
 * Marker of each kind. The fills are Okabe–Ito colours (as the branch colours elsewhere in the
 * client) with a dark or white edge, so that they stand out on black wiggles and on both ends of
 * the density ramp alike.
 */
export const MARKER_STYLES: Readonly<Record<MarkerKind, MarkerStyle>> = {
  automatic: { label: 'Automatic pick', shape: 'disc', fill: '#D55E00', stroke: '#ffffff', description: 'placed by the automatic picker and kept in the pick set' },
  'low-confidence': { label: 'Automatic, low confidence', shape: 'triangle', fill: '#E69F00', stroke: '#1d2a2f', description: 'kept in the pick set, but the picker doubted it: check it against the trace' },
  user: { label: 'Placed by hand', shape: 'square', fill: '#CC79A7', stroke: '#1d2a2f', description: 'moved or added by hand and saved' },
  unsaved: { label: 'Placed by hand, not saved', shape: 'square-dot', fill: null, stroke: '#C2185B', description: 'your edit, kept in this page until you save it' },
  rejected: { label: 'Rejected candidate', shape: 'ring', fill: null, stroke: '#1d2a2f', description: 'what the picker found but kept out of the pick set; click the trace to place a pick' },
  removed: { label: 'Removed', shape: 'cross', fill: null, stroke: '#5b6b70', description: 'removed by hand; no pick of this trace is in the pick set' },
  'unsaved-removal': { label: 'Removal not saved', shape: 'cross-ring', fill: null, stroke: '#C2185B', description: 'your removal, kept in this page until you save it' },
};

/** A hand edit of one trace, not saved yet. */
export type PendingEdit = { readonly time: number } | { readonly remove: true };

/** Unsaved edits of a survey's gathers, by gather and trace (see `pendingKey`). Immutable: every change makes a new map. */
export type PendingEdits = ReadonlyMap<string, { readonly gatherId: string; readonly traceIndex: number; readonly edit: PendingEdit }>;

export const NO_PENDING_EDITS: PendingEdits = new Map();

export function pendingKey(gatherId: string, traceIndex: number): string {
  return `${gatherId}\u0000${traceIndex}`;
}

/** True when the stored pick set holds a pick of this trace (automatic or by hand). */
function inPickSet(pick: DisplayPick | undefined): pick is DisplayPick & { time: number } {
  return pick !== undefined && pick.pickIndex !== null && pick.time !== null && (pick.status === 'automatic' || pick.status === 'user');
}

/** Times closer than this are one time (a snapped click lands on the stored sample time up to rounding), seconds. */
const SAME_TIME = 1e-9;

/**
 * The edits after placing the pick of trace `traceIndex` of `gatherId` at `time`. Placing it back
 * where the pick set has it drops the edit instead (nothing left to save for that trace).
 */
export function withPlacement(pending: PendingEdits, gatherId: string, traceIndex: number, time: number, stored: DisplayPick | undefined): PendingEdits {
  const next = new Map(pending);
  const key = pendingKey(gatherId, traceIndex);
  if (inPickSet(stored) && Math.abs(stored.time - time) <= SAME_TIME) next.delete(key);
  else next.set(key, { gatherId, traceIndex, edit: { time } });
  return next;
}

/**
 * The edits after removing the pick of a trace. A trace with a pick in the pick set gets a removal;
 * one without (rejected, removed, none) only loses an unsaved placement, since there is nothing
 * stored to remove.
 */
export function withRemoval(pending: PendingEdits, gatherId: string, traceIndex: number, stored: DisplayPick | undefined): PendingEdits {
  const next = new Map(pending);
  const key = pendingKey(gatherId, traceIndex);
  if (inPickSet(stored)) next.set(key, { gatherId, traceIndex, edit: { remove: true } });
  else next.delete(key);
  return next;
}

/** The edits as the service takes them (POST /api/surveys/:id/pick-edits), by gather then trace. */
export function toPickEdits(pending: PendingEdits): PickEdit[] {
  return [...pending.values()]
    .sort((left, right) => (left.gatherId < right.gatherId ? -1 : left.gatherId > right.gatherId ? 1 : left.traceIndex - right.traceIndex))
    .map(({ gatherId, traceIndex, edit }) => ('remove' in edit ? { gatherId, traceIndex, remove: true as const } : { gatherId, traceIndex, time: edit.time }));
}

/** A trace's pick as drawn now: the stored one, or the unsaved edit over it. */
export interface ShownPick {
  readonly traceIndex: number;
  /** Where the marker goes, seconds; null: nothing to draw. */
  readonly time: number | null;
  readonly kind: MarkerKind | null;
  /** True when the trace has a pick in the pick set once the edits are saved. */
  readonly picked: boolean;
  readonly confidence: number | null;
  readonly note: string | null;
  /** The stored status, for the text alternative. */
  readonly status: DisplayPick['status'];
}

/**
 * Every trace's pick as the figure shows it, in the order of `traces`: an unsaved placement is
 * 'unsaved' at its time; an unsaved removal is 'unsaved-removal' at the stored time; else the
 * stored status decides — automatic ('low-confidence' when the picker flagged it), user, rejected
 * (the candidate's time; not picked), removed (at its old time when the service still gives one),
 * none (no marker). A trace the service sent no pick for counts as 'none'.
 */
export function shownPicks(display: Pick<GatherDisplay, 'traces' | 'picks'> & { readonly gather: { readonly id: string } }, pending: PendingEdits): ShownPick[] {
  const byTrace = new Map(display.picks.map((pick) => [pick.traceIndex, pick]));
  return display.traces.map((trace): ShownPick => {
    const stored = byTrace.get(trace.traceIndex);
    const base = { traceIndex: trace.traceIndex, confidence: stored?.confidence ?? null, note: stored?.note ?? null, status: stored?.status ?? 'none' as const };
    const edit = pending.get(pendingKey(display.gather.id, trace.traceIndex))?.edit;
    if (edit && 'time' in edit) return { ...base, time: edit.time, kind: 'unsaved', picked: true };
    if (edit) return { ...base, time: stored?.time ?? null, kind: stored?.time !== null && stored?.time !== undefined ? 'unsaved-removal' : null, picked: false };
    if (!stored || stored.status === 'none' || stored.time === null) return { ...base, time: null, kind: null, picked: false };
    switch (stored.status) {
      case 'automatic':
        return { ...base, time: stored.time, kind: stored.lowConfidence ? 'low-confidence' : 'automatic', picked: stored.pickIndex !== null };
      case 'user':
        return { ...base, time: stored.time, kind: 'user', picked: stored.pickIndex !== null };
      case 'rejected':
        return { ...base, time: stored.time, kind: 'rejected', picked: false };
      case 'removed':
        return { ...base, time: stored.time, kind: 'removed', picked: false };
    }
  });
}

/** How many markers of each kind are drawn. */
export function markerCounts(shown: readonly ShownPick[]): Record<MarkerKind, number> {
  const counts: Record<MarkerKind, number> = { automatic: 0, 'low-confidence': 0, user: 0, unsaved: 0, rejected: 0, removed: 0, 'unsaved-removal': 0 };
  for (const pick of shown) if (pick.kind !== null && pick.time !== null) counts[pick.kind] += 1;
  return counts;
}

/**
 * The gather in one sentence for a screen reader and for the eye: "Shot S1: 48 traces, 46 picks,
 * 2 rejected", then low-confidence picks and unsaved edits of this gather when there are any.
 * Picks count the traces picked once the edits are saved.
 */
export function gatherSummaryText(shot: string, shown: readonly ShownPick[], unsavedHere: number): string {
  const counts = markerCounts(shown);
  const picks = shown.filter((pick) => pick.picked).length;
  const plural = (count: number, word: string) => `${count} ${word}${count === 1 ? '' : 's'}`;
  const parts = [plural(shown.length, 'trace'), plural(picks, 'pick'), `${counts.rejected} rejected`];
  if (counts['low-confidence'] > 0) parts.push(`${counts['low-confidence']} of low confidence`);
  if (unsavedHere > 0) parts.push(plural(unsavedHere, 'unsaved edit'));
  return `Shot ${shot}: ${parts.join(', ')}`;
}

/** The marker nearest (x, y) within `radius` px, or null: for the tooltip over a marker. */
export function markerAt(layout: GatherLayout, shown: readonly ShownPick[], x: number, y: number, radius: number): ShownPick | null {
  const columnOf = new Map(layout.columns.map((column) => [column.traceIndex, column]));
  let best: ShownPick | null = null;
  let bestDistance = radius;
  for (const pick of shown) {
    const column = columnOf.get(pick.traceIndex);
    if (!column || pick.time === null || pick.kind === null) continue;
    const distance = Math.hypot(column.x - x, timeToY(layout, pick.time) - y);
    if (distance <= bestDistance) {
      best = pick;
      bestDistance = distance;
    }
  }
  return best;
}
