import type { ModeState, Scenario } from '../scenario/types.js';
import { tauToSeconds } from '../scenario/units.js';
import { ModelParameters, type MutableParameterValues } from '../model/parameters.js';
import { addToAmplitude, originalFromRotating } from '../model/coordinates.js';
import { initialRotatingState } from '../model/initial.js';
import { FullSystem, type FullIntegrator } from '../integrate/full-system.js';
import { IntegratorSwitch, type IntegratorSwitchCheckpoint } from '../envelope/integrator-switch.js';
import type { IntegratorMode, IntegratorRequest } from '../envelope/choice.js';
import type { NoiseModel } from '../envelope/averaged-noise.js';
import { GUIDE_TOLERANCE, GuideSystem } from '../guide/guide.js';
import { nearResonances, type ResonanceWarning } from '../guide/resonance.js';
import { divergence, neighbourPhaseDifferences, readObservables, type Divergence, type SystemObservables } from '../observe/amplitudes.js';
import { graphAutomorphisms } from '../pattern/automorphisms.js';
import { lockedStateStability, solveLockedState } from '../predict/locked-state.js';
import { GuideModel } from '../predict/guide-model.js';
import { LivePredictor, type LivePrediction, type LivePredictorState } from '../predict/live.js';
import { applyPerturbation, describePerturbation, parsePerturbation, type Perturbation } from './perturbation.js';
import { PatternTracker, patternIdentity, type PatternReport, type PatternTrackerState } from './pattern-tracker.js';
import { LOCK_TOLERANCE, type LockSettings, type LockTransition } from '../observe/lock-detector.js';
import { CoupledPairs } from '../observe/coupled-pairs.js';
import type { RandomState } from '../util/random.js';
import { wrapAngle } from '../util/angles.js';
import { FrequencyDrive, type FrequencyDriveState } from './frequency-drive.js';

export interface SessionOptions {
  /**
   * Lock window in slow time units (eps tau). Default: two coupling relaxation times,
   * 2 / (kappa |sigma + i rho / omega_0|), kept between 2 and 50, so a slow phase slip near the
   * edge of the locking range is not mistaken for a lock.
   */
  lockWindow?: number;
  /** Largest phase-difference excursion over the window that still counts as locked (rad); default LOCK_TOLERANCE (0.05). */
  lockTolerance?: number;
  /** Relative residual below which a group element counts as a symmetry; default 0.02. */
  symmetryTolerance?: number;
  /** Relative tolerance of the guiding system's adaptive integrator; default 1e-10. */
  guideTolerance?: number;
  /**
   * Full-system integrator: 'micro' steps, the second-order 'envelope', or 'auto' (default): the
   * envelope where it is valid, as accurate as micro-stepping and cheaper (src/envelope).
   */
  integrator?: IntegratorRequest;
  /** Largest estimated relative error at which 'auto' takes the envelope; default 1e-8 (micro-step accuracy). */
  envelopeAutoError?: number;
}

export type SessionEventKind = 'perturbation' | 'lock' | 'unlock' | 'pattern-change' | 'blow-up' | 'guide-failure' | 'warning' | 'control';

export interface SessionEvent {
  /** Running number of the event within the session. */
  seq: number;
  tau: number;
  kind: SessionEventKind;
  message: string;
  /** Who caused it (operator name, "schedule", "engine"). */
  by: string;
  perturbation?: Perturbation;
}

/**
 * Everything needed to continue a session bit for bit: both states, the clock, the mutable
 * parameters, the noise generator, the guide's adaptive step, the lock windows and the queue.
 * Plain JSON (doubles survive JSON.stringify/parse exactly).
 */
export interface SessionCheckpoint {
  version: 1;
  tick: number;
  tau: number;
  full: number[];
  guide: number[];
  guideStep: number;
  guideFailed: boolean;
  random: RandomState;
  parameters: MutableParameterValues;
  queue: { perturbation: Perturbation; by: string }[];
  eventCount: number;
  halted: string | null;
  trackers: { full: PatternTrackerState; guide: PatternTrackerState };
  margin: { stale: boolean; value: { margin: number; rotation: number[] } | null };
  /** Which integrator ran, with the envelope's state (absent in older checkpoints: micro steps). */
  integrator?: IntegratorSwitchCheckpoint;
  /** Part noise and environment drive (absent when the scenario has neither). */
  drive?: FrequencyDriveState;
  /** Live prediction state (absent in checkpoints written before it existed). */
  prediction?: { stale: boolean; kicked: boolean; value: LivePrediction | null; predictor: LivePredictorState };
}

