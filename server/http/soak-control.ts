import { spawn, type ChildProcess } from 'node:child_process';
import { closeSync, existsSync, mkdirSync, openSync, readFileSync, readdirSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import express, { Router, type NextFunction, type Request, type Response } from 'express';
import { parseCampaign } from '../../src/campaign/index.js';
import { scenarioToJSON } from '../../src/scenario/parse.js';
import type { Scenario } from '../../src/scenario/types.js';
import { builtInCampaignNames, builtInCampaignRaw, builtInScenarioNames, loadBuiltInScenario } from '../../src/scenarios/index.js';
import { describeValue, fieldChecks, has, type JsonObject } from '../../src/util/json-fields.js';
import type { LiveSession } from '../live/live-session.js';
import { STATUS_FILE, SUMMARY_FILE, writeJsonAtomically } from '../soak/outputs.js';
import { checkUpgrade, type OriginPolicy } from '../ws/origin.js';
import { SAFE_NAME, START_FILE, processAlive, stateOf, type StartRecord } from './soak-api.js';
import { sameToken } from '../operator-token.js';

/**
 * Starting, stopping and resuming soaks from the dashboard (the listing is soak-api.ts):
 *   GET  /api/campaigns            the built-in campaigns with their titles and the built-in
 *                                  scenarios each one fits
 *   POST /api/soaks                { name, scenario?, campaign, until (slow units), pace? }:
 *                                  `syncring soak ... --out SOAKS/NAME` as a detached process
 *   POST /api/soaks/NAME/stop      SIGTERM to a running soak this server started
 *   POST /api/soaks/NAME/resume    { pace? }: the same soak again with --resume
 * The POSTs change things: they need the operator token (`Authorization: Bearer TOKEN`) and
 * pass the same Host/Origin check as the WebSocket upgrade (ws/origin.ts), so no other site
 * can make a browser start soaks. Viewers can still list.
 *
 * A started soak is its own process group with its output in SOAKS/NAME/soak.out and soak.err,
 * so it outlives the server; START_FILE in its folder keeps its arguments (for resume) and its
 * pid (so a stop only ever signals a process this server started).
 */

export interface SoakControlOptions {
  /** The operator token of the WebSocket hub. */
  token: string;
  policy: OriginPolicy;
  /** The port the server listens on (known once it listens). */
  port: () => number;
  /** Soaks started from the dashboard that may run at once; default 2 (one per core of the development machine). */
  maxRunning?: number;
}

export const DEFAULT_MAX_RUNNING = 2;
/** A soak request is a handful of short fields. */
const BODY_LIMIT = '2kb';
const NAME_MAX = 80;
/** How long a stop waits for the process to end before it answers. */
const STOP_WAIT_MS = 3000;

/** The `syncring` command of this checkout: bin/ beside server/ (sources) or beside dist/ (compiled). */
const BIN = fileURLToPath(new URL(import.meta.url.endsWith('.ts') ? '../../bin/syncring.js' : '../../../bin/syncring.js', import.meta.url));

/** A request refused with its HTTP status and a message naming what is wrong. */
class ControlError extends Error {
  constructor(readonly status: number, message: string) {
    super(message);
  }
}

const checks = fieldChecks((path, reason) => {
  throw new ControlError(400, `${path}: ${reason}`);
});

interface StartRequest {
  name: string;
  scenario: string;
  campaign: string;
  untilSlow: number;
  pace: number | null;
}

export function registerSoakControl(app: express.Express, soaksDir: string, live: LiveSession, options: SoakControlOptions): void {
  const root = resolve(soaksDir);
  const maxRunning = options.maxRunning ?? DEFAULT_MAX_RUNNING;
  /** Processes started by this server instance: their exit is known at once (no zombie to poll). */
  const children = new Map<number, ChildProcess>();
  const campaigns = builtInCampaignNames.map((name) => {
    const raw = builtInCampaignRaw(name) as { name?: unknown; description?: unknown };
    return {
      name,
      title: typeof raw.name === 'string' ? raw.name : name,
      description: typeof raw.description === 'string' ? raw.description : '',
      scenarios: builtInScenarioNames.filter((scenario) => campaignProblem(name, loadBuiltInScenario(scenario)) === null),
    };
  });

  app.get('/api/campaigns', (_req, res) => {
    res.json(campaigns);
  });

  const router = Router();
  const guard = (req: Request, _res: Response, next: NextFunction) => {
    const problem = checkUpgrade(req, options.port(), options.policy);
    if (problem) throw new ControlError(403, `refused: ${problem}`);
    const match = /^Bearer\s+(\S+)\s*$/i.exec(req.headers.authorization ?? '');
    if (!match) throw new ControlError(401, 'starting, stopping and resuming soaks needs the operator token (Authorization: Bearer TOKEN)');
    if (!sameToken(match[1], options.token)) throw new ControlError(401, 'wrong operator token');
    next();
  };
  const body = express.json({ limit: BODY_LIMIT, strict: true });
  const launch = (dir: string, record: StartRecord, resume: boolean): number => {
    const args = [BIN, ...record.args, ...(record.pace !== null ? ['--pace', String(record.pace)] : []), ...(resume ? ['--resume'] : [])];
    const out = openSync(join(dir, 'soak.out'), 'a');
    const err = openSync(join(dir, 'soak.err'), 'a');
    let child: ChildProcess;
    try {
      const env = { ...process.env };
      delete env.SYNCRING_TOKEN;
      // cwd: the soak's own folder, where no file can shadow a built-in scenario or campaign name
      child = spawn(process.execPath, args, { cwd: dir, detached: true, stdio: ['ignore', out, err], env });
    } finally {
      closeSync(out);
      closeSync(err);
    }
    const pid = child.pid;
    if (pid === undefined) throw new ControlError(500, `could not start node ${args.join(' ')}`);
    children.set(pid, child);
    child.once('exit', () => children.delete(pid));
    child.once('error', () => children.delete(pid));
    child.unref();
    const runs = [...(record.runs ?? []), { pid, at: new Date().toISOString(), resume, pace: record.pace }];
    writeJsonAtomically(dir, START_FILE, { ...record, pid, runs });
    return pid;
  };
  /** Soaks started from the dashboard whose process is up (also those of an earlier server on this folder). */
  const running = (): string[] =>
    existsSync(root)
      ? readdirSync(root, { withFileTypes: true })
          .filter((d) => d.isDirectory() && SAFE_NAME.test(d.name))
          .filter((d) => {
            const start = readStart(join(root, d.name));
            return start !== null && ours(start);
          })
          .map((d) => d.name)
      : [];
  const roomForOneMore = () => {
    const now = running();
    if (now.length >= maxRunning) {
      throw new ControlError(429, `${now.length} soaks started here are running (${now.join(', ')}); at most ${maxRunning} run at once on this machine: stop one or wait for it to finish`);
    }
  };

  router.post('/api/soaks', guard, body, (req, res) => {
    const request = startRequest(req.body, liveBuiltIn(live));
    const dir = join(root, request.name);
    if (existsSync(dir)) throw new ControlError(409, `name: a soak named ${JSON.stringify(request.name)} already exists in ${root}; choose another name`);
    roomForOneMore();
    const scenario = loadBuiltInScenario(request.scenario);
    const until = Number((request.untilSlow / scenario.epsilon).toPrecision(15));
    if (!Number.isFinite(until)) throw new ControlError(400, `until: ${request.untilSlow} slow time units is beyond the largest tau (epsilon ${scenario.epsilon})`);
    mkdirSync(root, { recursive: true });
    try {
      mkdirSync(dir);
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code === 'EEXIST') throw new ControlError(409, `name: a soak named ${JSON.stringify(request.name)} already exists in ${root}; choose another name`);
      throw error;
    }
    const record: StartRecord = {
      format: 'syncring-soak-start',
      formatVersion: 1,
      scenario: request.scenario,
      campaign: request.campaign,
      untilSlow: request.untilSlow,
      until,
      epsilon: scenario.epsilon,
      pace: request.pace,
      args: ['soak', request.scenario, '--campaign', request.campaign, '--until', String(until), '--out', dir],
      pid: 0,
      runs: [],
    };
    const pid = launch(dir, record, false);
    res.status(202).json({ name: request.name, state: 'starting', pid, scenario: request.scenario, campaign: request.campaign, untilSlow: request.untilSlow, until, pace: request.pace, dir });
  });

  router.post('/api/soaks/:name/stop', guard, async (req, res) => {
    const { dir, start } = startedHere(root, String(req.params.name), 'stopped');
    const status = readJson(join(dir, STATUS_FILE));
    const state = stateOf(status, readJson(join(dir, SUMMARY_FILE)), start);
    if (state !== 'running' && state !== 'starting') throw new ControlError(409, `${req.params.name} is not running (it is ${state}); nothing to stop`);
    const pid = start.pid;
    const written = status && typeof status.pid === 'number' ? status.pid : null;
    if (state === 'running' && written !== pid) throw new ControlError(409, `${STATUS_FILE} of ${req.params.name} names pid ${written}, not the process this server started (${pid}); stop it where it runs`);
    if (!ours(start)) throw new ControlError(409, `pid ${pid} is not the soak process of ${req.params.name} any more; nothing to stop`);
    // The soak is a process group of its own (detached): the signal reaches all of it.
    process.kill(-pid, 'SIGTERM');
    let signal: NodeJS.Signals = 'SIGTERM';
    if (!(await exited(pid, children.get(pid), STOP_WAIT_MS))) {
      process.kill(-pid, 'SIGKILL');
      signal = 'SIGKILL';
      await exited(pid, children.get(pid), STOP_WAIT_MS);
    }
    res.json({
      name: req.params.name,
      pid,
      signal,
      state: 'interrupted',
      resumable: true,
      note:
        'the soak runner does not catch SIGTERM, so it ended at once, as after a kill: its log is crash-safe, and a resume continues from its last checkpoint and rewrites the records after it',
    });
  });

  router.post('/api/soaks/:name/resume', guard, body, (req, res) => {
    const { dir, start } = startedHere(root, String(req.params.name), 'resumed');
    const state = stateOf(readJson(join(dir, STATUS_FILE)), readJson(join(dir, SUMMARY_FILE)), start);
    if (state !== 'interrupted' && !(state === 'unknown' && !processAlive(start.pid))) {
      throw new ControlError(409, `${req.params.name} is ${state}: only an interrupted soak can be resumed`);
    }
    const pace = resumePace(req.body, start.pace);
    roomForOneMore();
    const pid = launch(dir, { ...start, pace }, true);
    res.status(202).json({ name: req.params.name, state: 'starting', pid, resume: true, pace });
  });

  router.use((error: unknown, _req: Request, res: Response, next: NextFunction) => {
    if (res.headersSent) return next(error);
    const e = error as { status?: number; type?: string; message?: string };
    if (error instanceof ControlError) res.status(error.status).json({ error: error.message });
    else if (e.type === 'entity.parse.failed') res.status(400).json({ error: `body: not valid JSON (${e.message})` });
    else if (e.type === 'entity.too.large') res.status(413).json({ error: `body: larger than ${BODY_LIMIT}; a soak request is a few short fields` });
    else if (typeof e.status === 'number' && e.status >= 400 && e.status < 500) res.status(e.status).json({ error: `body: ${e.message}` });
    else res.status(500).json({ error: e.message ?? String(error) });
  });
  app.use(router);
}

