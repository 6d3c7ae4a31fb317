/**
 * The shot-gather view end to end, in Debian's Chromium driven by playwright-core, against a real
 * server on loopback (tests/browser/browser-harness.ts). The tests run in order and share one page:
 * each leaves the state the next expects.
 *
 * The gathers are made here: two shots over two plane layers from the project's synthetic-gather
 * generator (tests/tools/synthetic-gather.ts; first breaks by the two-layer formula there),
 * written as SEG-2 by the test-side writer (tests/gathers/seg2/write-seg2.ts), one file per shot,
 * and uploaded together through the survey panel's file picker.
 *
 * What is checked is what a practitioner does: open the gathers, see the picks on the traces
 * (counted by kind from the view's marker counts and its summary sentence, against the service),
 * move one pick by a click and remove another by Alt-click, save, and find in the stored pick set
 * the moved pick within one displayed sample of the click, the removed one gone, and a new
 * revision made from the new picks; the keyboard: select, move, place, remove, discard; the
 * variable-density display; and the axe-core accessibility rules on the view.
 */
import { createRequire } from 'node:module';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { describe, expect, it } from 'vitest';
import type { CurrentPicks, GatherDisplay, GatherSummary, RevisionSummary } from '../../client/src/api-types.js';
import { DENSITY_RAMP, MARKER_STYLES } from '../../client/src/gather-figure.js';
import { writeSeg2 } from '../gathers/seg2/write-seg2.js';
import { syntheticGather, twoLayerFirstArrival } from '../tools/synthetic-gather.js';
import { LAPTOP, useSharedPage, type BrowserSession, type PageGlobals } from './browser-harness.js';

let session: BrowserSession;
let page: Page;
useSharedPage(LAPTOP, (shared) => ({ session, page } = shared));

const scratch = mkdtempSync(join(tmpdir(), 'slopebreak-gather-view-'));

/** The modelled line: 24 geophones every 2 m from 2 m, loose soil (450 m/s, 3 m) over rock (1800 m/s). */
const RECEIVERS = Array.from({ length: 24 }, (_, k) => 2 + 2 * k);
const SHOTS = [{ id: 'G-W', x: 0, seed: 5101 }, { id: 'G-E', x: 50, seed: 5102 }] as const;
const SAMPLE_INTERVAL = 0.000125;
const SAMPLE_COUNT = 1024;

function writeShotFile(shot: (typeof SHOTS)[number]): string {
  const gather = syntheticGather({
    sourceX: shot.x, receiverXs: RECEIVERS, arrivalTimes: (offset) => twoLayerFirstArrival(offset, 450, 1800, 3),
    sampleInterval: SAMPLE_INTERVAL, sampleCount: SAMPLE_COUNT, delay: 0, wavelet: { shape: 'damped-sine', frequency: 120 },
    snr: 25, float32: true, seed: shot.seed,
  });
  const bytes = writeSeg2({
    littleEndian: true,
    fileStrings: ['UNITS METERS', 'NOTE invented test line for the gather view'],
    traces: gather.traces.map((trace, channel) => ({
      format: 4,
      samples: Array.from(trace.samples),
      strings: [`CHANNEL_NUMBER ${channel + 1}`, `SAMPLE_INTERVAL ${SAMPLE_INTERVAL}`, 'DELAY 0', `RECEIVER_LOCATION ${RECEIVERS[channel]}`, `SOURCE_LOCATION ${shot.x}`],
    })),
  });
  const file = join(scratch, `${shot.id}.sg2`);
  writeFileSync(file, bytes);
  return file;
}

/** The service's JSON at `path` (reads need no token on loopback). */
async function serviceJson<T>(path: string): Promise<T> {
  const response = await fetch(`${session.baseUrl}${path}`, { headers: { Accept: 'application/json' } });
  expect(response.status, `GET ${path}`).toBe(200);
  return (await response.json()) as T;
}

function surveyIdOf(url: string): string {
  const id = /\/surveys\/([\w-]+)/.exec(new URL(url).pathname)?.[1];
  if (!id) throw new Error(`no survey in ${url}`);
  return id;
}

interface Geometry {
  readonly box: { left: number; top: number; width: number; height: number };
  readonly timeTop: number;
  readonly timeBottom: number;
  readonly columns: readonly (readonly [number, number])[];
}

