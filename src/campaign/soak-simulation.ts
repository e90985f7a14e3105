import { CoSimulation, type Frame, type SessionOptions } from '../session/session.js';
import type { Scenario } from '../scenario/types.js';
import { tauToSeconds } from '../scenario/units.js';
import type { NewLogRecord, SoakCheckpointRecord } from '../protocol/log-records.js';
import { SOAK_EXIT, type SoakOutcome } from '../protocol/soak-records.js';
import { runSummaryOf, type RunSummary } from '../protocol/run-summary.js';
import { CampaignRun } from './campaign-run.js';
import { PhaseRecorder, type PhaseSample } from './phase-record.js';
import { analyzeStability, type MaskResult } from './stability-analysis.js';
import { tickViewOf } from './tick-view.js';
import type { Campaign } from './types.js';
import type { FaultVerdict, TimeBase } from './verdict.js';

/** How a soak is laid out in ticks (fixed when it starts, kept in its log header). */
export interface SoakPlan {
  /** End of the soak (tau). */
  until: number;
  /** Ticks between stability samples. */
  stride: number;
  /** Ticks between checkpoints. */
  checkpointTicks: number;
}

/** Where a resumed soak continues: its last checkpoint and what the log held before it. */
export interface SoakContinuation {
  checkpoint: SoakCheckpointRecord;
  samples: PhaseSample[];
  verdicts: FaultVerdict[];
}

/**
 * The simulation of a soak, without any I/O: the co-simulation driven by the campaign, beside an
 * uncoupled twin (same parts, same noise, coupling 0) for the stability references. Each tick
 * hands back, in order, the records the soak log gets: the tick's events, the verdicts that
 * closed, a trace sample every `stride` ticks and a checkpoint every `checkpointTicks`. Nothing
 * in them depends on the wall clock, so a soak continued from a checkpoint hands back the same
 * records as one run straight through.
 */
export class SoakSimulation {
  readonly session: CoSimulation;
  private twin: CoSimulation | null;
  readonly faults: CampaignRun;
  private readonly recorder: PhaseRecorder;
  readonly samples: PhaseSample[];
  readonly verdicts: FaultVerdict[];
  readonly base: TimeBase;
  private lastFrame: Frame | null = null;
  private lastFinal: RunSummary | null = null;

  constructor(
    readonly scenario: Scenario,
    readonly campaign: Campaign,
    readonly plan: SoakPlan,
    from: SoakContinuation | null = null,
  ) {
    const options = sessionOptionsOf(campaign);
    const twinScenario: Scenario = { ...scenario, coupling: { ...scenario.coupling, strength: 0 } };
    const cp = from?.checkpoint ?? null;
    this.session = cp ? CoSimulation.fromCheckpoint(scenario, cp.session, options) : new CoSimulation(scenario, options);
    const withTwin = campaign.stability.uncoupledReference;
    this.twin = !withTwin
      ? null
      : cp
        ? cp.twin
          ? CoSimulation.fromCheckpoint(twinScenario, cp.twin, options)
          : null
        : new CoSimulation(twinScenario, options);
    const params = this.session.params;
    this.base = { epsilon: scenario.epsilon, secondsPerTau: tauToSeconds(1, scenario.units.nominalFrequencyHz, params.omega[0]) };
    this.faults = new CampaignRun(campaign, params, plan.until, this.session.lock, this.base);
    this.recorder = new PhaseRecorder(campaign.stability.from, plan.stride, this.session.macroStep, withTwin);
    this.samples = from?.samples.slice() ?? [];
    this.verdicts = from?.verdicts.slice() ?? [];
    if (cp) {
      this.faults.load(cp.campaign);
      this.recorder.load(cp.phases);
      this.lastFinal = cp.final;
      if (this.recorder.samples !== this.samples.length) {
        throw new RangeError(`the checkpoint counts ${this.recorder.samples} stability samples but the log holds ${this.samples.length}`);
      }
    }
  }

  /** The soak reached its end or halted. */
  get done(): boolean {
    return !(this.session.tau < this.plan.until * (1 - 1e-15)) || this.session.halted !== null;
  }

  /** One tick: the records it adds to the log, in order (empty once halted). */
  tick(): NewLogRecord[] {
    const s = this.session;
    for (const q of this.faults.beforeTick(s.tau)) {
      s.enqueue(q.perturbation, q.by);
      if (this.twin && q.uncoupled) this.twin.enqueue(q.perturbation, q.by);
    }
    const frame = s.step(this.plan.until);
    if (!frame) return [];
    let twinFrame: Frame | null = null;
    if (this.twin) {
      twinFrame = this.twin.step(this.plan.until);
      if (!twinFrame || twinFrame.status === 'halted') {
        this.twin = null;
        twinFrame = null;
      }
    }
    this.lastFrame = frame;
    const records: NewLogRecord[] = frame.events.map((event) => ({ record: 'event', event }));
    const view = tickViewOf(frame, s.pairs);
    for (const verdict of this.faults.afterTick(view)) records.push(this.verdictRecord(verdict));
    const sample = this.recorder.observe(
      frame.tick,
      frame.tau,
      frame.full.pattern.locked,
      frame.full.phase,
      twinFrame ? twinFrame.full.phase : null,
    );
    if (sample) this.samples.push(sample);
    if (sample || this.recorder.isSampleTick(frame.tick, frame.tau)) {
      records.push({
        record: 'soak-sample',
        tick: frame.tick,
        tau: frame.tau,
        ensemble: sample?.ensemble ?? null,
        node: sample?.node ?? null,
        uncoupledEnsemble: sample?.uncoupledEnsemble ?? null,
        singlePart: sample?.singlePart ?? null,
        phaseDifferences: frame.full.phaseDifferences,
        divergence: frame.divergence.relative,
        pattern: view.full.label,
        guide: view.guide.label,
      });
    }
    if (frame.tick % this.plan.checkpointTicks === 0 && frame.status !== 'halted') records.push(this.checkpoint(frame));
    return records;
  }

