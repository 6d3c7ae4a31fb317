/**
 * The shot-gather figure's arithmetic (client/src/gather-figure.ts): layout of traces and times,
 * hit-testing and snapping, wiggles and their positive fill, the variable-density raster, ticks,
 * and the unsaved hand edits of picks. Inputs are small gathers written out here; every expected
 * pixel is worked by hand in the comment beside it.
 *
 * Oracles: the filled area of a wiggle against the exact integral of the positive part of the
 * piecewise-linear trace; `columnAt`'s binary search against a scan of every column.
 *
 * Contrast: relative luminance and contrast ratio as WCAG 2.1 defines them (SC 1.4.3 notes;
 * sRGB linearisation from IEC 61966-2-1), with the 3:1 minimum of SC 1.4.11 for graphical objects.
 */
import { describe, expect, it } from 'vitest';
import type { DisplayPick, DisplayTrace, GatherDisplay } from '../../client/src/api-types.js';
import {
  clippedAmplitude, columnAt, densityColour, densityRaster, DENSITY_RAMP, gainFromSlider, GAIN_SLIDER, GATHER_MARGINS, gatherLayout, gatherTimeText, positionToX, traceNumber,
  gatherSummaryText, hitTest, markerAt, markerCounts, MARKER_STYLES, neighbourColumn, niceTicks, NO_PENDING_EDITS, pendingKey, shownPicks,
  snapTime, stepTime, timeToY, toPickEdits, traceSpacing, wigglePath, withPlacement, withRemoval, yToTime, type GatherLayout, type MarkerKind,
} from '../../client/src/gather-figure.js';
import { seededRandom } from '../../lib/random.js';
import { expectWithin } from '../helpers/expect-within.js';

/** Pixel arithmetic here is sums and products of a few numbers of order 10³: 1e-9 px is far above double rounding, far below a pixel. */
const PIXEL_TOLERANCE = 1e-9;
/** Times are a few multiples of 0.5 ms in seconds: same argument, in seconds. */
const TIME_TOLERANCE = 1e-12;

const DT = 0.0005;

function trace(traceIndex: number, receiverX: number, samples: readonly number[], sourceX = 0): DisplayTrace {
  return { traceIndex, receiver: `R${traceIndex}`, receiverX, offset: receiverX - sourceX, samples };
}

function display(traces: readonly DisplayTrace[], picks: readonly DisplayPick[] = [], startTime = 0, sampleInterval = DT): GatherDisplay {
  return {
    gather: { id: 'u1.1', shot: 'S1', fileName: 'shot.sg2', format: 'SEG-2', traceCount: traces.length, sampleCount: 100, sampleInterval, sourceX: 0, pickCount: 0 },
    version: 3, picksState: 'p', startTime, sampleInterval, traces, picks,
  };
}

function pick(traceIndex: number, status: DisplayPick['status'], time: number | null, extra: Partial<DisplayPick> = {}): DisplayPick {
  const stored = status === 'automatic' || status === 'user';
  return { traceIndex, pickIndex: stored ? traceIndex : null, time, sigma: null, confidence: status === 'user' ? null : 0.9, lowConfidence: false, status, note: null, ...extra };
}

const zeros = (count: number) => Array.from({ length: count }, () => 0);
/** The doc example: four receivers every 2 m from 2 m, shot at 0, 101 samples (0–50 ms). */
const FOUR = display([trace(1, 2, zeros(101)), trace(2, 4, zeros(101)), trace(3, 6, zeros(101)), trace(4, 8, zeros(101))]);
/** 460 × 340 px: box 384 × 286 px from (62, 40). */
const SIZE = { width: 460, height: 340 };

