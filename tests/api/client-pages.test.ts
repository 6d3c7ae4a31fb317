/**
 * The browser client's pages and built files (server/routes/client-pages.ts), mounted in
 * server/app.ts before the access check. Each behaviour is checked twice: over a small fake client
 * folder written by the test and passed as `clientDir`, and over the real build in `dist/client/`
 * (made by `npm run build:client`; these tests never build it), found by the default lookup.
 * supertest over a real SQLite file (tests/api/api-harness.ts); the `..` path checks go over a real
 * loopback socket (tests/api/loopback-http.ts) so that the path reaches the server exactly as written.
 */
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { once } from 'node:events';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import request from 'supertest';
import { afterEach, describe, expect, it } from 'vitest';
import { builtClientDir } from '../../server/routes/client-pages.js';
import { openHarness, type Harness } from './api-harness.js';
import { sendOverLoopback } from './loopback-http.js';

/**
 * The Accept header a browser sends when it opens a page (recalled from memory of current
 * Firefox/Chromium navigation requests; common practice). RFC 9110 §12.5.1: text/html at q=1 beats
 * application/json, which only matches the `*\/*;q=0.8` range.
 */
const BROWSER_ACCEPT = 'text/html,application/xhtml+xml,application/xml;q=0.9,*/*;q=0.8';
const TOKEN = 'office-token-0123456789abcdef';
/** One year in seconds: the lifetime asked of hashed file names (common practice for content-hashed builds). */
const ONE_YEAR_SECONDS = 365 * 24 * 60 * 60;
/** Milliseconds any one loopback request may take before the test gives up (generous; a reply takes a few ms). */
const LOOPBACK_TIMEOUT_MS = 10_000;

/** The three page shapes beside `/` that a colleague may open from a link. */
const SURVEY_PAGES = ['/surveys/abc123', '/surveys/abc123/revisions/3', '/surveys/abc123/revisions/3/report'];

const REAL_BUILD_DIR = fileURLToPath(new URL('../../dist/client/', import.meta.url));
/** A file of the repository outside the build, three folders above `dist/client/assets/`. */
const REPOSITORY_PACKAGE_JSON = fileURLToPath(new URL('../../package.json', import.meta.url));

/** One client folder under test: where it is, its page, one of its assets, and a file that must stay private. */
interface ClientUnderTest {
  /** Passed as `clientDir`; undefined to use the default lookup (the real build). */
  readonly clientDir: string | undefined;
  readonly indexBytes: Buffer;
  readonly assetUrl: string;
  readonly assetBytes: Buffer;
  readonly assetType: RegExp;
  /** Request paths that try to climb out of `/assets/` to `secretBytes`, raw and percent-encoded. */
  readonly traversalPaths: readonly string[];
  readonly secretBytes: Buffer;
  cleanup(): void;
}

/**
 * A fake built client in a temp folder: `client/index.html` (with a non-ASCII character, so a
 * byte-for-byte comparison means something) and `client/assets/app-abc123.js`, plus a private file
 * beside `client/` that no URL may reach.
 */
function fakeClient(): ClientUnderTest {
  const root = mkdtempSync(join(tmpdir(), 'slopebreak-client-'));
  const clientDir = join(root, 'client');
  mkdirSync(join(clientDir, 'assets'), { recursive: true });
  const indexBytes = Buffer.from('<!doctype html><html><head><meta charset="utf-8"><title>fake client – Fenwick</title>'
    + '<script type="module" src="/assets/app-abc123.js"></script></head><body><div id="app"></div></body></html>\n', 'utf8');
  writeFileSync(join(clientDir, 'index.html'), indexBytes);
  const assetBytes = Buffer.from('export const fakeClientMarker = "app-abc123";\n', 'utf8');
  writeFileSync(join(clientDir, 'assets', 'app-abc123.js'), assetBytes);
  const secretBytes = Buffer.from('private-file-outside-the-client-folder 7f3a9c\n', 'utf8');
  writeFileSync(join(root, 'secret.txt'), secretBytes);
  return {
    clientDir, indexBytes, assetUrl: '/assets/app-abc123.js', assetBytes, assetType: /javascript/,
    traversalPaths: [
      '/assets/../../secret.txt',
      '/assets/..%2f..%2fsecret.txt',
      '/assets/%2e%2e/%2e%2e/secret.txt',
      '/assets/%2e%2e%2f%2e%2e%2fsecret.txt',
      '/assets/..%5c..%5csecret.txt',
      '/assets/%252e%252e%252f%252e%252e%252fsecret.txt',
      '/assets/app-abc123.js/../../../secret.txt',
    ],
    secretBytes,
    cleanup: () => rmSync(root, { recursive: true, force: true }),
  };
}

