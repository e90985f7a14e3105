import { writeReport } from '../report/write-report.js';

/** `syncring report DIR`: write DIR/report.html (or FILE) from a soak's summary and log; returns the path. */
export function report(dir: string, out?: string): string {
  return writeReport(dir, out);
}