describe('gatherLayout places traces at their positions and times downward', () => {
  it('gatherLayout: four traces every 2 m give columns at 110, 206, 302, 398 px, each owning the span to the midpoints', () => {
    const layout = gatherLayout(FOUR, SIZE, { axis: 'receiver' });
    expect(layout.box).toEqual({ left: 62, top: 40, width: 384, height: 286 });
    expect(layout.spacing).toBe(2);
    // 384 px over (8 − 2 + 2) m = 48 px/m: one spacing is 96 px.
    expectWithin(layout.spacingPx, 96, PIXEL_TOLERANCE, '2 m × 48 px/m');
    expect(layout.columns.map((column) => column.x)).toEqual([110, 206, 302, 398]);
    expect(layout.columns.map((column) => [column.left, column.right])).toEqual([[62, 158], [158, 254], [254, 350], [350, 446]]);
    expect(layout.timeTop).toBe(0);
    expectWithin(layout.timeBottom, 0.05, TIME_TOLERANCE, '100 intervals of 0.5 ms');
  });

  it('gatherLayout: a gap in the spread shows as space, and the spacing is the median gap', () => {
    // Receivers at 0, 1, 2, 3 and 7 m: gaps 1, 1, 1, 4 → median 1 m; 7 m is four spacings right of 3 m.
    const layout = gatherLayout(display([0, 1, 2, 3, 7].map((x, k) => trace(k + 1, x, zeros(5)))), { width: 62 + 14 + 800, height: 300 }, { axis: 'receiver' });
    expect(layout.spacing).toBe(1);
    // 800 px over (7 − 0 + 1) m = 100 px/m; first trace half a spacing in.
    expect(layout.columns.map((column) => column.x)).toEqual([112, 212, 312, 412, 812]);
    expect(traceSpacing([0, 1, 3, 6])).toBe(2); // gaps 1, 2, 3: median 2
    expect(traceSpacing([0, 1, 3, 6, 10])).toBe(2.5); // gaps 1, 2, 3, 4: mean of the middle two
    expect(traceSpacing([0, 0, 0])).toBe(1); // one position: 1 m
  });

  it('gatherLayout: by offset, a split spread runs from the most negative offset; by receiver, by position along the line', () => {
    // Shot at 10 m; receivers at 4, 8, 12, 16 m: offsets −6, −2, 2, 6. Trace indices out of order on purpose.
    const traces = [trace(3, 12, zeros(3), 10), trace(1, 4, zeros(3), 10), trace(4, 16, zeros(3), 10), trace(2, 8, zeros(3), 10)];
    const byOffset = gatherLayout(display(traces), SIZE, { axis: 'offset' });
    expect(byOffset.columns.map((column) => column.traceIndex)).toEqual([1, 2, 3, 4]);
    expect(byOffset.columns.map((column) => column.position)).toEqual([-6, -2, 2, 6]);
    expect(byOffset.columns.map((column) => column.arrayIndex)).toEqual([1, 3, 0, 2]);
    const byReceiver = gatherLayout(display(traces), SIZE, { axis: 'receiver' });
    expect(byReceiver.columns.map((column) => column.position)).toEqual([4, 8, 12, 16]);
  });

  it('gatherLayout: traces at one position are spread across one spacing in trace-index order', () => {
    // Receivers 0, 2, 2, 4 m: spacing 2 m; the two at 2 m go to 2 ∓ 2/4 = 1.5 and 2.5 m.
    const layout = gatherLayout(display([trace(1, 0, [0]), trace(3, 2, [0]), trace(2, 2, [0]), trace(4, 4, [0])]), { width: 62 + 14 + 600, height: 200 }, { axis: 'receiver' });
    expect(layout.spacing).toBe(2);
    expect(layout.columns.map((column) => column.traceIndex)).toEqual([1, 2, 3, 4]);
    // 600 px over 6 m = 100 px/m: places 0, 1.5, 2.5, 4 m → 62 + (place + 1)·100.
    expect(layout.columns.map((column) => column.x)).toEqual([162, 312, 412, 562]);
    // Every column is distinct and clickable.
    expect(layout.columns.every((column) => column.right > column.left)).toBe(true);
  });

  it('gatherLayout: one trace takes the whole box with a 1 m spacing; no traces give no columns', () => {
    const one = gatherLayout(display([trace(1, 5, [0, 1])]), SIZE, { axis: 'receiver' });
    expect(one.spacing).toBe(1);
    expect(one.columns).toHaveLength(1);
    expect(one.columns[0]).toMatchObject({ x: 62 + 384 / 2, left: 62, right: 446 });
    const none = gatherLayout(display([]), SIZE, { axis: 'offset' });
    expect(none.columns).toEqual([]);
    expect(columnAt(none, 200)).toBeNull();
    // No samples at all: one displayed interval is shown.
    expectWithin(none.timeBottom - none.timeTop, DT, TIME_TOLERANCE, 'one sample interval');
  });

  it('gatherLayout: the bottom time can be chosen; one at or above the start falls back to the end of the longest trace', () => {
    expect(gatherLayout(FOUR, SIZE, { axis: 'receiver', timeBottom: 0.02 }).timeBottom).toBe(0.02);
    expectWithin(gatherLayout(FOUR, SIZE, { axis: 'receiver', timeBottom: 0 }).timeBottom, 0.05, TIME_TOLERANCE, 'fallback');
    expectWithin(gatherLayout(FOUR, SIZE, { axis: 'receiver', timeBottom: Number.NaN }).timeBottom, 0.05, TIME_TOLERANCE, 'fallback');
    // A display that starts after the shot: the top is its first sample.
    const late = gatherLayout(display([trace(1, 2, zeros(11))], [], 0.01), SIZE, { axis: 'receiver' });
    expect(late.timeTop).toBe(0.01);
    expectWithin(late.timeBottom, 0.015, TIME_TOLERANCE, '0.01 s + 10 × 0.5 ms');
  });

  it('gatherLayout refuses a canvas with no room, naming the size and the fix', () => {
    expect(() => gatherLayout(FOUR, { width: 60, height: 300 }, { axis: 'offset' })).toThrow(/60 × 300 px leaves no room.*give the canvas a size first/);
    expect(() => gatherLayout(display([], [], 0, 0), SIZE, { axis: 'offset' })).toThrow(/sample interval must be positive, got 0/);
  });

  it('timeToY and yToTime: 0 s at the box top, the bottom time at its foot, linear between and inverse of each other', () => {
    const layout = gatherLayout(FOUR, SIZE, { axis: 'receiver' });
    expect(timeToY(layout, 0)).toBe(40);
    expectWithin(timeToY(layout, 0.05), 326, PIXEL_TOLERANCE, 'box foot 40 + 286');
    expectWithin(timeToY(layout, 0.025), 183, PIXEL_TOLERANCE, 'half way');
    for (const time of [0, 0.0123, 0.049]) expectWithin(yToTime(layout, timeToY(layout, time)), time, TIME_TOLERANCE, 'round trip');
  });
});

