/**
 * The headless soak: a co-simulation driven by a fault campaign, beside an uncoupled twin (same
 * parts, same noise, coupling 0) for the stability references, written to a crash-safe
 * segmented log with bit-exact checkpoints, ending in DIR/summary.json.
 *
 * Order of work per tick: the campaign's restores and new faults are queued (to the twin too
 * when they mean something uncoupled), both sessions step, then the tick's events, closed
 * verdicts, stability sample and (every checkpointTicks) checkpoint are appended in that order.
 * Nothing in a record depends on the wall clock, so a resumed soak writes the same lines.
 */
import { existsSync, mkdirSync, readFileSync, unlinkSync } from 'node:fs';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import {
  CampaignRun,
  PhaseRecorder,
  analyzeStability,
  parseCampaign,
  tickViewOf,
  type Campaign,
  type FaultVerdict,
  type PhaseSample,
  type TimeBase,
  type VerdictOutcome,
} from '../../src/campaign/index.js';
import { LOG_FORMAT_VERSION } from '../../src/protocol/log-records.js';
import { scenarioToJSON } from '../../src/scenario/parse.js';
import type { Scenario } from '../../src/scenario/types.js';
import { ASSUMED_FREQUENCY_NOTE, tauToSeconds } from '../../src/scenario/units.js';
import { PASS_CAUTION } from '../../src/campaign/cautions.js';
import { CoSimulation, type Frame, type SessionOptions } from '../../src/session/session.js';
import { SegmentedLog, cutAfter, listSegments, segmentPathFor, syncDirectory, type LogLine } from '../log/segments.js';
import { Progress, formatSeconds } from '../progress.js';
import { UsageError, loadScenario } from '../scenario-file.js';
import { SOFTWARE_VERSION } from '../version.js';
import { loadCampaign } from './campaign-file.js';
import { RESUMES_FILE, STATUS_FILE, SUMMARY_FILE, writeJsonAtomically } from './outputs.js';
import { runSummaryOf, type RunSummary } from '../../src/protocol/run-summary.js';
import { lockSoakDir } from './dir-lock.js';
import { engineFingerprint } from './engine-fingerprint.js';
import { findResumePoint, soakLogDir, type ResumePoint } from './resume.js';
import { SEGMENT_PREFIX, type CheckpointLine, type SampleLine, type SoakHeader, type SoakOutcome } from './soak-records.js';

export interface SoakOptions {
  scenario: string;
  campaign: string;
  /** End of the soak (tau); on --resume it may be left out (the log's header has it). */
  until?: number;
  out: string;
  resume?: boolean;
  /** Slow time units per wall second; undefined runs as fast as possible. */
  pace?: number;
  /** Segment size (bytes) of the log; default 4 MiB. */
  segmentBytes?: number;
  /** Tau between checkpoints; default 1/64 of the soak (at least 50 ticks). */
  checkpointEvery?: number;
  /** Where progress and verdict lines go; default process.stderr. */
  stderr?: NodeJS.WriteStream;
  /** An INCOMPLETE verdict fails the soak (exit code 1) instead of being reported beside a pass. */
  failIncomplete?: boolean;
}

export interface SoakResult {
  exitCode: number;
  summaryPath: string;
  summary: Record<string, unknown>;
}

export const EXIT_PASS = 0;
export const EXIT_FAILED = 1;
export const EXIT_HALTED = 3;

const DEFAULT_SEGMENT_BYTES = 4 * 1024 * 1024;
const SLICE_MS = 40;
/** Above this many lines not yet durable the stepping waits for the disk. */
const MAX_PENDING_LINES = 20000;

export async function runSoak(options: SoakOptions): Promise<SoakResult> {
  const { scenario } = loadScenario(options.scenario);
  const { campaign, raw } = loadCampaign(options.campaign, scenario);
  mkdirSync(options.out, { recursive: true });
  const unlock = lockSoakDir(options.out);
  try {
    return await soakLocked(options, scenario, campaign, raw);
  } finally {
    unlock();
  }
}

