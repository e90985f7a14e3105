import { performance } from 'node:perf_hooks';
import type { FaultVerdict } from '../../src/campaign/index.js';
import type { SoakSimulation } from '../../src/campaign/soak-simulation.js';
import { STATUS_FILE, type DurableVerdict, type SoakStatus } from '../../src/protocol/soak-files.js';
import { Progress, formatSeconds } from '../progress.js';
import { nominalFrequencyFields, writeJsonAtomically } from './outputs.js';

/** Newest durable verdicts status.json lists. */
const STATUS_VERDICTS = 50;
/** status.json is rewritten at most this often while the soak runs. */
const STATUS_EVERY_MS = 1000;

/**
 * What a running soak tells the people watching it: a progress bar (or a line a minute when
 * stderr is not a terminal) and status.json, rewritten about once a second. Verdicts count here
 * only once they are on disk.
 */
export class SoakStatusReport {
  private readonly progress: Progress;
  private readonly durable: DurableVerdict[];
  private readonly startedWall = performance.now();
  private readonly startTau: number;
  private lastWritten = 0;

  constructor(
    private readonly out: string,
    private readonly simulation: SoakSimulation,
    stderr: NodeJS.WriteStream,
  ) {
    this.progress = new Progress('soak', simulation.plan.until, stderr);
    // verdicts read back from the log of a resumed soak are on disk already
    this.durable = simulation.verdicts.map(durableEntry);
    this.startTau = simulation.session.tau;
  }

  /** Seconds of wall time since this process started the soak. */
  get wallSeconds(): number {
    return (performance.now() - this.startedWall) / 1000;
  }

  /** A verdict reached the disk. */
  acknowledge(verdict: FaultVerdict): void {
    this.durable.push(durableEntry(verdict));
  }

  update(done: boolean): void {
    const sim = this.simulation;
    const s = sim.session;
    const eps = sim.scenario.epsilon;
    const until = sim.plan.until;
    this.progress.update(
      s.tau,
      `slow ${(eps * s.tau).toFixed(1)}/${(eps * until).toFixed(1)}  faults ${sim.faults.finished}/${sim.faults.started}  failed ${sim.faults.failed}`,
    );
    const now = performance.now();
    if (!done && now - this.lastWritten < STATUS_EVERY_MS) return;
    this.lastWritten = now;
    const elapsed = this.wallSeconds;
    const doneHere = (s.tau - this.startTau) / (until - this.startTau);
    const status: SoakStatus = {
      state: done ? (s.halted ? 'halted' : 'finished') : 'running',
      pid: process.pid,
      tau: s.tau,
      until,
      slowTime: eps * s.tau,
      slowUntil: eps * until,
      fraction: Math.min(1, s.tau / until),
      wallSeconds: elapsed,
      eta: done ? '0 s' : doneHere > 0 ? formatSeconds((elapsed * (1 - doneHere)) / doneHere) : '--',
      faults: {
        started: sim.faults.started,
        judged: this.durable.length,
        failed: this.durable.filter((v) => v.outcome === 'fail').length,
        incomplete: this.durable.filter((v) => v.outcome === 'incomplete').length,
      },
      verdicts: this.durable.slice(-STATUS_VERDICTS),
      nominalFrequencyHz: sim.scenario.units.nominalFrequencyHz,
      ...nominalFrequencyFields(sim.scenario),
      updatedAt: new Date().toISOString(),
    };
    writeJsonAtomically(this.out, STATUS_FILE, status);
  }

  finish(): void {
    this.progress.finish();
    this.update(true);
  }
}

function durableEntry(v: FaultVerdict): DurableVerdict {
  // verdicts in logs written before INCOMPLETE existed carry only `pass`
  return { id: v.id, pass: v.pass, outcome: v.outcome ?? (v.pass ? 'pass' : 'fail') };
}
