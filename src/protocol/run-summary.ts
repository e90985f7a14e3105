import type { Frame } from '../session/session.js';
import type { PatternReport } from '../session/pattern-tracker.js';

/**
 * The end-of-run picture of a run, as `syncring simulate` prints it and a soak's `end` record
 * and summary hold it (the soak leaves the bulky state out). One definition for both.
 */
export interface PatternSummary {
  /** The committed pattern, or 'unlocked'. */
  kind: PatternReport['kind'];
  q?: number;
  /** Frequency-locked (no cycle slip since the lock began): true while locked or settling. */
  locked: boolean;
  status: PatternReport['status'];
  lockedSince: number | null;
  settledSince: number | null;
  carryingMode: number;
  /** False when an unwanted mode carries the pattern: a design defect, the output sits at that mode's frequency. */
  wantedMode: boolean;
  shape: PatternReport['shape'];
  clusters?: number[][];
  symmetry: { element: string; phase: number }[];
  orderParameters: number[];
  slips: number;
  spread: number | null;
  combiningLossDb: number | null;
}

export interface RunSummary {
  tau: number;
  status: Frame['status'];
  pattern: PatternSummary;
  phaseDifferences: number[];
  amplitudes: number[][];
  guide: {
    pattern: Pick<PatternSummary, 'kind' | 'q' | 'locked' | 'status' | 'carryingMode' | 'wantedMode' | 'symmetry'>;
    margin: number | null;
    stable: boolean | null;
    rotation: number[] | null;
    phaseDifferences: number[];
    amplitudes: number[][];
  };
  divergence: Frame['divergence'];
}

export function patternSummaryOf(p: PatternReport): PatternSummary {
  return {
    kind: p.kind,
    ...(p.q !== undefined && p.kind !== 'unlocked' ? { q: p.q } : {}),
    locked: p.locked,
    status: p.status,
    lockedSince: p.lockedSince,
    settledSince: p.settledSince,
    carryingMode: p.mode,
    wantedMode: p.mode === 0,
    shape: p.shape,
    ...(p.clusters ? { clusters: p.clusters } : {}),
    symmetry: p.symmetry.map(({ element, phase }) => ({ element, phase })),
    orderParameters: p.orderParameters,
    slips: p.slips,
    spread: p.spread,
    combiningLossDb: p.combiningLossDb,
  };
}

export function runSummaryOf(frame: Frame): RunSummary {
  const g = patternSummaryOf(frame.guide.pattern);
  return {
    tau: frame.tau,
    status: frame.status,
    pattern: patternSummaryOf(frame.full.pattern),
    phaseDifferences: frame.full.phaseDifferences,
    amplitudes: frame.full.amplitude,
    guide: {
      pattern: {
        kind: g.kind,
        ...(g.q !== undefined ? { q: g.q } : {}),
        locked: g.locked,
        status: g.status,
        carryingMode: g.carryingMode,
        wantedMode: g.wantedMode,
        symmetry: g.symmetry,
      },
      margin: frame.guide.margin,
      stable: frame.guide.margin === null ? null : frame.guide.margin < 0,
      rotation: frame.guide.rotation,
      phaseDifferences: frame.guide.phaseDifferences,
      amplitudes: frame.guide.amplitude,
    },
    divergence: frame.divergence,
  };
}
