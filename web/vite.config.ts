import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vite';

/**
 * Dashboard build: web/ is the root, the bundle goes to dist/web where the server serves it.
 * During `vite dev` the API and the WebSocket are proxied to a server on SYNCRING_DEV_SERVER.
 * The built page must run under the server's Content Security Policy (README "Security"):
 * no inline script (no module preload polyfill, which vite would put into the page) and no
 * asset inlined as a data: URL.
 */
const devServer = process.env.SYNCRING_DEV_SERVER ?? 'http://127.0.0.1:8080';

export default defineConfig({
  root: fileURLToPath(new URL('.', import.meta.url)),
  base: './',
  build: {
    outDir: '../dist/web',
    emptyOutDir: true,
    target: 'es2022',
    sourcemap: true,
    chunkSizeWarningLimit: 800,
    modulePreload: { polyfill: false },
    assetsInlineLimit: 0,
  },
  server: {
    proxy: {
      '/api': devServer,
      '/ws': { target: devServer.replace(/^http/, 'ws'), ws: true },
    },
  },
});