describe('hit-testing a click and snapping it to a displayed sample', () => {
  const layout = gatherLayout(FOUR, SIZE, { axis: 'receiver' });

  it('columnAt: the binary search agrees with a scan of every column at every pixel, and is null outside the box', () => {
    const irregular = gatherLayout(display([0, 0.5, 3, 3, 3, 9, 10, 10.5].map((x, k) => trace(k + 1, x, [0]))), SIZE, { axis: 'receiver' });
    for (const subject of [layout, irregular]) {
      for (let x = subject.box.left; x < subject.box.left + subject.box.width; x += 0.25) {
        const scanned = subject.columns.find((column) => x >= column.left && x < column.right) ?? null;
        expect(columnAt(subject, x)?.traceIndex, `x = ${x}`).toBe(scanned?.traceIndex);
      }
    }
    expect(columnAt(layout, 61.9)).toBeNull();
    expect(columnAt(layout, 446)).toBeNull();
    // Boundaries belong to the column on their right.
    expect(columnAt(layout, 158)?.traceIndex).toBe(2);
    expect(columnAt(layout, 157.99)?.traceIndex).toBe(1);
  });

  it('snapTime: to the nearest displayed sample, kept between the first and last sample of the trace', () => {
    expectWithin(snapTime(layout, 0.01024, 101), 0.0100, TIME_TOLERANCE, '10.24 ms → 10.0 ms');
    expectWithin(snapTime(layout, 0.01026, 101), 0.0105, TIME_TOLERANCE, '10.26 ms → 10.5 ms');
    expect(snapTime(layout, -0.003, 101)).toBe(0);
    expectWithin(snapTime(layout, 0.9, 101), 0.05, TIME_TOLERANCE, 'last sample');
    expectWithin(snapTime(layout, 0.9, 21), 0.01, TIME_TOLERANCE, 'a shorter trace ends at 20 × 0.5 ms');
    expect(snapTime(layout, 0.02, 0)).toBe(0);
    const late = { startTime: 0.004, sampleInterval: 0.001 };
    expectWithin(snapTime(late, 0.0076, 50), 0.008, TIME_TOLERANCE, 'samples counted from the display start');
  });

  it('stepTime: one displayed sample up or down, kept on the trace', () => {
    expectWithin(stepTime(layout, 0.01, 1, 101), 0.0105, TIME_TOLERANCE, 'one down');
    expectWithin(stepTime(layout, 0.01, -3, 101), 0.0085, TIME_TOLERANCE, 'three up');
    expect(stepTime(layout, 0, -1, 101)).toBe(0);
    expectWithin(stepTime(layout, 0.05, 1, 101), 0.05, TIME_TOLERANCE, 'stays on the last sample');
  });

  it('hitTest: a click anywhere in a column selects that trace at the snapped time; outside the box nothing', () => {
    // y = 40 + 286 × t / 0.05 → t = 10.2 ms at y = 98.344; snapped to 10.0 ms.
    const y = 40 + (286 * 0.0102) / 0.05;
    const onTheLine = hitTest(layout, FOUR.traces, 206, y);
    const farInTheColumn = hitTest(layout, FOUR.traces, 253.9, y);
    expect(onTheLine?.traceIndex).toBe(2);
    expect(farInTheColumn?.traceIndex).toBe(2);
    expectWithin(onTheLine?.time, 0.01, TIME_TOLERANCE, 'snapped');
    expect(hitTest(layout, FOUR.traces, 255, y)?.traceIndex).toBe(3);
    expect(hitTest(layout, FOUR.traces, 30, y)).toBeNull();
    expect(hitTest(layout, FOUR.traces, 206, 39)).toBeNull();
    expect(hitTest(layout, FOUR.traces, 206, 327)).toBeNull();
  });

  it('neighbourColumn: left and right in display order, kept at the ends; null for a trace not laid out', () => {
    expect(neighbourColumn(layout, 2, 1)?.traceIndex).toBe(3);
    expect(neighbourColumn(layout, 2, -1)?.traceIndex).toBe(1);
    expect(neighbourColumn(layout, 1, -1)?.traceIndex).toBe(1);
    expect(neighbourColumn(layout, 4, 5)?.traceIndex).toBe(4);
    expect(neighbourColumn(layout, 99, 1)).toBeNull();
  });
});

