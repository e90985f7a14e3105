import { spawn, type ChildProcess } from 'node:child_process';
import { closeSync, existsSync, mkdirSync, openSync, readFileSync, readdirSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseCampaign } from '../../src/campaign/index.js';
import type { Scenario } from '../../src/scenario/types.js';
import { builtInCampaignNames, builtInCampaignRaw, builtInScenarioNames, loadBuiltInScenario } from '../../src/scenarios/index.js';
import { SOAK_ERR, SOAK_OUT, START_FILE, type StartRecord } from '../../src/protocol/soak-files.js';
import type { CampaignChoice } from '../../src/protocol/catalogue-lists.js';
import { writeJsonAtomically } from './outputs.js';
import { SAFE_NAME, processAlive, readSoakFiles, stateOf } from './soak-folder.js';

/**
 * Starts, stops and resumes soaks as detached `syncring soak` processes, one folder each under
 * one soaks folder. A started soak is its own process group with its output in NAME/soak.out and
 * soak.err, so it outlives the server; START_FILE in its folder keeps its arguments (for resume)
 * and its pid, so a stop only ever signals a process this server started. Refusals are
 * LaunchErrors whose `kind` says what went wrong; the HTTP layer maps them to statuses.
 */

export const DEFAULT_MAX_RUNNING = 2;
/** How long a stop waits for the process to end before it answers. */
const STOP_WAIT_MS = 3000;

/** The `syncring` command of this checkout: bin/ beside server/ (sources) or beside dist/ (compiled). */
const BIN = fileURLToPath(new URL(import.meta.url.endsWith('.ts') ? '../../bin/syncring.js' : '../../../bin/syncring.js', import.meta.url));

export type LaunchRefusal = 'invalid' | 'not-found' | 'conflict' | 'busy' | 'failed';

/** A refused start, stop or resume: what kind of refusal, and a message naming what is wrong. */
export class LaunchError extends Error {
  constructor(
    readonly kind: LaunchRefusal,
    message: string,
  ) {
    super(message);
    this.name = 'LaunchError';
  }
}

/** What to start: already checked by the caller (a built-in scenario and a campaign that fits it). */
export interface LaunchRequest {
  name: string;
  scenario: string;
  campaign: string;
  untilSlow: number;
  pace: number | null;
}

export class SoakLauncher {
  readonly root: string;
  /** Processes started by this server instance: their exit is known at once (no zombie to poll). */
  private readonly children = new Map<number, ChildProcess>();
  readonly campaigns: CampaignChoice[];

  constructor(
    soaksDir: string,
    readonly maxRunning = DEFAULT_MAX_RUNNING,
  ) {
    this.root = resolve(soaksDir);
    this.campaigns = builtInCampaignNames.map((name) => {
      const raw = builtInCampaignRaw(name) as { name?: unknown; description?: unknown };
      return {
        name,
        title: typeof raw.name === 'string' ? raw.name : name,
        description: typeof raw.description === 'string' ? raw.description : '',
        scenarios: builtInScenarioNames.filter((scenario) => campaignProblem(name, loadBuiltInScenario(scenario)) === null),
      };
    });
  }

  start(request: LaunchRequest): {
    name: string;
    state: 'starting';
    pid: number;
    scenario: string;
    campaign: string;
    untilSlow: number;
    until: number;
    pace: number | null;
    dir: string;
  } {
    const dir = join(this.root, request.name);
    const taken = () =>
      new LaunchError('conflict', `name: a soak named ${JSON.stringify(request.name)} already exists in ${this.root}; choose another name`);
    if (existsSync(dir)) throw taken();
    this.roomForOneMore();
    const scenario = loadBuiltInScenario(request.scenario);
    const until = Number((request.untilSlow / scenario.epsilon).toPrecision(15));
    if (!Number.isFinite(until))
      throw new LaunchError(
        'invalid',
        `until: ${request.untilSlow} slow time units is beyond the largest tau (epsilon ${scenario.epsilon})`,
      );
    mkdirSync(this.root, { recursive: true });
    try {
      mkdirSync(dir);
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code === 'EEXIST') throw taken();
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
    const pid = this.launch(dir, record, false);
    return {
      name: request.name,
      state: 'starting',
      pid,
      scenario: request.scenario,
      campaign: request.campaign,
      untilSlow: request.untilSlow,
      until,
      pace: request.pace,
      dir,
    };
  }