async function soakLocked(options: SoakOptions, scenario: Scenario, campaign: Campaign, raw: unknown): Promise<SoakResult> {
  const point = options.resume ? findResumePoint(options.out) : null;
  if (!options.resume && listSegments(soakLogDir(options.out), SEGMENT_PREFIX).length > 0) {
    throw new UsageError(`${options.out} already holds a soak log; continue it with --resume or choose another --out`);
  }
  if (point) checkSameSoak(point, scenario, campaign, options);
  const until = options.until ?? point?.header.soak.until;
  if (until === undefined) throw new UsageError('soak needs --until TAU');
  if (!(until > 0) || !Number.isFinite(until)) throw new UsageError(`--until must be a positive number (got ${until})`);
  if (point?.end) return finishedAlready(options.out, point, scenario, campaign);
  if (point && !point.checkpoint) {
    // killed before its first checkpoint: nothing to continue from, so start over
    removeSegments(soakLogDir(options.out));
    (options.stderr ?? process.stderr).write(`soak: ${options.out} had no checkpoint yet; starting over\n`);
  }
  const runner = new SoakRunner(scenario, campaign, raw, until, options, point?.checkpoint ? point : null);
  return runner.run();
}

function checkSameSoak(point: ResumePoint, scenario: Scenario, campaign: Campaign, options: SoakOptions): void {
  const header = point.header;
  if (JSON.stringify(header.scenario) !== JSON.stringify(scenarioToJSON(scenario))) {
    throw new UsageError(`cannot resume: ${options.scenario} is not the scenario the soak in ${options.out} was started with`);
  }
  const started = parseCampaign(header.soak.campaign, scenario, 'the log header');
  if (JSON.stringify(started) !== JSON.stringify(campaign)) {
    throw new UsageError(`cannot resume: ${options.campaign} is not the campaign the soak in ${options.out} was started with`);
  }
  if (options.until !== undefined && options.until !== header.soak.until) {
    throw new UsageError(`cannot resume: the soak in ${options.out} was started with --until ${header.soak.until}, not ${options.until}`);
  }
}

/** Resuming a soak that had finished: rewrite its summary from the end record. */
function finishedAlready(out: string, point: ResumePoint, scenario: Scenario, campaign: Campaign): SoakResult {
  const result = point.end!.result;
  const soak = point.header.soak;
  const summary = {
    ...summaryHead(result),
    scenario: scenario.name,
    campaign: campaign.name,
    until: soak.until,
    timeBase: timeBaseOf(scenario, campaign, soak.macroStep, soak.stride),
    note: 'the soak had already finished; summary rewritten from its log',
    resumes: readResumes(out),
    ...result,
  };
  return { exitCode: result.exitCode, summaryPath: writeJsonAtomically(out, SUMMARY_FILE, summary), summary };
}

function summaryHead(result: SoakOutcome): Record<string, unknown> {
  return { format: 'syncring-soak-summary', formatVersion: 1, pass: result.pass, caution: PASS_CAUTION, exitCode: result.exitCode };
}

/** How times convert, for readers of the summary. */
function timeBaseOf(scenario: Scenario, campaign: Campaign, macroStep: number, stride: number): Record<string, unknown> {
  return {
    epsilon: scenario.epsilon,
    secondsPerTau: tauToSeconds(1, scenario.units.nominalFrequencyHz, scenario.modes[0].omega),
    nominalFrequencyHz: scenario.units.nominalFrequencyHz,
    ...nominalFrequencyFields(scenario),
    campaignUnit: campaign.timeUnit,
    tauPerCampaignUnit: campaign.tauPerUnit,
    macroStep,
    sampleStrideTicks: stride,
  };
}

/**
 * Whether the seconds of this soak rest on the default nominal frequency, with the sentence that
 * says so: in the summary's time base and in status.json, for readers of either.
 */
function nominalFrequencyFields(scenario: Scenario): { nominalFrequencyAssumed: boolean; secondsNote?: string } {
  const assumed = scenario.units.nominalFrequencyAssumed;
  return assumed ? { nominalFrequencyAssumed: true, secondsNote: ASSUMED_FREQUENCY_NOTE } : { nominalFrequencyAssumed: false };
}

function readResumes(out: string): unknown[] {
  const path = join(out, RESUMES_FILE);
  if (!existsSync(path)) return [];
  try {
    return JSON.parse(readFileSync(path, 'utf8')) as unknown[];
  } catch {
    return [];
  }
}

