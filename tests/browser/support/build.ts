import { execFileSync } from 'node:child_process';
import { existsSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

export const ROOT = fileURLToPath(new URL('../../../', import.meta.url));
const BUILT_PAGE = join(ROOT, 'dist/web/index.html');

/** Newest modification time under a folder (the dashboard sources and the shared protocol). */
function newest(path: string): number {
  const stat = statSync(path);
  if (!stat.isDirectory()) return stat.mtimeMs;
  return readdirSync(path).reduce((latest, name) => Math.max(latest, newest(join(path, name))), stat.mtimeMs);
}

/**
 * Compile src/ and server/ into dist/ when the build is missing or older than the sources: the
 * server runs its simulation in a worker thread loaded from dist/, even when the server itself
 * is imported from the TypeScript sources.
 */
export function ensureServerCompiled(): void {
  const worker = join(ROOT, 'dist/server/live/session-worker.js');
  const sources = Math.max(newest(join(ROOT, 'src')), newest(join(ROOT, 'server')));
  if (existsSync(worker) && statSync(worker).mtimeMs >= sources) return;
  execFileSync('npx', ['tsc', '-p', 'tsconfig.build.json'], { cwd: ROOT, stdio: 'inherit', timeout: 170_000 });
}

/**
 * Build the dashboard with vite when dist/web is missing or older than its sources, so the
 * browser tests always exercise the code in the tree and not a stale bundle.
 */
export function ensureDashboardBuilt(): void {
  const sources = Math.max(newest(join(ROOT, 'web')), newest(join(ROOT, 'src/protocol')));
  if (existsSync(BUILT_PAGE) && statSync(BUILT_PAGE).mtimeMs >= sources) return;
  execFileSync('npx', ['vite', 'build', '--config', 'web/vite.config.ts', '--logLevel', 'warn'], {
    cwd: ROOT,
    stdio: 'inherit',
    timeout: 170_000,
  });
}
