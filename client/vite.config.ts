/**
 * Build of the browser client: TypeScript and CSS from `client/` into `dist/client/`, which the
 * server serves (server/routes/client-pages.ts). plotly.js comes from its npm package and is
 * loaded as its own chunk (a dynamic import): the page needs nothing from the internet.
 */
import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vite';

export default defineConfig({
  root: fileURLToPath(new URL('.', import.meta.url)),
  base: '/',
  logLevel: 'warn',
  build: {
    outDir: fileURLToPath(new URL('../dist/client/', import.meta.url)),
    emptyOutDir: true,
    target: 'es2022',
    chunkSizeWarningLimit: 6000,
    sourcemap: false,
  },
});
