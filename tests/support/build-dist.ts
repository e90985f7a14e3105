import { execFileSync } from 'node:child_process';

/**
 * Global setup of the server tests: compile src/ and server/ into dist/ first, because the
 * simulation worker thread and the `npx syncring` command run the compiled code, and a stale
 * build would test yesterday's code.
 */
export default function setup(): void {
  const root = new URL('../../', import.meta.url).pathname;
  execFileSync('npx', ['tsc', '-p', 'tsconfig.build.json'], { cwd: root, stdio: 'inherit', timeout: 300_000 });
}