/** The fields of POST /api/soaks, each checked; `fallbackScenario` stands in for a missing scenario. */
function startRequest(body: unknown, fallbackScenario: string | null): StartRequest {
  if (body === undefined) throw new ControlError(400, 'body: send the soak as a JSON object with Content-Type: application/json');
  const obj = checks.expectObject(body, 'body', ['name', 'scenario', 'campaign', 'until', 'pace']);
  const name = checks.required(obj, 'name', '');
  if (typeof name !== 'string') throw new ControlError(400, `name: must be a string (got ${describeValue(name)})`);
  if (name.length > NAME_MAX || !SAFE_NAME.test(name)) {
    throw new ControlError(400, `name: must be 1 to ${NAME_MAX} letters, digits, '.', '_' or '-', starting with a letter or digit (got ${describeValue(name)})`);
  }
  let scenario: unknown = obj.scenario;
  if (!has(obj, 'scenario')) {
    if (fallbackScenario === null) throw new ControlError(400, `scenario: is required (the live session does not run a built-in scenario); one of ${builtInScenarioNames.join(', ')}`);
    scenario = fallbackScenario;
  }
  if (typeof scenario !== 'string' || !builtInScenarioNames.includes(scenario)) {
    throw new ControlError(400, `scenario: must be a built-in scenario, one of ${builtInScenarioNames.join(', ')} (got ${describeValue(scenario)})`);
  }
  const campaign = checks.required(obj, 'campaign', '');
  if (typeof campaign !== 'string' || !builtInCampaignNames.includes(campaign)) {
    throw new ControlError(400, `campaign: must be a built-in campaign, one of ${builtInCampaignNames.join(', ')} (got ${describeValue(campaign)})`);
  }
  const problem = campaignProblem(campaign, loadBuiltInScenario(scenario));
  if (problem) throw new ControlError(400, `campaign: ${campaign} does not fit scenario ${scenario}: ${problem}`);
  const until = checks.required(obj, 'until', '');
  if (typeof until !== 'number' || !Number.isFinite(until) || !(until > 0)) {
    throw new ControlError(400, `until: must be a positive number of slow time units (got ${describeValue(until)})`);
  }
  return { name, scenario, campaign, untilSlow: until, pace: paceField(obj, null) };
}

