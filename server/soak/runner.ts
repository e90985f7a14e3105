/**
 * `syncring soak`: runs a soak (src/campaign/soak-simulation.ts) headless, paced or as fast as it
 * goes, into its crash-safe log (soak-log.ts), continues a killed one from its last checkpoint
 * (resume.ts), keeps status.json current (status.ts) and ends with DIR/summary.json
 * (outputs.ts). This module only ties them together: the folder lock, the choice between a new
 * soak, a resume and a finished one, the pacing loop and the lines printed per verdict.
 */
import { mkdirSync, unlinkSync } from 'node:fs';
import { performance } from 'node:perf_hooks';
import type { Campaign, FaultVerdict, TimeBase } from '../../src/campaign/index.js';
import { SoakSimulation, type SoakPlan } from '../../src/campaign/soak-simulation.js';
import { logHeader, type NewLogRecord } from '../../src/protocol/log-records.js';
import { SEGMENT_PREFIX, type SoakSummary } from '../../src/protocol/soak-files.js';
import type { SoakHeader } from '../../src/protocol/soak-records.js';
import { scenarioToJSON } from '../../src/scenario/parse.js';
import type { Scenario } from '../../src/scenario/types.js';
import { macroStepOf } from '../../src/session/session.js';
import { listSegments, syncDirectory } from '../log/segments.js';
import { loadScenario } from '../scenario-file.js';
import { UsageError, callError } from '../usage-error.js';
import { SOFTWARE_VERSION } from '../version.js';
import { loadCampaign } from './campaign-file.js';
import { lockSoakDir } from './dir-lock.js';
import { engineFingerprint } from './engine-fingerprint.js';
import { recordResume, writeSummary } from './outputs.js';
import { checkSameSoak, findResumePoint, soakLogDir, type ResumePoint } from './resume.js';
import { SoakLog } from './soak-log.js';
import { exportStabilitySeries } from './series-export.js';
import { SoakStatusReport } from './status.js';

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
  summary: SoakSummary;
}

/** The stepping yields to the event loop (timers, the log's writes) after this long. */
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
  if (until === undefined) throw callError('soak needs --until TAU');
  if (!(until > 0) || !Number.isFinite(until)) throw new UsageError(`--until must be a positive number (got ${until})`);
  if (point?.end) {
    // it had finished: rewrite its summary from the end record
    const soak = point.header.soak;
    const { path, summary } = writeSummary(
      options.out,
      point.end.result,
      { scenario, campaign, until: soak.until, macroStep: soak.macroStep, stride: soak.stride },
      { note: 'the soak had already finished; summary rewritten from its log' },
    );
    return { exitCode: point.end.result.exitCode, summaryPath: path, summary };
  }
  if (point && !point.checkpoint) {
    // killed before its first checkpoint: nothing to continue from, so start over
    removeSegments(soakLogDir(options.out));
    (options.stderr ?? process.stderr).write(`soak: ${options.out} had no checkpoint yet; starting over\n`);
  }
  return new SoakRunner(scenario, campaign, raw, until, options, point?.checkpoint ? point : null).run();
}

class SoakRunner {
  private readonly simulation: SoakSimulation;
  private readonly log: SoakLog;
  private readonly status: SoakStatusReport;
  private readonly stderr: NodeJS.WriteStream;
  private readonly notes: string[] = [];

  constructor(
    private readonly scenario: Scenario,
    private readonly campaign: Campaign,
    rawCampaign: unknown,
    until: number,
    private readonly options: SoakOptions,
    point: ResumePoint | null,
  ) {
    this.stderr = options.stderr ?? process.stderr;
    const plan = point ? { until, stride: point.header.soak.stride, checkpointTicks: point.header.soak.checkpointTicks } : null;
    this.simulation = newSimulation(scenario, campaign, until, options.checkpointEvery, plan, point);
    this.log = new SoakLog(options.out, { segmentBytes: options.segmentBytes, ...(point ? { from: point } : {}) });
    if (point) this.resumed(point);
    else {
      const soak: SoakHeader = {
        campaign: rawCampaign,
        until,
        stride: this.simulation.plan.stride,
        checkpointTicks: this.simulation.plan.checkpointTicks,
        macroStep: this.simulation.session.macroStep,
        uncoupledReference: campaign.stability.uncoupledReference,
        engine: engineFingerprint(),
      };
      this.append(logHeader(scenario, scenarioToJSON(scenario), SOFTWARE_VERSION, soak));
    }
    this.status = new SoakStatusReport(options.out, this.simulation, this.stderr);
  }

