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
}

/** A stability sample with what the report plots beside it. */
export interface SampleLine extends PhaseSample {
  record: 'soak-sample';
  /** Mode-0 neighbour phase differences of the full system (rad). */
  phaseDifferences: number[];
  divergence: number;
  pattern: string;
  guide: string;
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
  /** The end-of-run picture at this tick (finalOf), so a soak resumed at its very end can still report it. */
  final: Record<string, unknown>;
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
  final: Record<string, unknown>;
  state: ModeState[][];
  notes: string[];
}

export const SEGMENT_PREFIX = 'soak';
export const LOG_FOLDER = 'log';
