import type { Perturbation } from '../session/perturbation.js';
import { closeTrack, observeTrack, persisted, slipped, startTrack, type SystemTrackState } from './system-track.js';
import type { TickView } from './tick-view.js';
import type { Criteria, FaultPlan } from './types.js';

/** A duration in the three time bases a reader may want. */
export interface Span {
  tau: number;
  /** eps tau */
  slow: number;
  /** at the nominal frequency */
  seconds: number;
}

export interface TimeBase {
  epsilon: number;
  secondsPerTau: number;
}

export function spanOf(tau: number, base: TimeBase): Span {
  return { tau, slow: tau * base.epsilon, seconds: tau * base.secondsPerTau };
}

/** The verdict on one fault (see README in this folder for the definitions). */
export interface FaultVerdict {
  id: string;
  source: 'schedule' | 'random';
  action: Perturbation['action'];
  perturbation: Perturbation;
  restore: Perturbation | null;
  /** tau at which the fault was applied (the first tick boundary at or after its start). */
  appliedAt: number;
  restoredAt: number | null;
  windowEnd: number;
  /** Pattern label before the fault. */
  before: string;
  persisted: boolean;
  slipped: boolean;
  /** Largest excursion of a neighbour phase difference from its pre-fault value (rad). */
  maxPhaseExcursion: number;
  /** Labels the lock detector showed instead of the pre-fault one, in order. */
  became: string[];
  lostAt: number | null;
  /** The pre-fault pattern came back (after the restore) within the window. */
  recovered: boolean;
  relockedAt: number | null;
  /** From the restore (or the fault, when nothing is restored) to the re-lock. */
  timeToRelock: Span | null;
  /** Label at the end of the window. */
  final: string;
  divergence: { before: number; max: number };
  guide: { before: string; persisted: boolean; slipped: boolean; maxPhaseExcursion: number; became: string[] };
  /** The frame's live prediction when there was one, else the guiding system's own behaviour. */
  prediction: { source: 'guide' | 'frame'; persists: boolean | null; agreed: boolean | null; message: string | null };
  overlaps: string[];
  /** False when the soak ended (or halted) before the window closed. */
  complete: boolean;
  pass: boolean;
  reasons: string[];
}

export interface EvaluationState {
  plan: FaultPlan;
  appliedAt: number;
  restore: Perturbation | null;
  restoreAt: number | null;
  restoredAt: number | null;
  windowEnd: number;
  full: SystemTrackState;
  guide: SystemTrackState;
  divergenceBefore: number;
  maxDivergence: number;
  /** The first frame prediction made at or after the fault's application and before its restore. */
  predictedDuring: { persists: boolean; message: string | null } | null;
  overlaps: string[];
}

/**
 * One fault under evaluation, from the tick it is applied to the end of its window
 * (restore + relockWithin, or start + relockWithin without a restore). Plain state, saved in
 * checkpoints as it is.
 */
export class FaultEvaluation {
  constructor(readonly state: EvaluationState) {}

  /** Start evaluating `plan`, applied at `appliedAt`; `before` is the last tick before it (null at the very start). */
  static begin(plan: FaultPlan, appliedAt: number, restore: Perturbation | null, before: TickView | null): FaultEvaluation {
    const restoreAt = plan.duration !== null ? appliedAt + plan.duration : null;
    const nothing = { label: 'unlocked', mode: 0, phaseDifferences: [] };
    return new FaultEvaluation({
      plan,
      appliedAt,
      restore,
      restoreAt,
      restoredAt: null,
      windowEnd: (restoreAt ?? appliedAt) + plan.criteria.relockWithin,
      full: startTrack(before?.full ?? nothing),
      guide: startTrack(before?.guide ?? nothing),
      divergenceBefore: before?.divergence ?? 0,
      maxDivergence: before?.divergence ?? 0,
      predictedDuring: null,
      overlaps: [],
    });
  }

  get id(): string {
    return this.state.plan.id;
  }

  /** The restore is due before the tick starting at tau. */
  restoreDue(tau: number): boolean {
    const s = this.state;
    return s.restoreAt !== null && s.restoredAt === null && tau >= s.restoreAt * (1 - 1e-12);
  }

  markRestored(tau: number): void {
    this.state.restoredAt = tau;
  }

  observe(view: TickView, hold: number): void {
    const s = this.state;
    const reference = s.restoreAt === null ? s.appliedAt : s.restoredAt;
    observeTrack(s.full, view.full, view.tau, reference, hold);
    observeTrack(s.guide, view.guide, view.tau, reference, hold);
    s.maxDivergence = Math.max(s.maxDivergence, view.divergence);
    const p = view.prediction;
    if (s.restoredAt === null && s.predictedDuring === null && p && (p.tau === null || p.tau >= s.appliedAt * (1 - 1e-12))) {
      s.predictedDuring = { persists: p.persists, message: p.message };
    }
  }