describe('gain, clipping and the wiggle', () => {
  it('gainFromSlider doubles per unit; the slider starts at ×2; clippedAmplitude clips at ±1 and reads non-finite as 0', () => {
    expect(gainFromSlider(0)).toBe(1);
    expect(gainFromSlider(GAIN_SLIDER.initial)).toBe(2);
    expect(gainFromSlider(GAIN_SLIDER.min)).toBe(0.25);
    expect(gainFromSlider(GAIN_SLIDER.max)).toBe(32);
    expect(clippedAmplitude(0.3, 2)).toBeCloseTo(0.6, 15);
    expect(clippedAmplitude(0.8, 2)).toBe(1);
    expect(clippedAmplitude(-0.8, 2)).toBe(-1);
    expect(clippedAmplitude(Number.NaN, 2)).toBe(0);
    expect(clippedAmplitude(Number.POSITIVE_INFINITY, 1)).toBe(0);
  });

  // One trace at 2 m (x₀ = 62 + 384/2 = 254 px, spacing 1 m = 384 px), 5 samples every 0.5 ms on a box 286 px tall (71.5 px a sample).
  const single = display([trace(1, 2, [0.25, -0.5, 0.5, 1, -0.25])]);
  const layout = gatherLayout(single, SIZE, { axis: 'receiver' });

  it('wigglePath: each sample at x₀ + amplitude × gain × spacing, clipped at one spacing', () => {
    const { line } = wigglePath(layout, layout.columns[0]!, single.traces[0]!.samples, 1.5);
    // Amplitudes × 1.5: 0.375, −0.75, 0.75, 1.5 → clipped 1, −0.375.
    const expected = [0.375, -0.75, 0.75, 1, -0.375].flatMap((amplitude, k) => [254 + amplitude * 384, 40 + k * 71.5]);
    expect(line).toHaveLength(expected.length);
    line.forEach((value, k) => expectWithin(value, expected[k]!, PIXEL_TOLERANCE, `line[${k}]`));
    expect(Math.max(...line.filter((_, k) => k % 2 === 0))).toBe(254 + 384);
  });

  it('wigglePath: positive lobes filled from zero crossing to zero crossing, back along the zero line', () => {
    const { fills } = wigglePath(layout, layout.columns[0]!, single.traces[0]!.samples, 1);
    // Lobes: sample 0 (from the zero line at the first sample), samples 2–3. Crossings by linear interpolation:
    // 0.25 → −0.5 at 1/3 of the interval; −0.5 → 0.5 at 1/2; 1 → −0.25 at 0.8.
    expect(fills).toHaveLength(2);
    const [first, second] = fills as [number[], number[]];
    const expectedFirst = [254, 40, 254 + 96, 40, 254, 40 + 71.5 / 3];
    first.forEach((value, k) => expectWithin(value, expectedFirst[k]!, PIXEL_TOLERANCE, `first lobe[${k}]`));
    const expectedSecond = [254, 40 + 1.5 * 71.5, 254 + 192, 40 + 2 * 71.5, 254 + 384, 40 + 3 * 71.5, 254, 40 + 3.8 * 71.5];
    second.forEach((value, k) => expectWithin(value, expectedSecond[k]!, PIXEL_TOLERANCE, `second lobe[${k}]`));
    // Every filled point lies on the positive side of the zero line.
    for (const polygon of fills) for (let k = 0; k < polygon.length; k += 2) expect(polygon[k]!).toBeGreaterThanOrEqual(254);
  });

  it('wigglePath: a lobe that runs to the last sample closes on the zero line there', () => {
    const rising = display([trace(1, 2, [-0.5, 0.5, 0.5])]);
    const rise = gatherLayout(rising, SIZE, { axis: 'receiver' });
    const { fills } = wigglePath(rise, rise.columns[0]!, rising.traces[0]!.samples, 1);
    expect(fills).toHaveLength(1);
    // From the crossing half way into the first interval to the last sample, then to the zero line at it.
    const last = fills[0]!;
    expectWithin(last[1], 40 + 0.5 * 143, PIXEL_TOLERANCE, 'crossing');
    expect(last.slice(-2)).toEqual([254, 40 + 286]);
  });

  it('wigglePath: the filled area equals the integral of the positive part of the trace (random traces, seeded)', () => {
    const random = seededRandom(20261202);
    for (let run = 0; run < 20; run += 1) {
      const samples = Array.from({ length: 60 }, () => (random() - 0.5) * 1.6);
      const gain = 0.5 + random() * 2;
      const subject = display([trace(1, 2, samples)]);
      const fitted = gatherLayout(subject, SIZE, { axis: 'receiver' });
      const { fills } = wigglePath(fitted, fitted.columns[0]!, samples, gain);
      const area = fills.reduce((sum, polygon) => sum + Math.abs(shoelace(polygon)), 0);
      expectWithin(area, positiveIntegral(fitted, samples, gain), 1e-6, `run ${run}: exact ∫ max(0, x − x₀) dy of the piecewise-linear trace`);
    }
  });

  it('wigglePath: only the samples in the time window (one either side), none for a trace outside it; NaN drawn as zero', () => {
    const long = display([trace(1, 2, [0.1, 0.2, Number.NaN, 0.4, 0.5, 0.6, 0.7, 0.8])]);
    // Window 1.0–2.0 ms: samples 2–4, with 1 and 5 either side.
    const windowed = { ...gatherLayout(long, SIZE, { axis: 'receiver', timeBottom: 0.002 }), timeTop: 0.001 };
    const { line } = wigglePath(windowed, windowed.columns[0]!, long.traces[0]!.samples, 1);
    expect(line.length / 2).toBe(5);
    expect(line[2]).toBe(254); // sample 2 is NaN: on the zero line
    expect(wigglePath(windowed, windowed.columns[0]!, [], 1)).toEqual({ line: [], fills: [] });
  });
});