export interface GuideReport extends SystemObservables {
  pattern: PatternReport;
  /** Largest real part of the locked state's reduced Jacobian (slow-time units), null when unknown. */
  margin: number | null;
  /** Collective frequency shift per mode, in slow time (rad per unit eps tau), when locked. */
  rotation: number[] | null;
}

export interface Frame {
  tick: number;
  tau: number;
  /** eps tau */
  slowTime: number;
  /** Physical time at the nominal frequency. */
  seconds: number;
  /** 'halted' after a blow-up: the state is the last good one and the run does not go on. */
  status: 'running' | 'halted';
  full: SystemObservables & { pattern: PatternReport };
  guide: GuideReport;
  divergence: Divergence;
  /** Which integrator produced `full`: micro steps or the second-order envelope. */
  mode: IntegratorMode;
  /** How the noise in `full` was made; 'averaged-diffusion' (envelope) is statistically, not pathwise, equivalent. */
  noiseModel: NoiseModel;
  /**
   * The guide's predicted fate after the latest perturbation batch (does the current pattern
   * persist, with what margin, or what does it become); null until the first perturbation.
   * Computed once per batch and then repeated, so ordinary ticks cost nothing.
   */
  prediction: LivePrediction | null;
  events: SessionEvent[];
}

/** The macro tick in tau: the scenario's number of carrier periods of mode 0. */
export function macroStepOf(scenario: Scenario): number {
  return (scenario.integrator.macroPeriods * 2 * Math.PI) / scenario.modes[0].omega;
}

/** Two coupling relaxation times in slow time, clamped to [2, 50]. */
export function defaultLockWindow(params: ModelParameters): number {
  const rate = Math.abs(params.strength) * Math.hypot(params.dissipative, params.reactive / params.omega[0]);
  return rate > 0 ? Math.min(50, Math.max(2, 2 / rate)) : 2;
}

/** The lock window never holds more ticks than this (memory and time per tick stay bounded). */
const MAX_LOCK_WINDOW_TICKS = 5000;

/** Above this many slow variables the guide's margin is not computed every lock (dense Jacobian). */
const MARGIN_SIZE_LIMIT = 160;

/**
 * The co-simulation: the full system and the guiding system on one clock of macro ticks.
 * Perturbations are queued and applied at the next tick boundary to both; each tick yields a
 * frame with the observables of both, their patterns and symmetry, their divergence and the
 * events of that tick. A blow-up halts the run with an event and keeps the last good state.
 */
export class CoSimulation {
  readonly params: ModelParameters;
  /** Micro steps, the envelope, and which of them runs (src/envelope/integrator-switch.ts). */
  readonly integrator: IntegratorSwitch;
  readonly guide: GuideSystem;
  readonly macroStep: number;
  readonly warnings: ResonanceWarning[];
  tick = 0;
  halted: string | null = null;
  group: Int32Array[];
  /** The lock detector's tolerance (rad) and window (tau), as the soak verdicts need them. */
  readonly lock: LockSettings;
  /** The coupled pairs whose phase differences the lock detectors watch (updated after link and coupling faults). */
  readonly pairs: CoupledPairs;
  /** Part noise and environment (src/session/frequency-drive.ts); null when the scenario has neither. */
  readonly drive: FrequencyDrive | null;

  private readonly fullTracker: PatternTracker;
  private readonly guideTracker: PatternTracker;
  private readonly queue: { perturbation: Perturbation; by: string }[] = [];
  private pending: SessionEvent[] = [];
  private eventCount = 0;
  private marginStale = true;
  private margin: { margin: number; rotation: number[] } | null = null;
  private readonly predictor: LivePredictor;
  /** The guide's state just before the latest perturbation batch (where the prediction's continuation starts). */
  private readonly guideBefore: Float64Array;
  private prediction: LivePrediction | null = null;
  private predictionStale = false;
  private predictionKicked = false;

