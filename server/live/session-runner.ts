import { CoSimulation, type Frame, type SessionEvent } from '../../src/session/session.js';
import { partsViewOf } from '../../src/scenario/parts/trim.js';
import { parseScenario, scenarioToJSON } from '../../src/scenario/parse.js';
import type { Scenario } from '../../src/scenario/types.js';
import { deltaToPpm } from '../../src/scenario/units.js';
import { builtInScenarioNames, builtInScenarioRaw } from '../../src/scenarios/index.js';
import { parsePerturbation } from '../../src/session/perturbation.js';
import { InputError } from '../../src/util/input-error.js';
import { sampleOf, type NewLogRecord } from '../../src/protocol/log-records.js';
import {
  historyPointOf,
  type ClientCommand,
  type HistoryPoint,
  type NodePartsView,
  type RunStatus,
  type SessionInfo,
  type Speed,
  type WireFrame,
} from '../../src/protocol/messages.js';

/** What a runner reports; the same stream whether it runs in a worker or in the main thread. */
export type RunnerOutput =
  | { kind: 'frame'; frame: WireFrame; emittedAt: number }
  | { kind: 'event'; event: SessionEvent }
  | { kind: 'history'; points: HistoryPoint[] }
  | { kind: 'log'; record: NewLogRecord }
  | { kind: 'started'; scenario: unknown; label: string }
  | { kind: 'status'; info: SessionInfo; tau: number; tick: number };

export interface RunnerOptions {
  /** Scenario in normalized JSON form (it crosses a thread boundary). */
  scenario: unknown;
  /** The parts of a board described by them (the normalized JSON keeps only the derived model). */
  partsView?: NodePartsView[] | null;
  speed: Speed;
  frameRate: number;
  sliceMs: number;
}

/** Samples logged per slow time unit (ticks are decimated to this). */
const SAMPLES_PER_SLOW_UNIT = 10;
/** A checkpoint of the full state every this many samples. */
const CHECKPOINT_EVERY = 50;

/**
 * Steps the one live co-simulation, paced to the operator's speed in short slices, and carries
 * out operators' commands. It does no I/O: everything it has to say goes to `emit`, so the same
 * code runs in a worker thread (the server's default) or in the main thread.
 */
export class SessionRunner {
  session!: CoSimulation;
  scenario!: Scenario;
  private partsView: NodePartsView[] | null = null;
  status: RunStatus = 'running';
  speed: Speed;
  private readonly frameInterval: number;
  private timer: NodeJS.Timeout | null = null;
  private stopped = false;
  private lastFrameSent = 0;
  private pendingFrame: WireFrame | null = null;
  private pendingPoints: HistoryPoint[] = [];
  private paceOrigin = { wall: 0, slow: 0 };
  private sampleEveryTicks = 1;
  private samplesLogged = 0;

