import { renameSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Frame } from '../../src/session/session.js';

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

/** The end-of-run picture in the form `syncring simulate` prints it (without the state, kept apart). */
export function finalOf(frame: Frame): Record<string, unknown> {
  const p = frame.full.pattern;
  const g = frame.guide.pattern;
  return {
    tau: frame.tau,
    status: frame.status,
    pattern: {
      kind: p.kind,
      ...(p.q !== undefined && p.kind !== 'unlocked' ? { q: p.q } : {}),
      locked: p.locked,
      lockedSince: p.lockedSince,
      carryingMode: p.mode,
      shape: p.shape,
      symmetry: p.symmetry.map(({ element, phase }) => ({ element, phase })),
    },
    phaseDifferences: frame.full.phaseDifferences,
    amplitudes: frame.full.amplitude,
    guide: {
      pattern: { kind: g.kind, ...(g.q !== undefined && g.kind !== 'unlocked' ? { q: g.q } : {}), locked: g.locked, carryingMode: g.mode },
      margin: frame.guide.margin,
      stable: frame.guide.margin === null ? null : frame.guide.margin < 0,
      phaseDifferences: frame.guide.phaseDifferences,
      amplitudes: frame.guide.amplitude,
    },
    divergence: frame.divergence,
  };
}
