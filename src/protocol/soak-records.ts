import type { CampaignRunState, FaultVerdict, PhaseRecorderState, PhaseSample, StabilityReport } from '../campaign/index.js';
import type { ModeState } from '../scenario/types.js';
import type { SessionCheckpoint } from '../session/session.js';
import type { RunSummary } from './run-summary.js';

/**
 * The records a soak writes into its log beside the common ones (log-records.ts). All of them
 * except the header are deterministic: a resumed soak writes exactly the lines an uninterrupted
 * one would, which the resume checks as it goes.
 */

/** The soak's part of the log header. */
export interface SoakHeader {
  /** The campaign JSON as given (re-read and compared on resume). */
  campaign: unknown;
  until: number;
  /** Ticks between stability samples. */
  stride: number;
  /** Ticks between checkpoints. */
  checkpointTicks: number;
  macroStep: number;
  uncoupledReference: boolean;
  /** Hash of the engine code that started the soak. */
  engine: string;
}

/**
 * A trace point every `stride` ticks from the start, with what the report plots; the stability
 * phases are null until the stability record starts (first lock, or the campaign's `from`).
 */
export interface SoakSampleRecord {
  record: 'soak-sample';
  seq: number;
  tick: number;
  tau: number;
  ensemble: number | null;
  node: number | null;
  uncoupledEnsemble: number | null;
  singlePart: number | null;
  /** Mode-0 neighbour phase differences of the full system (rad). */
  phaseDifferences: number[];
  divergence: number;
  pattern: string;
  guide: string;
}

/** What a soak checkpoint holds beside the state every checkpoint record has. */
export interface SoakCheckpointFields {
  session: SessionCheckpoint;
  /** The uncoupled twin, null when it is not run (or stopped). */
  twin: SessionCheckpoint | null;
  campaign: CampaignRunState;
  phases: PhaseRecorderState;
  /** The end-of-run picture at this tick, so a soak resumed at its very end can still report it. */
  final: RunSummary;
}

export interface VerdictRecord {
  record: 'verdict';
  seq: number;
  verdict: FaultVerdict;
}

/** The deterministic part of the summary, written as the last record. */
export interface EndRecord {
  record: 'end';
  seq: number;
  result: SoakOutcome;
}

/** Exit codes of `syncring soak` (2 is bad input, as for every command). */
export const SOAK_EXIT = { pass: 0, failed: 1, halted: 3 } as const;

export interface SoakCounts {
  faults: number;
  passed: number;
  failed: number;
  incomplete: number;
  notStarted: string[];
}

export interface SoakOutcome {
  status: 'complete' | 'halted';
  halted: string | null;
  tau: number;
  pass: boolean;
  exitCode: number;
  counts: SoakCounts;
  verdicts: FaultVerdict[];
  stability: StabilityReport | null;
  /** The end-of-run picture; null when the soak ran no tick. */
  final: RunSummary | null;
  state: ModeState[][];
  notes: string[];
}

/** The stability samples among the trace points (those after the record started). */
export function stabilitySamples(lines: readonly SoakSampleRecord[]): PhaseSample[] {
  const samples: PhaseSample[] = [];
  for (const s of lines) {
    if (s.ensemble === null || s.node === null) continue;
    samples.push({
      tick: s.tick,
      tau: s.tau,
      ensemble: s.ensemble,
      node: s.node,
      uncoupledEnsemble: s.uncoupledEnsemble,
      singlePart: s.singlePart,
    });
  }
  return samples;
}
