import type { Frame } from '../session/session.js';
import type { PatternReport } from '../session/pattern-tracker.js';

/** What the verdicts need from one frame: small, plain, and the same for full and guide. */
export interface SystemView {
  /** Pattern label, e.g. "in-phase q=0 on mode 0", or "unlocked". */
  label: string;
  mode: number;
  /** Mode-0 neighbour phase differences, wrapped (rad). */
  phaseDifferences: number[];
}

export interface TickView {
  tick: number;
  tau: number;
  full: SystemView;
  guide: SystemView;
  /** Full-vs-guide divergence relative to the mean amplitude. */
  divergence: number;
  /** A frame's own prediction of whether the current configuration holds a lock, when frames carry one. */
  predictedLocked: boolean | null;
}

/** Same wording as the session's lock events. */
export function patternLabel(pattern: PatternReport): string {
  if (!pattern.locked) return 'unlocked';
  return `${pattern.kind}${pattern.q !== undefined ? ` q=${pattern.q}` : ''} on mode ${pattern.mode}`;
}

export function tickViewOf(frame: Frame): TickView {
  return {
    tick: frame.tick,
    tau: frame.tau,
    full: { label: patternLabel(frame.full.pattern), mode: frame.full.pattern.mode, phaseDifferences: frame.full.phaseDifferences },
    guide: { label: patternLabel(frame.guide.pattern), mode: frame.guide.pattern.mode, phaseDifferences: frame.guide.phaseDifferences },
    divergence: frame.divergence.relative,
    predictedLocked: predictionOf(frame),
  };
}

/**
 * Frames may later carry a `prediction` (a locking-range prediction for the current
 * parameters). Its shape is not fixed yet, so read it defensively: a boolean `locked` or
 * `stable`, at the top or under `pattern`; anything else counts as no prediction.
 */
export function predictionOf(frame: Frame): boolean | null {
  const prediction = (frame as Frame & { prediction?: unknown }).prediction;
  if (prediction === null || typeof prediction !== 'object') return null;
  const p = prediction as Record<string, unknown>;
  for (const holder of [p, p.pattern]) {
    if (holder === null || typeof holder !== 'object') continue;
    const h = holder as Record<string, unknown>;
    if (typeof h.locked === 'boolean') return h.locked;
    if (typeof h.stable === 'boolean') return h.stable;
  }
  return null;
}
