import { existsSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

/** The nearest package.json above this module (works from server/ and from dist/server/). */
function findPackageJson(): string {
  let dir = dirname(fileURLToPath(import.meta.url));
  while (!existsSync(join(dir, 'package.json'))) {
    const parent = dirname(dir);
    if (parent === dir) throw new Error('package.json not found above the server code');
    dir = parent;
  }
  return join(dir, 'package.json');
}

/** The package version, read once. */
export const SOFTWARE_VERSION: string = (JSON.parse(readFileSync(findPackageJson(), 'utf8')) as { version: string }).version;