  constructor(
    readonly scenario: Scenario,
    readonly options: SessionOptions = {},
  ) {
    this.params = new ModelParameters(scenario);
    const initial = initialRotatingState(scenario, this.params);
    const micro = new FullSystem(this.params, initial, scenario.integrator.stepsPerPeriod, scenario.noise.seed);
    this.guide = new GuideSystem(this.params, initial, scenario.integrator.averagingGrid, options.guideTolerance ?? GUIDE_TOLERANCE);
    this.macroStep = macroStepOf(scenario);
    this.drive = FrequencyDrive.of(scenario, this.params, this.macroStep);
    this.integrator = new IntegratorSwitch(
      this.params,
      micro,
      options.integrator ?? 'auto',
      this.macroStep,
      (kind, message) => this.record(kind, message, 'engine'),
      options.envelopeAutoError,
    );
    const eps = this.params.epsilon;
    const window = options.lockWindow ?? defaultLockWindow(this.params);
    const windowTicks = eps > 0 ? Math.min(MAX_LOCK_WINDOW_TICKS, Math.max(2, Math.round(window / (eps * this.macroStep)))) : 10;
    const lockTolerance = options.lockTolerance ?? LOCK_TOLERANCE;
    this.lock = { tolerance: lockTolerance, window: windowTicks * this.macroStep };
    const symmetryTolerance = options.symmetryTolerance ?? 0.02;
    this.pairs = new CoupledPairs(this.params);
    this.fullTracker = new PatternTracker(this.params.nodes, this.params.modes, this.pairs, windowTicks, lockTolerance, symmetryTolerance);
    this.guideTracker = new PatternTracker(this.params.nodes, this.params.modes, this.pairs, windowTicks, lockTolerance, symmetryTolerance);
    this.group = this.computeGroup();
    this.predictor = new LivePredictor(scenario, this.params, lockTolerance);
    this.guideBefore = new Float64Array(this.guide.state.length);
    this.warnings = nearResonances(this.params.omega, eps);
    for (const w of this.warnings) this.record('warning', w.message, 'engine');
    this.integrator.start();
  }

  get tau(): number {
    return this.full.tau;
  }

  /** The full-system integrator that runs now (micro steps or the envelope). */
  get full(): FullIntegrator {
    return this.integrator.active;
  }

  /** Validate a raw perturbation (throws InputError) and queue it. */
  submit(raw: unknown, by: string, extraFields: readonly string[] = []): Perturbation {
    const perturbation = parsePerturbation(raw, this.params, '', extraFields);
    this.enqueue(perturbation, by);
    return perturbation;
  }

  /** Queue an already validated perturbation for the next tick boundary. */
  enqueue(perturbation: Perturbation, by: string): void {
    this.queue.push({ perturbation, by });
  }

  /** One macro tick (or a shorter one ending at `until`); null once halted. */
  step(until?: number): Frame | null {
    if (this.halted) return null;
    this.applyQueue();
    const tauEnd = until !== undefined ? Math.min(this.tau + this.macroStep, until) : this.tau + this.macroStep;
    if (this.drive) {
      this.drive.beforeTick(this.tau, tauEnd);
      this.guide.invalidate();
      this.integrator.afterDetuningChange();
    }
    const outcome = this.integrator.advance(tauEnd);
    if (!outcome.ok) {
      this.halted = outcome.reason ?? 'blow-up';
      this.record('blow-up', `run halted: ${this.halted}; the state is kept as it was at tau = ${this.tau.toPrecision(8)}`, 'engine');
      return this.frame();
    }
    if (outcome.detuningChanged) this.guide.invalidate();
    const guideRunning = !this.guide.failed;
    if (!this.guide.advance(tauEnd) && guideRunning) {
      this.record('guide-failure', 'the guiding system failed (its step size collapsed); the full run goes on', 'engine');
    }
    this.tick++;
    this.integrator.afterTick(this.tick);
    return this.frame();
  }

