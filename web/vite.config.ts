import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vite';

/**
 * Dashboard build: web/ is the root, the bundle goes to dist/web where the server serves it.
 * During `vite dev` the API and the WebSocket are proxied to a server on SYNCRING_DEV_SERVER.
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
  },
  server: {
    proxy: {
      '/api': devServer,
      '/ws': { target: devServer.replace(/^http/, 'ws'), ws: true },
    },
  },
});
