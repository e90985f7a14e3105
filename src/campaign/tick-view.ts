import type { Frame } from '../session/session.js';
import { patternIdentity, type PatternReport } from '../session/pattern-tracker.js';
import { neighbourPhaseDifferences } from '../observe/amplitudes.js';
import type { LockStatus } from '../observe/lock-detector.js';
import type { CoupledPairs } from '../observe/coupled-pairs.js';

/** What the verdicts need from one frame: small, plain, and the same for full and guide. */
export interface SystemView {
  /** The lock detector's committed pattern, e.g. "in-phase q=0 on mode 0", or "unlocked". */
  label: string;
  status: LockStatus;
  mode: number;
  /** Neighbour phase differences arg a_{k+1} - arg a_k of the carrying mode, wrapped (rad). */
  phaseDifferences: number[];
  /** Phase differences of the coupled pairs (coupled-pairs.ts) of the carrying mode, wrapped (rad). */
  pairDifferences: number[];
  /** 1 where that pair's difference can slip now, 0 where it may wind freely. */
  watched: number[];
  /** The detector's cycle-slip count since the run began. */
  slips: number;
}

/** What a frame's live prediction says about the current parameters. */
export interface PredictionView {
  persists: boolean;
  tau: number | null;
  message: string | null;
  /** Where the persisting pattern settles (its phase differences), when the prediction says. */
  continued: { mode: number; phaseDifferences: number[] } | null;
}

export interface TickView {
  tick: number;
  tau: number;
  full: SystemView;
  guide: SystemView;
  /** Full-vs-guide divergence relative to the mean amplitude. */
  divergence: number;
  /** A frame's own prediction of whether the pattern persists under the current parameters, when frames carry one. */
  prediction: PredictionView | null;
}

/** Same wording as the session's lock events. */
export function patternLabel(pattern: PatternReport): string {
  return pattern.locked ? patternIdentity(pattern.kind, pattern.q, pattern.mode) : 'unlocked';
}

function systemViewOf(system: Frame['full'], pairs: CoupledPairs): SystemView {
  const p = system.pattern;
  return {
    label: patternLabel(p),
    status: p.status,
    mode: p.mode,
    phaseDifferences: p.mode === 0 ? system.phaseDifferences : neighbourPhaseDifferences(system.phase, p.mode),
    pairDifferences: Array.from(pairs.differences(system.phase, p.mode)),
    watched: Array.from(pairs.watched),
    slips: p.slips,
  };
}

/** The verdicts' view of a frame; `pairs` are the session's coupled pairs as they are at that frame. */
export function tickViewOf(frame: Frame, pairs: CoupledPairs): TickView {
  return {
    tick: frame.tick,
    tau: frame.tau,
    full: systemViewOf(frame.full, pairs),
    guide: systemViewOf(frame.guide, pairs),
    divergence: frame.divergence.relative,
    prediction: predictionOf(frame),
  };
}

/**
 * A frame's own prediction for the current parameters: "persists" or "marginal" (the pattern
 * holds, with where it settles) or "lost"; a prediction that could say neither (the guide was not
 * locked, or the ring is above the live size limit) is none.
 */
export function predictionOf(frame: Frame): PredictionView | null {
  const p = frame.prediction;
  if (p === null) return null;
  if (p.verdict === 'persists' || p.verdict === 'marginal') {
    return {
      persists: true,
      tau: p.tau,
      message: p.message,
      continued: p.pattern ? { mode: p.pattern.mode, phaseDifferences: p.pattern.phaseDifferences } : null,
    };
  }
  if (p.verdict === 'lost') return { persists: false, tau: p.tau, message: p.message, continued: null };
  return null;
}
