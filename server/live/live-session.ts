import { EventEmitter } from 'node:events';
import { CoSimulation, type Frame, type SessionEvent } from '../../src/session/session.js';
import { parseScenario, scenarioToJSON } from '../../src/scenario/parse.js';
import type { Scenario } from '../../src/scenario/types.js';
import { deltaToPpm } from '../../src/scenario/units.js';
import { builtInScenarioNames, builtInScenarioRaw } from '../../src/scenarios/index.js';
import { DecimatingHistory } from '../../src/observe/decimating-history.js';
import { LOG_FORMAT_VERSION, sampleOf } from '../../src/protocol/log-records.js';
import {
  ProtocolError,
  historyPointOf,
  type ClientCommand,
  type HistoryPoint,
  type SessionInfo,
  type Speed,
  type WireFrame,
  type RunStatus,
} from '../../src/protocol/messages.js';
import { ScenarioError } from '../../src/scenario/errors.js';
import { SessionLog } from '../log/session-log.js';
import { SOFTWARE_VERSION } from '../version.js';

export interface LiveSessionOptions {
  scenario: Scenario;
  /** Slow-time units per wall second, or 'max'. */
  speed?: Speed;
  /** Folder for session logs; null keeps no log. */
  logDir: string | null;
  /** Frames per second sent to browsers at most. */
  frameRate?: number;
  /** Wall milliseconds of stepping per turn of the event loop. */
  sliceMs?: number;
}

const RECENT_EVENTS = 200;
/** Samples logged per slow time unit (ticks are decimated to this). */
const SAMPLES_PER_SLOW_UNIT = 10;
/** A checkpoint of the full state every this many samples. */
const CHECKPOINT_EVERY = 50;

/**
 * The one running co-simulation of a server process. It paces the session's ticks to the
 * operator's speed in short slices of the event loop, so socket traffic is served between
 * slices; it emits 'frame' (the newest frame, at most frameRate per second), 'event' (every
 * session event, never dropped) and 'status' (run status or parameters changed), and keeps the
 * session log and a decimated history for late joiners.
 *
 * Events: 'frame' (WireFrame), 'event' (SessionEvent), 'status' (), 'log-error' (Error).
 */
export class LiveSession extends EventEmitter {
  session!: CoSimulation;
  scenario: Scenario;
  status: RunStatus = 'running';
  speed: Speed;
  readonly history = new DecimatingHistory<HistoryPoint>(1200);
  readonly recentEvents: SessionEvent[] = [];
  log: SessionLog | null = null;
  latestFrame: WireFrame | null = null;

  private readonly frameInterval: number;
  private readonly sliceMs: number;
  private timer: NodeJS.Timeout | null = null;
  private stopped = false;
  private lastFrameSent = 0;
  private pendingFrame: WireFrame | null = null;
  private paceOrigin = { wall: 0, slow: 0 };
  private sampleEveryTicks = 1;
  private samplesLogged = 0;

  constructor(private readonly options: LiveSessionOptions) {
    super();
    this.scenario = options.scenario;
    this.speed = options.speed ?? 1;
    this.frameInterval = 1000 / (options.frameRate ?? 20);
    this.sliceMs = options.sliceMs ?? 25;
    this.start();
  }

  /** Session info for hello and status messages. */
  info(): SessionInfo {
    const p = this.session.params;
    const s = this.scenario;
    return {
      scenarioName: s.name,
      scenario: scenarioToJSON(s),
      nodes: p.nodes,
      modes: p.modes,
      epsilon: p.epsilon,
      nominalFrequencyHz: s.units.nominalFrequencyHz,
      omega: Array.from(p.omega),
      links: Array.from(p.linkFrom, (from, e) => ({ from, to: p.linkTo[e], weight: p.linkWeight[e], nominal: p.linkNominal[e] })),
      detuning: Array.from(p.detuning),
      detuningPpm: p.epsilon > 0 ? Array.from(p.detuning, (d) => deltaToPpm(d, p.epsilon)) : Array.from(p.detuning, () => 0),
      coupling: { strength: p.strength, reactive: p.reactive, dissipative: p.dissipative },
      noise: { intensity: p.noiseIntensity, detuningWalk: p.detuningWalk, seed: s.noise.seed },
      macroStep: this.session.macroStep,
      integrator: { mode: 'micro', ...s.integrator },
      status: this.status,
      speed: this.speed,
      warnings: this.session.warnings.map((w) => w.message),
      logFile: this.log?.path ?? null,
    };
  }