/** The optional body of a resume: { pace } (a number, or null for as fast as possible); absent: the pace it was started with. */
function resumePace(body: unknown, started: number | null): number | null {
  if (body === undefined) return started;
  return paceField(checks.expectObject(body, 'body', ['pace']), started);
}

function paceField(obj: JsonObject, fallback: number | null): number | null {
  if (!Object.prototype.hasOwnProperty.call(obj, 'pace')) return fallback;
  const pace = obj.pace;
  if (pace === null) return null;
  if (typeof pace !== 'number' || !Number.isFinite(pace) || !(pace > 0)) {
    throw new ControlError(400, `pace: must be a positive number of slow time units per second, or null for as fast as possible (got ${describeValue(pace)})`);
  }
  return pace;
}

/** Why the built-in campaign cannot run on the scenario (a node or link it names is missing...), or null. */
function campaignProblem(campaign: string, scenario: Scenario): string | null {
  try {
    parseCampaign(builtInCampaignRaw(campaign), scenario, `built-in campaign ${campaign}`);
    return null;
  } catch (error) {
    return (error as Error).message;
  }
}

/** The built-in scenario the live session runs (as loaded), or null when it runs another one. */
function liveBuiltIn(live: LiveSession): string | null {
  let running: string;
  try {
    running = JSON.stringify(live.info().scenario);
  } catch {
    return null;
  }
  return builtInScenarioNames.find((name) => JSON.stringify(scenarioToJSON(loadBuiltInScenario(name))) === running) ?? null;
}

