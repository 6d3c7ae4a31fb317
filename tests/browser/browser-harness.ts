/**
 * Browser tests' harness: a real slopebreak server on a loopback port with the sample surveys
 * loaded (as the README's main-job command starts it), and Debian's Chromium driven by
 * playwright-core. Every page's console errors and uncaught exceptions are collected, and so is
 * every request to anywhere but this server (the page must work offline, with no CDN), so a test
 * can assert that there were none. Screenshots go to `tests/browser/screenshots/` (not committed).
 *
 * Chromium: `/usr/bin/chromium` from Debian's `chromium` package (installed by `.ci/run`), or
 * `SLOPEBREAK_CHROMIUM` if set. A missing browser fails the tests with the fix, never skips them.
 */
import { existsSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { afterAll, afterEach, beforeAll, expect } from 'vitest';
import { startServer, type RunningServer } from '../../server/serve.js';

export const CHROMIUM_PATH = process.env['SLOPEBREAK_CHROMIUM'] ?? '/usr/bin/chromium';
export const SCREENSHOT_DIR = fileURLToPath(new URL('./screenshots/', import.meta.url));
export const SAMPLE_DIR = fileURLToPath(new URL('../../sample-surveys/', import.meta.url));
const BUILT_CLIENT = fileURLToPath(new URL('../../dist/client/index.html', import.meta.url));

/** Flags known to work for headless Debian Chromium here (no GPU, closed network). */
const CHROMIUM_FLAGS = [
  '--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update',
  '--disable-sync', '--no-first-run', '--disable-quic',
  // WebGL without a GPU: the software rasteriser, for the WebGL pick traces of large surveys.
  '--enable-unsafe-swiftshader', '--use-angle=swiftshader',
];

/** A laptop screen. */
export const LAPTOP = { width: 1366, height: 768 } as const;
/** A common projector resolution. */
export const PROJECTOR = { width: 1280, height: 720 } as const;

export interface BrowserSession {
  readonly server: RunningServer;
  readonly baseUrl: string;
  readonly browser: Browser;
  /** Where screenshots and other artefacts for a person to look at go (not committed). */
  readonly screenshotDir: string;
  /** Console errors and page errors of every page opened through `newPage`. */
  readonly errors: string[];
  /**
   * Allow one console line matching `pattern` (a response the test provokes on purpose, such as a
   * 422 refusal, which Chromium logs as a failed resource load). Unused allowances fail the test too.
   */
  expectConsole(pattern: RegExp): void;
  /** Console errors not allowed by `expectConsole`, and allowances that were not used; both cleared. */
  takeUnexpected(): string[];
  /** `bypassCSP`: let the test inject a script (the accessibility checker) despite the page's CSP. */
  newPage(viewport?: { width: number; height: number }, options?: { bypassCSP?: boolean }): Promise<{ page: Page; context: BrowserContext }>;
  /** The visible screen (what a person sees first), or the whole page when `fullPage`. */
  screenshot(page: Page, name: string, fullPage?: boolean): Promise<string>;
  close(): Promise<void>;
}

export async function startBrowserSession(): Promise<BrowserSession> {
  if (!existsSync(CHROMIUM_PATH)) {
    throw new Error(`Chromium is not at ${CHROMIUM_PATH}: install Debian's package (apt-get install -y chromium), as .ci/run does, or set SLOPEBREAK_CHROMIUM`);
  }
  if (!existsSync(BUILT_CLIENT)) throw new Error('the browser client is not built: run npm run build:client (npm test builds it first)');
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  const dataDir = mkdtempSync(join(tmpdir(), 'slopebreak-browser-'));
  const server = await startServer({ dataDir, host: '127.0.0.1', port: 0, sampleFolder: SAMPLE_DIR, say: () => undefined, logSink: () => undefined });
  const browser = await chromium.launch({ executablePath: CHROMIUM_PATH, args: CHROMIUM_FLAGS, headless: true });
  const errors: string[] = [];
  let allowed: RegExp[] = [];
  const baseUrl = `http://127.0.0.1:${server.port}`;
  return {
    server,
    baseUrl,
    browser,
    screenshotDir: SCREENSHOT_DIR,
    errors,
    expectConsole(pattern) {
      allowed.push(pattern);
    },
    takeUnexpected() {
      const unexpected = errors.splice(0).filter((line) => {
        const index = allowed.findIndex((pattern) => pattern.test(line));
        if (index < 0) return true;
        allowed.splice(index, 1);
        return false;
      });
      const unused = allowed.map((pattern) => `expected console line never came: ${pattern}`);
      allowed = [];
      return [...unexpected, ...unused];
    },
    async newPage(viewport = LAPTOP, options = {}) {
      const context = await browser.newContext({ viewport, acceptDownloads: true, baseURL: baseUrl, bypassCSP: options.bypassCSP ?? false });
      // Offline on the office network: any request that leaves this server is refused and reported.
      await context.route('**/*', (route) => {
        const url = route.request().url();
        if (url.startsWith(`${baseUrl}/`) || url.startsWith('data:') || url.startsWith('blob:')) return route.continue();
        errors.push(`request outside the service: ${url}`);
        return route.abort();
      });
      const page = await context.newPage();
      page.on('console', (message) => {
        if (message.type() === 'error') errors.push(`console: ${message.text()} (${page.url()})`);
      });
      page.on('pageerror', (error) => errors.push(`page error: ${error.message} (${page.url()})`));
      return { page, context };
    },
    async screenshot(page, name, fullPage = false) {
      const file = join(SCREENSHOT_DIR, `${name}.png`);
      await page.screenshot({ path: file, fullPage });
      return file;
    },
    async close() {
      await browser.close();
      await server.stop();
      rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

/** What the page functions below use of the browser's globals (the root tsconfig has no DOM types). */
export interface PageGlobals {
  readonly document: {
    querySelector(selector: string): (PlotElement & { dataset: Record<string, string | undefined>; textContent: string | null }) | null;
    querySelectorAll(selector: string): ArrayLike<{ textContent: string | null }>;
  };
}
/** A plotly graph element: its traces and, after drawing, its laid-out axes. */
export interface PlotElement {
  readonly data?: { meta?: { role?: string; branch?: number }; x?: unknown[]; y?: unknown[]; customdata?: unknown[]; type?: string }[];
  readonly layout?: Record<string, unknown>;
  readonly _fullLayout?: Record<string, { _offset: number; _length: number; l2p: (value: number) => number } | undefined>;
  getBoundingClientRect(): { left: number; top: number };
}

/** Wait until a plot has been drawn (its `data-drawn` stamp changes from `previous`). */
export async function waitForPlot(page: Page, selector: string, previous: string | null = null): Promise<string> {
  const handle = await page.waitForFunction(
    ({ selector: target, previous: before }) => {
      const stamp = (globalThis as unknown as PageGlobals).document.querySelector(target)?.dataset['drawn'];
      return stamp && stamp !== before ? stamp : null;
    },
    { selector, previous },
    { timeout: 20_000 },
  );
  return (await handle.jsonValue()) as string;
}

/** The roles (meta.role) of the traces a plot holds, with their point counts. */
export async function traceRoles(page: Page, selector: string): Promise<{ role: string; points: number; type: string }[]> {
  return page.evaluate((target) => {
    const plot = (globalThis as unknown as PageGlobals).document.querySelector(target);
    return (plot?.data ?? []).map((trace) => ({ role: trace.meta?.role ?? '', points: trace.x?.length ?? 0, type: trace.type ?? '' }));
  }, selector);
}

/**
 * One browser session and one page for a whole test file: started before the first test, closed
 * after the last, and after every test no console or page error may remain unexpected (the
 * acceptance: no console errors in the browser). `opened` receives the session and the page.
 */
export function useSharedPage(viewport: { width: number; height: number }, opened: (shared: { session: BrowserSession; page: Page }) => void): void {
  let session: BrowserSession | undefined;
  beforeAll(async () => {
    session = await startBrowserSession();
    const { page } = await session.newPage(viewport);
    opened({ session, page });
  });
  afterAll(async () => {
    await session?.close();
  });
  afterEach(() => {
    expect(session?.takeUnexpected() ?? [], 'console and page errors during the test').toEqual([]);
  });
}
