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
  /** A frame's own prediction of whether the pattern persists under the current parameters, when frames carry one. */
  prediction: { persists: boolean; tau: number | null; message: string | null } | null;
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
    prediction: predictionOf(frame),
  };
}

/**
 * A frame's own prediction for the current parameters, when frames carry one. Read defensively
 * (the live predictor is young): a `verdict` of "persists"/"marginal" (true) or "lost" (false),
 * else a boolean `locked` or `stable`, at the top or under `pattern`; anything else is none.
 */
export function predictionOf(frame: Frame): { persists: boolean; tau: number | null; message: string | null } | null {
  const prediction = (frame as unknown as { prediction?: unknown }).prediction;
  if (prediction === null || typeof prediction !== 'object') return null;
  const p = prediction as Record<string, unknown>;
  const tau = typeof p.tau === 'number' ? p.tau : null;
  const message = typeof p.message === 'string' ? p.message : null;
  if (p.verdict === 'persists' || p.verdict === 'marginal') return { persists: true, tau, message };
  if (p.verdict === 'lost') return { persists: false, tau, message };
  if (typeof p.verdict === 'string') return null;
  for (const holder of [p, p.pattern]) {
    if (holder === null || typeof holder !== 'object') continue;
    const h = holder as Record<string, unknown>;
    if (typeof h.locked === 'boolean') return { persists: h.locked, tau, message };
    if (typeof h.stable === 'boolean') return { persists: h.stable, tau, message };
  }
  return null;
}
