import { EventEmitter } from 'node:events';
import { Worker } from 'node:worker_threads';
import { basename } from 'node:path';
import { ModelParameters } from '../../src/model/parameters.js';
import { parseScenario } from '../../src/scenario/parse.js';
import { scenarioToJSON } from '../../src/scenario/parse.js';
import type { Scenario } from '../../src/scenario/types.js';
import type { SessionCheckpoint, SessionEvent } from '../../src/session/session.js';
import { DecimatingHistory } from '../../src/observe/decimating-history.js';
import { logHeader } from '../../src/protocol/log-records.js';
import type { ClientCommand, HistoryPoint, RunStatus, SessionInfo, Speed, WireFrame } from '../../src/protocol/messages.js';
import { InputError, type InputErrorData } from '../../src/util/input-error.js';
import { SessionLog } from '../log/session-log.js';
import { SOFTWARE_VERSION } from '../version.js';
import { partsViewOf } from '../../src/scenario/parts/trim.js';
import { SessionRunner, type RunnerOptions, type RunnerOutput } from './session-runner.js';

export interface LiveSessionOptions {
  scenario: Scenario;
  /** Slow-time units per wall second, or 'max'. */
  speed?: Speed;
  /** Folder for session logs; null keeps no log. */
  logDir: string | null;
  /** Frames per second sent to browsers at most. */
  frameRate?: number;
  /** Wall milliseconds of stepping per slice. */
  sliceMs?: number;
  /** Where the run steps: a worker thread (default) or the main thread. */
  thread?: 'worker' | 'main';
}

const RECENT_EVENTS = 200;

type ReplyMessage = { kind: 'reply'; id: number; error?: InputErrorData; checkpoint?: SessionCheckpoint };

/**
 * The server's one live run, as the rest of the server sees it. The stepping itself happens in
 * a SessionRunner, by default in a worker thread; this side keeps what needs I/O or serves
 * clients: the session log, the decimated history for late joiners, recent events, the latest
 * frame and status, and a copy of the network for validating commands before they are sent on.
 *
 * Events: 'frame' (WireFrame, emittedAt), 'event' (SessionEvent), 'status' (), 'log-error' (Error).
 */
export class LiveSession extends EventEmitter {
  readonly history = new DecimatingHistory<HistoryPoint>(1200);
  readonly recentEvents: SessionEvent[] = [];
  latestFrame: WireFrame | null = null;
  latestEmittedAt = 0;
  log: SessionLog | null = null;
  /** The network as last started, for validating commands (sizes and links never change in a run). */
  params: ModelParameters;
  tau = 0;
  tick = 0;
  readonly ready: Promise<void>;

  private current: SessionInfo | null = null;
  private readonly worker: Worker | null = null;
  private readonly inThread: SessionRunner | null = null;
  private readonly replies = new Map<number, { resolve: (m: ReplyMessage) => void; reject: (e: Error) => void }>();
  private nextId = 1;
  private markReady!: () => void;
  private closed = false;

  constructor(private readonly options: LiveSessionOptions) {
    super();
    this.params = new ModelParameters(options.scenario);
    this.ready = new Promise((resolve) => (this.markReady = resolve));
    const runnerOptions: RunnerOptions = {
      scenario: scenarioToJSON(options.scenario),
      partsView: partsViewOf(options.scenario),
      speed: options.speed ?? 1,
      frameRate: options.frameRate ?? 20,
      sliceMs: options.sliceMs ?? 25,
    };
    if ((options.thread ?? 'worker') === 'worker') {
      this.worker = new Worker(workerUrl(), { workerData: runnerOptions });
      this.worker.on('message', (message: RunnerOutput | ReplyMessage) =>
        message.kind === 'reply' ? this.settle(message) : this.receive(message),
      );
      this.worker.on('error', (error) => this.emit('log-error', new Error(`simulation worker failed: ${error.message}`)));
    } else {
      this.inThread = new SessionRunner(runnerOptions, (output) => this.receive(output));
      this.receive({ kind: 'status', info: this.inThread.info(), tau: 0, tick: 0 });
    }
  }

