import { afterAll, beforeAll, expect, it } from 'vitest';
import { startBrowserSession, waitForPlot, traceRoles, type BrowserSession } from './browser-harness.js';

let session: BrowserSession;
beforeAll(async () => { session = await startBrowserSession(); });
afterAll(async () => { await session?.close(); });

it('smoke', async () => {
  const { page } = await session.newPage();
  await page.goto('/');
  await waitForPlot(page, '#travel-time-plot');
  console.log(await traceRoles(page, '#travel-time-plot'));
  await session.screenshot(page, 'smoke-first-sight');
  await page.click('button[data-view="depth"]');
  await waitForPlot(page, '#depth-plot');
  await session.screenshot(page, 'smoke-depth');
  const rev = await page.getAttribute('#report-link', 'href');
  await page.goto(rev!);
  await page.waitForSelector('#app[data-ready="true"]', { timeout: 20000 });
  await session.screenshot(page, 'smoke-report');
  console.log(session.errors);
  expect(session.errors).toEqual([]);
});
