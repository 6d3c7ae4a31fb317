/**
 * Accessibility of the browser client, checked by axe-core (Deque's open-source rules engine for
 * WCAG 2.x, from the npm registry) in Debian's Chromium: the workspace's first sight, the depth
 * section, the token dialog and the printable report, against the WCAG 2.0/2.1 A and AA rules
 * (colour contrast, names of controls, labels, landmarks, ARIA use). Plus the keyboard: every
 * control of the editing panel is reachable with Tab and works with Enter.
 *
 * axe-core is injected into the page, which the page's own Content-Security-Policy would forbid:
 * these pages are opened with `bypassCSP` (the other browser tests keep the policy on).
 */
import { createRequire } from 'node:module';
import { readFileSync } from 'node:fs';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startBrowserSession, waitForPlot, type BrowserSession } from './browser-harness.js';

const AXE_SOURCE = readFileSync(createRequire(import.meta.url).resolve('axe-core/axe.min.js'), 'utf8');
/** Impacts that fail the test; "minor" and "moderate" findings are printed for a person to judge. */
const FAILING_IMPACTS = new Set(['serious', 'critical']);

interface AxeViolation {
  readonly id: string;
  readonly impact: string | null;
  readonly help: string;
  readonly nodes: readonly { readonly target: readonly string[]; readonly failureSummary?: string }[];
}

let session: BrowserSession;
beforeAll(async () => {
  session = await startBrowserSession();
});
afterAll(async () => {
  await session?.close();
});

/** Runs axe-core on the page (WCAG 2.0/2.1 A and AA) and returns the violations. The plots' SVG is left out: plotly draws it, its text is in the tables. */
async function axeViolations(page: Page): Promise<AxeViolation[]> {
  await page.addScriptTag({ content: AXE_SOURCE });
  return page.evaluate(async () => {
    const axe = (globalThis as unknown as { axe: { run(context: unknown, options: unknown): Promise<{ violations: AxeViolation[] }> } }).axe;
    const result = await axe.run({ exclude: [['.js-plotly-plot .main-svg'], ['.js-plotly-plot .gl-container']] }, { runOnly: { type: 'tag', values: ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'] } });
    return result.violations.map((violation) => ({ id: violation.id, impact: violation.impact, help: violation.help, nodes: violation.nodes.map((node) => ({ target: node.target, failureSummary: node.failureSummary })) }));
  });
}

function failing(violations: readonly AxeViolation[], where: string): string[] {
  for (const violation of violations) {
    console.log(`${where}: axe ${violation.impact ?? 'unrated'} ${violation.id} (${violation.help}) at ${violation.nodes.slice(0, 3).map((node) => node.target.join(' ')).join('; ')}`);
  }
  return violations.filter((violation) => FAILING_IMPACTS.has(violation.impact ?? '')).map((violation) => `${violation.id}: ${violation.help} — ${violation.nodes.map((node) => node.target.join(' ')).join('; ')}`);
}

describe('accessibility of the browser client (axe-core, WCAG 2.1 A/AA)', () => {
  it('the workspace at first sight, the depth section and the token dialog have no serious or critical violations', async () => {
    const { page, context } = await session.newPage(undefined, { bypassCSP: true });
    await page.goto('/');
    await waitForPlot(page, '#travel-time-plot');
    expect(failing(await axeViolations(page), 'travel times')).toEqual([]);
    await page.click('button[data-view="depth"]');
    await waitForPlot(page, '#depth-plot');
    expect(failing(await axeViolations(page), 'depth section')).toEqual([]);
    await page.click('button:has-text("Access token")');
    await page.waitForSelector('dialog.token-dialog[open]');
    expect(failing(await axeViolations(page), 'token dialog')).toEqual([]);
    // Esc closes the dialog and gives focus back to the page (WAI-ARIA dialog pattern).
    await page.keyboard.press('Escape');
    await page.waitForSelector('dialog.token-dialog:not([open])', { state: 'attached' });
    await context.close();
  });

  it('the printable report has no serious or critical violations', async () => {
    const { page, context } = await session.newPage(undefined, { bypassCSP: true });
    await page.goto('/');
    await waitForPlot(page, '#travel-time-plot');
    await page.click('#report-link');
    await page.waitForSelector('#app[data-ready="true"]', { timeout: 30_000 });
    expect(failing(await axeViolations(page), 'report')).toEqual([]);
    await context.close();
  });

  it('the editing panel works from the keyboard: Tab reaches "Select by offset", Enter selects, a branch button assigns', async () => {
    const { page, context } = await session.newPage();
    await page.goto('/');
    await waitForPlot(page, '#travel-time-plot');
    const before = await page.textContent('#result-summary');
    await page.focus('#range-shot');
    await page.keyboard.press('Tab'); // side
    await page.keyboard.press('Tab'); // from
    await page.keyboard.type('0');
    await page.keyboard.press('Tab'); // to
    await page.keyboard.type('20'); // the first shot, A-OFF-W, is 12 m off the end: its first picks are at 13.5–19.5 m
    await page.keyboard.press('Enter');
    await page.waitForFunction(() => /^\d+ picks? selected/.test((globalThis as unknown as { document: { querySelector(s: string): { textContent: string | null } | null } }).document.querySelector('#selection-count')?.textContent ?? ''));
    // The branch buttons are above the form; focus one as Shift+Tab would reach it, press Enter.
    await page.focus('button[data-assign="3"]');
    await page.keyboard.press('Enter');
    await page.waitForFunction((old) => (globalThis as unknown as { document: { querySelector(s: string): { textContent: string | null } | null } }).document.querySelector('#result-summary')?.textContent !== old, before);
    expect(await page.textContent('#status')).toMatch(/Saved as revision \d+/);
    await context.close();
    expect(session.takeUnexpected()).toEqual([]);
  });
});