  info(): SessionInfo {
    if (!this.current) throw new Error('the live session has not started yet');
    // the file's name only: the path on disk is the server's own business (GET /api/log serves the file)
    return { ...this.current, logFile: this.log ? basename(this.log.path) : null };
  }

  get status(): RunStatus {
    return this.current?.status ?? 'running';
  }

  /** Carry out a validated command; rejects with InputError (answering the command's id) when the run cannot do it. */
  async command(command: ClientCommand, by: string): Promise<void> {
    if (this.inThread) {
      this.inThread.command(command, by);
      return;
    }
    const reply = await this.request({ kind: 'command', command, by });
    if (reply.error) throw InputError.fromData(reply.error).answering(command.id);
  }

  /** Step at once until the run has done `tick` ticks; returns the session's checkpoint (tests, tools). */
  async runToTick(tick: number): Promise<SessionCheckpoint> {
    if (this.inThread) {
      this.inThread.runToTick(tick);
      return this.inThread.session.checkpoint();
    }
    return (await this.request({ kind: 'run-to-tick', tick })).checkpoint!;
  }

  async close(): Promise<void> {
    if (this.closed) return;
    this.closed = true;
    this.inThread?.stop();
    if (this.worker) {
      this.worker.postMessage({ kind: 'stop' });
      await this.worker.terminate();
    }
    for (const pending of this.replies.values()) pending.reject(new Error('the live session was closed'));
    this.replies.clear();
    await this.log?.close();
  }

  private request(
    message: { kind: 'command'; command: ClientCommand; by: string } | { kind: 'run-to-tick'; tick: number },
  ): Promise<ReplyMessage> {
    const id = this.nextId++;
    return new Promise((resolve, reject) => {
      this.replies.set(id, { resolve, reject });
      this.worker!.postMessage({ ...message, id });
    });
  }

  private settle(reply: ReplyMessage): void {
    const pending = this.replies.get(reply.id);
    this.replies.delete(reply.id);
    pending?.resolve(reply);
  }

  private receive(output: RunnerOutput): void {
    switch (output.kind) {
      case 'started':
        this.start(output.scenario, output.label);
        return;
      case 'frame':
        this.latestFrame = output.frame;
        this.latestEmittedAt = output.emittedAt;
        this.tau = output.frame.tau;
        this.tick = output.frame.tick;
        this.emit('frame', output.frame, output.emittedAt);
        return;
      case 'history':
        for (const point of output.points) this.history.push(point);
        return;
      case 'event':
        this.recentEvents.push(output.event);
        if (this.recentEvents.length > RECENT_EVENTS) this.recentEvents.shift();
        this.emit('event', output.event);
        return;
      case 'log':
        void this.log?.append(output.record).catch(() => undefined);
        return;
      case 'status':
        this.current = output.info;
        this.tau = output.tau;
        this.tick = output.tick;
        this.markReady();
        this.emit('status');
        return;
    }
  }

  /** A run (re)started: fresh history and a new log file with its header. */
  private start(scenarioJson: unknown, label: string): void {
    const scenario = parseScenario(scenarioJson, 'scenario');
    this.params = new ModelParameters(scenario);
    this.history.clear();
    this.recentEvents.length = 0;
    this.latestFrame = null;
    this.tau = 0;
    this.tick = 0;
    const previous = this.log;
    this.log = null;
    void previous?.close();
    if (!this.options.logDir || this.closed) return;
    this.log = new SessionLog(SessionLog.fileFor(this.options.logDir, label), (error) => this.emit('log-error', error));
    void this.log.append(logHeader(scenario, scenarioJson, SOFTWARE_VERSION)).catch(() => undefined);
  }
}

/** The compiled worker beside this module, or in dist/ when the server runs from TypeScript sources (tests). */
function workerUrl(): URL {
  const here = new URL(import.meta.url);
  if (here.pathname.endsWith('.js')) return new URL('./session-worker.js', here);
  return new URL('../../dist/server/live/session-worker.js', here);
}