/** The scripts and style sheets `index.html` loads: every `<script src>` and `<link rel="stylesheet" href>`. */
function referencedFiles(html: string): string[] {
  const scripts = [...html.matchAll(/<script\b[^>]*\bsrc="([^"]+)"/g)].map((match) => match[1] ?? '');
  const styles = [...html.matchAll(/<link\b(?=[^>]*\brel="stylesheet")[^>]*\bhref="([^"]+)"/g)].map((match) => match[1] ?? '');
  return [...scripts, ...styles];
}

/** The real build in dist/client/, or a failure that says how to make it. */
function realBuild(): ClientUnderTest {
  const indexFile = join(REAL_BUILD_DIR, 'index.html');
  if (!existsSync(indexFile)) {
    throw new Error(`the browser client has not been built (no ${join('dist', 'client', 'index.html')}); run npm run build:client, then run these tests again`);
  }
  const indexBytes = readFileSync(indexFile);
  const script = referencedFiles(indexBytes.toString('utf8')).find((file) => file.endsWith('.js'));
  if (script === undefined || !script.startsWith('/assets/')) throw new Error('dist/client/index.html loads no /assets/ script; run npm run build:client again');
  return {
    clientDir: undefined, indexBytes, assetUrl: script, assetBytes: readFileSync(join(REAL_BUILD_DIR, script)), assetType: /javascript/,
    traversalPaths: [
      '/assets/../../../package.json',
      '/assets/..%2f..%2fpackage.json',
      '/assets/..%2f..%2f..%2fpackage.json',
      '/assets/%2e%2e/%2e%2e/%2e%2e/package.json',
      '/assets/%2e%2e%2f%2e%2e%2f%2e%2e%2fpackage.json',
      '/assets/..%2findex.html',
    ],
    secretBytes: readFileSync(REPOSITORY_PACKAGE_JSON),
    cleanup: () => {},
  };
}

/** Directives of a Content-Security-Policy header, each to its source list (W3C CSP Level 3 policy syntax: directives `;`-separated, sources space-separated). */
function cspDirectives(header: string | undefined): Map<string, string[]> {
  const directives = new Map<string, string[]>();
  for (const part of (header ?? '').split(';')) {
    const [name, ...sources] = part.trim().split(/\s+/);
    if (name !== undefined && name !== '') directives.set(name.toLowerCase(), sources);
  }
  return directives;
}

/** supertest: keep the body as the bytes sent (superagent's `blob` response type gives a Buffer in Node). */
function bytesOf(body: unknown): Buffer {
  if (!Buffer.isBuffer(body)) throw new Error('expected the response body as bytes');
  return body;
}

