/**
 * The browser client end to end, in Debian's Chromium driven by playwright-core, against a real
 * server on loopback with the two sample surveys loaded (the README's main-job command). The tests
 * run in order and share one server: each leaves the state the next expects.
 *
 * What is checked is what a practitioner does: first sight shows a result without a click; upload
 * a pick table and see the fitted travel-time plot; reassign a pick and see the layer table change
 * (and how long that takes for a 1,000-pick survey); undo; move a breakpoint; exclude picks; the
 * depth view and its methods; exports; sharing a revision's URL and being told of a newer one; the
 * printable report (and its PDF); a refused file with its problems listed; a large survey drawn
 * with WebGL. After every test: no console errors and no page errors.
 *
 * Screenshots of each view go to tests/browser/screenshots/ (not committed).
 */
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { describe, expect, it } from 'vitest';
import { range, syntheticSurvey } from '../helpers/synthetic-survey.js';
import {
  LAPTOP, PROJECTOR, SAMPLE_DIR, useSharedPage, traceRoles, waitForPlot, type BrowserSession, type PageGlobals,
} from './browser-harness.js';

let session: BrowserSession;
let page: Page;
const scratch = mkdtempSync(join(tmpdir(), 'slopebreak-browser-files-'));

/** Acceptance: an edit of a 1,000-pick survey shows its new result within a second. */
const EDIT_BUDGET_MS = 1000;

useSharedPage(LAPTOP, (shared) => ({ session, page } = shared));

/** The text of every cell of the layer table's body, row by row. */
async function layerRows(target: Page = page): Promise<string[]> {
  return target.$$eval('.layer-table tbody tr[data-layer]', (rows) => rows.map((row) => (row.textContent ?? '').replace(/\s+/g, ' ').trim()));
}

async function revisionShown(target: Page = page): Promise<number> {
  const text = (await target.textContent('#result-summary')) ?? '';
  return Number(/Revision (\d+)/.exec(text)?.[1] ?? Number.NaN);
}

async function waitForRevision(number: number, target: Page = page): Promise<void> {
  await target.waitForFunction((wanted) => {
    const text = (globalThis as unknown as PageGlobals).document.querySelector('#result-summary')?.textContent ?? '';
    return text.includes(`Revision ${wanted}:`);
  }, number, { timeout: 20_000 });
}

/** Pixel position, in the page, of the pick on table line `line` in the travel-time plot. */
async function pickPixel(line: number): Promise<{ x: number; y: number }> {
  await page.evaluate(() => (globalThis as unknown as { scrollTo(x: number, y: number): void }).scrollTo(0, 0));
  const position = await page.evaluate((wanted) => {
    const plot = (globalThis as unknown as PageGlobals).document.querySelector('#travel-time-plot');
    if (!plot?.data || !plot._fullLayout) return null;
    for (const trace of plot.data) {
      if (trace.meta?.role !== 'picks') continue;
      const index = (trace.customdata ?? []).indexOf(wanted);
      if (index < 0) continue;
      const xaxis = plot._fullLayout['xaxis']!;
      const yaxis = plot._fullLayout['yaxis']!;
      const box = plot.getBoundingClientRect();
      return { x: box.left + xaxis._offset + xaxis.l2p(trace.x![index] as number), y: box.top + yaxis._offset + yaxis.l2p(trace.y![index] as number) };
    }
    return null;
  }, line);
  if (!position) throw new Error(`pick on line ${line} is not drawn`);
  return position;
}

/** Table line of the pick of `shot` at receiver position `receiverX` (from the stored CSV). */
function lineOf(csv: string, shot: string, receiverX: number): number {
  const lines = csv.split('\n');
  const header = lines.findIndex((line) => line.startsWith('shot,'));
  const columns = lines[header]!.split(',');
  const shotColumn = columns.indexOf('shot');
  const receiverColumn = columns.indexOf('receiver_x_m');
  const found = lines.findIndex((line, k) => k > header && line.split(',')[shotColumn] === shot && Number(line.split(',')[receiverColumn]) === receiverX);
  if (found < 0) throw new Error(`no pick of ${shot} at ${receiverX}`);
  return found + 1;
}

