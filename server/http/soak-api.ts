import { existsSync, readFileSync, type Stats } from 'node:fs';
import { readdir, readFile, stat } from 'node:fs/promises';
import { join, resolve } from 'node:path';
import type { Express } from 'express';
import type { FaultVerdict } from '../../src/campaign/index.js';
import { STATUS_FILE, SUMMARY_FILE } from '../soak/outputs.js';
import type { ReportRequest } from './report-worker.js';
import { BackgroundWorker, WorkerRequestError, compiledHttpWorker } from './worker-client.js';
import { VerdictTail } from './verdict-tail.js';

/**
 * Soaks for the dashboard, read from the folders `syncring soak --out` writes under one soaks
 * folder (default ./soaks):
 *   GET /api/soaks                  every soak folder with its progress (status.json) and, once
 *                                   finished, its result (summary.json): verdicts, pass
 *   GET /soaks/NAME/report.html     the soak's report: report.html when it is up to date, else
 *                                   made on demand from the log (in a worker thread)
 * Starting, stopping and resuming soaks from the dashboard is soak-control.ts; it leaves
 * START_FILE in the folders it starts, which the listing reads for `launch`.
 */

/** 'starting': launched from the dashboard, its process is up but has not written status.json yet. */
export type SoakState = 'starting' | 'running' | 'finished' | 'halted' | 'interrupted' | 'unknown';

/** Written by soak-control.ts into the folder of a soak started from the dashboard. */
export const START_FILE = 'start.json';

/** What START_FILE holds: the arguments of the soak, so that it can be resumed, and its processes. */
export interface StartRecord {
  format: 'syncring-soak-start';
  formatVersion: 1;
  scenario: string;
  campaign: string;
  /** End of the soak in slow time units, as asked for, and in tau, as passed to --until. */
  untilSlow: number;
  until: number;
  epsilon: number;
  pace: number | null;
  /** The `syncring soak` arguments (without --resume and --pace). */
  args: string[];
  /** The newest process; one entry per start and resume. */
  pid: number;
  runs: { pid: number; at: string; resume: boolean; pace: number | null }[];
}

/** One row of the verdict table: the verdict without the raw perturbation records. */
export const VERDICT_ROW_FIELDS = [
  'id', 'source', 'action', 'appliedAt', 'restoredAt', 'before', 'persisted', 'slipped', 'maxPhaseExcursion', 'shift', 'settled', 'settledAfter', 'fromContinued',
  'became', 'recovered', 'timeToRelock', 'final', 'divergence', 'prediction', 'cutShort', 'complete', 'outcome', 'pass', 'reasons', 'notes',
] as const satisfies readonly (keyof FaultVerdict)[];
export type VerdictRow = Pick<FaultVerdict, (typeof VERDICT_ROW_FIELDS)[number]>;

export interface SoakListing {
  name: string;
  state: SoakState;
  progress: { tau: number; until: number; slowTime: number; slowUntil: number; fraction: number; eta: string; wallSeconds: number } | null;
  faults: { started: number; judged: number; failed: number; incomplete?: number } | null;
  /** From summary.json, once the soak has finished. */
  pass: boolean | null;
  exitCode: number | null;
  scenario: string | null;
  campaign: string | null;
  epsilon: number | null;
  /** What the soak's seconds rest on: its scenario's nominal frequency, or the default it assumed (null: not known yet). */
  nominalFrequency: { hz: number; assumed: boolean } | null;
  verdicts: VerdictRow[];
  verdictsTotal: number;
  updatedAt: string;
  report: { url: string; file: boolean };
  /** Started from the dashboard (START_FILE): what with, how often, and whether its newest process is up. */
  launch: { scenario: string; campaign: string; untilSlow: number; pace: number | null; runs: number; alive: boolean } | null;
  problems: string[];
}

/** Newest verdicts listed per soak (a long random campaign judges thousands). */
const VERDICTS_LISTED = 200;
export const SAFE_NAME = /^[A-Za-z0-9][A-Za-z0-9._-]*$/;