  constructor(
    private readonly options: RunnerOptions,
    private readonly emit: (output: RunnerOutput) => void,
  ) {
    this.speed = options.speed;
    this.frameInterval = 1000 / options.frameRate;
    this.start(parseScenario(options.scenario, 'scenario'), options.partsView ?? null);
  }

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
      nominalFrequencyAssumed: s.units.nominalFrequencyAssumed,
      omega: Array.from(p.omega),
      links: Array.from(p.linkFrom, (from, e) => ({ from, to: p.linkTo[e], weight: p.linkWeight[e], nominal: p.linkNominal[e] })),
      // nominal values: part noise and the environment move the detuning every tick on top of them
      detuning: this.session.nominalDetuning(),
      detuningPpm: this.session.nominalDetuning().map((d) => (p.epsilon > 0 ? deltaToPpm(d, p.epsilon) : 0)),
      coupling: { strength: p.strength, reactive: p.reactive, dissipative: p.dissipative },
      noise: { intensity: p.noiseIntensity, detuningWalk: p.detuningWalk, seed: s.noise.seed },
      macroStep: this.session.macroStep,
      integrator: { mode: this.session.integrator.mode, reason: this.session.integrator.reason, ...s.integrator },
      status: this.status,
      speed: this.speed,
      warnings: this.session.warnings.map((w) => w.message),
      logFile: null,
      parts: this.partsView,
    };
  }

  /** Carry out a command validated by the caller; throws InputError (answering the command's id) when it cannot be done. */
  command(command: ClientCommand, by: string): void {
    if (command.kind === 'perturbation') {
      if (this.status === 'halted')
        throw new InputError('action', 'the run is halted after a blow-up; reset or load a scenario first', { requestId: command.id });
      // validated again here: the caller's copy of the network may be one scenario behind
      try {
        this.session.enqueue(parsePerturbation(command.perturbation, this.session.params), by);
      } catch (error) {
        if (error instanceof InputError) throw error.answering(command.id);
        throw error;
      }
      if (this.status === 'paused') this.applyWhilePaused();
      return;
    }
    switch (command.action) {
      case 'pause':
        if (this.status === 'running') this.setStatus('paused', by);
        return;
      case 'resume':
        if (this.status === 'halted')
          throw new InputError('action', 'the run is halted after a blow-up; reset it first', { requestId: command.id });
        if (this.status === 'paused') this.setStatus('running', by);
        return;
      case 'set-speed':
        this.speed = command.speed;
        this.resetPace();
        this.announce(
          `speed set to ${command.speed === 'max' ? 'as fast as possible' : `${command.speed} slow-time units per second`}`,
          by,
        );
        return;
      case 'reset':
        this.start(this.scenario, this.partsView);
        this.announce('run reset to its start', by);
        return;
      case 'load-scenario': {
        if (command.name !== undefined && !builtInScenarioNames.includes(command.name)) {
          throw new InputError(
            'name',
            `no built-in scenario ${JSON.stringify(command.name)} (available: ${builtInScenarioNames.join(', ')})`,
            { requestId: command.id },
          );
        }
        let scenario: Scenario;
        try {
          scenario =
            command.name !== undefined
              ? parseScenario(builtInScenarioRaw(command.name), `built-in scenario ${command.name}`)
              : parseScenario(command.scenario);
        } catch (error) {
          // the scenario's fields lie inside the command's field `scenario`
          if (error instanceof InputError) throw error.under('scenario').answering(command.id);
          throw error;
        }
        this.start(scenario, partsViewOf(scenario));
        this.announce(`scenario "${scenario.name}" loaded`, by);
        return;
      }
    }
  }

  /** Step now, ignoring the pace, until the session has done `tick` ticks (tests, tools). */
  runToTick(tick: number): void {
    while (this.session.tick < tick && this.status !== 'halted') {
      const frame = this.session.step();
      if (!frame) break;
      this.absorb(frame);
    }
    this.flush(true);
  }

  stop(): void {
    this.stopped = true;
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
  }

  private start(scenario: Scenario, partsView: NodePartsView[] | null): void {
    this.scenario = scenario;
    this.partsView = partsView;
    this.session = new CoSimulation(scenario);
    const eps = this.session.params.epsilon;
    const ticksPerSlowUnit = eps > 0 ? 1 / (eps * this.session.macroStep) : 1;
    this.sampleEveryTicks = Math.max(1, Math.round(ticksPerSlowUnit / SAMPLES_PER_SLOW_UNIT));
    this.samplesLogged = 0;
    this.pendingFrame = null;
    this.pendingPoints = [];
    this.status = 'running';
    this.emit({ kind: 'started', scenario: scenarioToJSON(scenario), label: scenario.name });
    this.resetPace();
    this.schedule(0);
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
    if (this.stopped || this.status !== 'running') return;
    const eps = this.session.params.epsilon;
    const sliceEnd = performance.now() + this.options.sliceMs;
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
    this.flush(false);
    if (this.status === 'running') this.schedule(delay);
  }

  private absorb(frame: Frame): void {
    const { events, ...wire } = frame;
    for (const event of events) this.publish(event);
    this.pendingFrame = wire;
    this.pendingPoints.push(historyPointOf(wire));
    if (frame.tick % this.sampleEveryTicks === 0 || frame.status === 'halted') {
      this.emit({ kind: 'log', record: sampleOf(frame) });
      if (++this.samplesLogged % CHECKPOINT_EVERY === 0) this.checkpoint();
    }
    // a perturbation changed the parameters: tell everyone once it has taken effect
    if (events.some((e) => e.kind === 'perturbation')) this.emitStatus();
    if (frame.status === 'halted' && this.status !== 'halted') {
      this.status = 'halted';
      this.flush(true);
      this.checkpoint();
      this.emitStatus();
    }
  }

  private checkpoint(): void {
    this.emit({
      kind: 'log',
      record: { record: 'checkpoint', tau: this.session.tau, tick: this.session.tick, state: this.session.fullState() },
    });
  }

  private publish(event: SessionEvent): void {
    this.emit({ kind: 'log', record: { record: 'event', event } });
    this.emit({ kind: 'event', event });
  }

  private flush(force: boolean): void {
    if (this.pendingPoints.length > 0) {
      this.emit({ kind: 'history', points: this.pendingPoints });
      this.pendingPoints = [];
    }
    const now = performance.now();
    if (!this.pendingFrame || (!force && now - this.lastFrameSent < this.frameInterval)) return;
    // Keep to the frame clock rather than restarting it at each send: flushes come every few ms,
    // so "50 ms since the last send" alone gives 18 frames per second instead of 20.
    this.lastFrameSent = Math.max(this.lastFrameSent + this.frameInterval, now - this.frameInterval / 2);
    const frame = this.pendingFrame;
    this.pendingFrame = null;
    this.emit({ kind: 'frame', frame, emittedAt: Date.now() });
  }

  private emitStatus(): void {
    this.emit({ kind: 'status', info: this.info(), tau: this.session.tau, tick: this.session.tick });
  }

  /** While paused, apply queued perturbations with a zero-length tick so everyone sees them. */
  private applyWhilePaused(): void {
    setImmediate(() => {
      if (this.status !== 'paused') return;
      const frame = this.session.step(this.session.tau);
      if (frame) this.absorb(frame);
      this.flush(true);
      this.emitStatus();
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
    this.publish(this.session.recordNow('control', message, by));
    this.emitStatus();
  }
}