describe.each([
  { label: 'a fake client folder passed as clientDir', open: fakeClient },
  { label: 'the real build in dist/client (default clientDir)', open: realBuild },
])('clientRoutes over $label', ({ open }) => {
  let harness: Harness | undefined;
  let client: ClientUnderTest | undefined;
  afterEach(() => {
    harness?.close();
    client?.cleanup();
    harness = undefined;
    client = undefined;
  });
  function start(config: Parameters<typeof openHarness>[0] = {}): { harness: Harness; client: ClientUnderTest } {
    client = open();
    harness = openHarness({ ...(client.clientDir === undefined ? {} : { clientDir: client.clientDir }), ...config });
    return { harness, client };
  }

  it('when a browser asks for /, then it gets the index file byte for byte as HTML with Cache-Control: no-cache', async () => {
    const { harness, client } = start();
    const response = await request(harness.app).get('/').set('Accept', BROWSER_ACCEPT).responseType('blob');
    // RFC 9110 §12.5.1: the browser ranks text/html first, so the HTML representation is chosen.
    expect(response.status).toBe(200);
    expect(response.headers['content-type']).toMatch(/^text\/html/);
    expect(bytesOf(response.body).equals(client.indexBytes)).toBe(true);
    // Common practice: the page names hashed files, so it is revalidated on every load (RFC 9111 §5.2.2.4 no-cache).
    expect(response.headers['cache-control']).toBe('no-cache');
  });

  it('when a script asks for / with no Accept, */* or application/json, then it still gets the JSON service index', async () => {
    const { harness } = start();
    harness.store.createSurvey({ name: 'Millbrook line A', scale: 'engineering' });
    const asked = [
      request(harness.app).get('/'),
      request(harness.app).get('/').set('Accept', '*/*'),
      request(harness.app).get('/').set('Accept', 'application/json'),
    ];
    for (const pending of asked) {
      const response = await pending;
      // RFC 9110 §12.5.1: with no Accept (or */*) any representation is acceptable; the service keeps JSON for scripts.
      expect(response.status).toBe(200);
      expect(response.headers['content-type']).toMatch(/^application\/json/);
      expect(response.body.service).toBe('slopebreak');
      expect(response.body.surveys.map((survey: { name: string }) => survey.name)).toEqual(['Millbrook line A']);
    }
  });

  it('when a browser opens a survey, revision or report URL, then it gets the index page; a JSON request there gets a 404 JSON error', async () => {
    const { harness, client } = start();
    for (const path of SURVEY_PAGES) {
      const page = await request(harness.app).get(path).set('Accept', BROWSER_ACCEPT).responseType('blob');
      expect(page.status, path).toBe(200);
      expect(page.headers['content-type'], path).toMatch(/^text\/html/);
      expect(bytesOf(page.body).equals(client.indexBytes), path).toBe(true);
      // RFC 9110 §15.5.5: no JSON resource lives at a page URL, so a JSON request gets 404 (the API's unknown-route error).
      const json = await request(harness.app).get(path).set('Accept', 'application/json');
      expect(json.status, path).toBe(404);
      expect(json.headers['content-type'], path).toMatch(/^application\/json/);
      expect(json.body.error.code, path).toBe('route-not-found');
    }
  });

  it('when an asset is asked for, then it is served with a one-year immutable cache; a missing asset gets a 404 JSON error', async () => {
    const { harness, client } = start();
    const asset = await request(harness.app).get(client.assetUrl).responseType('blob');
    expect(asset.status).toBe(200);
    expect(asset.headers['content-type']).toMatch(client.assetType);
    expect(bytesOf(asset.body).equals(client.assetBytes)).toBe(true);
    // Common practice for content-hashed file names; RFC 8246 defines `immutable`, RFC 9111 §5.2.2.1 max-age.
    const cacheControl = String(asset.headers['cache-control']);
    expect(cacheControl).toContain(`max-age=${ONE_YEAR_SECONDS}`);
    expect(cacheControl).toContain('immutable');
    for (const path of ['/assets/app-missing000.js', '/assets/']) {
      const missing = await request(harness.app).get(path).set('Accept', BROWSER_ACCEPT);
      // RFC 9110 §15.5.5: 404, as JSON from the API's unknown-route handler (no directory listing, no index page).
      expect(missing.status, path).toBe(404);
      expect(missing.headers['content-type'], path).toMatch(/^application\/json/);
      expect(missing.body.error.code, path).toBe('route-not-found');
    }
  });

  it('when an /assets/ path climbs out with .. (raw or percent-encoded), then no file outside the assets folder is returned', async () => {
    const { harness, client } = start();
    const server = harness.app.listen(0, '127.0.0.1');
    try {
      await once(server, 'listening');
      const port = (server.address() as AddressInfo).port;
      const indexText = client.indexBytes.toString('utf8');
      const secretText = client.secretBytes.toString('utf8');
      for (const path of client.traversalPaths) {
        const reply = await sendOverLoopback(port, { method: 'GET', path, timeoutMs: LOOPBACK_TIMEOUT_MS });
        // Common practice (OWASP path traversal): refused as an unknown file, never a file from above the folder.
        expect(reply.status, path).toBe(404);
        expect(reply.text, path).not.toContain(secretText);
        expect(reply.text, path).not.toContain(indexText);
      }
    } finally {
      server.close();
    }
  });

  it('when reads are locked and the caller is not trusted, then the page and assets are served but /api/surveys and the JSON index get 401', async () => {
    // supertest connects from loopback; an empty trusted list makes it count as another machine (as in access.test.ts).
    const { harness, client } = start({ accessToken: TOKEN, lockReads: true, trustedAddresses: [] });
    harness.store.createSurvey({ name: 'Confidential quarry line', scale: 'engineering' });
    for (const path of ['/', ...SURVEY_PAGES]) {
      const page = await request(harness.app).get(path).set('Accept', BROWSER_ACCEPT).responseType('blob');
      expect(page.status, path).toBe(200);
      expect(bytesOf(page.body).equals(client.indexBytes), path).toBe(true);
      expect(bytesOf(page.body).toString('utf8'), path).not.toContain('Confidential quarry line');
    }
    const asset = await request(harness.app).get(client.assetUrl).responseType('blob');
    expect(asset.status).toBe(200);
    expect(bytesOf(asset.body).equals(client.assetBytes)).toBe(true);
    // RFC 9110 §15.5.2: 401 when credentials are needed and none were sent.
    const surveys = await request(harness.app).get('/api/surveys');
    expect(surveys.status).toBe(401);
    expect(surveys.body.error.code).toBe('token-required');
    for (const accept of [undefined, 'application/json']) {
      const pending = request(harness.app).get('/');
      const index = await (accept === undefined ? pending : pending.set('Accept', accept));
      expect(index.status, String(accept)).toBe(401);
      expect(index.text, String(accept)).not.toContain('Confidential quarry line');
    }
    // The refusal is about the token: with it, the same reads pass.
    expect((await request(harness.app).get('/api/surveys').set('Authorization', `Bearer ${TOKEN}`)).status).toBe(200);
    expect((await request(harness.app).get('/').set('Authorization', `Bearer ${TOKEN}`)).body.service).toBe('slopebreak');
  });

  it('when the page is served, then its Content-Security-Policy allows images from self, data: and blob: and scripts only from self', async () => {
    const { harness } = start();
    const page = await request(harness.app).get('/').set('Accept', BROWSER_ACCEPT);
    expect(page.status).toBe(200);
    const directives = cspDirectives(page.headers['content-security-policy']);
    // W3C CSP Level 3, img-src: the PNG export draws through a blob: image; the icon is a data: URL.
    expect(directives.get('img-src')).toEqual(expect.arrayContaining(["'self'", 'data:', 'blob:']));
    // W3C CSP Level 3, script-src: own origin only, no inline script and no eval.
    expect(directives.get('script-src')).toEqual(["'self'"]);
    // W3C CSP Level 3, script-src-elem / script-src-attr: when present they override script-src, so neither may widen it.
    expect(directives.get('script-src-elem') ?? ["'self'"]).toEqual(["'self'"]);
    expect(directives.get('script-src-attr') ?? ["'none'"]).toEqual(["'none'"]);
    expect(directives.get('default-src')).toEqual(["'self'"]);
  });
});