export function registerSoakApi(app: Express, soaksDir: string): { close(): Promise<void> } {
  const root = resolve(soaksDir);
  const worker = new BackgroundWorker<ReportRequest, string>(compiledHttpWorker('report-worker'), 'report');
  const reader = new JsonFileCache();
  const tails = new Map<string, VerdictTail>();
  const tailOf = (dir: string): VerdictTail => {
    let tail = tails.get(dir);
    if (!tail) tails.set(dir, (tail = new VerdictTail(dir)));
    return tail;
  };

  app.get('/api/soaks', async (_req, res) => {
    if (!existsSync(root)) {
      res.json({ dir: root, soaks: [], note: `no soaks folder yet: soaks written with --out ${join(root, 'NAME')} show up here` });
      return;
    }
    const names = (await readdir(root, { withFileTypes: true })).filter((d) => d.isDirectory() && SAFE_NAME.test(d.name)).map((d) => d.name);
    const soaks = (await Promise.all(names.map((name) => listSoak(root, name, reader, tailOf)))).filter((s): s is SoakListing => s !== null);
    soaks.sort((a, b) => b.updatedAt.localeCompare(a.updatedAt) || a.name.localeCompare(b.name));
    res.json({ dir: root, soaks });
  });

  app.get('/soaks/:name/report.html', async (req, res) => {
    const name = req.params.name;
    const dir = join(root, name);
    if (!SAFE_NAME.test(name) || !existsSync(dir)) {
      res.status(404).type('text/plain').send(`no soak named ${JSON.stringify(name)} in ${root}\n`);
      return;
    }
    const file = join(dir, 'report.html');
    const [report, summary] = await Promise.all([statOrNull(file), statOrNull(join(dir, SUMMARY_FILE))]);
    if (report && summary && report.mtimeMs >= summary.mtimeMs) {
      res.sendFile(file);
      return;
    }
    try {
      res.set('Cache-Control', 'no-store').type('html').send(await worker.request({ dir }));
    } catch (error) {
      const status = error instanceof WorkerRequestError ? error.status : 500;
      res.status(status).type('text/plain').send(`${(error as Error).message}\n`);
    }
  });

  return { close: () => worker.close() };
}

async function listSoak(root: string, name: string, reader: JsonFileCache, tailOf: (dir: string) => VerdictTail): Promise<SoakListing | null> {
  const dir = join(root, name);
  const problems: string[] = [];
  const read = async (file: string): Promise<Record<string, unknown> | null> => {
    try {
      return await reader.read(join(dir, file));
    } catch (error) {
      problems.push(`${file}: ${(error as Error).message}`);
      return null;
    }
  };
  const [status, summary, start, report] = await Promise.all([read(STATUS_FILE), read(SUMMARY_FILE), read(START_FILE), statOrNull(join(dir, 'report.html'))]);
  if (!status && !summary && !start && problems.length === 0) return null;
  const launch = start ? launchOf(start as unknown as StartRecord) : null;
  const state = stateOf(status, summary, start as unknown as StartRecord | null);
  if (state === 'unknown' && launch && !status && !summary) problems.push(`the soak process ended before its first status: ${lastLine(join(dir, 'soak.err')) ?? 'soak.err is empty'}`);
  // Until the summary exists, the log has the full verdicts (status.json only ids and pass).
  let running: FaultVerdict[] = [];
  if (!summary) {
    try {
      running = await tailOf(dir).read();
    } catch (error) {
      problems.push(`log: ${(error as Error).message}`);
    }
  }
  const allVerdicts = ((summary?.verdicts ?? (running.length > 0 ? running : status?.verdicts) ?? []) as FaultVerdict[]).filter((v) => v && typeof v === 'object');
  const timeBase = summary?.timeBase as { epsilon?: number } | undefined;
  const slowTime = num(status?.slowTime);
  const tau = num(status?.tau);
  return {
    name,
    state,
    progress:
      status && tau !== null
        ? {
            tau,
            until: num(status.until) ?? 0,
            slowTime: slowTime ?? 0,
            slowUntil: num(status.slowUntil) ?? 0,
            fraction: num(status.fraction) ?? 0,
            eta: typeof status.eta === 'string' ? status.eta : '--',
            wallSeconds: num(status.wallSeconds) ?? 0,
          }
        : null,
    faults: status?.faults && typeof status.faults === 'object' ? (status.faults as SoakListing['faults']) : null,
    pass: typeof summary?.pass === 'boolean' ? summary.pass : null,
    exitCode: num(summary?.exitCode),
    scenario: typeof summary?.scenario === 'string' ? summary.scenario : null,
    campaign: typeof summary?.campaign === 'string' ? summary.campaign : null,
    epsilon: num(timeBase?.epsilon) ?? (slowTime !== null && tau ? slowTime / tau : null),
    nominalFrequency: nominalFrequencyOf(summary?.timeBase) ?? nominalFrequencyOf(status),
    verdicts: allVerdicts.slice(-VERDICTS_LISTED).map(verdictRow),
    verdictsTotal: allVerdicts.length,
    updatedAt: typeof status?.updatedAt === 'string' ? status.updatedAt : new Date(0).toISOString(),
    report: { url: `soaks/${encodeURIComponent(name)}/report.html`, file: report !== null },
    launch,
    problems,
  };
}