/** The folder and START_FILE of a soak started from the dashboard, or the error to answer with. */
function startedHere(root: string, name: string, verb: string): { dir: string; start: StartRecord } {
  const dir = join(root, name);
  if (!SAFE_NAME.test(name) || !existsSync(dir)) throw new ControlError(404, `no soak named ${JSON.stringify(name)} in ${root}`);
  const start = readStart(dir);
  if (!start) throw new ControlError(409, `${name} was not started from the dashboard (no ${START_FILE}); it can only be ${verb} where it was started`);
  return { dir, start };
}

function readStart(dir: string): StartRecord | null {
  const start = readJson(join(dir, START_FILE)) as unknown as StartRecord | null;
  return start && start.format === 'syncring-soak-start' && Number.isInteger(start.pid) && start.pid > 0 && Array.isArray(start.args) ? start : null;
}

function readJson(path: string): Record<string, unknown> | null {
  try {
    const value: unknown = JSON.parse(readFileSync(path, 'utf8'));
    return value !== null && typeof value === 'object' && !Array.isArray(value) ? (value as Record<string, unknown>) : null;
  } catch {
    return null;
  }
}

/**
 * Whether the newest process of a dashboard-started soak is up and still that soak: where /proc
 * exists its command line must be `syncring soak ... --out` its folder, so a pid reused by
 * another program after the soak ended is never signalled (nor counted as running).
 */
function ours(start: StartRecord): boolean {
  const pid = start.pid;
  const out = start.args[start.args.indexOf('--out') + 1];
  if (!processAlive(pid)) return false;
  let cmdline: string;
  try {
    cmdline = readFileSync(`/proc/${pid}/cmdline`, 'utf8');
  } catch {
    return !existsSync('/proc/self/cmdline');
  }
  const words = cmdline.split('\0');
  return words.includes(BIN) && words.includes('soak') && out !== undefined && words.includes(out);
}

/** Resolves true once the process has ended (its exit event, or polling when another server started it). */
async function exited(pid: number, child: ChildProcess | undefined, ms: number): Promise<boolean> {
  const deadline = Date.now() + ms;
  if (child && child.exitCode === null && child.signalCode === null) {
    await new Promise<void>((done) => {
      const timer = setTimeout(done, ms);
      child.once('exit', () => {
        clearTimeout(timer);
        done();
      });
    });
  }
  while (processAlive(pid) && Date.now() < deadline) await new Promise((r) => setTimeout(r, 50));
  return !processAlive(pid);
}