  async stop(
    name: string,
  ): Promise<{ name: string; pid: number; signal: NodeJS.Signals; state: 'interrupted'; resumable: true; note: string }> {
    const { dir, start } = this.startedHere(name, 'stopped');
    const files = readSoakFiles(dir);
    const state = stateOf(files);
    if (state !== 'running' && state !== 'starting')
      throw new LaunchError('conflict', `${name} is not running (it is ${state}); nothing to stop`);
    const pid = start.pid;
    const written = files.status?.pid ?? null;
    if (state === 'running' && written !== pid)
      throw new LaunchError(
        'conflict',
        `status.json of ${name} names pid ${written}, not the process this server started (${pid}); stop it where it runs`,
      );
    if (!ours(start)) throw new LaunchError('conflict', `pid ${pid} is not the soak process of ${name} any more; nothing to stop`);
    // The soak is a process group of its own (detached): the signal reaches all of it.
    process.kill(-pid, 'SIGTERM');
    let signal: NodeJS.Signals = 'SIGTERM';
    if (!(await exited(pid, this.children.get(pid), STOP_WAIT_MS))) {
      process.kill(-pid, 'SIGKILL');
      signal = 'SIGKILL';
      await exited(pid, this.children.get(pid), STOP_WAIT_MS);
    }
    return {
      name,
      pid,
      signal,
      state: 'interrupted',
      resumable: true,
      note:
        'the soak runner does not catch SIGTERM, so it ended at once, as after a kill: its log is crash-safe, ' +
        'and a resume continues from its last checkpoint and rewrites the records after it',
    };
  }

  /** `pace` undefined: the pace it was started with. */
  resume(
    name: string,
    pace: number | null | undefined,
  ): { name: string; state: 'starting'; pid: number; resume: true; pace: number | null } {
    const { dir, start } = this.startedHere(name, 'resumed');
    const state = stateOf(readSoakFiles(dir));
    if (state !== 'interrupted' && !(state === 'unknown' && !processAlive(start.pid))) {
      throw new LaunchError('conflict', `${name} is ${state}: only an interrupted soak can be resumed`);
    }
    const chosen = pace === undefined ? start.pace : pace;
    this.roomForOneMore();
    const pid = this.launch(dir, { ...start, pace: chosen }, true);
    return { name, state: 'starting', pid, resume: true, pace: chosen };
  }

  private launch(dir: string, record: StartRecord, resume: boolean): number {
    const args = [BIN, ...record.args, ...(record.pace !== null ? ['--pace', String(record.pace)] : []), ...(resume ? ['--resume'] : [])];
    const out = openSync(join(dir, SOAK_OUT), 'a');
    const err = openSync(join(dir, SOAK_ERR), 'a');
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
    if (pid === undefined) throw new LaunchError('failed', `could not start node ${args.join(' ')}`);
    this.children.set(pid, child);
    child.once('exit', () => this.children.delete(pid));
    child.once('error', () => this.children.delete(pid));
    child.unref();
    const runs = [...record.runs, { pid, at: new Date().toISOString(), resume, pace: record.pace }];
    writeJsonAtomically(dir, START_FILE, { ...record, pid, runs } satisfies StartRecord);
    return pid;
  }

  /** Soaks started from the dashboard whose process is up (also those of an earlier server on this folder). */
  private running(): string[] {
    if (!existsSync(this.root)) return [];
    return readdirSync(this.root, { withFileTypes: true })
      .filter((d) => d.isDirectory() && SAFE_NAME.test(d.name))
      .filter((d) => {
        const start = readSoakFiles(join(this.root, d.name)).start;
        return start !== null && ours(start);
      })
      .map((d) => d.name);
  }

  private roomForOneMore(): void {
    const now = this.running();
    if (now.length >= this.maxRunning) {
      throw new LaunchError(
        'busy',
        `${now.length} soaks started here are running (${now.join(', ')}); at most ${this.maxRunning} run at once on this machine: stop one or wait for it to finish`,
      );
    }
  }

  /** The folder and START_FILE of a soak started from the dashboard. */
  private startedHere(name: string, verb: string): { dir: string; start: StartRecord } {
    const dir = join(this.root, name);
    if (!SAFE_NAME.test(name) || !existsSync(dir))
      throw new LaunchError('not-found', `no soak named ${JSON.stringify(name)} in ${this.root}`);
    const start = readSoakFiles(dir).start;
    if (!start)
      throw new LaunchError(
        'conflict',
        `${name} was not started from the dashboard (no ${START_FILE}); it can only be ${verb} where it was started`,
      );
    return { dir, start };
  }
}

/** Why the built-in campaign cannot run on the scenario (a node or link it names is missing...), or null. */
export function campaignProblem(campaign: string, scenario: Scenario): string | null {
  try {
    parseCampaign(builtInCampaignRaw(campaign), scenario, `built-in campaign ${campaign}`);
    return null;
  } catch (error) {
    return (error as Error).message;
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