  /** Step until tau >= until, calling onFrame for each tick. Returns the last frame. */
  runUntil(until: number, onFrame?: (frame: Frame) => void): Frame | null {
    let last: Frame | null = null;
    while (this.tau < until * (1 - 1e-15) && !this.halted) {
      last = this.step(until);
      if (last && onFrame) onFrame(last);
    }
    return last;
  }

  /**
   * Each node's nominal detuning: the scenario's or the one an operator or a campaign set, without
   * the offset the part noise and the environment add for the current tick (frequency-drive.ts).
   * What the board is, as the catalogue and the controls see it; equal to params.detuning without a drive.
   */
  nominalDetuning(): number[] {
    return Array.from(this.drive ? this.drive.nominal : this.params.detuning);
  }

  /** The full state in the original coordinates (x, x') at the current tau. */
  fullState(): ModeState[][] {
    return originalFromRotating(this.params, this.tau, this.full.state);
  }

  /** A bit-exact checkpoint (see SessionCheckpoint). Events not yet handed out are not part of it. */
  checkpoint(): SessionCheckpoint {
    return {
      version: 1,
      tick: this.tick,
      tau: this.tau,
      full: Array.from(this.full.state),
      guide: Array.from(this.guide.state),
      guideStep: this.guide.nextStep,
      guideFailed: this.guide.failed,
      random: this.full.random.getState(),
      parameters: this.params.mutableValues(),
      queue: this.queue.map((q) => ({ ...q })),
      eventCount: this.eventCount,
      halted: this.halted,
      trackers: { full: this.fullTracker.save(), guide: this.guideTracker.save() },
      margin: { stale: this.marginStale, value: this.margin },
      integrator: this.integrator.save(),
      ...(this.drive ? { drive: this.drive.save() } : {}),
      prediction: { stale: this.predictionStale, kicked: this.predictionKicked, value: this.prediction, predictor: this.predictor.save() },
    };
  }

  /** A session of `scenario` continued from a checkpoint it wrote. */
  static fromCheckpoint(scenario: Scenario, saved: SessionCheckpoint, options: SessionOptions = {}): CoSimulation {
    const session = new CoSimulation(scenario, options);
    session.restore(saved);
    return session;
  }

  /**
   * An event from outside the tick loop (pause, speed, reset ...), numbered in the same sequence
   * as the session's own events and handed back at once instead of with the next frame.
   */
  recordNow(kind: SessionEventKind, message: string, by: string): SessionEvent {
    return { seq: ++this.eventCount, tau: this.tau, kind, message, by };
  }

  /** Continue as `saved` says (see fromCheckpoint): each part restores its own state. */
  private restore(saved: SessionCheckpoint): void {
    this.pending = [];
    const p = this.params;
    if (saved.full.length !== this.full.state.length || saved.parameters.linkWeight.length !== p.linkWeight.length) {
      throw new RangeError('the checkpoint does not belong to this scenario (state or link count differs)');
    }
    this.tick = saved.tick;
    this.integrator.micro.restore(saved.full, saved.tau, saved.random);
    this.guide.restore({ state: saved.guide, tau: saved.tau, failed: saved.guideFailed, nextStep: saved.guideStep });
    p.restoreValues(saved.parameters);
    this.integrator.load(saved.integrator);
    if (this.drive && saved.drive) this.drive.load(saved.drive);
    this.queue.push(...saved.queue.map((q) => ({ ...q })));
    this.eventCount = saved.eventCount;
    this.halted = saved.halted;
    this.fullTracker.load(saved.trackers.full);
    this.guideTracker.load(saved.trackers.guide);
    this.marginStale = saved.margin.stale;
    this.margin = saved.margin.value;
    if (saved.prediction) {
      this.predictionStale = saved.prediction.stale;
      this.predictionKicked = saved.prediction.kicked;
      this.prediction = saved.prediction.value;
      this.predictor.load(saved.prediction.predictor);
    } else {
      this.predictor.rememberParameters(p);
    }
    this.group = this.computeGroup();
    this.pairs.update(p);
  }