async function geometry(): Promise<Geometry> {
  const text = await page.getAttribute('#gather-plot', 'data-geometry');
  if (!text) throw new Error('the gather has not been drawn');
  return JSON.parse(text) as Geometry;
}

/** Canvas pixel (CSS px, whole pixels) of trace `traceIndex` near `time`, and the time that whole-pixel row stands for. */
function pixelOf(layout: Geometry, traceIndex: number, time: number): { x: number; y: number; time: number } {
  const column = layout.columns.find(([index]) => index === traceIndex);
  if (!column) throw new Error(`trace ${traceIndex} is not drawn`);
  const y = Math.round(layout.box.top + ((time - layout.timeTop) / (layout.timeBottom - layout.timeTop)) * layout.box.height);
  return { x: Math.round(column[1]), y, time: layout.timeTop + ((y - layout.box.top) / layout.box.height) * (layout.timeBottom - layout.timeTop) };
}

/** The automatic pick's marker fill as RGB. */
const AUTOMATIC_FILL = [1, 3, 5].map((at) => Number.parseInt(MARKER_STYLES.automatic.fill!.slice(at, at + 2), 16)) as [number, number, number];

/** RGB of the gather canvas at CSS pixels `points` (scaled to its device pixels). */
async function canvasColours(points: readonly { x: number; y: number }[]): Promise<number[][]> {
  return page.evaluate((wanted) => {
    const canvas = (globalThis as unknown as { document: { querySelector(selector: string): { width: number; clientWidth: number; getContext(kind: string): { getImageData(x: number, y: number, w: number, h: number): { data: ArrayLike<number> } } } | null } }).document.querySelector('#gather-plot canvas')!;
    const scale = canvas.width / canvas.clientWidth;
    const context = canvas.getContext('2d');
    return wanted.map((point) => {
      const data = context.getImageData(Math.round(point.x * scale), Math.round(point.y * scale), 1, 1).data;
      return [data[0]!, data[1]!, data[2]!];
    });
  }, points);
}

async function markerCounts(): Promise<Record<string, number>> {
  return JSON.parse((await page.getAttribute('#gather-plot', 'data-markers')) ?? '{}') as Record<string, number>;
}

async function waitForText(selector: string, pattern: RegExp): Promise<string> {
  const handle = await page.waitForFunction(({ selector: target, source }) => {
    const text = (globalThis as unknown as PageGlobals).document.querySelector(target)?.textContent ?? '';
    return new RegExp(source).test(text) ? text : null;
  }, { selector, source: pattern.source }, { timeout: 30_000 });
  return (await handle.jsonValue()) as string;
}

/** Wait until the gather canvas is drawn again after `previous` (its data-drawn stamp). */
async function waitForDraw(previous: string | null): Promise<string> {
  const handle = await page.waitForFunction((before) => {
    const stamp = (globalThis as unknown as PageGlobals).document.querySelector('#gather-plot')?.dataset['drawn'];
    return stamp && stamp !== before ? stamp : null;
  }, previous, { timeout: 30_000 });
  return (await handle.jsonValue()) as string;
}

let surveyId = '';
let westGather: GatherSummary;

