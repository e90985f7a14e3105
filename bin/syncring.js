#!/usr/bin/env node
// Entry point of the `syncring` command: runs the compiled CLI (built by `npm ci` / `npm run build`).
import { existsSync } from 'node:fs';

const cli = new URL('../dist/server/cli.js', import.meta.url);
if (!existsSync(cli)) {
  process.stderr.write('syncring: the project is not built yet; run `npm run build` (npm ci does it for you)\n');
  process.exit(2);
}
const { main } = await import(cli.href);
const code = await main(process.argv.slice(2));
if (code >= 0) process.exitCode = code;
