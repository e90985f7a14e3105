/**
 * At the end of a soak, each analysed stability series as plain two-column text beside the log:
 * DIR/series/NAME.txt with t (s, from the start of the stability record) and the time error x
 * (s), a '#' header saying what it is. `syncring stability DIR/series/ensemble.txt` reads it back
 * (README, "Stability statistics").
 */
import { mkdirSync, renameSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { SERIES_LABELS, timeErrorOf, type PhaseSample, type StabilityReport } from '../../src/campaign/index.js';
import { SERIES_FOLDER } from '../../src/protocol/soak-files.js';
import { formatDataText } from '../../src/stability/index.js';

/** Writes DIR/series/NAME.txt for every series of the report; returns the paths (none without a report). */
export function exportStabilitySeries(out: string, samples: readonly PhaseSample[], stability: StabilityReport | null): string[] {
  if (!stability) return [];
  const dir = join(out, SERIES_FOLDER);
  mkdirSync(dir, { recursive: true });
  return stability.series.map((s) => {
    const x = timeErrorOf(samples, s.name, s.points, stability.nominalFrequencyHz);
    const t = Array.from(x, (_, i) => i * stability.tau0);
    const header = [
      `syncring soak series ${s.name}: ${SERIES_LABELS[s.name]}`,
      `time error x = (phi - phi_start) / (2 pi f0), f0 = ${stability.nominalFrequencyHz} Hz; stability record from tau ${stability.startTau}`,
      `${s.points} samples every ${stability.tau0} s; read with: syncring stability FILE --type phase`,
      'columns: t (s)  x (s)',
    ];
    const path = join(dir, `${s.name}.txt`);
    const temporary = `${path}.${process.pid}.tmp`;
    writeFileSync(temporary, formatDataText(header, t, x));
    renameSync(temporary, path);
    return path;
  });
}