describe('variable density', () => {
  it('densityColour: the paper at zero, teal at −1, brown at +1, linear between and clipped beyond', () => {
    expect(densityColour(0)).toEqual([...DENSITY_RAMP.zero]);
    expect(densityColour(-1)).toEqual([...DENSITY_RAMP.negative]);
    expect(densityColour(1)).toEqual([...DENSITY_RAMP.positive]);
    expect(densityColour(3)).toEqual([...DENSITY_RAMP.positive]);
    expect(densityColour(Number.NaN)).toEqual([...DENSITY_RAMP.zero]);
    // Half way to brown: (0xfb + 0x6b)/2 = 179, (0xfa + 0x4f)/2 = 164.5 → 165 (rounded half up), (0xf7 + 0x2a)/2 = 144.5 → 145.
    expect(densityColour(0.5)).toEqual([179, 165, 145]);
  });

  it('densityRaster: each pixel column takes its trace, each row the amplitude at its time, linear between samples', () => {
    // Two traces at 0 and 1 m on a 100 × 10 px box: columns 0–50 and 50–100 px; 11 samples every 1 ms over 10 px.
    const two = display([trace(1, 0, [0, 0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9, 1]), trace(2, 1, zeros(11).map(() => -0.5))], [], 0, 0.001);
    const margins = { left: 0, top: 0, right: 0, bottom: 0 };
    const layout = gatherLayout(two, { width: 100, height: 10 }, { axis: 'receiver', margins });
    const raster = densityRaster(layout, two.traces, 1);
    expect([raster.width, raster.height]).toEqual([100, 10]);
    const at = (px: number, row: number) => [...raster.pixels.slice((row * 100 + px) * 4, (row * 100 + px) * 4 + 4)];
    // Row 3's centre is 3.5 ms: trace 1 between 0.3 and 0.4 → 0.35.
    expect(at(10, 3)).toEqual([...densityColour(0.35), 255]);
    expect(at(49, 3)).toEqual([...densityColour(0.35), 255]);
    expect(at(50, 3)).toEqual([...densityColour(-0.5), 255]);
    // Gain 4 clips trace 2 at −1.
    expect([...densityRaster(layout, two.traces, 4).pixels.slice((3 * 100 + 70) * 4, (3 * 100 + 70) * 4 + 3)]).toEqual([...DENSITY_RAMP.negative]);
  });

  it('densityRaster: rows past the end of a short trace stay transparent; scale 2 doubles the pixels', () => {
    const short = display([trace(1, 0, [0.5, 0.5, 0.5]), trace(2, 1, zeros(11))], [], 0, 0.001);
    const margins = { left: 0, top: 0, right: 0, bottom: 0 };
    const layout = gatherLayout(short, { width: 20, height: 10 }, { axis: 'receiver', margins });
    const raster = densityRaster(layout, short.traces, 1);
    const alpha = (px: number, row: number) => raster.pixels[(row * 20 + px) * 4 + 3];
    expect(alpha(5, 1)).toBe(255); // 1.5 ms: between samples 1 and 2
    expect(alpha(5, 2)).toBe(0); // 2.5 ms: past the last sample (2 ms)
    expect(alpha(15, 9)).toBe(255);
    const fine = densityRaster(layout, short.traces, 1, 2);
    expect([fine.width, fine.height, fine.pixels.length]).toEqual([40, 20, 40 * 20 * 4]);
  });
});