class SoakRunner {
  private readonly session: CoSimulation;
  private twin: CoSimulation | null;
  private readonly faults: CampaignRun;
  private readonly recorder: PhaseRecorder;
  private readonly log: SegmentedLog;
  private readonly samples: PhaseSample[];
  private readonly verdicts: FaultVerdict[];
  private readonly stride: number;
  private readonly checkpointTicks: number;
  private readonly base: TimeBase;
  private readonly progress: Progress;
  private readonly stderr: NodeJS.WriteStream;
  private readonly discarded: Map<number, string>;
  private readonly discardedAtStart: number;
  private readonly notes: string[] = [];
  private mismatches = 0;
  private lastFrame: Frame | null = null;
  private lastFinal: RunSummary | null = null;
  private durableVerdicts: { id: string; pass: boolean; outcome: VerdictOutcome }[] = [];
  private logError: Error | null = null;
  private readonly startedWall = performance.now();
  private readonly startTau: number;
  private lastStatus = 0;

  constructor(
    private readonly scenario: Scenario,
    private readonly campaign: Campaign,
    private readonly rawCampaign: unknown,
    private readonly until: number,
    private readonly options: SoakOptions,
    point: ResumePoint | null,
  ) {
    this.stderr = options.stderr ?? process.stderr;
    const sessionOptions: SessionOptions = {};
    if (campaign.detector.lockWindow !== null) sessionOptions.lockWindow = campaign.detector.lockWindow;
    if (campaign.detector.lockTolerance !== null) sessionOptions.lockTolerance = campaign.detector.lockTolerance;
    const twinScenario: Scenario = { ...scenario, coupling: { ...scenario.coupling, strength: 0 } };
    const cp = point?.checkpoint ?? null;
    this.session = cp ? CoSimulation.fromCheckpoint(scenario, cp.session, sessionOptions) : new CoSimulation(scenario, sessionOptions);
    const withTwin = campaign.stability.uncoupledReference;
    this.twin = !withTwin ? null : cp ? (cp.twin ? CoSimulation.fromCheckpoint(twinScenario, cp.twin, sessionOptions) : null) : new CoSimulation(twinScenario, sessionOptions);
    const eps = scenario.epsilon;
    const params = this.session.params;
    this.base = { epsilon: eps, secondsPerTau: tauToSeconds(1, scenario.units.nominalFrequencyHz, params.omega[0]) };
    const macroStep = this.session.macroStep;
    const totalTicks = Math.ceil(until / macroStep);
    this.stride = point?.header.soak.stride ?? Math.max(1, Math.ceil(totalTicks / campaign.stability.maxSamples));
    this.checkpointTicks =
      point?.header.soak.checkpointTicks ??
      Math.max(1, options.checkpointEvery ? Math.round(options.checkpointEvery / macroStep) : Math.max(50, Math.ceil(totalTicks / 64)));
    this.faults = new CampaignRun(campaign, params, until, this.session.lock, this.base);
    this.recorder = new PhaseRecorder(campaign.stability.from, this.stride, macroStep, withTwin);
    this.samples = point?.samples ?? [];
    this.verdicts = point?.verdicts ?? [];
    // verdicts read back from the log are on disk already
    this.durableVerdicts = this.verdicts.map(durableEntry);
    this.discarded = point?.discarded ?? new Map();
    this.discardedAtStart = this.discarded.size;
    this.startTau = this.session.tau;
    const logDir = soakLogDir(options.out);
    const segmentPath = segmentPathFor(logDir, SEGMENT_PREFIX);
    const onError = (error: Error) => (this.logError ??= error);
    if (cp && point?.checkpointAt) {
      this.faults.load(cp.campaign);
      this.recorder.load(cp.phases);
      this.lastFinal = cp.final;
      if (this.recorder.samples !== this.samples.length) {
        throw new UsageError(`cannot resume: the checkpoint counts ${this.recorder.samples} stability samples but the log holds ${this.samples.length}`);
      }
      const nextSegment = cutAfter(logDir, SEGMENT_PREFIX, point.checkpointAt);
      this.log = new SegmentedLog({ segmentPath, segmentBytes: options.segmentBytes ?? DEFAULT_SEGMENT_BYTES, firstSeq: cp.seq + 1, firstSegment: nextSegment, onError });
      this.recordResume(point);
    } else {
      this.log = new SegmentedLog({ segmentPath, segmentBytes: options.segmentBytes ?? DEFAULT_SEGMENT_BYTES, onError });
      this.append(this.header(macroStep));
    }
    this.progress = new Progress('soak', until, this.stderr);
  }