describe('the shot-gather view', () => {
  it('uploads two SEG-2 shot gathers at once, offers the "Shot gathers" view, and draws the picks the service holds', async () => {
    await page.goto('/');
    await page.waitForSelector('#survey-title');
    const files = SHOTS.map(writeShotFile);
    await page.setInputFiles('#pick-file', files);
    await page.waitForSelector('.upload-done', { timeout: 60_000 });
    // Named after the first file; the address bar names it once its title is shown.
    await waitForText('#survey-title', /^G-W$/);
    surveyId = surveyIdOf(page.url());
    const gathers = (await serviceJson<{ gathers: GatherSummary[] }>(`/api/surveys/${surveyId}/gathers`)).gathers;
    expect(gathers.map((gather) => gather.shot).sort()).toEqual(['G-E', 'G-W']);
    westGather = gathers.find((gather) => gather.shot === 'G-W')!;

    await page.click('button[data-view="gathers"]');
    await waitForDraw(null);
    expect(await page.$$eval('#gather-select option', (options) => options.length)).toBe(2);
    const display = await serviceJson<GatherDisplay>(`/api/surveys/${surveyId}/gathers/${encodeURIComponent(await page.inputValue('#gather-select'))}`);
    const shot = display.gather.shot;
    const picked = display.picks.filter((pick) => pick.pickIndex !== null).length;
    const rejected = display.picks.filter((pick) => pick.status === 'rejected').length;
    const doubtful = display.picks.filter((pick) => pick.pickIndex !== null && pick.status === 'automatic' && pick.lowConfidence).length;
    expect(picked).toBeGreaterThanOrEqual(20); // a clean synthetic line: nearly every trace picked
    // The summary sentence and the markers drawn agree with the service.
    expect(await page.textContent('#gather-summary')).toBe(`Shot ${shot}: 24 traces, ${picked} picks, ${rejected} rejected${doubtful > 0 ? `, ${doubtful} of low confidence` : ''}.`);
    const counts = await markerCounts();
    expect(counts['automatic']! + counts['low-confidence']! + counts['user']!).toBe(picked);
    expect(counts['rejected']).toBe(rejected);
    // And they are on the canvas: the automatic picks' fill at the centre of each of their markers.
    const layout = await geometry();
    const centres = display.picks.filter((pick) => pick.status === 'automatic' && !pick.lowConfidence && pick.time !== null && pick.time <= layout.timeBottom)
      .map((pick) => pixelOf(layout, pick.traceIndex, pick.time!));
    expect(centres.length).toBeGreaterThanOrEqual(20);
    const colours = await canvasColours(centres);
    const filled = colours.filter((colour) => Math.abs(colour[0]! - AUTOMATIC_FILL[0]) + Math.abs(colour[1]! - AUTOMATIC_FILL[1]) + Math.abs(colour[2]! - AUTOMATIC_FILL[2]) < 40);
    expect(filled.length, `marker centres in the automatic pick's fill: ${JSON.stringify(colours)}`).toBe(centres.length);
    // The legend says what each marker means; the table lists every trace.
    expect(await page.$$eval('.marker-legend li', (items) => items.length)).toBe(7);
    expect(await page.$$eval('#gather-table tbody tr', (rows) => rows.length)).toBe(24);
    // The cautions stay with the results.
    expect(await page.textContent('.gather-caution')).toContain('Automatic picks are suggestions');
    expect(await page.$$eval('#cautions li', (items) => items.length)).toBeGreaterThanOrEqual(4);
    await session.screenshot(page, 'gather-01-wiggle');
  });

  it('moves one pick by a click and removes another by Alt-click, saves, and the stored pick set and a new revision show both', async () => {
    await page.selectOption('#gather-select', westGather.id);
    let stamp = await waitForDraw(null);
    const before = await serviceJson<GatherDisplay>(`/api/surveys/${surveyId}/gathers/${encodeURIComponent(westGather.id)}`);
    const picksBefore = await serviceJson<CurrentPicks>(`/api/surveys/${surveyId}/picks`);
    const revisionsBefore = (await serviceJson<{ revisions: RevisionSummary[] }>(`/api/surveys/${surveyId}/revisions`)).revisions;
    const automatic = before.picks.filter((pick) => pick.pickIndex !== null && pick.time !== null);
    const moved = automatic[Math.floor(automatic.length / 2)]!;
    const removed = automatic[Math.floor(automatic.length / 2) + 2]!;
    // Zoom in on the first breaks: down to twice the latest pick, so that a displayed sample spans more pixels.
    const latest = Math.max(...automatic.map((pick) => pick.time!));
    await page.fill('#gather-time-to', String(Math.ceil(latest * 2000)));
    await page.press('#gather-time-to', 'Enter');
    stamp = await waitForDraw(stamp);

    const layout = await geometry();
    const target = pixelOf(layout, moved.traceIndex, moved.time! + 0.003);
    await page.click('#gather-plot canvas', { position: { x: target.x, y: target.y } });
    await waitForText('#pick-edit-status', /^1 unsaved pick edit\./);
    const away = pixelOf(layout, removed.traceIndex, removed.time!);
    await page.click('#gather-plot canvas', { position: { x: away.x, y: away.y }, modifiers: ['Alt'] });
    await waitForText('#pick-edit-status', /^2 unsaved pick edits\./);
    await waitForDraw(stamp);
    expect(await markerCounts()).toMatchObject({ unsaved: 1, 'unsaved-removal': 1 });
    expect(await page.textContent('#gather-summary')).toContain(`${automatic.length - 1} picks`);
    expect(await page.textContent('#gather-summary')).toContain('2 unsaved edits');
    await session.screenshot(page, 'gather-02-unsaved-edits');

    await page.click('#save-picks');
    await waitForText('#status', /^Saved as revision \d+/);
    await waitForText('#pick-edit-status', /^No unsaved pick edits\./);

    // Stored: the moved pick within one displayed sample of the click, the removed one gone.
    const after = await serviceJson<GatherDisplay>(`/api/surveys/${surveyId}/gathers/${encodeURIComponent(westGather.id)}`);
    const movedAfter = after.picks.find((pick) => pick.traceIndex === moved.traceIndex)!;
    expect(movedAfter.pickIndex).not.toBeNull();
    expect(movedAfter.status).toBe('user');
    const offBy = Math.abs(movedAfter.time! - target.time);
    console.log(`moved pick stored ${(offBy * 1000).toFixed(4)} ms from the clicked time (displayed sample ${(before.sampleInterval * 1000).toFixed(4)} ms)`);
    expect(offBy).toBeLessThanOrEqual(before.sampleInterval);
    expect(after.picks.find((pick) => pick.traceIndex === removed.traceIndex)?.pickIndex).toBeNull();
    const picksAfter = await serviceJson<CurrentPicks>(`/api/surveys/${surveyId}/picks`);
    expect(picksAfter.pickSet.picks.length).toBe(picksBefore.pickSet.picks.length - 1);
    const receiverX = (traceIndex: number) => before.traces.find((trace) => trace.traceIndex === traceIndex)!.receiverX;
    expect(picksAfter.pickSet.picks.some((pick) => pick.shot === 'G-W' && pick.receiverX === receiverX(removed.traceIndex))).toBe(false);
    const storedMoved = picksAfter.pickSet.picks.find((pick) => pick.shot === 'G-W' && pick.receiverX === receiverX(moved.traceIndex));
    expect(Math.abs(storedMoved!.time - target.time)).toBeLessThanOrEqual(before.sampleInterval);
    // A new revision, made from the new picks, is the one shown.
    const revisionsAfter = (await serviceJson<{ revisions: RevisionSummary[] }>(`/api/surveys/${surveyId}/revisions`)).revisions;
    expect(revisionsAfter).toHaveLength(revisionsBefore.length + 1);
    expect(revisionsAfter.at(-1)!.picksState).toBe(picksAfter.picksState);
    expect(picksAfter.picksState).not.toBe(picksBefore.picksState);
    expect(await page.textContent('#result-summary')).toContain(`Revision ${revisionsAfter.at(-1)!.number}:`);
    // The view shows the saved picks: the moved one as placed by hand, the removed one as removed.
    await page.waitForFunction(() => {
      const markers = JSON.parse((globalThis as unknown as PageGlobals).document.querySelector('#gather-plot')?.dataset['markers'] ?? '{}') as Record<string, number>;
      return markers['unsaved'] === 0 && (markers['user'] ?? 0) >= 1 && (markers['removed'] ?? 0) >= 1;
    });
    await session.screenshot(page, 'gather-03-saved');
  });

  it('works from the keyboard: arrows select and move, Enter places, Delete removes, Discard drops the edits', async () => {
    await page.focus('#gather-plot');
    await page.keyboard.press('Home');
    const first = await waitForText('#gather-selection', /^Trace \d+ /);
    await page.keyboard.press('ArrowRight');
    const second = await waitForText('#gather-selection', /^Trace \d+ /);
    expect(second).not.toBe(first);
    // The selected trace has a pick (a clean line): ↓ moves it one displayed sample.
    if (/: no pick/.test(second)) throw new Error(`the second trace has no pick: ${second}`);
    await page.keyboard.press('ArrowDown');
    await waitForText('#pick-edit-status', /^1 unsaved pick edit\./);
    // One displayed sample later than the stored pick (taken to its nearest displayed sample first).
    const display = await serviceJson<GatherDisplay>(`/api/surveys/${surveyId}/gathers/${encodeURIComponent(westGather.id)}`);
    const traceIndex = Number(/^Trace (\d+) /.exec(second)![1]) - 1; // the view counts traces from 1
    const stored = display.picks.find((pick) => pick.traceIndex === traceIndex)!.time!;
    const onSample = display.startTime + Math.round((stored - display.startTime) / display.sampleInterval) * display.sampleInterval;
    const moved = /placed by hand, not saved at ([\d.]+) ms/.exec((await page.textContent('#gather-selection')) ?? '');
    expect(moved, 'the selection line names the moved pick').not.toBeNull();
    // The line gives the time to 0.01 ms (a displayed sample is 0.125 ms).
    expect(Math.abs(Number(moved![1]) / 1000 - (onSample + display.sampleInterval))).toBeLessThanOrEqual(0.000005 + 1e-9);
    await page.keyboard.press('Delete');
    await waitForText('#gather-selection', /removal not saved/);
    await page.keyboard.press('Enter'); // put it back at the cursor: a placement again
    await waitForText('#gather-selection', /placed by hand, not saved at/);
    await page.keyboard.press('Shift+ArrowUp');
    expect(await page.textContent('#pick-edit-status')).toMatch(/^1 unsaved pick edit\./);
    await page.click('#discard-picks');
    await waitForText('#pick-edit-status', /^No unsaved pick edits\./);
    expect(await markerCounts()).toMatchObject({ unsaved: 0, 'unsaved-removal': 0 });
  });

  it('draws variable density in the two colours of the ramp, and the gain changes the picture', async () => {
    const stamp = await page.getAttribute('#gather-plot', 'data-drawn');
    await page.click('#gather-mode-density');
    const drawn = await waitForDraw(stamp);
    expect(drawn).toContain(':density:');
    const tints = async () => page.evaluate(({ negative, positive }) => {
      const canvas = (globalThis as unknown as { document: { querySelector(selector: string): { width: number; height: number; getContext(kind: string): { getImageData(x: number, y: number, w: number, h: number): { data: ArrayLike<number> } } } | null } }).document.querySelector('#gather-plot canvas')!;
      const data = canvas.getContext('2d').getImageData(0, 0, canvas.width, canvas.height).data;
      let nearNegative = 0;
      let nearPositive = 0;
      for (let at = 0; at < data.length; at += 4) {
        const distance = (target: readonly number[]) => Math.abs(data[at]! - target[0]!) + Math.abs(data[at + 1]! - target[1]!) + Math.abs(data[at + 2]! - target[2]!);
        if (distance(negative) < 30) nearNegative += 1;
        if (distance(positive) < 30) nearPositive += 1;
      }
      return { nearNegative, nearPositive };
    }, { negative: [...DENSITY_RAMP.negative], positive: [...DENSITY_RAMP.positive] });
    const low = await tints();
    await page.focus('#gather-gain');
    await page.keyboard.press('End'); // the slider's top: ×32
    await waitForDraw(drawn);
    const high = await tints();
    // At ×32 most of each trace after the first break is clipped to the ends of the ramp.
    expect(high.nearNegative).toBeGreaterThan(1000);
    expect(high.nearPositive).toBeGreaterThan(1000);
    expect(high.nearNegative + high.nearPositive).toBeGreaterThan(low.nearNegative + low.nearPositive);
    expect(await page.getAttribute('#gather-gain', 'aria-valuetext')).toBe('×32');
    await session.screenshot(page, 'gather-04-variable-density');
    await page.click('#gather-mode-wiggle');
  });

  it('has no serious or critical accessibility violations (axe-core, WCAG 2.1 A/AA)', async () => {
    const { page: checked, context } = await session.newPage(undefined, { bypassCSP: true });
    await checked.goto(`/surveys/${surveyId}`);
    await checked.waitForSelector('button[data-view="gathers"]');
    await checked.click('button[data-view="gathers"]');
    await checked.waitForSelector('#gather-plot[data-drawn]');
    await checked.addScriptTag({ content: AXE_SOURCE });
    const violations = await checked.evaluate(async () => {
      const axe = (globalThis as unknown as { axe: { run(context: unknown, options: unknown): Promise<{ violations: { id: string; impact: string | null; help: string; nodes: { target: string[] }[] }[] }> } }).axe;
      const result = await axe.run({ exclude: [['.js-plotly-plot .main-svg']] }, { runOnly: { type: 'tag', values: ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'] } });
      return result.violations.map((violation) => ({ id: violation.id, impact: violation.impact, help: violation.help, targets: violation.nodes.map((node) => node.target.join(' ')) }));
    });
    for (const violation of violations) console.log(`gather view: axe ${violation.impact ?? 'unrated'} ${violation.id} (${violation.help}) at ${violation.targets.slice(0, 3).join('; ')}`);
    expect(violations.filter((violation) => violation.impact === 'serious' || violation.impact === 'critical')).toEqual([]);
    await context.close();
  });
});

const AXE_SOURCE = readFileSync(createRequire(import.meta.url).resolve('axe-core/axe.min.js'), 'utf8');
