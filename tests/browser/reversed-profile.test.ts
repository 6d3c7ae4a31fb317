/**
 * The reversed-profile results in the browser, end to end in Debian's Chromium against a real
 * server on loopback with the sample surveys loaded: open the Ashcombe Hollow survey (three
 * overlapping spreads over undulating bedrock, invented data), see its interpretation, switch the
 * depth view to the generalized reciprocal method and find its seams (hovering one names both
 * pairs and the depth step), hover a point and read its pair, read the forward-check block, then
 * open the printable report and find the tables of reversed pairs, dipping layers, seams and the
 * forward check. After every test: no console errors and no page errors.
 *
 * Oracle: lib's own interpretation of the same pick table with the options the server's first
 * revision uses (engineering scale, defaults), so the counts and values the page shows are
 * checked against the engine, not against numbers written here.
 *
 * Screenshots go to tests/browser/screenshots/ (not committed).
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { describe, expect, it } from 'vitest';
import { interpret } from '../../lib/interpret.js';
import { readPickTable } from '../../lib/picks/index.js';
import { LAPTOP, SAMPLE_DIR, useSharedPage, traceRoles, waitForPlot, type BrowserSession, type PageGlobals } from './browser-harness.js';

const SURVEY = 'ashcombe-hollow-undulating-bedrock';
const GRM_PREFIX = 'generalized reciprocal';

/** lib's interpretation of the sample, as the server made its first revision (oracle). */
const ORACLE = (() => {
  const outcome = readPickTable(readFileSync(`${SAMPLE_DIR}${SURVEY}.csv`));
  if (!outcome.ok) throw new Error(`the sample ${SURVEY}.csv did not load: ${outcome.problems.map((problem) => problem.message).join('; ')}`);
  return interpret(outcome.value, { scale: outcome.value.suggestedScale });
})();
const GRM = ORACLE.refractors.find((refractor) => refractor.method.startsWith(GRM_PREFIX));

let session: BrowserSession;
let page: Page;

useSharedPage(LAPTOP, (shared) => ({ session, page } = shared));

/** Page position of point `index` of the depth plot's first trace with `role` (null when not drawn). */
async function pointPixel(role: string, index: number): Promise<{ x: number; y: number } | null> {
  await page.evaluate(() => (globalThis as unknown as { scrollTo(x: number, y: number): void }).scrollTo(0, 0));
  return page.evaluate(({ wanted, at }) => {
    const plot = (globalThis as unknown as PageGlobals).document.querySelector('#depth-plot');
    const trace = plot?.data?.find((entry) => entry.meta?.role === wanted);
    const xaxis = plot?._fullLayout?.['xaxis'];
    const yaxis = plot?._fullLayout?.['yaxis'];
    if (!plot || !trace || !xaxis || !yaxis) return null;
    const box = plot.getBoundingClientRect();
    return { x: box.left + xaxis._offset + xaxis.l2p(trace.x![at] as number), y: box.top + yaxis._offset + yaxis.l2p(trace.y![at] as number) };
  }, { wanted: role, at: index });
}

/** Moves the mouse onto a point and returns the hover box's text. */
async function hoverText(position: { x: number; y: number }): Promise<string> {
  await page.mouse.move(position.x - 30, position.y - 30);
  await page.mouse.move(position.x, position.y, { steps: 4 });
  await page.waitForSelector('#depth-plot .hoverlayer .hovertext', { timeout: 5_000 });
  return (await page.textContent('#depth-plot .hoverlayer')) ?? '';
}