  async run(): Promise<SoakResult> {
    const sim = this.simulation;
    const eps = this.scenario.epsilon;
    const pace = this.options.pace;
    const paceOrigin = { wall: performance.now(), slow: eps * sim.session.tau };
    while (!sim.done) {
      const sliceEnd = performance.now() + SLICE_MS;
      let delay = 0;
      while (performance.now() < sliceEnd && !sim.done) {
        if (pace) {
          const target = paceOrigin.slow + ((performance.now() - paceOrigin.wall) / 1000) * pace;
          if (eps * sim.session.tau >= target) {
            delay = Math.min(50, Math.max(1, ((eps * sim.session.macroStep) / pace) * 1000));
            break;
          }
        }
        for (const record of sim.tick()) this.append(record);
      }
      this.status.update(false);
      if (this.log.error)
        throw new Error(`the soak stopped because its log failed: ${this.log.error.message}; fix the disk and continue with --resume`);
      if (this.log.pending > MAX_PENDING_LINES) await this.log.drain();
      else await new Promise((resolve) => (delay > 0 ? setTimeout(resolve, delay) : setImmediate(resolve)));
    }
    return this.finish();
  }

  private async finish(): Promise<SoakResult> {
    const { records, outcome } = this.simulation.finish({ failIncomplete: this.options.failIncomplete, notes: this.notes });
    for (const record of records) this.append(record);
    await this.log.close();
    if (this.log.error) throw new Error(`the soak's log failed: ${this.log.error.message}; its summary was not written`);
    const sim = this.simulation;
    const about = {
      scenario: this.scenario,
      campaign: this.campaign,
      until: sim.plan.until,
      macroStep: sim.session.macroStep,
      stride: sim.plan.stride,
    };
    const { path, summary } = writeSummary(this.options.out, outcome, about, { ...this.log.facts(), wallSeconds: this.status.wallSeconds });
    exportStabilitySeries(this.options.out, sim.samples, outcome.stability);
    this.status.finish();
    return { exitCode: outcome.exitCode, summaryPath: path, summary };
  }

  /** Appends a record; a verdict is acknowledged (printed, counted in status.json) only once it is on disk. */
  private append(record: NewLogRecord): void {
    const written = this.log.append(record);
    if (record.record !== 'verdict') return;
    const verdict = record.verdict;
    void written.then(
      () => {
        this.status.acknowledge(verdict);
        this.say(verdictLine(verdict, this.simulation.base));
      },
      () => undefined,
    );
  }

  private resumed(point: ResumePoint): void {
    const cp = point.checkpoint!;
    const engine = engineFingerprint();
    const sameEngine = point.header.soak.engine === undefined || point.header.soak.engine === engine;
    if (!sameEngine) {
      this.notes.push(
        `resumed under other engine code (${engine}, started with ${point.header.soak.engine}): ` +
          `the part after tau ${cp.tau.toPrecision(8)} is not bit-identical to an uninterrupted run`,
      );
      this.say(`soak: warning: the engine code changed since this soak started; it continues, but not bit for bit`);
    }
    recordResume(this.options.out, {
      at: new Date().toISOString(),
      fromTick: cp.tick,
      fromTau: cp.tau,
      checkpointSeq: cp.seq,
      discardedRecords: point.discarded.size,
      tornTailBytes: point.tornTailBytes,
      engine,
      sameEngine,
    });
    this.say(
      `soak: resuming ${this.options.out} from tau ${cp.tau.toPrecision(8)} (tick ${cp.tick}); ` +
        `${point.discarded.size} later records will be written again` +
        (point.tornTailBytes ? `, a torn last line of ${point.tornTailBytes} bytes dropped` : ''),
    );
  }

  private say(line: string): void {
    this.stderr.write(`${this.stderr.isTTY ? '\r\x1b[K' : ''}${line}\n`);
  }
}

/**
 * The simulation of a new soak, or of a resumed one as its log header laid it out. A new soak
 * samples stability often enough to fill the campaign's sample budget and checkpoints every 1/64
 * of its length (at least every 50 ticks) unless told otherwise.
 */
function newSimulation(
  scenario: Scenario,
  campaign: Campaign,
  until: number,
  checkpointEvery: number | undefined,
  plan: SoakPlan | null,
  point: ResumePoint | null,
): SoakSimulation {
  try {
    if (plan && point?.checkpoint)
      return new SoakSimulation(scenario, campaign, plan, {
        checkpoint: point.checkpoint,
        samples: point.samples,
        verdicts: point.verdicts,
      });
    const macroStep = macroStepOf(scenario);
    const totalTicks = Math.ceil(until / macroStep);
    const stride = Math.max(1, Math.ceil(totalTicks / campaign.stability.maxSamples));
    const checkpointTicks = Math.max(
      1,
      checkpointEvery ? Math.round(checkpointEvery / macroStep) : Math.max(50, Math.ceil(totalTicks / 64)),
    );
    return new SoakSimulation(scenario, campaign, { until, stride, checkpointTicks });
  } catch (error) {
    if (error instanceof RangeError && point) throw new UsageError(`cannot resume: ${error.message}`);
    throw error;
  }
}

/** Remove every segment (newest first) and sync the folder. */
function removeSegments(dir: string): void {
  for (const segment of listSegments(dir, SEGMENT_PREFIX).reverse()) unlinkSync(segment.path);
  syncDirectory(dir);
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
