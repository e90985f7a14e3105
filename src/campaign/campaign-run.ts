import type { ModelParameters } from '../model/parameters.js';
import type { LockSettings } from '../observe/lock-detector.js';
import type { Perturbation } from '../session/perturbation.js';
import { FaultGenerator, type GeneratorState } from './generator.js';
import { applyToView, appliesToUncoupled, previousValuesOf } from './restore.js';
import type { TickView } from './tick-view.js';
import { RAMP_STEPS, rampStepsDue, rampTarget, rampValue, type ActiveRamp } from './ramp.js';
import type { Campaign, FaultPlan } from './types.js';
import { FaultEvaluation, type EvaluationState, type FaultVerdict, type TimeBase } from './verdict.js';

/** A perturbation to queue before the next tick; `uncoupled` says whether the reference twin gets it too. */
export interface QueuedPerturbation {
  perturbation: Perturbation;
  by: string;
  uncoupled: boolean;
}

/** A restore still to apply: it belongs to its fault even after that fault's judging was cut short. */
export interface PendingRestore {
  id: string;
  at: number;
  restore: Perturbation | null;
}

export interface CampaignRunState {
  nextExplicit: number;
  pendingRandom: FaultPlan | null;
  generator: GeneratorState | null;
  open: EvaluationState[];
  /** Absent in checkpoints written before judging could be cut short: then read off the open evaluations. */
  restores?: PendingRestore[];
  /** Ramps still moving (absent in checkpoints written before faults could ramp). */
  ramps?: ActiveRamp[];
  lastView: TickView | null;
  started: number;
  finished: number;
  failed: number;
}

/**
 * A campaign running against one session, without any I/O: before each tick it says which
 * faults and restores to queue; after each tick it updates the open evaluations and hands back
 * the verdicts whose windows have closed. Each fault is judged on its own effect: when another
 * fault is applied while an earlier one is still being judged, the earlier one is judged on
 * what happened until then (cut short; its restore still comes when due) and what follows is
 * judged against the later fault. Its whole state is plain JSON (save/load), so a soak resumed
 * from a checkpoint continues the campaign exactly.
 */
export class CampaignRun {
  private nextExplicit = 0;
  private pendingRandom: FaultPlan | null = null;
  private readonly generator: FaultGenerator | null;
  private open: FaultEvaluation[] = [];
  private restores: PendingRestore[] = [];
  private ramps: ActiveRamp[] = [];
  /** Verdicts of evaluations cut short before the latest tick, handed out with its afterTick. */
  private cut: FaultVerdict[] = [];
  private lastView: TickView | null = null;
  started = 0;
  finished = 0;
  failed = 0;

  /**
   * @param params the live parameters of the session (read for "previous" restore values)
   * @param until end of the soak (tau); random faults whose window would pass it are not drawn
   * @param lock the session's lock detector settings: settling is judged with them
   */
  constructor(
    readonly campaign: Campaign,
    private readonly params: ModelParameters,
    readonly until: number,
    readonly lock: LockSettings,
    readonly base: TimeBase,
  ) {
    this.generator = campaign.random ? new FaultGenerator(campaign.random, params, until) : null;
    this.pendingRandom = this.generator?.next() ?? null;
  }

  /** Faults of the schedule that start at or after the end of the soak (never run). */
  get notStarted(): string[] {
    return this.campaign.faults.filter((f) => f.start >= this.until).map((f) => f.id);
  }