/**
 * A soak whose status says running but whose process is gone was killed: it can be resumed.
 * A dashboard-started soak whose newest process is up but has not written status.json yet (just
 * started, or resumed over the status of the killed process) is starting.
 */
export function stateOf(status: Record<string, unknown> | null, summary: Record<string, unknown> | null, start: StartRecord | null): SoakState {
  const written = status?.state;
  const newest = start && Number.isInteger(start.pid) ? start.pid : null;
  const launching = newest !== null && newest !== num(status?.pid) && processAlive(newest);
  if (written === 'running') {
    const pid = num(status?.pid);
    if (pid !== null && !processAlive(pid)) return launching ? 'starting' : 'interrupted';
    return 'running';
  }
  if (written === 'finished' || written === 'halted') return written;
  if (summary) return summary.status === 'halted' ? 'halted' : 'finished';
  return launching ? 'starting' : 'unknown';
}

function launchOf(start: StartRecord): SoakListing['launch'] {
  return {
    scenario: String(start.scenario),
    campaign: String(start.campaign),
    untilSlow: num(start.untilSlow) ?? 0,
    pace: num(start.pace),
    runs: Array.isArray(start.runs) ? start.runs.length : 0,
    alive: Number.isInteger(start.pid) && processAlive(start.pid),
  };
}

/** The last non-empty line of a small text file (a soak's stderr), or null. */
function lastLine(path: string): string | null {
  try {
    const lines = readFileSync(path, 'utf8').slice(-4000).split('\n').map((l) => l.trim()).filter(Boolean);
    return lines.at(-1) ?? null;
  } catch {
    return null;
  }
}

/** The nominal frequency as the summary's time base or status.json records it; older soaks recorded no assumption (read as given). */
function nominalFrequencyOf(record: unknown): SoakListing['nominalFrequency'] {
  const r = record as { nominalFrequencyHz?: unknown; nominalFrequencyAssumed?: unknown } | null | undefined;
  const hz = num(r?.nominalFrequencyHz);
  return hz === null ? null : { hz, assumed: r?.nominalFrequencyAssumed === true };
}

function verdictRow(v: FaultVerdict): VerdictRow {
  return Object.fromEntries(VERDICT_ROW_FIELDS.filter((key) => key in v).map((key) => [key, v[key]])) as VerdictRow;
}

function num(value: unknown): number | null {
  return typeof value === 'number' && Number.isFinite(value) ? value : null;
}

export function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM';
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
      throw new Error(`not readable as JSON (${(error as Error).message})`);
    }
    if (value === null || typeof value !== 'object' || Array.isArray(value)) throw new Error('not a JSON object');
    this.parsed.set(path, { mtimeMs: info.mtimeMs, size: info.size, value: value as Record<string, unknown> });
    return value as Record<string, unknown>;
  }
}
