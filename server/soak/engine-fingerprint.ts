import { createHash } from 'node:crypto';
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';

/**
 * A hash of the engine's code as it runs (every .js or .ts file under src/, next to this
 * server folder). A soak resumed under other engine code continues, but not bit for bit; the
 * header keeps the hash so the resume can say so before the replay check finds the differences.
 */
export function engineFingerprint(): string {
  const here = dirname(fileURLToPath(import.meta.url));
  const src = join(here, '..', '..', 'src');
  const hash = createHash('sha256');
  const walk = (dir: string): void => {
    let entries;
    try {
      entries = readdirSync(dir, { withFileTypes: true }).sort((a, b) => a.name.localeCompare(b.name));
    } catch {
      return;
    }
    for (const entry of entries) {
      const path = join(dir, entry.name);
      if (entry.isDirectory()) walk(path);
      else if (/\.(js|ts|json)$/.test(entry.name) && !entry.name.endsWith('.map')) {
        hash.update(relative(src, path));
        hash.update(readFileSync(path));
      }
    }
  };
  walk(src);
  return hash.digest('hex').slice(0, 16);
}