describe('clientRoutes when the client has not been built', () => {
  let harness: Harness | undefined;
  let emptyDir: string | undefined;
  afterEach(() => {
    harness?.close();
    if (emptyDir !== undefined) rmSync(emptyDir, { recursive: true, force: true });
    harness = undefined;
    emptyDir = undefined;
  });

  it('when clientDir holds no index.html, then a browser gets a 503 HTML page saying to run npm run build:client, and the API still answers', async () => {
    emptyDir = mkdtempSync(join(tmpdir(), 'slopebreak-unbuilt-'));
    harness = openHarness({ clientDir: emptyDir });
    for (const path of ['/', ...SURVEY_PAGES]) {
      const page = await request(harness.app).get(path).set('Accept', BROWSER_ACCEPT);
      // RFC 9110 §15.6.4: 503, the service cannot give this page for now (a build step fixes it).
      expect(page.status, path).toBe(503);
      expect(page.headers['content-type'], path).toMatch(/^text\/html/);
      expect(page.text, path).toContain('npm run build:client');
    }
    const health = await request(harness.app).get('/api/health');
    expect(health.status).toBe(200);
    expect(health.headers['content-type']).toMatch(/^application\/json/);
    const index = await request(harness.app).get('/').set('Accept', 'application/json');
    expect(index.status).toBe(200);
    expect(index.body.service).toBe('slopebreak');
  });
});