  /** The perturbations to queue before the tick that starts at `tau`: restores first, then new faults. */
  beforeTick(tau: number): QueuedPerturbation[] {
    const due = (start: number) => start <= tau * (1 + 1e-12) && start < this.until;
    const queued: QueuedPerturbation[] = [];
    const view = this.params.mutableValues();
    // ramps move on before anything else happens at this tick: a restore or a new fault of the same parameter wins
    this.ramps = this.ramps.filter((ramp) => {
      const due = rampStepsDue(ramp, tau);
      if (due > ramp.taken) {
        ramp.taken = due;
        const p = rampValue(ramp.from, ramp.to, due / RAMP_STEPS);
        applyToView(p, view, this.params);
        queued.push({ perturbation: p, by: `campaign:${ramp.id} (ramp ${due}/${RAMP_STEPS})`, uncoupled: appliesToUncoupled(p) });
      }
      return ramp.taken < RAMP_STEPS;
    });
    this.restores = this.restores.filter((pending) => {
      if (tau < pending.at * (1 - 1e-12)) return true;
      const evaluation = this.open.find((e) => e.id === pending.id);
      evaluation?.markRestored(tau);
      // a restore inside another fault's span is part of what that fault is judged on: say so
      for (const other of this.open)
        if (other !== evaluation && !other.overlapsWith(pending.id)) other.noteOverlap(`${pending.id} (restore)`);
      if (pending.restore) {
        applyToView(pending.restore, view, this.params);
        queued.push({
          perturbation: pending.restore,
          by: `campaign:${pending.id} (restore)`,
          uncoupled: appliesToUncoupled(pending.restore),
        });
      }
      return false;
    });
    const starting: FaultPlan[] = [];
    while (this.nextExplicit < this.campaign.faults.length && due(this.campaign.faults[this.nextExplicit].start)) {
      starting.push(this.campaign.faults[this.nextExplicit++]);
    }
    while (this.pendingRandom && due(this.pendingRandom.start)) {
      starting.push(this.pendingRandom);
      this.pendingRandom = this.generator!.next();
    }
    if (starting.length > 0 && this.open.length > 0) {
      // judged on their own effect: up to the last tick before the new fault
      const by = starting.map((plan) => plan.id).join(', ');
      for (const evaluation of this.open) this.cut.push(this.count(evaluation.finish(false, this.base, undefined, { at: tau, by })));
      this.open = [];
    }
    for (const plan of starting) {
      const p = plan.perturbation;
      const restore = plan.restore === 'previous' ? previousValuesOf(p, view, this.params) : plan.restore === 'none' ? null : plan.restore;
      // a ramp starts from the values the fault replaces (what "previous" restores too)
      const rampTo = plan.ramp !== undefined ? rampTarget(p, this.params) : null;
      const rampFrom = rampTo ? previousValuesOf(rampTo, view, this.params)! : null;
      applyToView(p, view, this.params);
      const evaluation = FaultEvaluation.begin(plan, tau, restore, this.lastView, this.lock);
      // faults applied at the same tick are judged together: their effects cannot be told apart
      for (const other of this.open) {
        other.noteOverlap(plan.id);
        evaluation.noteOverlap(other.id);
      }
      if (evaluation.state.restoreAt !== null) this.restores.push({ id: plan.id, at: evaluation.state.restoreAt, restore });
      this.open.push(evaluation);
      this.started++;
      if (rampTo && rampFrom) {
        // the value at the start is the one replaced: the first step is taken at the next tick
        this.ramps.push({ id: plan.id, start: tau, end: tau + plan.ramp!, from: rampFrom, to: rampTo, taken: 0 });
        continue;
      }
      queued.push({ perturbation: p, by: `campaign:${plan.id}`, uncoupled: appliesToUncoupled(p) });
    }
    return queued;
  }

  /** After a tick: verdicts cut short before it, and those whose evaluation window closed with it. */
  afterTick(view: TickView): FaultVerdict[] {
    const closed: FaultVerdict[] = this.cut;
    this.cut = [];
    this.open = this.open.filter((evaluation) => {
      evaluation.observe(view);
      if (!evaluation.windowClosed(view.tau)) return true;
      closed.push(this.count(evaluation.finish(true, this.base)));
      return false;
    });
    this.lastView = view;
    return closed;
  }

  /** Verdicts of the windows still open when the soak ends or halts. */
  finishAll(reason?: string): FaultVerdict[] {
    const verdicts = [...this.cut, ...this.open.map((evaluation) => this.count(evaluation.finish(false, this.base, reason)))];
    this.open = [];
    this.cut = [];
    return verdicts;
  }

  get openCount(): number {
    return this.open.length;
  }

  /** A deep copy: the live evaluations go on changing after a checkpoint is taken. */
  save(): CampaignRunState {
    return structuredClone({
      nextExplicit: this.nextExplicit,
      pendingRandom: this.pendingRandom,
      generator: this.generator?.save() ?? null,
      open: this.open.map((e) => e.state),
      restores: this.restores,
      ramps: this.ramps,
      lastView: this.lastView,
      started: this.started,
      finished: this.finished,
      failed: this.failed,
    });
  }

  load(state: CampaignRunState): void {
    this.nextExplicit = state.nextExplicit;
    this.pendingRandom = state.pendingRandom;
    if (this.generator && state.generator) this.generator.load(state.generator);
    this.open = state.open.map((s) => new FaultEvaluation(s));
    this.restores =
      state.restores ??
      state.open
        .filter((s) => s.restoreAt !== null && s.restoredAt === null)
        .map((s) => ({ id: s.plan.id, at: s.restoreAt!, restore: s.restore }));
    this.ramps = state.ramps ?? [];
    this.lastView = state.lastView;
    this.started = state.started;
    this.finished = state.finished;
    this.failed = state.failed;
  }

  private count(verdict: FaultVerdict): FaultVerdict {
    this.finished++;
    if (verdict.outcome === 'fail') this.failed++;
    return verdict;
  }
}