  async run(): Promise<SoakResult> {
    const eps = this.scenario.epsilon;
    const paceOrigin = { wall: performance.now(), slow: eps * this.session.tau };
    while (this.session.tau < this.until * (1 - 1e-15) && !this.session.halted) {
      const sliceEnd = performance.now() + SLICE_MS;
      let delay = 0;
      while (performance.now() < sliceEnd && this.session.tau < this.until * (1 - 1e-15) && !this.session.halted) {
        if (this.options.pace) {
          const target = paceOrigin.slow + ((performance.now() - paceOrigin.wall) / 1000) * this.options.pace;
          if (eps * this.session.tau >= target) {
            delay = Math.min(50, Math.max(1, ((eps * this.session.macroStep) / this.options.pace) * 1000));
            break;
          }
        }
        this.tick();
      }
      this.report(false);
      if (this.logError) throw new Error(`the soak stopped because its log failed: ${this.logError.message}; fix the disk and continue with --resume`);
      if (this.log.pending > MAX_PENDING_LINES) await this.log.drain();
      else await new Promise((resolve) => (delay > 0 ? setTimeout(resolve, delay) : setImmediate(resolve)));
    }
    return this.finish();
  }

  private tick(): void {
    const s = this.session;
    for (const q of this.faults.beforeTick(s.tau)) {
      s.enqueue(q.perturbation, q.by);
      if (this.twin && q.uncoupled) this.twin.enqueue(q.perturbation, q.by);
    }
    const frame = s.step(this.until);
    if (!frame) return;
    let twinFrame: Frame | null = null;
    if (this.twin) {
      twinFrame = this.twin.step(this.until);
      if (!twinFrame || twinFrame.status === 'halted') {
        this.twin = null;
        twinFrame = null;
      }
    }
    this.lastFrame = frame;
    for (const event of frame.events) this.append({ record: 'event', event });
    const view = tickViewOf(frame, this.session.pairs);
    for (const verdict of this.faults.afterTick(view)) this.appendVerdict(verdict);
    const sample = this.recorder.observe(frame.tick, frame.tau, frame.full.pattern.locked, frame.full.phase, twinFrame ? twinFrame.full.phase : null);
    if (sample) this.samples.push(sample);
    if (sample || this.recorder.isSampleTick(frame.tick, frame.tau)) {
      const line: SampleLine = {
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
      };
      this.append(line as unknown as LogLine);
    }
    if (frame.tick % this.checkpointTicks === 0 && frame.status !== 'halted') this.checkpoint(frame);
  }

