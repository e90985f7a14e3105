import type { RunSummary } from '../../src/protocol/run-summary.js';
import type { CampaignRunState, FaultVerdict, PhaseRecorderState, PhaseSample, StabilityReport } from '../../src/campaign/index.js';
import type { ModeState } from '../../src/scenario/types.js';
import type { SessionCheckpoint } from '../../src/session/session.js';

/**
 * Records of a soak log (beside the common header and event records of src/protocol). All of
 * them except the header are deterministic: a resumed soak writes exactly the lines an
 * uninterrupted one would, which the resume checks as it goes.
 */

/** The soak's part of the header. */
export interface SoakHeader {
  campaign: unknown;
  until: number;
  /** Ticks between stability samples. */
  stride: number;
  /** Ticks between checkpoints. */
  checkpointTicks: number;
  macroStep: number;
  uncoupledReference: boolean;
  /** Hash of the engine code that started the soak (engine-fingerprint.ts). */
  engine: string;
}

/**
 * A trace point every `stride` ticks from the start, with what the report plots; the stability
 * phases are null until the stability record starts (first lock, or the campaign's `from`).
 */
export interface SampleLine {
  record: 'soak-sample';
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

/** The stability samples among the trace points (those after the record started). */
export function stabilitySamples(lines: readonly SampleLine[]): PhaseSample[] {
  const samples: PhaseSample[] = [];
  for (const s of lines) {
    if (s.ensemble === null || s.node === null) continue;
    samples.push({ tick: s.tick, tau: s.tau, ensemble: s.ensemble, node: s.node, uncoupledEnsemble: s.uncoupledEnsemble, singlePart: s.singlePart });
  }
  return samples;
}

export interface CheckpointLine {
  record: 'checkpoint';
  tau: number;
  tick: number;
  /** The full state in the original coordinates, as every checkpoint record has. */
  state: ModeState[][];
  session: SessionCheckpoint;
  /** The uncoupled twin, null when it is not run (or stopped). */
  twin: SessionCheckpoint | null;
  campaign: CampaignRunState;
  phases: PhaseRecorderState;
  /** The end-of-run picture at this tick, so a soak resumed at its very end can still report it. */
  final: RunSummary;
}

export interface VerdictLine {
  record: 'verdict';
  verdict: FaultVerdict;
}

/** Deterministic part of the summary, written as the last record. */
export interface EndLine {
  record: 'end';
  result: SoakOutcome;
}

export interface SoakOutcome {
  status: 'complete' | 'halted';
  halted: string | null;
  tau: number;
  pass: boolean;
  exitCode: number;
  counts: { faults: number; passed: number; failed: number; incomplete: number; notStarted: string[] };
  verdicts: FaultVerdict[];
  stability: StabilityReport | null;
  /** The end-of-run picture; null when the soak ran no tick. */
  final: RunSummary | null;
  state: ModeState[][];
  notes: string[];
}

export const SEGMENT_PREFIX = 'soak';
export const LOG_FOLDER = 'log';
