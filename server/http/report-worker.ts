import { parentPort } from 'node:worker_threads';
import { reportHtml } from '../report/html.js';
import { loadReportData } from '../report/report-data.js';
import { UsageError } from '../usage-error.js';
import { HttpError } from './http-error.js';
import type { WorkerReply } from './worker-client.js';

/**
 * Worker-thread home of on-demand soak reports (a running soak has no report.html yet, or an
 * old one): reading a long soak's log and drawing its plots takes long enough to delay frames.
 * In: {id, dir}. Out: {id, ok: true, value: the HTML} or {id, ok: false, error: HttpErrorData}
 * (404 when the folder holds no soak, as `syncring report` would say, 500 otherwise).
 */
export interface ReportRequest {
  dir: string;
}

if (!parentPort) throw new Error('report-worker must run in a worker thread');
const port = parentPort;

port.on('message', ({ id, dir }: ReportRequest & { id: number }) => {
  let reply: WorkerReply<string>;
  try {
    reply = { id, ok: true, value: reportHtml(loadReportData(dir)) };
  } catch (error) {
    const message = (error as Error).message;
    const failure =
      error instanceof UsageError ? new HttpError(404, message) : new HttpError(500, `the report could not be made: ${message}`);
    reply = { id, ok: false, error: failure.toData() };
  }
  port.postMessage(reply);
});
