/**
 * The browser client: its pages and its built files.
 *
 * - Pages: `/`, `/surveys/:id`, `/surveys/:id/revisions/:n` and `/surveys/:id/revisions/:n/report`
 *   answer a browser (a request that prefers HTML) with the client's `index.html`, which reads the
 *   path itself; so every survey and revision has a URL a colleague can open. A script asking `/`
 *   for JSON still gets the service index (next router).
 * - Built files: `/assets/…`, plotly.js among them (bundled from its npm package by the client
 *   build: no CDN, so the page works on an office network without internet). File names carry a
 *   content hash, so they are cached for a year.
 * - When the client has not been built, a browser gets a 503 page that says how to build it; the
 *   API is unaffected.
 * Nothing from the request becomes a path except through `express.static`, which refuses `..`.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import express, { Router, type Request } from 'express';
import type { RouteContext } from './context.js';

/** Paths of the client's pages (the client routes on them itself). */
export const CLIENT_PAGE_PATHS: readonly string[] = [
  '/',
  '/surveys/:id',
  '/surveys/:id/revisions/:number',
  '/surveys/:id/revisions/:number/report',
];

/**
 * Where the built client is: `dist/client/`, found from this module — beside the compiled server
 * (`dist/server/routes/…js`), or at the project root when the server runs from its TypeScript
 * sources (tests). The client's own sources in `client/` are never served.
 */
export function builtClientDir(): string {
  const compiled = import.meta.url.endsWith('.js');
  return fileURLToPath(new URL(compiled ? '../../client/' : '../../dist/client/', import.meta.url));
}

const NOT_BUILT_PAGE = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>slopebreak: client not built</title></head>
<body><h1>The browser client has not been built</h1>
<p>The service and its API are running, but the pages of the browser client are missing.
Build them with <code>npm run build:client</code> (or <code>npm run build</code>) and reload this page.</p>
<p>The API answers at <a href="/api">/api</a>.</p></body></html>
`;

function prefersHtml(request: Request): boolean {
  return request.accepts(['application/json', 'text/html']) === 'text/html';
}

export function clientRoutes(context: RouteContext): Router {
  const clientDir = context.config.clientDir ?? builtClientDir();
  const indexFile = join(clientDir, 'index.html');
  const router = Router();

  router.use('/assets', express.static(join(clientDir, 'assets'), { immutable: true, maxAge: '365d', index: false, redirect: false, fallthrough: true }));

  router.get(CLIENT_PAGE_PATHS as string[], (request, response, next) => {
    // The same path answers HTML or JSON by Accept: caches must keep the two apart.
    response.vary('Accept');
    if (!prefersHtml(request)) {
      next();
      return;
    }
    // Read on each request: a rebuilt client is served without restarting, and the page is small.
    // Missing or unreadable (a rebuild empties the folder for a moment): the 503 page, not a 500.
    let page: Buffer;
    try {
      page = readFileSync(indexFile);
    } catch {
      response.status(503).set('Cache-Control', 'no-store').type('html').send(NOT_BUILT_PAGE);
      return;
    }
    response.set('Cache-Control', 'no-cache').type('html').send(page);
  });

  return router;
}