  /**
   * The end: the verdicts of windows still open (a halt fails what it cut off; the planned end
   * leaves them INCOMPLETE where undecided), the stability analysis and the outcome. `notes` are
   * the soak's own remarks (a resume under other engine code, ...), kept first.
   */
  finish(options: { failIncomplete?: boolean; notes?: readonly string[] } = {}): { records: NewLogRecord[]; outcome: SoakOutcome } {
    const s = this.session;
    const halted = s.halted;
    const closing = halted ? this.faults.finishAll(`the run halted at tau ${s.tau.toPrecision(8)}: ${halted}`) : this.faults.finishAll();
    const records: NewLogRecord[] = closing.map((verdict) => this.verdictRecord(verdict));
    const notes = [...(options.notes ?? [])];
    const tau0 = this.plan.stride * s.macroStep * this.base.secondsPerTau;
    const { mask, mustMeetMask } = this.campaign.stability;
    const stability = analyzeStability(this.samples, tau0, this.scenario.units.nominalFrequencyHz, mask ? { mask, mustMeetMask } : {});
    const twinStop = this.samples.findIndex((sample) => sample.uncoupledEnsemble === null);
    if (this.campaign.stability.uncoupledReference && twinStop >= 0)
      notes.push(`the uncoupled twin halted (blow-up); its stability series stop after ${twinStop} samples`);
    if (!stability)
      notes.push(
        `too few stability samples (${this.samples.length}) for frequency-stability metrics; run longer or let the ring lock earlier`,
      );
    const failed = this.verdicts.filter((v) => v.outcome === 'fail').length;
    const incomplete = this.verdicts.filter((v) => v.outcome === 'incomplete').length;
    // The mask is a soak-level criterion, judged once over the whole record: a crossing fails the soak as a failed fault does.
    const maskFailed = mask !== null && mustMeetMask && stability?.mask?.pass !== true;
    if (mask !== null) notes.push(maskNote(mask.name, mustMeetMask, stability?.mask ?? null));
    const exitCode = halted
      ? SOAK_EXIT.halted
      : failed > 0 || maskFailed || (options.failIncomplete && incomplete > 0)
        ? SOAK_EXIT.failed
        : SOAK_EXIT.pass;
    if (incomplete > 0) {
      const counted = options.failIncomplete
        ? '; --fail-incomplete counts them as failures'
        : '; they do not fail the soak unless --fail-incomplete is given';
      notes.push(
        `${incomplete} fault${incomplete === 1 ? ' was' : 's were'} INCOMPLETE (judging stopped before the outcome was decided)${counted}`,
      );
    }
    const notStarted = this.faults.notStarted;
    if (notStarted.length > 0) notes.push(`faults starting after the end of the soak were not run: ${notStarted.join(', ')}`);
    const outcome: SoakOutcome = {
      status: halted ? 'halted' : 'complete',
      halted,
      tau: s.tau,
      pass: exitCode === SOAK_EXIT.pass,
      exitCode,
      counts: { faults: this.verdicts.length, passed: this.verdicts.length - failed - incomplete, failed, incomplete, notStarted },
      verdicts: this.verdicts,
      stability,
      final: this.lastFrame ? runSummaryOf(this.lastFrame) : this.lastFinal,
      state: s.fullState(),
      notes,
    };
    records.push({ record: 'end', result: outcome });
    return { records, outcome };
  }

  private verdictRecord(verdict: FaultVerdict): NewLogRecord {
    this.verdicts.push(verdict);
    return { record: 'verdict', verdict };
  }

  private checkpoint(frame: Frame): NewLogRecord {
    this.lastFinal = runSummaryOf(frame);
    return {
      record: 'checkpoint',
      tau: this.session.tau,
      tick: this.session.tick,
      state: this.session.fullState(),
      session: this.session.checkpoint(),
      twin: this.twin?.checkpoint() ?? null,
      campaign: this.faults.save(),
      phases: this.recorder.save(),
      final: this.lastFinal,
    };
  }
}

/** The session options a campaign's detector settings ask for. */
function sessionOptionsOf(campaign: Campaign): SessionOptions {
  const options: SessionOptions = {};
  if (campaign.detector.lockWindow !== null) options.lockWindow = campaign.detector.lockWindow;
  if (campaign.detector.lockTolerance !== null) options.lockTolerance = campaign.detector.lockTolerance;
  return options;
}

/** What the mask criterion found, for the summary's notes. */
function maskNote(name: string, required: boolean, result: MaskResult | null): string {
  const criterion = required ? 'the soak must meet it (stability.mustMeetMask)' : 'reported only (stability.mustMeetMask is false)';
  if (result === null) return `mask ${JSON.stringify(name)} could not be checked: too few stability samples; ${criterion}`;
  if (result.pass) {
    const m = result.margin;
    return `the array output meets mask ${JSON.stringify(name)} with a margin of ${m.db!.toFixed(2)} dB (x${m.factor!.toPrecision(3)}) at tau ${m.tau} s; ${criterion}`;
  }
  return `${result.reason}; ${criterion}`;
}