/** Select picks with the "Select by offset from the shot" form (empty bounds: no bound). */
async function selectByOffset(shot: string, side: 'forward' | 'reverse', from: string, to: string): Promise<void> {
  await page.selectOption('#range-shot', shot);
  await page.selectOption('#range-side', side);
  await page.fill('#range-from', from);
  await page.fill('#range-to', to);
  await page.click('.range-form button[type="submit"]');
  await page.waitForSelector('button[data-assign="automatic"]:not([disabled])');
}

/** Press an assignment button and wait for the revision after `revision`. */
async function assignSelected(assign: string, revision: number): Promise<void> {
  await page.click(`button[data-assign="${assign}"]`);
  await waitForRevision(revision + 1);
}

async function openSurveyNamed(name: string): Promise<void> {
  const before = (await (await page.$('#travel-time-plot'))?.getAttribute('data-drawn')) ?? null;
  await page.click(`.survey-list li:has-text("${name}") .survey-open`);
  await page.waitForFunction((wanted) => (globalThis as unknown as PageGlobals).document.querySelector('#survey-title')?.textContent?.includes(wanted) ?? false, name);
  await waitForPlot(page, '#travel-time-plot', before);
}

/** The bundled samples the harness loads as surveys (pick tables, SEG-Y files and folders of SEG-2 files), by name. */
const SAMPLE_NAMES = readdirSync(SAMPLE_DIR, { withFileTypes: true })
  .filter((entry) => entry.isDirectory() || /\.(csv|sgy)$/.test(entry.name))
  .map((entry) => entry.name.replace(/\.(csv|sgy)$/, ''))
  .sort();

