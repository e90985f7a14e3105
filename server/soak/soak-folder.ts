import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import {
  START_FILE,
  STATUS_FILE,
  SUMMARY_FILE,
  readSoakStatus,
  readSoakSummary,
  readStartRecord,
  type SoakState,
  type SoakStatus,
  type SoakSummary,
  type StartRecord,
} from '../../src/protocol/soak-files.js';

/** Names a soak folder may have: no path separators, no leading dot. */
export const SAFE_NAME = /^[A-Za-z0-9][A-Za-z0-9._-]*$/;

/** The three files that say what a soak folder is doing, each narrowed to its format (null: absent or not one). */
export interface SoakFiles {
  status: SoakStatus | null;
  summary: SoakSummary | null;
  start: StartRecord | null;
}

/** Reads a folder's files synchronously (for the control endpoints; the listing caches its reads). */
export function readSoakFiles(dir: string): SoakFiles {
  return {
    status: readSoakStatus(readJsonFile(join(dir, STATUS_FILE))),
    summary: readSoakSummary(readJsonFile(join(dir, SUMMARY_FILE))),
    start: readStartRecord(readJsonFile(join(dir, START_FILE))),
  };
}

function readJsonFile(path: string): unknown {
  try {
    return JSON.parse(readFileSync(path, 'utf8'));
  } catch {
    return null;
  }
}

/**
 * A soak whose status says running but whose process is gone was killed: it can be resumed.
 * A dashboard-started soak whose newest process is up but has not written status.json yet (just
 * started, or resumed over the status of the killed process) is starting.
 */
export function stateOf({ status, summary, start }: SoakFiles): SoakState {
  const launching = start !== null && start.pid !== status?.pid && processAlive(start.pid);
  if (status?.state === 'running') {
    if (!processAlive(status.pid)) return launching ? 'starting' : 'interrupted';
    return 'running';
  }
  if (status) return status.state;
  if (summary) return summary.status === 'halted' ? 'halted' : 'finished';
  return launching ? 'starting' : 'unknown';
}

export function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM';
  }
}