describe('the real client build (dist/client, made by npm run build:client)', () => {
  let harness: Harness | undefined;
  afterEach(() => {
    harness?.close();
    harness = undefined;
  });

  it('builtClientDir finds dist/client/ from the TypeScript sources', () => {
    // Common practice: the default lookup must point at the build the tests read.
    expect(builtClientDir().replace(/\/?$/, '/')).toBe(REAL_BUILD_DIR.replace(/\/?$/, '/'));
  });

  it('when index.html is read, then it loads only /assets/ scripts and styles and names no http(s) URL (works offline)', () => {
    const html = realBuild().indexBytes.toString('utf8');
    const files = referencedFiles(html);
    // Common practice: one script and one style sheet at least; nothing from a CDN.
    expect(files.filter((file) => file.endsWith('.js')).length).toBeGreaterThan(0);
    expect(files.filter((file) => file.endsWith('.css')).length).toBeGreaterThan(0);
    for (const file of files) expect(file).toMatch(/^\/assets\/[A-Za-z0-9._-]+\.(js|css)$/);
    expect(html).not.toMatch(/https?:\/\//i);
    expect(html).not.toMatch(/(src|href)="\/\//i);
  });

  it('when each file index.html loads is asked for, then it is served 200 as JavaScript or CSS, the bytes of the build', async () => {
    const build = realBuild();
    harness = openHarness();
    for (const file of referencedFiles(build.indexBytes.toString('utf8'))) {
      const response = await request(harness.app).get(file).responseType('blob');
      expect(response.status, file).toBe(200);
      // Common practice (RFC 9239 text/javascript; RFC 2318 text/css): browsers refuse module scripts of another type.
      expect(response.headers['content-type'], file).toMatch(file.endsWith('.css') ? /^text\/css/ : /^(text|application)\/javascript/);
      expect(bytesOf(response.body).equals(readFileSync(join(REAL_BUILD_DIR, file))), file).toBe(true);
    }
  });

  it('when the client loads plotly, then it comes from a plotly file in the build, imported by the client and served as JavaScript', async () => {
    const build = realBuild();
    harness = openHarness();
    const plotlyFiles = readdirSync(join(REAL_BUILD_DIR, 'assets')).filter((name) => name.startsWith('plotly') && name.endsWith('.js'));
    expect(plotlyFiles.length, 'a plotly*.js file in dist/client/assets').toBe(1);
    const plotlyFile = plotlyFiles[0] ?? '';
    // The client's own scripts import it by a relative name, which the browser resolves under /assets/.
    const scripts = referencedFiles(build.indexBytes.toString('utf8')).filter((file) => file.endsWith('.js'));
    const imported = scripts.some((file) => readFileSync(join(REAL_BUILD_DIR, file), 'utf8').includes(`./${plotlyFile}`));
    expect(imported, `a script of index.html imports ./${plotlyFile}`).toBe(true);
    const response = await request(harness.app).get(`/assets/${plotlyFile}`).responseType('blob');
    expect(response.status).toBe(200);
    expect(response.headers['content-type']).toMatch(/^(text|application)\/javascript/);
    expect(String(response.headers['cache-control'])).toContain('immutable');
    const bytes = bytesOf(response.body);
    expect(bytes.equals(readFileSync(join(REAL_BUILD_DIR, 'assets', plotlyFile)))).toBe(true);
    // plotly.js's own API names, as its documentation spells them (a bundled copy, not a stub).
    expect(bytes.toString('utf8')).toMatch(/newPlot/);
    expect(bytes.toString('utf8')).toMatch(/relayout/);
  });
});
