import { renameSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

/** Files a soak keeps beside its log, each replaced atomically (write to a temporary name, rename). */
export const SUMMARY_FILE = 'summary.json';
export const STATUS_FILE = 'status.json';
export const RESUMES_FILE = 'resumes.json';

export function writeJsonAtomically(dir: string, name: string, value: unknown): string {
  const path = join(dir, name);
  const temporary = `${path}.${process.pid}.tmp`;
  writeFileSync(temporary, `${JSON.stringify(value, null, 2)}\n`);
  renameSync(temporary, path);
  return path;
}