describe('axes', () => {
  it('niceTicks: steps of 1, 2 or 5 × 10ⁿ inside the range; a degenerate range gives its start, non-finite none', () => {
    expect(niceTicks(0, 0.05, 5)).toEqual([0, 0.01, 0.02, 0.03, 0.04, 0.05]);
    expect(niceTicks(-23, 47, 7)).toEqual([-20, -10, 0, 10, 20, 30, 40]);
    expect(niceTicks(2.3, 8.9, 4)).toEqual([4, 6, 8]); // rough step 1.65 → 2
    expect(niceTicks(2.3, 8.9, 3)).toEqual([5]); // rough step 2.2 → 5: "about" count, never a finer step than asked
    expect(niceTicks(5, 5, 4)).toEqual([5]);
    expect(niceTicks(5, 1, 4)).toEqual([5]);
    expect(niceTicks(0, Number.NaN, 4)).toEqual([]);
  });
});

describe('labels', () => {
  it('positionToX: the linear map the columns sit on (used for the position labels)', () => {
    const layout = gatherLayout(FOUR, SIZE, { axis: 'receiver' });
    for (const column of layout.columns) expectWithin(positionToX(layout, column.position), column.x, PIXEL_TOLERANCE, `trace ${column.traceIndex}`);
    expectWithin(positionToX(layout, 1), 62, PIXEL_TOLERANCE, 'half a spacing left of the first trace is the box edge');
  });

  it('traceNumber: people count traces from 1, the service from 0', () => {
    expect(traceNumber(0)).toBe(1);
    expect(traceNumber(23)).toBe(24);
  });

  it('gatherTimeText: one decimal more than the sample interval needs, in ms or s', () => {
    expect(gatherTimeText(0.01425, 'ms', 0.0005)).toBe('14.25');
    expect(gatherTimeText(0.014125, 'ms', 0.00025)).toBe('14.13'); // 0.25 ms: ⌈0.60⌉ + 1 = 2 places
    expect(gatherTimeText(0.012, 'ms', 0.001)).toBe('12.0');
    expect(gatherTimeText(1.5, 's', 0.004)).toBe('1.5000');
    expect(gatherTimeText(0.012, 'ms', 0)).toBe('12.00');
  });
});