describe('the browser client', () => {
  it('on first sight shows the survey list and the latest survey: fitted travel-time plot and layer table, without a click', async () => {
    await page.goto('/');
    await waitForPlot(page, '#travel-time-plot');
    const names = await page.$$eval('.survey-list .survey-name', (items) => items.map((item) => item.textContent));
    expect([...names].sort()).toEqual(SAMPLE_NAMES);
    const roles = await traceRoles(page, '#travel-time-plot');
    expect(roles.filter((trace) => trace.role === 'picks').length).toBeGreaterThanOrEqual(2);
    expect(roles.filter((trace) => trace.role === 'fitted-lines').length).toBeGreaterThanOrEqual(2);
    expect(roles.some((trace) => trace.role === 'crossovers' && trace.points > 0)).toBe(true);
    expect(roles.filter((trace) => trace.role === 'residuals').length).toBeGreaterThanOrEqual(2);
    expect((await layerRows()).length).toBeGreaterThanOrEqual(2);
    // The layers are on screen beside the plot, not only further down the page.
    const summary = await page.locator('#layer-summary').boundingBox();
    expect(summary, 'layer summary drawn').not.toBeNull();
    expect(summary!.y + summary!.height).toBeLessThanOrEqual(LAPTOP.height);
    expect(await page.$$eval('#layer-summary tbody tr', (rows) => rows.length)).toBeGreaterThanOrEqual(2);
    // The address bar names the revision shown, so it can be shared as it is.
    expect(new URL(page.url()).pathname).toMatch(/^\/surveys\/[\w-]+\/revisions\/1$/);
    // No control of the plotting library offers to send a chart off the office network.
    const plotButtons = await page.$$eval('.modebar-btn', (buttons) => buttons.map((button) => button.getAttribute('data-title') ?? ''));
    expect(plotButtons.length).toBeGreaterThan(0);
    expect(plotButtons.filter((title) => /share|cloud|studio|edit/i.test(title))).toEqual([]);
    await expect(page.textContent('.caution-strip')).resolves.toContain('confirm depths with boreholes');
    expect(await page.$$eval('#cautions li', (items) => items.length)).toBeGreaterThanOrEqual(4);
    await session.screenshot(page, '01-first-sight-laptop');
    const projector = await session.newPage(PROJECTOR);
    await projector.page.goto(page.url());
    await waitForPlot(projector.page, '#travel-time-plot');
    await session.screenshot(projector.page, '01-first-sight-projector');
    await projector.context.close();
  });

  it('uploads a sample pick table by the file picker, with progress, and shows its fitted plot and layers', async () => {
    const file = join(SAMPLE_DIR, 'millbrook-quarry-bedrock.csv');
    const before = await page.getAttribute('#travel-time-plot', 'data-drawn');
    await page.setInputFiles('#pick-file', file);
    await page.waitForSelector('.upload-done', { timeout: 20_000 });
    await waitForPlot(page, '#travel-time-plot', before);
    expect(await page.textContent('.upload-done')).toContain('240 picks, 5 shots');
    expect(await page.$$eval('.survey-list .survey-name', (items) => items.length)).toBe(SAMPLE_NAMES.length + 1);
    const roles = await traceRoles(page, '#travel-time-plot');
    expect(roles.filter((trace) => trace.role === 'fitted-lines').length).toBe(3);
    const rows = await layerRows();
    expect(rows).toHaveLength(3);
    // The generator model of this demo (sample-surveys/README.md): granite 4300 m/s; the fit lands near it.
    expect(rows[2]).toMatch(/^3\s*4\d{3}/);
    await session.screenshot(page, '02-uploaded');
  });

  it('refuses a bad file and lists its problems line by line, storing nothing', async () => {
    const bad = join(scratch, 'field-notes.csv');
    writeFileSync(bad, 'shot,source_x_m,receiver_x_m,time_ms\nS1,0,2,4.1\nS1,0,abc,5.0\nS1,0,6,-3\n');
    // The refusal is the service's designed answer (422 with the problems); Chromium logs any 4xx of
    // a request in the console, so exactly that one line is expected here.
    session.expectConsole(/Failed to load resource: the server responded with a status of 422/);
    await page.setInputFiles('#pick-file', bad);
    await page.waitForSelector('.upload-refused', { timeout: 20_000 });
    expect(await page.textContent('.upload-refused')).toContain('field-notes.csv was not loaded');
    const problemLines = await page.$$eval('.problem-table tbody tr td:first-child', (cells) => cells.map((cell) => Number(cell.textContent)));
    expect(problemLines).toEqual(expect.arrayContaining([3, 4]));
    expect(await page.$$eval('.survey-list .survey-name', (items) => items.length)).toBe(SAMPLE_NAMES.length + 1);
    await session.screenshot(page, '03-refused-file');
  });

  it('reassigns one pick by clicking it and a branch button: the layer table changes and a new revision is stored', async () => {
    const csv = readFileSync(join(SAMPLE_DIR, 'millbrook-quarry-bedrock.csv'), 'utf8');
    // The last direct-wave pick of shot A-W (receiver at 6 m), moved onto the first refractor's branch.
    const line = lineOf(csv, 'A-W', 6);
    const before = await layerRows();
    const revision = await revisionShown();
    const pixel = await pickPixel(line);
    await page.mouse.click(pixel.x, pixel.y);
    await page.waitForFunction(() => (globalThis as unknown as PageGlobals).document.querySelector('#selection-count')?.textContent?.startsWith('1 pick') ?? false);
    await page.click('button[data-assign="2"]');
    await waitForRevision(revision + 1);
    const after = await layerRows();
    expect(after[0]).not.toEqual(before[0]); // layer 1's velocity comes from the direct-wave branches
    const branchOfLine = await page.evaluate((wanted) => {
      const plot = (globalThis as unknown as PageGlobals).document.querySelector('#travel-time-plot');
      return plot?.data?.find((trace) => trace.meta?.role === 'picks' && (trace.customdata ?? []).includes(wanted))?.meta?.branch ?? null;
    }, line);
    expect(branchOfLine).toBe(2);
    await session.screenshot(page, '04-after-reassign');
    await session.screenshot(page, '04-after-reassign-whole-page', true);
  });

  it('undoes the edit as a new revision that restores the layer table', async () => {
    const revision = await revisionShown();
    const edited = await layerRows();
    await page.click('#undo-edit');
    await waitForRevision(revision + 1);
    const restored = await layerRows();
    expect(restored[0]).not.toEqual(edited[0]);
    // Same figures as the first interpretation of the upload (revision 1 of this survey).
    const revisionOne = await session.newPage();
    const surveyPath = new URL(page.url()).pathname.replace(/\/revisions\/\d+$/, '/revisions/1');
    await revisionOne.page.goto(surveyPath);
    await waitForPlot(revisionOne.page, '#travel-time-plot');
    expect(await layerRows(revisionOne.page)).toEqual(restored);
    await revisionOne.context.close();
  });

  it('selects picks by shot and offset from the keyboard, excludes them, and draws them as excluded', async () => {
    const revision = await revisionShown();
    await page.selectOption('#range-shot', 'A-E');
    await page.selectOption('#range-side', 'reverse');
    await page.fill('#range-from', '60');
    await page.fill('#range-to', '66');
    await page.press('#range-to', 'Enter');
    await page.waitForFunction(() => /^\d+ picks? selected/.test((globalThis as unknown as PageGlobals).document.querySelector('#selection-count')?.textContent ?? ''));
    const selected = Number(/^(\d+)/.exec((await page.textContent('#selection-count')) ?? '')?.[1]);
    expect(selected).toBeGreaterThan(0);
    // The key X excludes, as the panel says; focus is on the page body, not a field.
    await page.evaluate(() => (globalThis as unknown as { document: { activeElement: { blur?: () => void } | null } }).document.activeElement?.blur?.());
    await page.keyboard.press('x');
    await waitForRevision(revision + 1);
    const roles = await traceRoles(page, '#travel-time-plot');
    expect(roles.find((trace) => trace.role === 'excluded')?.points).toBe(selected);
    expect(await page.textContent('#result-summary')).toContain(`${selected} picks excluded`);
  });

  it('selects picks with Box select, and Esc clears the selection', async () => {
    await page.click('button[data-drag-mode="select"]');
    await page.evaluate(() => (globalThis as unknown as { scrollTo(x: number, y: number): void }).scrollTo(0, 0));
    /** Page pixels of a point given in the plot's data units (position m, time ms). */
    const pixel = (x: number, y: number) => page.evaluate(({ x: px, y: py }) => {
      const plot = (globalThis as unknown as PageGlobals).document.querySelector('#travel-time-plot');
      const xaxis = plot!._fullLayout!['xaxis']!;
      const yaxis = plot!._fullLayout!['yaxis']!;
      const box = plot!.getBoundingClientRect();
      return { x: box.left + xaxis._offset + xaxis.l2p(px), y: box.top + yaxis._offset + yaxis.l2p(py) };
    }, { x, y });
    const drag = async (from: { x: number; y: number }, to: { x: number; y: number }) => {
      await page.mouse.move(from.x, from.y);
      await page.mouse.down();
      await page.mouse.move((from.x + to.x) / 2, (from.y + to.y) / 2, { steps: 4 });
      await page.mouse.move(to.x, to.y, { steps: 4 });
      await page.mouse.up();
    };
    const count = async () => Number(/^(\d+) picks? selected/.exec((await page.textContent('#selection-count')) ?? '')?.[1] ?? 0);
    // Direct-wave picks of shot A-W: positions 1.5–6 m, times under 16 ms (the sample's first picks).
    await drag(await pixel(0.5, 17), await pixel(6.5, -1));
    await page.waitForFunction(() => /^\d+ picks? selected/.test((globalThis as unknown as PageGlobals).document.querySelector('#selection-count')?.textContent ?? ''));
    const first = await count();
    expect(first).toBeGreaterThanOrEqual(4);
    await page.click('button[data-drag-mode="zoom"]');
    await page.keyboard.press('Escape');
    await page.waitForFunction(() => ((globalThis as unknown as PageGlobals).document.querySelector('#selection-count')?.textContent ?? '').startsWith('No picks selected'));
  });

  it('moves a breakpoint: the picks between the old and the new offset change branch', async () => {
    const revision = await revisionShown();
    const options = await page.$$eval('#breakpoint-choice option', (items) => items.map((item) => item.textContent ?? ''));
    const choice = options.findIndex((text) => text.startsWith('A-W forward: branch 2 → 3'));
    expect(choice).toBeGreaterThanOrEqual(0);
    const countsBefore = await page.textContent('tr[data-shot="A-W"][data-side="forward"]');
    await page.selectOption('#breakpoint-choice', String(choice));
    await page.fill('#breakpoint-offset', '30');
    await page.click('#breakpoint-move');
    await waitForRevision(revision + 1);
    const countsAfter = await page.textContent('tr[data-shot="A-W"][data-side="forward"]');
    expect(countsAfter).not.toEqual(countsBefore);
    // Branch 2 of A-W forward now reaches 30 m: the picks at 22.5–28.5 m moved down from branch 3.
    expect(countsAfter).toMatch(/\(1\d picks, assigned by hand\)/);
  });

  it('moves a breakpoint by dragging its dotted line on the plot', async () => {
    const revision = await revisionShown();
    const options = await page.$$eval('#breakpoint-choice option', (items) => items.map((item) => item.textContent ?? ''));
    await page.selectOption('#breakpoint-choice', String(options.findIndex((text) => text.startsWith('A-W forward: branch 2 → 3'))));
    // The chosen breakpoint is drawn on the plot (the choice may already have been this one).
    await page.waitForFunction(() => {
      const layout = (globalThis as unknown as PageGlobals).document.querySelector('#travel-time-plot')?.layout as { shapes?: { label?: { text?: string } }[] } | undefined;
      return layout?.shapes?.[0]?.label?.text === 'A-W 2→3';
    });
    await page.evaluate(() => (globalThis as unknown as { scrollTo(x: number, y: number): void }).scrollTo(0, 0)); // the plot's middle on screen
    const line = await page.evaluate(() => {
      const plot = (globalThis as unknown as PageGlobals).document.querySelector('#travel-time-plot');
      const shape = (plot?.layout as { shapes?: { x0: number }[] } | undefined)?.shapes?.[0];
      const xaxis = plot?._fullLayout?.['xaxis'];
      const yaxis = plot?._fullLayout?.['yaxis'];
      if (!plot || !shape || !xaxis || !yaxis) return null;
      const box = plot.getBoundingClientRect();
      return { x0: shape.x0, from: box.left + xaxis._offset + xaxis.l2p(shape.x0), to: box.left + xaxis._offset + xaxis.l2p(25), y: box.top + yaxis._offset + yaxis._length / 2 };
    });
    expect(line, 'the chosen breakpoint is drawn as a line on the plot').not.toBeNull();
    // Between the last branch-2 pick (28.5 m) and the first branch-3 pick (30 m) after the move above.
    expect(line!.x0).toBeCloseTo(29.25, 6);
    const countsBefore = await page.textContent('tr[data-shot="A-W"][data-side="forward"]');
    await page.mouse.move(line!.from, line!.y);
    await page.mouse.down();
    await page.mouse.move((line!.from + line!.to) / 2, line!.y, { steps: 5 });
    await page.mouse.move(line!.to, line!.y, { steps: 5 });
    await page.mouse.up();
    await waitForRevision(revision + 1);
    const countsAfter = await page.textContent('tr[data-shot="A-W"][data-side="forward"]');
    expect(countsAfter).not.toEqual(countsBefore);
    // Dragged to 25 m: branch 2 ends at the pick at 24 m (receivers every 1.5 m from 1.5 m).
    const breakpoints = await page.$$eval('#breakpoint-choice option', (items) => items.map((item) => item.textContent ?? ''));
    expect(breakpoints.find((text) => text.startsWith('A-W forward: branch 2 → 3'))).toContain('between offsets 24 and 25.5 m');
  });

  it('toggles shots and switches to reduced time', async () => {
    const full = (await traceRoles(page, '#travel-time-plot')).filter((trace) => trace.role === 'picks').reduce((sum, trace) => sum + trace.points, 0);
    let stamp = await page.getAttribute('#travel-time-plot', 'data-drawn');
    await page.uncheck('input[data-shot-toggle="A-OFF-W"]');
    stamp = await waitForPlot(page, '#travel-time-plot', stamp);
    const fewer = (await traceRoles(page, '#travel-time-plot')).filter((trace) => trace.role === 'picks').reduce((sum, trace) => sum + trace.points, 0);
    expect(fewer).toBe(full - 48);
    await page.check('#reduced-time');
    await page.fill('#reduction-velocity', '4000');
    await page.press('#reduction-velocity', 'Enter');
    stamp = await waitForPlot(page, '#travel-time-plot', stamp);
    const title = await page.evaluate(() => {
      const layout = (globalThis as unknown as PageGlobals).document.querySelector('#travel-time-plot')?.layout as { yaxis?: { title?: { text?: string } } } | undefined;
      return layout?.yaxis?.title?.text ?? '';
    });
    expect(title).toContain('Reduced time');
    expect(title).toContain('4000 m/s');
    await session.screenshot(page, '05-reduced-time');
    await page.uncheck('#reduced-time');
    await page.check('input[data-shot-toggle="A-OFF-W"]');
    await waitForPlot(page, '#travel-time-plot', stamp);
  });

  it('exports the travel-time plot as PNG and the layers as CSV', async () => {
    const [png] = await Promise.all([page.waitForEvent('download'), page.click('#travel-time-png')]);
    expect(png.suggestedFilename()).toMatch(/travel-times\.png$/);
    const bytes = readFileSync((await png.path())!);
    expect(bytes.subarray(0, 8)).toEqual(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])); // PNG signature (ISO/IEC 15948)
    const [csv] = await Promise.all([page.waitForEvent('download'), page.click('a:has-text("Layers CSV")')]);
    expect(csv.suggestedFilename()).toMatch(/^millbrook-quarry-bedrock-rev\d+-layers\.csv$/);
    const text = readFileSync((await csv.path())!, 'utf8');
    expect(text.split('\n')[0]).toMatch(/^layer,velocity_m_per_s,velocity_se_m_per_s,thickness_m/);
  });

  it('shows the depth section with ground, refractors with their uncertainty, shots and layer velocities, and switches method', async () => {
    await page.click('button[data-view="depth"]');
    let stamp = await waitForPlot(page, '#depth-plot');
    const roles = await traceRoles(page, '#depth-plot');
    expect(roles.map((trace) => trace.role)).toEqual(expect.arrayContaining(['ground', 'survey-band', 'survey-boundary', 'refractor', 'shots']));
    const annotations = await page.evaluate(() => {
      const layout = (globalThis as unknown as PageGlobals).document.querySelector('#depth-plot')?.layout as { annotations?: { text: string }[] } | undefined;
      return (layout?.annotations ?? []).map((annotation) => annotation.text);
    });
    expect(annotations.filter((text) => /^layer \d: .*m\/s$/.test(text))).toHaveLength(3);
    await session.screenshot(page, '06-depth-section');
    await page.check('input[name="depth-method"][value^="crossover-distance"]');
    stamp = await waitForPlot(page, '#depth-plot', stamp);
    const names = await page.evaluate(() => ((globalThis as unknown as PageGlobals).document.querySelector('#depth-plot')?.data ?? []).map((trace) => (trace as { name?: string }).name ?? ''));
    expect(names.some((name) => name.includes('crossover-distance'))).toBe(true);
    const [png] = await Promise.all([page.waitForEvent('download'), page.click('#depth-png')]);
    expect(png.suggestedFilename()).toMatch(/depth-section\.png$/);
    await page.click('button[data-view="travel-times"]');
    await waitForPlot(page, '#travel-time-plot');
  });

  it('gives each revision a URL a colleague can open, and tells them when a newer revision exists', async () => {
    const shared = page.url();
    const colleague = await session.newPage();
    await colleague.page.goto(shared);
    await waitForPlot(colleague.page, '#travel-time-plot');
    expect(await revisionShown(colleague.page)).toBe(await revisionShown());
    expect(await colleague.page.isHidden('#newer-revision')).toBe(true);
    // A new revision made here (undo of the breakpoint move).
    const revision = await revisionShown();
    await page.click('#undo-edit');
    await waitForRevision(revision + 1);
    // The colleague's page checks when it becomes visible again (and every few seconds).
    await colleague.page.evaluate(() => (globalThis as unknown as { document: { dispatchEvent(event: unknown): void } }).document.dispatchEvent(new Event('visibilitychange')));
    await colleague.page.waitForSelector('#newer-revision:not([hidden])', { timeout: 15_000 });
    expect(await colleague.page.textContent('#newer-revision')).toContain(`revision ${revision + 1}`);
    await session.screenshot(colleague.page, '07-newer-revision-notice');
    await colleague.page.click('#open-newer');
    await waitForRevision(revision + 1, colleague.page);
    await colleague.context.close();
  });

  it('opens the printable report with survey, method, plots, tables, warnings, cautions, version and revision, and prints it to PDF', async () => {
    const revision = await revisionShown();
    await page.click('#report-link');
    await page.waitForSelector('#app[data-ready="true"]', { timeout: 30_000 });
    const text = (await page.textContent('#report')) ?? '';
    expect(text).toContain('millbrook-quarry-bedrock');
    expect(text).toContain(`Revision${revision} of`);
    expect(text).toMatch(/slopebreak \d+\.\d+\.\d+/);
    expect(text).toContain('intercept-time');
    expect(await page.$$eval('img.report-figure', (images) => images.map((image) => (image as unknown as { naturalWidth: number }).naturalWidth))).toEqual([2200, 2200]);
    expect(await page.$$eval('.report .layer-table tbody tr[data-layer]', (rows) => rows.length)).toBe(3);
    expect(await page.$$eval('#report-cautions li', (items) => items.length)).toBeGreaterThanOrEqual(4);
    expect(await page.$$eval('.report .warnings li', (items) => items.length)).toBeGreaterThan(0);
    await session.screenshot(page, '08-report', true);
    const pdf = await page.pdf({ format: 'A4', printBackground: true });
    writeFileSync(join(session.screenshotDir, '08-report.pdf'), pdf);
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-'); // PDF header (ISO 32000-1 §7.5.2)
    const pages = (pdf.toString('latin1').match(/\/Type\s*\/Page[^s]/g) ?? []).length;
    expect(pages).toBeGreaterThanOrEqual(2);
    expect(pages).toBeLessThanOrEqual(8);
    await page.goBack();
    await waitForPlot(page, '#travel-time-plot');
  });

  it(`re-interprets an edit of a 1,000-pick survey and prints the time from click to new result (acceptance ${EDIT_BUDGET_MS} ms; fails past 3×)`, async () => {
    const survey = syntheticSurvey({
      velocities: [600, 2400], thicknesses: [6], receivers: range(200, 1, 1), shots: [0, 50.5, 100.5, 150.5, 201], noise: 0.0002, sigma: 0.0003, seed: 41,
    });
    const file = join(scratch, 'thousand-picks.csv');
    writeFileSync(file, survey.csv);
    const before = await page.getAttribute('#travel-time-plot', 'data-drawn');
    await page.setInputFiles('#pick-file', file);
    await page.waitForSelector('.upload-done', { timeout: 30_000 });
    await waitForPlot(page, '#travel-time-plot', before);
    expect(await page.textContent('#result-summary')).toContain('1000 picks');
    const revision = await revisionShown();
    await selectByOffset('S1', 'forward', '10', '14');
    const started = Date.now();
    await page.click('button[data-assign="1"]');
    await waitForRevision(revision + 1);
    await waitForPlot(page, '#travel-time-plot');
    const elapsed = Date.now() - started;
    console.log(`edit of a 1,000-pick survey: new result shown ${elapsed} ms after the click`);
    expect(elapsed).toBeLessThan(EDIT_BUDGET_MS * 3); // the acceptance figure is printed; 3× guards against a gross regression on a loaded CI machine
  });

  it('draws a survey of several thousand picks with WebGL traces, without console errors', async () => {
    const survey = syntheticSurvey({
      velocities: [500, 1800, 4200], thicknesses: [4, 9], receivers: range(480, 0.5, 0.5), shots: [0, 60.25, 120.25, 180.25, 240.25, 300.25, 360.25, 420.25], noise: 0.0002, sigma: null, seed: 42,
    });
    const file = join(scratch, 'dense-line.csv');
    writeFileSync(file, survey.csv);
    const before = await page.getAttribute('#travel-time-plot', 'data-drawn');
    await page.setInputFiles('#pick-file', file);
    await page.waitForSelector('.upload-done', { timeout: 60_000 });
    await waitForPlot(page, '#travel-time-plot', before);
    expect(await page.getAttribute('#travel-time-plot', 'data-webgl')).toBe('true');
    expect(Number(await page.getAttribute('#travel-time-plot', 'data-point-count'))).toBeGreaterThan(3000);
    const types = new Set((await traceRoles(page, '#travel-time-plot')).filter((trace) => trace.role === 'picks').map((trace) => trace.type));
    expect([...types]).toEqual(['scattergl']);
    // The WebGL layer really drew: no "WebGL is not supported" notice, and its canvas holds pixels.
    expect(await page.textContent('#travel-time-plot')).not.toContain('WebGL is not supported');
    const painted = await page.evaluate(() => {
      const canvas = (globalThis as unknown as { document: { querySelector(selector: string): { toDataURL(): string } | null } }).document.querySelector('#travel-time-plot canvas.gl-canvas-context');
      return canvas ? canvas.toDataURL().length : 0;
    });
    expect(painted, 'size of the WebGL canvas as a PNG data URL (an empty canvas is a few hundred bytes)').toBeGreaterThan(5000);
    await session.screenshot(page, '09-webgl-dense-line');
  });

  it('keeps a crustal survey in km, s and km/s through an edit, and shows shot names with markup as plain text', async () => {
    // A long profile written in km and s (invented; the spec is in SI), one shot named with markup characters.
    const survey = syntheticSurvey({
      velocities: [6000, 8000], thicknesses: [32000], receivers: range(40, 10_000, 10_000), shots: [0, 405_000], noise: 0.03, sigma: 0.05, seed: 43, distanceUnit: 'km', timeUnit: 's',
    });
    const csv = survey.csv.replace(/^S1,/gm, '<b>S1</b>,');
    expect(csv).toContain('<b>S1</b>,');
    const file = join(scratch, 'ridge-profile.csv');
    writeFileSync(file, csv);
    const before = await page.getAttribute('#travel-time-plot', 'data-drawn');
    await page.setInputFiles('#pick-file', file);
    await page.waitForSelector('.upload-done', { timeout: 30_000 });
    await waitForPlot(page, '#travel-time-plot', before);
    expect(await page.textContent('.survey-list li[class="current"] .survey-meta')).toContain('crustal');
    expect(await page.textContent('.layer-table thead')).toContain('km/s');
    const revision = await revisionShown();
    await selectByOffset('<b>S1</b>', 'forward', '300', '400');
    await assignSelected('exclude', revision);
    expect(await page.textContent('.layer-table thead'), 'units after the edit').toContain('km/s');
    // Plotly reads a subset of HTML in labels: the shot name must arrive as text, not as bold markup.
    await page.click('button[data-view="depth"]');
    await waitForPlot(page, '#depth-plot');
    const labels = await page.$$eval('#depth-plot .textpoint', (nodes) => nodes.map((node) => ({ text: node.textContent, bold: node.querySelector('[style*="bold"], b') !== null })));
    expect(labels.map((label) => label.text)).toContain('<b>S1</b>');
    expect(labels.every((label) => !label.bold)).toBe(true);
    await page.click('button[data-view="travel-times"]');
    await waitForPlot(page, '#travel-time-plot');
  });

  it('renaming the open survey right after an edit works, and the survey stays editable', async () => {
    const revision = await revisionShown();
    await selectByOffset('S2', 'reverse', '', '');
    await assignSelected('1', revision);
    await page.click('.survey-list li.current button:has-text("Rename")');
    await page.fill('.rename-form input', 'Ridge profile (renamed)');
    await page.press('.rename-form input', 'Enter');
    await page.waitForSelector('#survey-title:has-text("Ridge profile (renamed)")');
    expect(await page.textContent('#status')).not.toContain('was not done');
    // A rename changes the survey, not its picks: the latest revision still describes them.
    expect(await page.isVisible('button[data-assign="1"]')).toBe(true);
    expect(await page.$('#reinterpret')).toBeNull();
  });

  it('renames, finds by name and deletes a survey', async () => {
    await page.fill('#survey-search', 'dense');
    await page.waitForFunction(() => (globalThis as unknown as PageGlobals).document.querySelectorAll('.survey-list .survey-name').length === 1);
    page.once('dialog', (dialog) => void dialog.accept());
    await page.click('.survey-list li:has-text("dense-line") button:has-text("Delete")');
    await page.waitForFunction(() => (globalThis as unknown as PageGlobals).document.querySelectorAll('.survey-list .survey-name').length === 0);
    // The open survey was deleted: the latest other survey is shown, whatever the search shows.
    await page.waitForFunction(() => !((globalThis as unknown as PageGlobals).document.querySelector('#survey-title')?.textContent ?? 'dense-line').includes('dense-line'));
    await waitForPlot(page, '#travel-time-plot');
    await page.fill('#survey-search', '');
    await page.waitForFunction((expected) => (globalThis as unknown as PageGlobals).document.querySelectorAll('.survey-list .survey-name').length === expected, SAMPLE_NAMES.length + 3);
    await page.click('.survey-list li:has-text("thousand-picks") button:has-text("Rename")');
    await page.fill('.rename-form input', 'Ashgrove test line');
    await page.press('.rename-form input', 'Enter');
    await page.waitForSelector('.survey-list .survey-name:has-text("Ashgrove test line")');
    await openSurveyNamed('fenwick-meadow-water-table');
    await session.screenshot(page, '10-survey-list');
  });
});