describe('reversed profiles in the browser client', () => {
  it('the oracle has what the page is checked against: a GRM section with seams, reversed pairs, dipping layers and a forward check', () => {
    expect(GRM, 'lib gives a GRM section for the sample').toBeDefined();
    expect(GRM!.seams.length).toBeGreaterThan(0);
    expect(ORACLE.reversedPairs.length).toBeGreaterThan(0);
    expect(ORACLE.dippingLayers.length).toBeGreaterThan(0);
    expect(ORACLE.forwardCheck).not.toBeNull();
  });

  it('opens the Ashcombe Hollow survey and shows its interpretation', async () => {
    await page.goto('/');
    await waitForPlot(page, '#travel-time-plot');
    const before = await page.getAttribute('#travel-time-plot', 'data-drawn');
    await page.click(`.survey-list li:has-text("${SURVEY}") .survey-open`);
    await page.waitForFunction((wanted) => (globalThis as unknown as PageGlobals).document.querySelector('#survey-title')?.textContent?.includes(wanted) ?? false, SURVEY);
    await waitForPlot(page, '#travel-time-plot', before);
    expect(await page.textContent('#result-summary')).toContain(`${ORACLE.summary.pickCount} picks of ${ORACLE.summary.shotCount} shots`);
  });

  it('switches the depth view to the GRM: a line with its SE band, seams whose hover names both pairs and the step, points whose hover names their pair', async () => {
    await page.click('button[data-view="depth"]');
    let stamp = await waitForPlot(page, '#depth-plot');
    await page.check(`input[name="depth-method"][value^="${GRM_PREFIX}"]`);
    stamp = await waitForPlot(page, '#depth-plot', stamp);
    const roles = await traceRoles(page, '#depth-plot');
    expect(roles.map((trace) => trace.role)).toEqual(expect.arrayContaining(['refractor-band', 'refractor', 'seams']));
    expect(roles.find((trace) => trace.role === 'refractor')?.points).toBe(GRM!.points.length);
    const seamCount = await page.evaluate(() => {
      const plot = (globalThis as unknown as PageGlobals).document.querySelector('#depth-plot');
      return (plot?.data?.find((trace) => trace.meta?.role === 'seams')?.meta as { count?: number } | undefined)?.count ?? 0;
    });
    expect(seamCount, 'seams drawn (oracle: lib)').toBe(GRM!.seams.length);
    // The method radios are not rebuilt on a change: the keyboard focus stays on the chosen one (arrow keys keep working).
    expect(await page.evaluate(() => ((globalThis as unknown as { document: { activeElement: { value?: string } | null } }).document.activeElement?.value ?? ''))).toBe(GRM!.method);
    // Without elevations in the table the elevation mode is offered but not available.
    expect(await page.isDisabled('input[name="depth-mode"][value="elevation"]')).toBe(true);
    expect(await page.textContent('#depth-view .plot-note')).toContain(`${GRM!.seams.length} seams`);
    await session.screenshot(page, 'reversed-01-grm-section');

    // Hover the first seam halfway down its mark: the box names both pairs and the depth step.
    const seam = GRM!.seams[0]!;
    const middle = await pointPixel('seams', 12);
    expect(middle, 'the seam mark is drawn').not.toBeNull();
    const seamHover = await hoverText(middle!);
    expect(seamHover).toContain(seam.fromPair);
    expect(seamHover).toContain(seam.toPair);
    expect(seamHover).toContain('depth step');
    await session.screenshot(page, 'reversed-02-seam-hover');

    // Hover a point of the section: its pair (oracle: lib's point, by position).
    const points = [...GRM!.points].sort((left, right) => left.x - right.x);
    const index = Math.floor(points.length / 2);
    const pointHover = await hoverText((await pointPixel('refractor', index))!);
    expect(pointHover).toContain(`pair ${points[index]!.pair}`);
  });

  it('shows the forward-check block and the tables of reversed pairs and dipping layers under the depth section', async () => {
    const block = page.locator('#depth-results .forward-check');
    await block.waitFor({ timeout: 10_000 });
    const check = ORACLE.forwardCheck!;
    const pickCount = check.perShot.reduce((sum, entry) => sum + entry.pickCount, 0);
    expect(await block.textContent()).toContain(`${check.overallRms!.toFixed(2)}\u202fms over ${pickCount} picks`);
    expect(await page.$$eval('#depth-results .forward-check-shots tbody tr[data-key]', (rows) => rows.length)).toBe(check.perShot.length);
    expect(await page.$$eval('#depth-results .forward-check-receivers tbody tr[data-key]', (rows) => rows.length)).toBe(5);
    // Shots the engine warns about are marked in words (oracle: lib's forward-check-misfit warnings).
    const warned = ORACLE.warnings.filter((warning) => warning.code === 'forward-check-misfit').map((warning) => warning.shot).sort();
    const marked = await page.$$eval('#depth-results .forward-check-shots tr.flagged', (rows) => rows.map((row) => row.getAttribute('data-key')));
    expect(marked.sort()).toEqual(warned);
    for (const key of marked) expect(await page.textContent(`#depth-results .forward-check-shots tr[data-key="${key}"]`)).toContain('exceeds');
    expect(await page.$$eval('#depth-results .reversed-pair-table tbody tr[data-key]', (rows) => rows.length)).toBe(ORACLE.reversedPairs.length);
    const dippingRows = ORACLE.dippingLayers.reduce((sum, entry) => sum + entry.interfaces.length, 0);
    expect(await page.$$eval('#depth-results .dipping-layer-table tbody tr[data-key]', (rows) => rows.length)).toBe(dippingRows);
    await page.locator('#depth-results .reversed-pair-table').scrollIntoViewIfNeeded();
    await session.screenshot(page, 'reversed-03-pair-table');
    await block.scrollIntoViewIfNeeded();
    await session.screenshot(page, 'reversed-04-forward-check');
  });

  it('opens the report with the GRM section and the tables of reversed pairs, seams, dipping layers and the forward check', async () => {
    await page.click('#report-link');
    await page.waitForSelector('#app[data-ready="true"]', { timeout: 30_000 });
    const text = (await page.textContent('#report')) ?? '';
    expect(text).toContain(SURVEY);
    expect(text).toContain(GRM!.method);
    expect(await page.$$eval('img.report-figure', (images) => images.length)).toBe(2);
    expect(await page.$$eval('.report .reversed-pair-table tbody tr[data-key]', (rows) => rows.length)).toBe(ORACLE.reversedPairs.length);
    expect(await page.$$eval('.report .seam-table tbody tr[data-key]', (rows) => rows.length)).toBe(GRM!.seams.length);
    const dippingRows = ORACLE.dippingLayers.reduce((sum, entry) => sum + entry.interfaces.length, 0);
    expect(await page.$$eval('.report .dipping-layer-table tbody tr[data-key]', (rows) => rows.length)).toBe(dippingRows);
    expect(await page.textContent('.report .forward-check')).toContain('Overall RMS');
    // Every optimum-XY reason is printed (no tooltips on paper).
    const reasons = ORACLE.reversedPairs.filter((pair) => pair.generalizedReciprocal.reason !== null).length;
    expect(await page.$$eval('.report .reversed-pair-table-block .table-notes li', (items) => items.filter((item) => item.textContent?.startsWith('Optimum XY of')).length)).toBe(reasons);
    await session.screenshot(page, 'reversed-05-report', true);
    await page.locator('.report-section:has(h2:text-is("Depth section"))').screenshot({ path: join(session.screenshotDir, 'reversed-06-report-depth-section.png') });
    await page.locator('.report .reversed-results').screenshot({ path: join(session.screenshotDir, 'reversed-07-report-reversed-profiles.png') });
    await page.goBack();
    await waitForPlot(page, '#travel-time-plot');
  });

  it('the depth view with the reversed-profile tables and the report have no serious or critical axe-core violations (WCAG 2.1 A/AA)', async () => {
    // axe-core is injected, which the page's CSP forbids: this page bypasses it (as tests/browser/accessibility.test.ts does).
    const axeSource = readFileSync(createRequire(import.meta.url).resolve('axe-core/axe.min.js'), 'utf8');
    const { page: checked, context } = await session.newPage(LAPTOP, { bypassCSP: true });
    const serious = async (where: string): Promise<string[]> => {
      await checked.addScriptTag({ content: axeSource });
      const violations = await checked.evaluate(async () => {
        const axe = (globalThis as unknown as { axe: { run(context: unknown, options: unknown): Promise<{ violations: { id: string; impact: string | null; nodes: { target: string[] }[] }[] }> } }).axe;
        const result = await axe.run({ exclude: [['.js-plotly-plot .main-svg']] }, { runOnly: { type: 'tag', values: ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'] } });
        return result.violations.map((violation) => ({ id: violation.id, impact: violation.impact, targets: violation.nodes.map((node) => node.target.join(' ')) }));
      });
      return violations.filter((violation) => violation.impact === 'serious' || violation.impact === 'critical').map((violation) => `${where}: ${violation.id} at ${violation.targets.join('; ')}`);
    };
    await checked.goto(page.url());
    await waitForPlot(checked, '#travel-time-plot');
    await checked.click('button[data-view="depth"]');
    await waitForPlot(checked, '#depth-plot');
    await checked.locator('#depth-results .forward-check').waitFor();
    expect(await serious('depth view')).toEqual([]);
    await checked.click('#report-link');
    await checked.waitForSelector('#app[data-ready="true"]', { timeout: 30_000 });
    expect(await serious('report')).toEqual([]);
    await context.close();
  });
});