  private applyQueue(): void {
    if (this.queue.length === 0) return;
    this.guideBefore.set(this.guide.state);
    let linksChanged = false;
    const m = this.params.modes;
    for (const { perturbation, by } of this.queue.splice(0)) {
      applyPerturbation(perturbation, this.params, (node, mode, re, im) => {
        addToAmplitude(this.full.state, m, node, mode, re, im);
        addToAmplitude(this.guide.state, m, node, mode, re, im);
      });
      // a set detuning is the node's nominal value: the drive's offset stays on top of it
      if (perturbation.action === 'set-detuning' && this.drive) this.drive.setNominal(perturbation.node, perturbation.delta);
      if (perturbation.action.endsWith('link') || perturbation.action === 'set-link-weight') linksChanged = true;
      if (perturbation.action !== 'set-noise') this.predictionStale = true;
      if (perturbation.action === 'kick-mode') this.predictionKicked = true;
      this.record('perturbation', describePerturbation(perturbation), by, perturbation);
    }
    if (linksChanged) this.group = this.computeGroup();
    this.pairs.update(this.params);
    this.guide.invalidate();
    this.marginStale = true;
    this.integrator.afterPerturbations();
  }

  private computeGroup(): Int32Array[] {
    return graphAutomorphisms(this.params.nodes, this.params.currentLinks(), { limit: 4 * this.params.nodes + 8 }).elements;
  }

  private record(kind: SessionEventKind, message: string, by: string, perturbation?: Perturbation): void {
    const event: SessionEvent = { seq: ++this.eventCount, tau: this.tau, kind, message, by };
    if (perturbation) event.perturbation = perturbation;
    this.pending.push(event);
  }

  private frame(): Frame {
    const { nodes, modes } = this.params;
    // first the prediction for the pattern the guide was in when the perturbations arrived, so
    // that both trackers already know where that pattern is predicted to go
    if (this.predictionStale) this.predictAfterPerturbations();
    const fullObserved = readObservables(this.full.state, nodes, modes);
    const guideObserved = readObservables(this.guide.state, nodes, modes);
    const full = this.fullTracker.observe(this.tau, this.full.state, fullObserved, this.group);
    const guide = this.guideTracker.observe(this.tau, this.guide.state, guideObserved, this.group);
    if (full.transition) this.recordTransition(full.transition);
    if (this.drive) this.addOutputPhase(fullObserved.phase);
    const margin = guide.report.locked ? this.guideMargin() : null;
    if (!guide.report.locked) this.marginStale = true;
    const eps = this.params.epsilon;
    const events = this.pending;
    this.pending = [];
    return {
      tick: this.tick,
      tau: this.tau,
      slowTime: eps * this.tau,
      seconds: tauToSeconds(this.tau, this.scenario.units.nominalFrequencyHz, this.params.omega[0]),
      status: this.halted ? 'halted' : 'running',
      full: { ...fullObserved, pattern: full.report },
      guide: { ...guideObserved, pattern: guide.report, margin: margin?.margin ?? null, rotation: margin?.rotation ?? null },
      divergence: divergence(this.full.state, this.guide.state, this.params.modes),
      mode: this.integrator.mode,
      noiseModel: this.integrator.noiseModel,
      prediction: this.prediction,
      events,
    };
  }

  /**
   * White PM is the output buffer's: it is in the phases read off the nodes (and so in every
   * stability record), not in what the resonators or the lock detector see.
   */
  private addOutputPhase(phase: number[][]): void {
    const pm = this.drive!.outputPhase;
    const omega = this.params.omega;
    for (let k = 0; k < phase.length; k++) {
      if (pm[k] === 0) continue;
      for (let j = 0; j < phase[k].length; j++) phase[k][j] = wrapAngle(phase[k][j] + (pm[k] * omega[j]) / omega[0]);
    }
  }

