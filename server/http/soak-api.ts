import { existsSync, readFileSync, type Stats } from 'node:fs';
import { readdir, readFile, stat } from 'node:fs/promises';
import { join, resolve } from 'node:path';
import type { Express } from 'express';
import type { FaultVerdict } from '../../src/campaign/index.js';
import {
  REPORT_FILE,
  SOAK_ERR,
  START_FILE,
  STATUS_FILE,
  SUMMARY_FILE,
  readSoakStatus,
  readSoakSummary,
  readStartRecord,
  verdictRowOf,
  type SoakListing,
  type SoaksResponse,
  type StartRecord,
} from '../../src/protocol/soak-files.js';
import { SAFE_NAME, processAlive, stateOf } from '../soak/soak-folder.js';
import type { ReportRequest } from './report-worker.js';
import { BackgroundWorker, compiledHttpWorker } from './worker-client.js';
import { httpErrorOf } from './http-error.js';
import { VerdictTail } from './verdict-tail.js';
import { useReportPolicy } from './security-headers.js';
import { asServed, SERVED_SOAKS_DIR } from './served-paths.js';
import { sourceOf } from '../request-source.js';

/**
 * Soaks for the dashboard, read from the folders `syncring soak --out` writes under one soaks
 * folder (default ./soaks):
 *   GET /api/soaks                  every soak folder with its progress (status.json) and, once
 *                                   finished, its result (summary.json): verdicts, pass
 *   GET /soaks/NAME/report.html     the soak's report: report.html when it is up to date, else
 *                                   made on demand from the log (in a worker thread)
 * Starting, stopping and resuming soaks from the dashboard is soak-control.ts; it leaves
 * START_FILE in the folders it starts, which the listing reads for `launch`. What they send
 * names the soaks folder as it is served (`soaks`, served-paths.ts), never its place on disk.
 */

/** Newest verdicts listed per soak (a long random campaign judges thousands). */
const VERDICTS_LISTED = 200;

/** A report of a long soak is read from its whole log: more work than a prediction, so a longer budget. */
const REPORT_BUDGET_MS = 120_000;

export function registerSoakApi(app: Express, soaksDir: string): { close(): Promise<void> } {
  const root = resolve(soaksDir);
  const worker = new BackgroundWorker<ReportRequest, string>(compiledHttpWorker('report-worker'), 'report', {
    timeBudgetMs: REPORT_BUDGET_MS,
    overrunAdvice: 'make it with `syncring report` on the server',
  });
  const served = (text: string) => asServed(text, root);
  const reader = new JsonFileCache();
  const tails = new Map<string, VerdictTail>();
  const tailOf = (dir: string): VerdictTail => {
    let tail = tails.get(dir);
    if (!tail) tails.set(dir, (tail = new VerdictTail(dir)));
    return tail;
  };

  app.get('/api/soaks', async (_req, res) => {
    if (!existsSync(root)) {
      res.json({
        dir: SERVED_SOAKS_DIR,
        soaks: [],
        note: `no soaks folder yet: soaks written with --out ${SERVED_SOAKS_DIR}/NAME (in the soaks folder syncring serve printed at start-up) show up here`,
      } satisfies SoaksResponse);
      return;
    }
    const names = (await readdir(root, { withFileTypes: true }))
      .filter((d) => d.isDirectory() && SAFE_NAME.test(d.name))
      .map((d) => d.name);
    const soaks = (await Promise.all(names.map((name) => listSoak(root, name, reader, tailOf)))).filter(
      (s): s is SoakListing => s !== null,
    );
    soaks.sort((a, b) => b.updatedAt.localeCompare(a.updatedAt) || a.name.localeCompare(b.name));
    for (const soak of soaks) soak.problems = soak.problems.map(served);
    res.json({ dir: SERVED_SOAKS_DIR, soaks } satisfies SoaksResponse);
  });

  app.get('/soaks/:name/report.html', async (req, res) => {
    const name = req.params.name;
    const dir = join(root, name);
    if (!SAFE_NAME.test(name) || !existsSync(dir)) {
      res
        .status(404)
        .type('text/plain')
        .send(`no soak named ${JSON.stringify(name)} in ${SERVED_SOAKS_DIR}\n`);
      return;
    }
    const file = join(dir, REPORT_FILE);
    const [report, summary] = await Promise.all([statOrNull(file), statOrNull(join(dir, SUMMARY_FILE))]);
    const upToDate = report !== null && summary !== null && report.mtimeMs >= summary.mtimeMs;
    try {
      // read rather than sent as a file: the page names the soak's folder, which is shown as served
      const html = upToDate ? await readFile(file, 'utf8') : await worker.request({ dir }, sourceOf(req.socket.remoteAddress));
      if (!upToDate) res.set('Cache-Control', 'no-store');
      useReportPolicy(res);
      res.type('html').send(served(html));
    } catch (error) {
      const answer = httpErrorOf(error);
      res
        .status(answer.status)
        .type('text/plain')
        .send(`${served(answer.message)}\n`);
    }
  });

  return { close: () => worker.close() };
}

