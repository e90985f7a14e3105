import type { ReportOptions } from '../report/report-data.js';
import { writeReport } from '../report/write-report.js';

/** `syncring report DIR`: write DIR/report.html (or FILE) from a soak's summary and log, with an optional overlay; returns the path. */
export function report(dir: string, out?: string, options: ReportOptions = {}): string {
  return writeReport(dir, out, options);
}