  /** Lock, unlock and pattern-change events of the full system (the lock detector's transitions). */
  private recordTransition(t: LockTransition): void {
    switch (t.kind) {
      case 'lock':
        this.record('lock', `locked into ${t.label}`, 'engine');
        return;
      case 'unlock': {
        const why =
          t.cause === 'slip'
            ? `cycle slip: the phase difference of nodes ${this.pairs.ends[2 * t.pair!]} and ${this.pairs.ends[2 * t.pair! + 1]} moved ${t.move!.toFixed(2)} rad`
            : t.cause === 'mode'
              ? 'another mode now carries the energy'
              : "the carrying mode's amplitude collapsed";
        this.record('unlock', `lost lock (was ${t.was}): ${why}`, 'engine');
        return;
      }
      case 'pattern-change':
        this.record(
          'pattern-change',
          `pattern changed from ${t.from} to ${t.to} without a cycle slip (the new pattern held over a lock window)`,
          'engine',
        );
        return;
      case 'settled':
        return; // settling back onto the same pattern is not an event
    }
  }

  /**
   * Once per perturbation batch: the live prediction for the pattern the guide was in (the
   * tracker's committed pattern, not a transient shape), continued from the guide's state before
   * the batch and looked ahead from its state after it. A persisting prediction tells both
   * trackers where that pattern's continued state lies.
   */
  private predictAfterPerturbations(): void {
    this.predictionStale = false;
    const kicked = this.predictionKicked;
    this.predictionKicked = false;
    if (this.halted || this.guide.failed) {
      this.prediction = null;
    } else {
      const current = this.guideTracker.committedPattern();
      this.prediction = this.predictor.predict(this.params, this.guideBefore, this.guide.state, current, this.tau, kicked);
    }
    const p = this.prediction;
    const current = p?.current;
    const hint =
      p && current && current.locked && current.kind !== 'unlocked' && (p.verdict === 'persists' || p.verdict === 'marginal') && p.pattern
        ? {
            label: patternIdentity(current.kind, current.q, current.mode),
            kind: current.kind,
            ...(current.q !== undefined ? { q: current.q } : {}),
            mode: p.pattern.mode,
            phaseDifferences: p.pattern.phaseDifferences,
          }
        : null;
    this.fullTracker.expectContinuation(hint);
    this.guideTracker.expectContinuation(hint);
  }

  private guideMargin(): { margin: number; rotation: number[] } | null {
    if (!this.marginStale) return this.margin;
    this.marginStale = false;
    this.margin = null;
    if (this.guide.state.length > MARGIN_SIZE_LIMIT) return null;
    // the same locked-state solver and stability as the catalogue, on the guide's own average
    const model = new GuideModel(this.scenario, this.params);
    const locked = solveLockedState(model.field, this.guide.state, model.modes, { parts: model.parts() });
    if (!locked.converged) return null;
    const stability = lockedStateStability(model.field, locked, model.modes, model.accuracy);
    // the collective frequency shift per mode (of the first part carrying it)
    const rotation = Array.from({ length: model.modes }, (_, j) => locked.rates[locked.generators.findIndex((g) => g.mode === j)] ?? 0);
    this.margin = { margin: stability.margin, rotation };
    this.expectLockedStateOfGuide(locked.state, stability.verdict === 'stable');
    return this.margin;
  }

  /**
   * The exact locked state the guide sits on is where its committed pattern lies under the
   * current parameters: the trackers keep that pattern's name for a state near it (noise can push
   * a snapshot across a shape boundary, a strained in-phase lock reads as a cluster), unless the
   * latest prediction said the pattern is lost.
   */
  private expectLockedStateOfGuide(state: Float64Array, stable: boolean): void {
    const p = this.prediction;
    if (!stable || !this.guideTracker.locked || (p && p.verdict !== 'persists' && p.verdict !== 'marginal')) return;
    const { nodes, modes } = this.params;
    const committed = this.guideTracker.committedPattern();
    if (committed.kind === 'unlocked') return;
    const observed = readObservables(state, nodes, modes);
    const mode = observed.dominantMode;
    const hint = {
      label: this.guideTracker.label,
      kind: committed.kind,
      ...(committed.q !== undefined ? { q: committed.q } : {}),
      mode,
      phaseDifferences: mode === 0 ? observed.phaseDifferences : neighbourPhaseDifferences(observed.phase, mode),
    };
    this.fullTracker.expectContinuation(hint);
    this.guideTracker.expectContinuation(hint);
  }
}