async function listSoak(
  root: string,
  name: string,
  reader: JsonFileCache,
  tailOf: (dir: string) => VerdictTail,
): Promise<SoakListing | null> {
  const dir = join(root, name);
  const problems: string[] = [];
  const read = async <T>(file: string, narrow: (value: unknown) => T | null, what: string): Promise<T | null> => {
    try {
      const value = await reader.read(join(dir, file));
      if (value === null) return null;
      const narrowed = narrow(value);
      if (narrowed === null) problems.push(`${file}: not ${what}`);
      return narrowed;
    } catch (error) {
      problems.push(`${file}: ${(error as Error).message}`);
      return null;
    }
  };
  const [status, summary, start, report] = await Promise.all([
    read(STATUS_FILE, readSoakStatus, 'a soak status'),
    read(SUMMARY_FILE, readSoakSummary, 'a soak summary'),
    read(START_FILE, readStartRecord, 'a soak start record'),
    statOrNull(join(dir, REPORT_FILE)),
  ]);
  if (!status && !summary && !start && problems.length === 0) return null;
  const launch = start ? launchOf(start) : null;
  const state = stateOf({ status, summary, start });
  if (state === 'unknown' && launch && !status && !summary)
    problems.push(`the soak process ended before its first status: ${lastLine(join(dir, SOAK_ERR)) ?? `${SOAK_ERR} is empty`}`);
  // Until the summary exists, the log has the full verdicts (status.json only ids and outcomes).
  let running: FaultVerdict[] = [];
  if (!summary) {
    try {
      running = await tailOf(dir).read();
    } catch (error) {
      problems.push(`log: ${(error as Error).message}`);
    }
  }
  const verdicts = summary?.verdicts ?? (running.length > 0 ? running : null);
  const rows = verdicts ? verdicts.map(verdictRowOf) : (status?.verdicts ?? []);
  const nominal = summary?.timeBase ?? status;
  return {
    name,
    state,
    progress: status
      ? {
          tau: status.tau,
          until: status.until,
          slowTime: status.slowTime,
          slowUntil: status.slowUntil,
          fraction: status.fraction,
          eta: status.eta,
          wallSeconds: status.wallSeconds,
        }
      : null,
    faults: status?.faults ?? null,
    pass: summary?.pass ?? null,
    exitCode: summary?.exitCode ?? null,
    scenario: summary?.scenario ?? null,
    campaign: summary?.campaign ?? null,
    epsilon: summary?.timeBase.epsilon ?? (status && status.tau ? status.slowTime / status.tau : null),
    nominalFrequency:
      nominal && typeof nominal.nominalFrequencyHz === 'number'
        ? { hz: nominal.nominalFrequencyHz, assumed: nominal.nominalFrequencyAssumed === true }
        : null,
    verdicts: rows.slice(-VERDICTS_LISTED),
    verdictsTotal: rows.length,
    updatedAt: status?.updatedAt ?? new Date(0).toISOString(),
    report: { url: `soaks/${encodeURIComponent(name)}/report.html`, file: report !== null },
    launch,
    problems,
  };
}

function launchOf(start: StartRecord): SoakListing['launch'] {
  return {
    scenario: start.scenario,
    campaign: start.campaign,
    untilSlow: start.untilSlow,
    pace: start.pace,
    runs: start.runs.length,
    alive: processAlive(start.pid),
  };
}

/** The last non-empty line of a small text file (a soak's stderr), or null. */
function lastLine(path: string): string | null {
  try {
    const lines = readFileSync(path, 'utf8')
      .slice(-4000)
      .split('\n')
      .map((l) => l.trim())
      .filter(Boolean);
    return lines.at(-1) ?? null;
  } catch {
    return null;
  }
}

async function statOrNull(path: string): Promise<Stats | null> {
  try {
    return await stat(path);
  } catch {
    return null;
  }
}

/**
 * JSON files parsed once per version (size and modification time): a finished soak's summary
 * holds its whole final state and stability tables, and every open dashboard polls the list.
 */
class JsonFileCache {
  private readonly parsed = new Map<string, { mtimeMs: number; size: number; value: Record<string, unknown> }>();

  /** The file's object, or null when it does not exist; throws with the reason when it is not JSON. */
  async read(path: string): Promise<Record<string, unknown> | null> {
    const info = await statOrNull(path);
    if (!info) {
      this.parsed.delete(path);
      return null;
    }
    const hit = this.parsed.get(path);
    if (hit && hit.mtimeMs === info.mtimeMs && hit.size === info.size) return hit.value;
    let value: unknown;
    try {
      value = JSON.parse(await readFile(path, 'utf8'));
    } catch (error) {
      throw new Error(`not readable as JSON (${(error as Error).message})`, { cause: error });
    }
    if (value === null || typeof value !== 'object' || Array.isArray(value)) throw new Error('not a JSON object');
    this.parsed.set(path, { mtimeMs: info.mtimeMs, size: info.size, value: value as Record<string, unknown> });
    return value as Record<string, unknown>;
  }
}
