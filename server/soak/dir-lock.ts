import { closeSync, openSync, readFileSync, unlinkSync, writeSync } from 'node:fs';
import { join } from 'node:path';
import { UsageError } from '../usage-error.js';

/**
 * One soak per folder: DIR/soak.lock holds the writer's pid. A lock whose process is gone (a
 * killed soak) is stale and taken over; a live one makes the second soak refuse, because two
 * writers on one log would interleave their lines.
 */
export function lockSoakDir(dir: string): () => void {
  return lockFolder(dir, 'soak');
}

/** The same lock for any run that owns a folder (`kind` names it: DIR/KIND.lock, "in use by another KIND"). */
export function lockFolder(dir: string, kind: string): () => void {
  const path = join(dir, `${kind}.lock`);
  for (let attempt = 0; attempt < 2; attempt++) {
    try {
      const fd = openSync(path, 'wx');
      writeSync(fd, `${process.pid}\n`);
      closeSync(fd);
      return () => {
        try {
          unlinkSync(path);
        } catch {
          // already gone
        }
      };
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code !== 'EEXIST') throw error;
      const holder = Number(readFileSync(path, 'utf8').trim());
      if (Number.isInteger(holder) && holder > 0 && holder !== process.pid && isAlive(holder)) {
        throw new UsageError(
          `${dir} is in use by another ${kind} (pid ${holder}); wait for it or stop it first (remove ${path} if no ${kind} is running there)`,
        );
      }
      unlinkSync(path);
    }
  }
  throw new UsageError(`${dir}: cannot take the ${kind} lock ${path}`);
}

function isAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM';
  }
}