  /** Carry out a validated command from `by`; throws ProtocolError when it cannot be done now. */
  command(command: ClientCommand, by: string): void {
    if (command.kind === 'perturbation') {
      if (this.status === 'halted') throw new ProtocolError('action', 'the run is halted after a blow-up; reset or load a scenario first', command.id);
      this.session.enqueue(command.perturbation, by);
      // a paused run applies it at once, so everyone sees the change without resuming
      if (this.status === 'paused') this.flushPaused();
      return;
    }
    switch (command.action) {
      case 'pause':
        if (this.status === 'running') this.setStatus('paused', by);
        return;
      case 'resume':
        if (this.status === 'halted') throw new ProtocolError('action', 'the run is halted after a blow-up; reset it first', command.id);
        if (this.status === 'paused') this.setStatus('running', by);
        return;
      case 'set-speed':
        this.speed = command.speed;
        this.resetPace();
        this.announce(`speed set to ${command.speed === 'max' ? 'as fast as possible' : `${command.speed} slow-time units per second`}`, by);
        return;
      case 'reset':
        this.restart(this.scenario, by, 'run reset to its start');
        return;
      case 'load-scenario': {
        let scenario: Scenario;
        try {
          if (command.name !== undefined) {
            if (!builtInScenarioNames.includes(command.name)) {
              throw new ProtocolError('name', `no built-in scenario ${JSON.stringify(command.name)} (available: ${builtInScenarioNames.join(', ')})`, command.id);
            }
            scenario = parseScenario(builtInScenarioRaw(command.name), `built-in scenario ${command.name}`);
          } else {
            scenario = parseScenario(command.scenario, 'scenario');
          }
        } catch (error) {
          if (error instanceof ScenarioError) throw new ProtocolError(error.path ? `scenario.${error.path}` : 'scenario', error.reason, command.id);
          throw error;
        }
        this.restart(scenario, by, `scenario "${scenario.name}" loaded`);
        return;
      }
    }
  }

  async close(): Promise<void> {
    this.stopped = true;
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
    await this.log?.close();
  }

  private start(): void {
    this.session = new CoSimulation(this.scenario);
    const ticksPerSlowUnit = this.session.params.epsilon > 0 ? 1 / (this.session.params.epsilon * this.session.macroStep) : 1;
    this.sampleEveryTicks = Math.max(1, Math.round(ticksPerSlowUnit / SAMPLES_PER_SLOW_UNIT));
    this.samplesLogged = 0;
    this.history.clear();
    this.recentEvents.length = 0;
    this.latestFrame = null;
    this.pendingFrame = null;
    this.status = 'running';
    this.openLog();
    this.resetPace();
    this.schedule(0);
  }

  private restart(scenario: Scenario, by: string, message: string): void {
    const previous = this.log;
    this.scenario = scenario;
    this.start();
    void previous?.close();
    this.announce(message, by);
  }

  private openLog(): void {
    this.log = null;
    if (!this.options.logDir) return;
    const log = new SessionLog(SessionLog.fileFor(this.options.logDir, this.scenario.name), (error) => this.emit('log-error', error));
    this.log = log;
    void log
      .append({
        record: 'header',
        format: 'syncring-log',
        formatVersion: LOG_FORMAT_VERSION,
        software: { name: 'syncring', version: SOFTWARE_VERSION },
        createdAt: new Date().toISOString(),
        scenario: scenarioToJSON(this.scenario),
        seeds: { noise: this.scenario.noise.seed, initial: 'random' in this.scenario.initial ? this.scenario.initial.random.seed : null },
      })
      .catch(() => undefined);
  }