describe('picks, their markers and the unsaved hand edits', () => {
  const gather = display(
    [1, 2, 3, 4, 5, 6].map((k) => trace(k, 2 * k, zeros(101))),
    [
      pick(1, 'automatic', 0.004),
      pick(2, 'automatic', 0.006, { lowConfidence: true, confidence: 0.3, note: 'weak onset: signal-to-noise 1.8' }),
      pick(3, 'user', 0.008),
      pick(4, 'rejected', 0.02, { note: 'later than its neighbours by 9 ms' }),
      pick(5, 'removed', 0.011),
      pick(6, 'none', null, { confidence: null }),
    ],
  );
  const id = gather.gather.id;
  const stored = (traceIndex: number) => gather.picks.find((entry) => entry.traceIndex === traceIndex);

  it('shownPicks: each stored status gets its marker; none draws nothing', () => {
    const shown = shownPicks(gather, NO_PENDING_EDITS);
    expect(shown.map((entry) => entry.kind)).toEqual(['automatic', 'low-confidence', 'user', 'rejected', 'removed', null]);
    expect(shown.map((entry) => entry.picked)).toEqual([true, true, true, false, false, false]);
    expect(shown[3]?.note).toBe('later than its neighbours by 9 ms');
    expect(markerCounts(shown)).toEqual({ automatic: 1, 'low-confidence': 1, user: 1, unsaved: 0, rejected: 1, removed: 1, 'unsaved-removal': 0 });
  });

  it('shownPicks: a trace the service sent no pick for counts as none', () => {
    const bare = { ...gather, picks: gather.picks.slice(0, 2) };
    expect(shownPicks(bare, NO_PENDING_EDITS).slice(2).every((entry) => entry.kind === null && entry.status === 'none' && !entry.picked)).toBe(true);
  });

  it('withPlacement: a moved or added pick is unsaved at its new time; put back where it was, the edit goes', () => {
    let pending = withPlacement(NO_PENDING_EDITS, id, 1, 0.0045, stored(1));
    pending = withPlacement(pending, id, 6, 0.013, stored(6)); // adds a pick on a trace with none
    pending = withPlacement(pending, id, 4, 0.0195, stored(4)); // accepts the rejected candidate, a sample earlier
    const shown = shownPicks(gather, pending);
    expect(shown.map((entry) => entry.kind)).toEqual(['unsaved', 'low-confidence', 'user', 'unsaved', 'removed', 'unsaved']);
    expect(shown.map((entry) => entry.time)).toEqual([0.0045, 0.006, 0.008, 0.0195, 0.011, 0.013]);
    expect(shown.filter((entry) => entry.picked)).toHaveLength(5);
    // Moved back to the stored time: nothing to save for trace 1.
    pending = withPlacement(pending, id, 1, 0.004, stored(1));
    expect(pending.has(pendingKey(id, 1))).toBe(false);
    // The candidate of a rejected trace is not stored: placing at its time is still an edit.
    expect(withPlacement(NO_PENDING_EDITS, id, 4, 0.02, stored(4)).size).toBe(1);
  });

  it('withRemoval: a stored pick gets a removal; a trace without one only loses its unsaved placement', () => {
    let pending = withRemoval(NO_PENDING_EDITS, id, 3, stored(3));
    expect(shownPicks(gather, pending)[2]).toMatchObject({ kind: 'unsaved-removal', time: 0.008, picked: false });
    pending = withPlacement(pending, id, 6, 0.013, stored(6));
    pending = withRemoval(pending, id, 6, stored(6));
    expect(pending.has(pendingKey(id, 6))).toBe(false);
    expect(withRemoval(NO_PENDING_EDITS, id, 4, stored(4)).size).toBe(0); // rejected: nothing stored to remove
    expect(withRemoval(NO_PENDING_EDITS, id, 5, stored(5)).size).toBe(0); // already removed
    // Placing after removing replaces the removal.
    expect(shownPicks(gather, withPlacement(withRemoval(NO_PENDING_EDITS, id, 3, stored(3)), id, 3, 0.009, stored(3)))[2]?.kind).toBe('unsaved');
  });

  it('toPickEdits: the service\'s shape, by gather then trace', () => {
    let pending = withRemoval(NO_PENDING_EDITS, 'u2.1', 2, pick(2, 'automatic', 0.01));
    pending = withPlacement(pending, id, 6, 0.013, stored(6));
    pending = withPlacement(pending, id, 1, 0.0045, stored(1));
    expect(toPickEdits(pending)).toEqual([
      { gatherId: 'u1.1', traceIndex: 1, time: 0.0045 },
      { gatherId: 'u1.1', traceIndex: 6, time: 0.013 },
      { gatherId: 'u2.1', traceIndex: 2, remove: true },
    ]);
    // The edits of another gather do not show on this one.
    expect(shownPicks(gather, pending)[1]?.kind).toBe('low-confidence');
  });

  it('gatherSummaryText: "Shot S1: 48 traces, 46 picks, 2 rejected", then low confidence and unsaved edits', () => {
    const many: ReturnType<typeof shownPicks> = Array.from({ length: 48 }, (_, k) => ({
      traceIndex: k + 1, time: 0.01, kind: k < 2 ? 'rejected' as const : 'automatic' as const, picked: k >= 2, confidence: 0.9, note: null, status: k < 2 ? 'rejected' as const : 'automatic' as const,
    }));
    expect(gatherSummaryText('S1', many, 0)).toBe('Shot S1: 48 traces, 46 picks, 2 rejected');
    expect(gatherSummaryText('S2', shownPicks(gather, withRemoval(NO_PENDING_EDITS, id, 1, stored(1))), 1))
      .toBe('Shot S2: 6 traces, 2 picks, 1 rejected, 1 of low confidence, 1 unsaved edit');
  });

  it('markerAt: the nearest marker within the radius, or none', () => {
    const layout = gatherLayout(gather, SIZE, { axis: 'receiver' });
    const shown = shownPicks(gather, NO_PENDING_EDITS);
    const column = layout.columns.find((entry) => entry.traceIndex === 4)!;
    expect(markerAt(layout, shown, column.x + 2, timeToY(layout, 0.02) - 3, 6)?.traceIndex).toBe(4);
    expect(markerAt(layout, shown, column.x + 9, timeToY(layout, 0.02), 6)).toBeNull();
    // Trace 6 has no marker, so nothing is found on it.
    const sixth = layout.columns.find((entry) => entry.traceIndex === 6)!;
    expect(markerAt(layout, shown, sixth.x, timeToY(layout, 0.0), 50)).toBeNull();
  });
});