  windowClosed(tau: number): boolean {
    return tau >= this.state.windowEnd * (1 - 1e-12);
  }

  finish(complete: boolean, base: TimeBase, extraReason?: string): FaultVerdict {
    const s = this.state;
    closeTrack(s.full);
    closeTrack(s.guide);
    const c: Criteria = s.plan.criteria;
    const fullPersisted = persisted(s.full);
    const guidePersisted = persisted(s.guide);
    const reference = s.restoreAt === null ? s.appliedAt : s.restoredAt;
    const recovered = s.full.relockedAt !== null;
    const relockTau = recovered && reference !== null ? Math.max(0, s.full.relockedAt! - reference) : null;
    const prediction: FaultVerdict['prediction'] =
      s.predictedDuring !== null
        ? { source: 'frame', persists: s.predictedDuring.persists, agreed: s.predictedDuring.persists === fullPersisted, message: s.predictedDuring.message }
        : { source: 'guide', persists: guidePersisted, agreed: guidePersisted === fullPersisted, message: null };

    const reasons: string[] = [];
    if (s.full.baseline === 'unlocked') reasons.push('the ring was not locked when the fault began; schedule faults after the first lock');
    else {
      if (c.mustPersist && !fullPersisted) reasons.push(`the locked pattern did not persist: ${lossDescription(s.full)}`);
      // a window cut short by the end of the soak cannot judge a re-lock that was still due
      if (c.mustRelock && (relockTau === null ? complete : relockTau > c.relockWithin)) {
        reasons.push(`did not re-lock into ${s.full.baseline} within ${spanText(c.relockWithin, base)} of the ${s.restoreAt === null ? 'fault' : 'restore'}`);
      }
    }
    if (c.maxPhaseExcursion !== null && s.full.maxExcursion > c.maxPhaseExcursion) {
      reasons.push(`phase excursion ${s.full.maxExcursion.toFixed(3)} rad exceeds ${c.maxPhaseExcursion} rad`);
    }
    // the growth, not the level: under noise the full system's common phase wanders away from
    // the noiseless guide over the whole soak, so the level says more about elapsed time than the fault
    const growth = s.maxDivergence - s.divergenceBefore;
    if (c.maxDivergence !== null && growth > c.maxDivergence) {
      reasons.push(`full-vs-guide divergence grew by ${growth.toPrecision(3)} (from ${s.divergenceBefore.toPrecision(3)} to ${s.maxDivergence.toPrecision(3)}), more than ${c.maxDivergence}`);
    }
    if (c.predictionMustAgree && prediction.agreed === false) {
      reasons.push(`the prediction (${prediction.source}) said the pattern would ${prediction.persists ? '' : 'not '}persist`);
    }
    if (extraReason) reasons.push(extraReason);

    return {
      id: s.plan.id,
      source: s.plan.source,
      action: s.plan.perturbation.action,
      perturbation: s.plan.perturbation,
      restore: s.restore,
      appliedAt: s.appliedAt,
      restoredAt: s.restoredAt,
      windowEnd: s.windowEnd,
      before: s.full.baseline,
      persisted: fullPersisted,
      slipped: slipped(s.full),
      maxPhaseExcursion: s.full.maxExcursion,
      became: s.full.became.slice(),
      lostAt: s.full.lostAt,
      recovered,
      relockedAt: s.full.relockedAt,
      timeToRelock: relockTau === null ? null : spanOf(relockTau, base),
      final: s.full.final,
      divergence: { before: s.divergenceBefore, max: s.maxDivergence },
      guide: {
        before: s.guide.baseline,
        persisted: guidePersisted,
        slipped: slipped(s.guide),
        maxPhaseExcursion: s.guide.maxExcursion,
        became: s.guide.became.slice(),
      },
      prediction,
      overlaps: s.overlaps.slice(),
      complete,
      pass: reasons.length === 0,
      reasons,
    };
  }
}

function lossDescription(track: SystemTrackState): string {
  const parts: string[] = [];
  if (slipped(track)) parts.push(`a phase difference moved ${track.maxExcursion.toFixed(2)} rad (cycle slip)`);
  if (track.modeChanged) parts.push('the carrying mode changed');
  if (track.lockedOther) parts.push(`settled into ${track.final !== 'unlocked' && track.final !== track.baseline ? track.final : track.became.filter((l) => l !== 'unlocked').join(', then ')}`);
  return parts.join('; ') || 'lost';
}

function spanText(tau: number, base: TimeBase): string {
  return `${(tau * base.epsilon).toPrecision(3)} slow time units (tau ${tau.toPrecision(4)})`;
}