  private logRecord(record: { record: string; [key: string]: unknown }): void {
    void this.log?.append(record).catch(() => undefined);
  }

  private resetPace(): void {
    this.paceOrigin = { wall: performance.now(), slow: this.session.params.epsilon * this.session.tau };
  }

  private schedule(delay: number): void {
    if (this.stopped) return;
    if (this.timer) clearTimeout(this.timer);
    this.timer = setTimeout(() => this.turn(), delay);
  }

  /** One slice of stepping, then give the event loop back. */
  private turn(): void {
    this.timer = null;
    if (this.stopped) return;
    if (this.status !== 'running') return;
    const eps = this.session.params.epsilon;
    const sliceEnd = performance.now() + this.sliceMs;
    let delay = 0;
    while (performance.now() < sliceEnd && this.status === 'running') {
      if (this.speed !== 'max' && eps > 0) {
        const target = this.paceOrigin.slow + ((performance.now() - this.paceOrigin.wall) / 1000) * this.speed;
        if (eps * this.session.tau >= target) {
          // ahead of the clock: sleep until the next tick is due
          delay = Math.min(50, Math.max(1, ((eps * this.session.macroStep) / this.speed) * 1000));
          break;
        }
      }
      const frame = this.session.step();
      if (!frame) break;
      this.absorb(frame);
    }
    this.flushFrame(false);
    if (this.status === 'running') this.schedule(delay);
  }

  private absorb(frame: Frame): void {
    const { events, ...wire } = frame;
    for (const event of events) this.publishEvent(event);
    // a perturbation changed the parameters: tell everyone once it has taken effect
    if (events.some((e) => e.kind === 'perturbation')) this.emit('status');
    this.latestFrame = wire;
    this.pendingFrame = wire;
    this.history.push(historyPointOf(wire));
    if (frame.tick % this.sampleEveryTicks === 0 || frame.status === 'halted') {
      this.logRecord(sampleOf(frame));
      if (++this.samplesLogged % CHECKPOINT_EVERY === 0) this.logCheckpoint();
    }
    if (frame.status === 'halted' && this.status !== 'halted') {
      this.status = 'halted';
      this.flushFrame(true);
      this.logCheckpoint();
      this.emit('status');
    }
  }

  private logCheckpoint(): void {
    this.logRecord({ record: 'checkpoint', tau: this.session.tau, tick: this.session.tick, state: this.session.fullState() });
  }

  private publishEvent(event: SessionEvent): void {
    this.recentEvents.push(event);
    if (this.recentEvents.length > RECENT_EVENTS) this.recentEvents.shift();
    this.logRecord({ record: 'event', event });
    this.emit('event', event);
  }

  private flushFrame(force: boolean): void {
    const now = performance.now();
    if (!this.pendingFrame || (!force && now - this.lastFrameSent < this.frameInterval)) return;
    this.lastFrameSent = now;
    const frame = this.pendingFrame;
    this.pendingFrame = null;
    this.emit('frame', frame);
  }

  /** While paused, apply queued perturbations with a zero-length tick so everyone sees them. */
  private flushPaused(): void {
    setImmediate(() => {
      if (this.status !== 'paused') return;
      const frame = this.session.step(this.session.tau);
      if (frame) this.absorb(frame);
      this.flushFrame(true);
      this.emit('status');
    });
  }

  private setStatus(status: RunStatus, by: string): void {
    this.status = status;
    this.announce(status === 'paused' ? 'run paused' : 'run resumed', by);
    if (status === 'running') {
      this.resetPace();
      this.schedule(0);
    }
  }

  /** A control event (not a perturbation): logged, broadcast, and followed by a status update. */
  private announce(message: string, by: string): void {
    this.publishEvent(this.session.recordNow('control', message, by));
    this.emit('status');
  }
}