  private checkpoint(frame: Frame): void {
    this.lastFinal = runSummaryOf(frame);
    const line: CheckpointLine = {
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
    this.append(line as unknown as LogLine);
  }

  private appendVerdict(verdict: FaultVerdict): void {
    this.verdicts.push(verdict);
    // acknowledged (printed, counted in status.json) only once it is on disk
    void this.append({ record: 'verdict', verdict }).then(() => {
      this.durableVerdicts.push(durableEntry(verdict));
      this.say(verdictLine(verdict, this.base));
    }, () => undefined);
  }

  private append(record: LogLine): Promise<number> {
    if (this.discarded.size > 0) {
      const seq = this.log.nextSeq;
      const before = this.discarded.get(seq);
      if (before !== undefined) {
        this.discarded.delete(seq);
        if (before !== JSON.stringify({ ...record, seq })) this.mismatches++;
      }
    }
    const written = this.log.append(record);
    written.catch(() => undefined);
    return written;
  }

  private header(macroStep: number): LogLine {
    const soak: SoakHeader = {
      campaign: this.rawCampaign,
      until: this.until,
      stride: this.stride,
      checkpointTicks: this.checkpointTicks,
      macroStep,
      uncoupledReference: this.campaign.stability.uncoupledReference,
      engine: engineFingerprint(),
    };
    return {
      record: 'header',
      format: 'syncring-log',
      formatVersion: LOG_FORMAT_VERSION,
      software: { name: 'syncring', version: SOFTWARE_VERSION },
      createdAt: new Date().toISOString(),
      scenario: scenarioToJSON(this.scenario),
      seeds: { noise: this.scenario.noise.seed, initial: 'random' in this.scenario.initial ? this.scenario.initial.random.seed : null },
      soak,
    };
  }

  private recordResume(point: ResumePoint): void {
    const cp = point.checkpoint!;
    const entry = {
      at: new Date().toISOString(),
      fromTick: cp.tick,
      fromTau: cp.tau,
      checkpointSeq: cp.seq,
      discardedRecords: point.discarded.size,
      tornTailBytes: point.tornTailBytes,
    };
    const engine = engineFingerprint();
    const sameEngine = point.header.soak.engine === undefined || point.header.soak.engine === engine;
    if (!sameEngine) {
      this.notes.push(`resumed under other engine code (${engine}, started with ${point.header.soak.engine}): the part after tau ${cp.tau.toPrecision(8)} is not bit-identical to an uninterrupted run`);
      this.say(`soak: warning: the engine code changed since this soak started; it continues, but not bit for bit`);
    }
    writeJsonAtomically(this.options.out, RESUMES_FILE, [...readResumes(this.options.out), { ...entry, engine, sameEngine }]);
    this.say(`soak: resuming ${this.options.out} from tau ${cp.tau.toPrecision(8)} (tick ${cp.tick}); ${point.discarded.size} later records will be written again${point.tornTailBytes ? `, a torn last line of ${point.tornTailBytes} bytes dropped` : ''}`);
  }

  private async finish(): Promise<SoakResult> {
    const s = this.session;
    const halted = s.halted;
    // a halt fails what it cut off; the planned end of the soak leaves it INCOMPLETE where undecided
    const closing = halted ? this.faults.finishAll(`the run halted at tau ${s.tau.toPrecision(8)}: ${halted}`) : this.faults.finishAll();
    for (const verdict of closing) this.appendVerdict(verdict);
    const tau0 = this.stride * s.macroStep * this.base.secondsPerTau;
    const stability = analyzeStability(this.samples, tau0, this.scenario.units.nominalFrequencyHz);
    const twinStop = this.samples.findIndex((sample) => sample.uncoupledEnsemble === null);
    if (this.campaign.stability.uncoupledReference && twinStop >= 0) this.notes.push(`the uncoupled twin halted (blow-up); its stability series stop after ${twinStop} samples`);
    if (!stability) this.notes.push(`too few stability samples (${this.samples.length}) for frequency-stability metrics; run longer or let the ring lock earlier`);
    const failed = this.verdicts.filter((v) => v.outcome === 'fail').length;
    const incomplete = this.verdicts.filter((v) => v.outcome === 'incomplete').length;
    const exitCode = halted ? EXIT_HALTED : failed > 0 || (this.options.failIncomplete && incomplete > 0) ? EXIT_FAILED : EXIT_PASS;
    if (incomplete > 0) this.notes.push(`${incomplete} fault${incomplete === 1 ? ' was' : 's were'} INCOMPLETE (judging stopped before the outcome was decided)${this.options.failIncomplete ? '; --fail-incomplete counts them as failures' : '; they do not fail the soak unless --fail-incomplete is given'}`);
    const notStarted = this.faults.notStarted;
    if (notStarted.length > 0) this.notes.push(`faults starting after the end of the soak were not run: ${notStarted.join(', ')}`);
    const outcome: SoakOutcome = {
      status: halted ? 'halted' : 'complete',
      halted,
      tau: s.tau,
      pass: exitCode === EXIT_PASS,
      exitCode,
      counts: {
        faults: this.verdicts.length,
        passed: this.verdicts.length - failed - incomplete,
        failed,
        incomplete,
        notStarted,
      },
      verdicts: this.verdicts,
      stability,
      final: this.lastFrame ? runSummaryOf(this.lastFrame) : this.lastFinal,
      state: s.fullState(),
      notes: this.notes,
    };
    this.append({ record: 'end', result: outcome });
    await this.log.drain();
    await this.log.close();
    if (this.logError) throw new Error(`the soak's log failed: ${this.logError.message}; its summary was not written`);
    this.progress.finish();
    const summary = {
      ...summaryHead(outcome),
      scenario: this.scenario.name,
      campaign: this.campaign.name,
      until: this.until,
      timeBase: timeBaseOf(this.scenario, this.campaign, s.macroStep, this.stride),
      log: { dir: soakLogDir(this.options.out), segments: listSegments(soakLogDir(this.options.out), SEGMENT_PREFIX).length, records: this.log.nextSeq },
      resumes: readResumes(this.options.out),
      resumeCheck: { recordsCompared: this.discardedAtStart - this.discarded.size, mismatches: this.mismatches },
      wallSeconds: (performance.now() - this.startedWall) / 1000,
      ...outcome,
    };
    const summaryPath = writeJsonAtomically(this.options.out, SUMMARY_FILE, summary);
    this.report(true);
    return { exitCode, summaryPath, summary };
  }

  /** Progress bar on a terminal, status.json for anyone watching the folder. */
  private report(done: boolean): void {
    const s = this.session;
    const eps = this.scenario.epsilon;
    this.progress.update(s.tau, `slow ${(eps * s.tau).toFixed(1)}/${(eps * this.until).toFixed(1)}  faults ${this.faults.finished}/${this.faults.started}  failed ${this.faults.failed}`);
    const now = performance.now();
    if (!done && now - this.lastStatus < 1000) return;
    this.lastStatus = now;
    const fraction = Math.min(1, s.tau / this.until);
    const elapsed = (now - this.startedWall) / 1000;
    const doneHere = (s.tau - this.startTau) / (this.until - this.startTau);
    writeJsonAtomically(this.options.out, STATUS_FILE, {
      state: done ? (s.halted ? 'halted' : 'finished') : 'running',
      pid: process.pid,
      tau: s.tau,
      until: this.until,
      slowTime: eps * s.tau,
      slowUntil: eps * this.until,
      fraction,
      wallSeconds: elapsed,
      eta: done ? '0 s' : doneHere > 0 ? formatSeconds((elapsed * (1 - doneHere)) / doneHere) : '--',
      faults: {
        started: this.faults.started,
        judged: this.durableVerdicts.length,
        failed: this.durableVerdicts.filter((v) => v.outcome === 'fail').length,
        incomplete: this.durableVerdicts.filter((v) => v.outcome === 'incomplete').length,
      },
      verdicts: this.durableVerdicts.slice(-50),
      nominalFrequencyHz: this.scenario.units.nominalFrequencyHz,
      ...nominalFrequencyFields(this.scenario),
      updatedAt: new Date().toISOString(),
    });
  }

  private say(line: string): void {
    this.stderr.write(`${this.stderr.isTTY ? '\r\x1b[K' : ''}${line}\n`);
  }
}

/** Remove every segment (newest first) and sync the folder. */
function removeSegments(dir: string): void {
  for (const segment of listSegments(dir, SEGMENT_PREFIX).reverse()) unlinkSync(segment.path);
  syncDirectory(dir);
}

function durableEntry(v: FaultVerdict): { id: string; pass: boolean; outcome: VerdictOutcome } {
  // verdicts in logs written before INCOMPLETE existed carry only `pass`
  return { id: v.id, pass: v.pass, outcome: v.outcome ?? (v.pass ? 'pass' : 'fail') };
}

function verdictLine(v: FaultVerdict, base: TimeBase): string {
  const at = (v.appliedAt * base.epsilon).toFixed(1);
  const lost = v.slipped || v.became.length > 0;
  const detail =
    v.before === 'unlocked'
      ? 'not judged'
      : v.persisted
        ? `persisted, excursion ${v.maxPhaseExcursion.toFixed(3)} rad`
        : lost
          ? `lost (${v.became.join(' -> ') || 'slip'}), ${v.recovered ? `re-locked after ${v.timeToRelock?.slow.toFixed(2) ?? '?'} slow units` : 'did not re-lock'}`
          : `not lost, not settled, excursion ${v.maxPhaseExcursion.toFixed(3)} rad`;
  const remarks = [...v.reasons, ...v.notes];
  return `soak: ${v.outcome.toUpperCase()} ${v.id} (${v.action} at slow ${at}): ${detail}${remarks.length ? ` -- ${remarks.join('; ')}` : ''}`;
}
