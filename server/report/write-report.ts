import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { reportHtml } from './html.js';
import { loadReportData, type ReportOptions } from './report-data.js';

/** Write the soak report of folder `dir` to `out` (default DIR/report.html); returns the path. */
export function writeReport(dir: string, out?: string, options: ReportOptions = {}): string {
  const path = out ?? join(dir, 'report.html');
  writeFileSync(path, reportHtml(loadReportData(dir, options)));
  return path;
}
