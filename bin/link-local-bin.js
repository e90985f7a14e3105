#!/usr/bin/env node
// npx resolves commands from node_modules/.bin, which never holds the root package's own bin.
// Link it there (run by `npm ci` through the prepare script) so `npx syncring` works in a checkout.
import { mkdirSync, rmSync, symlinkSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

const binDir = fileURLToPath(new URL('../node_modules/.bin/', import.meta.url));
mkdirSync(binDir, { recursive: true });
rmSync(`${binDir}syncring`, { force: true });
symlinkSync('../../bin/syncring.js', `${binDir}syncring`);