describe('marker styles stay apart and visible', () => {
  const kinds = Object.keys(MARKER_STYLES) as MarkerKind[];

  it('every kind has its own shape (they are told apart without colour) and its own label', () => {
    expect(new Set(kinds.map((kind) => MARKER_STYLES[kind].shape)).size).toBe(kinds.length);
    expect(new Set(kinds.map((kind) => MARKER_STYLES[kind].label)).size).toBe(kinds.length);
    // Rejected candidates are hollow; automatic picks are filled (as the brief for the view asks).
    expect(MARKER_STYLES.rejected.fill).toBeNull();
    expect(MARKER_STYLES.automatic.fill).not.toBeNull();
  });

  it('every marker has a part at 3:1 or more against the paper and against its white halo, and the halo against the dark ends of the ramp and the wiggle ink', () => {
    const paper = '#fbfaf7';
    const halo = '#ffffff';
    for (const kind of kinds) {
      const { fill, stroke } = MARKER_STYLES[kind];
      const best = (background: string) => Math.max(contrast(stroke, background), fill ? contrast(fill, background) : 0);
      expect(best(paper), `${kind} on the paper`).toBeGreaterThanOrEqual(3);
      expect(best(halo), `${kind} on its halo`).toBeGreaterThanOrEqual(3);
    }
    for (const background of [DENSITY_RAMP.negative, DENSITY_RAMP.positive]) expect(contrast(halo, hex(background))).toBeGreaterThanOrEqual(3);
    expect(contrast(halo, '#1d2a2f')).toBeGreaterThanOrEqual(3);
  });
});

it('GATHER_MARGINS leave room for time labels at the left and positions at the top', () => {
  expect(GATHER_MARGINS.left).toBeGreaterThanOrEqual(50);
  expect(GATHER_MARGINS.top).toBeGreaterThanOrEqual(30);
});

// ---------------------------------------------------------------- helpers

function shoelace(flat: readonly number[]): number {
  let sum = 0;
  const count = flat.length / 2;
  for (let k = 0; k < count; k += 1) {
    const next = (k + 1) % count;
    sum += flat[2 * k]! * flat[2 * next + 1]! - flat[2 * next]! * flat[2 * k + 1]!;
  }
  return sum / 2;
}

/** ∫ max(0, x(y) − x₀) dy over the trace's polyline, segment by segment, exactly (linear pieces). */
function positiveIntegral(layout: GatherLayout, samples: readonly number[], gain: number): number {
  const excursion = samples.map((value) => clippedAmplitude(value, gain) * layout.spacingPx);
  const step = timeToY(layout, layout.sampleInterval) - timeToY(layout, 0);
  let total = 0;
  for (let k = 1; k < excursion.length; k += 1) {
    const upper = excursion[k - 1]!;
    const lower = excursion[k]!;
    if (upper >= 0 && lower >= 0) total += ((upper + lower) / 2) * step;
    else if (upper > 0 || lower > 0) {
      const positive = Math.max(upper, lower);
      const negative = Math.min(upper, lower);
      total += (positive * positive) / (positive - negative) / 2 * step;
    }
  }
  return total;
}

function hex(channels: readonly number[]): string {
  return `#${channels.map((channel) => channel.toString(16).padStart(2, '0')).join('')}`;
}

function luminance(colour: string): number {
  const linear = [1, 3, 5].map((at) => {
    const channel = Number.parseInt(colour.slice(at, at + 2), 16) / 255;
    return channel <= 0.04045 ? channel / 12.92 : ((channel + 0.055) / 1.055) ** 2.4;
  });
  return 0.2126 * linear[0]! + 0.7152 * linear[1]! + 0.0722 * linear[2]!;
}

function contrast(left: string, right: string): number {
  const [light, dark] = [luminance(left), luminance(right)].sort((a, b) => b - a) as [number, number];
  return (light + 0.05) / (dark + 0.05);
}
