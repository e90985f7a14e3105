import type { Perturbation } from '../session/perturbation.js';
import {
  distanceTo,
  finalShift,
  lost,
  observeTrack,
  persisted,
  settledAfter,
  settledInBaseline,
  startTrack,
  type SystemTrackState,
} from './system-track.js';
import type { SystemView, TickView } from './tick-view.js';
import type { Criteria, FaultPlan } from './types.js';
import type { LockSettings } from '../observe/lock-detector.js';

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

/**
 * PASS: every enabled criterion held over the judged span. FAIL: one did not (a reason each).
 * INCOMPLETE: nothing has failed, but the span ended (the soak ended or halted, or the next
 * fault was applied) before the outcome was decided: the ring was still settling, or a re-lock
 * was still due.
 */
export type VerdictOutcome = 'pass' | 'fail' | 'incomplete';

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
  /** When the fault ramps: the tau at which its parameters reached their values (judging counts from there); else null. */
  rampedUntil: number | null;
  windowEnd: number;
  /** tau up to which the fault was judged: the window end, the end of the soak, or the next fault. */
  judgedUntil: number;
  /** Set when another fault was applied before this one's window closed. */
  cutShort: { at: number; by: string } | null;
  /** Pattern label before the fault. */
  before: string;
  /** Not lost (no slip, no other pattern, same carrying mode) and settled in the pre-fault pattern at the end. */
  persisted: boolean;
  slipped: boolean;
  /** Cycle slips during the span (the lock detector's). */
  slips: number;
  /** Largest excursion of a neighbour phase difference from its pre-fault value (rad). */
  maxPhaseExcursion: number;
  /** Largest final change of a neighbour phase difference from its pre-fault value (rad): the move the fault left. */
  shift: number;
  /** Settled (locked, not settling) in the pre-fault pattern at the end of the span. */
  settled: boolean;
  /** From the fault (or its restore) until the phase differences stayed within the lock tolerance of their final values. */
  settledAfter: Span | null;
  /** Largest distance of the final phase differences from the predicted continued state (rad), when the prediction gave one. */
  fromContinued: number | null;
  /** Committed patterns other than the pre-fault one, in order ("unlocked" after a slip). */
  became: string[];
  lostAt: number | null;
  /** Never lost, or the pre-fault pattern came back (after the restore) within the span. */
  recovered: boolean;
  relockedAt: number | null;
  /** From the restore (or the fault, when nothing is restored) to the re-lock; null when never lost. */
  timeToRelock: Span | null;
  /** Label at the end of the span. */
  final: string;
  divergence: { before: number; max: number };
  guide: { before: string; persisted: boolean; slipped: boolean; maxPhaseExcursion: number; became: string[] };
  /** The frame's live prediction when there was one, else the guiding system's own behaviour. */
  prediction: { source: 'guide' | 'frame'; persists: boolean | null; agreed: boolean | null; message: string | null };
  overlaps: string[];
  /** False when the span ended before the window closed (soak end, halt, or the next fault). */
  complete: boolean;
  outcome: VerdictOutcome;
  /** outcome === 'pass' (kept for scripts that read it). */
  pass: boolean;
  /** Why it failed, one reason per failed criterion (empty unless the outcome is fail). */
  reasons: string[];
  /** What a reader should know beside the outcome: the shift and settling, a cut-short span, an open judgement. */
  notes: string[];
}

export interface EvaluationState {
  plan: FaultPlan;
  appliedAt: number;
  restore: Perturbation | null;
  restoreAt: number | null;
  restoredAt: number | null;
  /** Where a ramping fault reaches its values (absent for a step, and in older checkpoints). */
  rampEnd?: number;
  windowEnd: number;
  /** Lock tolerance of the detector (rad), for the settling time. */
  lockTolerance: number;
  /**
   * The detector's window (tau): a ring counts as settled only once a whole window has passed
   * since the fault's latest perturbation (application or restore). Absent in older checkpoints.
   */
  lockWindow?: number;
  lastTau: number;
  full: SystemTrackState;
  guide: SystemTrackState;
  divergenceBefore: number;
  maxDivergence: number;
  /** The first frame prediction made at or after the fault's application and before its restore. */
  predictedDuring: { persists: boolean; message: string | null } | null;
  /** Where the newest prediction since this fault's latest perturbation (application or restore) says the pattern settles. */
  continued: { mode: number; phaseDifferences: number[] } | null;
  overlaps: string[];
}

/** What judging counts from: the restore, the end of a ramp, or the fault itself. */
function latestChangeName(s: EvaluationState, restore: boolean): string {
  return restore ? 'restore' : s.rampEnd !== undefined ? "ramp's end" : 'fault';
}

/**
 * One fault under evaluation, from the tick it is applied to the end of its window
 * (restore + relockWithin, or start + relockWithin without a restore), or to the application of
 * the next fault, whichever comes first. Plain state, saved in checkpoints as it is.
 */
export class FaultEvaluation {
  constructor(readonly state: EvaluationState) {}

  /** Start evaluating `plan`, applied at `appliedAt`; `before` is the last tick before it (null at the very start). */
  static begin(
    plan: FaultPlan,
    appliedAt: number,
    restore: Perturbation | null,
    before: TickView | null,
    lock: LockSettings,
  ): FaultEvaluation {
    // a ramp is judged from where it ends: the duration runs from there, and so does the window without a restore
    const rampEnd = plan.ramp !== undefined ? appliedAt + plan.ramp : undefined;
    const full = rampEnd ?? appliedAt;
    const restoreAt = plan.duration !== null ? full + plan.duration : null;
    const nothing: SystemView = {
      label: 'unlocked',
      status: 'unlocked',
      mode: 0,
      phaseDifferences: [],
      pairDifferences: [],
      watched: [],
      slips: 0,
    };
    return new FaultEvaluation({
      plan,
      appliedAt,
      restore,
      restoreAt,
      restoredAt: null,
      ...(rampEnd !== undefined ? { rampEnd } : {}),
      windowEnd: (restoreAt ?? full) + plan.criteria.relockWithin,
      lockTolerance: lock.tolerance,
      lockWindow: lock.window,
      lastTau: appliedAt,
      full: startTrack(before?.full ?? nothing),
      guide: startTrack(before?.guide ?? nothing),
      divergenceBefore: before?.divergence ?? 0,
      maxDivergence: before?.divergence ?? 0,
      predictedDuring: null,
      continued: null,
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

  /** True when the fault `id` was applied in the same tick as this one (they are judged together). */
  overlapsWith(id: string): boolean {
    return this.state.overlaps.includes(id);
  }

  /** Records something else that happened within this fault's span: a fault applied with it, or another fault's restore. */
  noteOverlap(what: string): void {
    this.state.overlaps.push(what);
  }

  observe(view: TickView): void {
    const s = this.state;
    const reference = s.restoreAt === null ? (s.rampEnd ?? s.appliedAt) : s.restoredAt;
    s.lastTau = view.tau;
    observeTrack(s.full, view.full, view.tau, reference);
    observeTrack(s.guide, view.guide, view.tau, reference);
    s.maxDivergence = Math.max(s.maxDivergence, view.divergence);
    const p = view.prediction;
    const made = (since: number) => p !== null && (p.tau === null || p.tau >= since * (1 - 1e-12));
    if (s.restoredAt === null && s.predictedDuring === null && p && made(s.appliedAt)) {
      s.predictedDuring = { persists: p.persists, message: p.message };
    }
    if (p && made(s.restoredAt ?? s.rampEnd ?? s.appliedAt)) s.continued = p.persists ? p.continued : null;
  }

  windowClosed(tau: number): boolean {
    return tau >= this.state.windowEnd * (1 - 1e-12);
  }

  /**
   * The verdict. `complete`: the window closed. Otherwise the soak ended or halted
   * (`extraReason` says why when it is a failure), or `cutShort` names the next fault, applied
   * before the tick starting at `cutShort.at`.
   */
  finish(complete: boolean, base: TimeBase, extraReason?: string, cutShort: { at: number; by: string } | null = null): FaultVerdict {
    const s = this.state;
    const c: Criteria = s.plan.criteria;
    const track = s.full;
    const wasLost = lost(track);
    // settled means the detector's window, all of it after the latest perturbation, saw no motion
    const windowSeen = s.lastTau - (s.restoredAt ?? s.rampEnd ?? s.appliedAt) >= (s.lockWindow ?? 0) * (1 - 1e-9);
    const settled = windowSeen && settledInBaseline(track);
    const fullPersisted = windowSeen && persisted(track);
    const reference = s.restoreAt === null ? (s.rampEnd ?? s.appliedAt) : s.restoredAt;
    const recovered = !wasLost || track.relockedAt !== null;
    const relockTau = wasLost && track.relockedAt !== null && reference !== null ? Math.max(0, track.relockedAt - reference) : null;
    const settleTau = settled ? settledAfter(track, s.lockTolerance) : null;
    const settledSpan = settleTau !== null ? spanOf(Math.max(0, settleTau - (reference ?? s.appliedAt)), base) : null;
    const fromContinued =
      s.continued !== null && s.continued.mode === track.baselineMode ? distanceTo(track, s.continued.phaseDifferences) : null;
    const shift = finalShift(track);

    const reasons: string[] = [];
    // the soak ended or halted before the window closed: what was not yet lost stays undecided
    // (a cut-short span is judged on what it saw, as far as that decides anything)
    let open = !complete && cutShort === null;
    if (track.baseline === 'unlocked') reasons.push('the ring was not locked when the fault began; schedule faults after the first lock');
    else {
      if (track.baselineMode !== 0)
        reasons.push(
          `the ring was locked on unwanted mode ${track.baselineMode} before the fault: a design defect (the output sits at that mode's frequency), not a healthy lock`,
        );
      if (c.mustPersist && wasLost) reasons.push(`the locked pattern did not persist: ${lossDescription(track)}`);
      else if (!wasLost && !settled) {
        if (complete && c.mustPersist)
          reasons.push(
            `the ring did not settle within the window (still ${track.finalStatus} at the end; largest move ${track.maxExcursion.toFixed(3)} rad, no cycle slip)`,
          );
        else if (!complete) open = true;
      }
      if (c.mustRelock && wasLost) {
        if (relockTau === null) {
          if (complete)
            reasons.push(
              `did not re-lock into ${track.baseline} within ${spanText(c.relockWithin, base)} of the ${latestChangeName(s, s.restoreAt !== null)}`,
            );
          else open = true;
        } else if (relockTau > c.relockWithin)
          reasons.push(
            `re-locked into ${track.baseline} only after ${spanText(relockTau, base)}, more than ${spanText(c.relockWithin, base)}`,
          );
      }
    }
    if (c.maxPhaseExcursion !== null && track.maxExcursion > c.maxPhaseExcursion) {
      reasons.push(`phase excursion ${track.maxExcursion.toFixed(3)} rad exceeds ${c.maxPhaseExcursion} rad`);
    }
    // the growth, not the level: under noise the full system's common phase wanders away from
    // the noiseless guide over the whole soak, so the level says more about elapsed time than the fault
    const growth = s.maxDivergence - s.divergenceBefore;
    if (c.maxDivergence !== null && growth > c.maxDivergence) {
      reasons.push(
        `full-vs-guide divergence grew by ${growth.toPrecision(3)} (from ${s.divergenceBefore.toPrecision(3)} to ${s.maxDivergence.toPrecision(3)}), more than ${c.maxDivergence}`,
      );
    }
    // whether the pattern persisted is known once it was lost or has settled
    const decided = wasLost || settled;
    const guidePersisted = windowSeen && persisted(s.guide);
    const prediction: FaultVerdict['prediction'] =
      s.predictedDuring !== null
        ? {
            source: 'frame',
            persists: s.predictedDuring.persists,
            agreed: decided ? s.predictedDuring.persists === fullPersisted : null,
            message: s.predictedDuring.message,
          }
        : { source: 'guide', persists: guidePersisted, agreed: decided ? guidePersisted === fullPersisted : null, message: null };
    if (c.predictionMustAgree && prediction.agreed === false) {
      reasons.push(`the prediction (${prediction.source}) said the pattern would ${prediction.persists ? '' : 'not '}persist`);
    }
    if (extraReason) reasons.push(extraReason);

    const notes: string[] = [];
    if (cutShort)
      notes.push(
        `judged until the next fault (${cutShort.by}) at tau ${cutShort.at.toPrecision(6)} ` +
          `(slow ${(cutShort.at * base.epsilon).toPrecision(4)}), settled: ${settled ? 'yes' : 'no'}`,
      );
    if (settled && !wasLost)
      notes.push(
        settleNote({
          shift,
          largest: track.maxExcursion,
          restored: s.restoredAt !== null,
          fromContinued,
          after: settledSpan,
          tolerance: s.lockTolerance,
        }),
      );
    if (settled && fromContinued !== null && fromContinued > CONTINUED_NOTE)
      notes.push(`settled ${fromContinued.toFixed(2)} rad from the predicted continued state`);
    const outcome: VerdictOutcome = reasons.length > 0 ? 'fail' : open ? 'incomplete' : 'pass';
    if (outcome === 'incomplete') {
      const why = wasLost
        ? 'the re-lock was still due'
        : settled
          ? 'the window had not closed'
          : !windowSeen
            ? `less than a lock window had passed since the ${latestChangeName(s, s.restoredAt !== null)}`
            : `the ring was still ${track.finalStatus}`;
      notes.push(`undecided when judging stopped: ${why}`);
    }

    return {
      id: s.plan.id,
      source: s.plan.source,
      action: s.plan.perturbation.action,
      perturbation: s.plan.perturbation,
      restore: s.restore,
      appliedAt: s.appliedAt,
      restoredAt: s.restoredAt,
      rampedUntil: s.rampEnd ?? null,
      windowEnd: s.windowEnd,
      judgedUntil: s.lastTau,
      cutShort,
      before: track.baseline,
      persisted: fullPersisted,
      slipped: track.slips > 0,
      slips: track.slips,
      maxPhaseExcursion: track.maxExcursion,
      shift,
      settled,
      settledAfter: settledSpan,
      fromContinued,
      became: track.became.slice(),
      lostAt: track.lostAt,
      recovered,
      relockedAt: wasLost ? track.relockedAt : null,
      timeToRelock: relockTau === null ? null : spanOf(relockTau, base),
      final: track.final,
      divergence: { before: s.divergenceBefore, max: s.maxDivergence },
      guide: {
        before: s.guide.baseline,
        persisted: guidePersisted,
        slipped: s.guide.slips > 0,
        maxPhaseExcursion: s.guide.maxExcursion,
        became: s.guide.became.slice(),
      },
      prediction,
      overlaps: s.overlaps.slice(),
      complete,
      outcome,
      pass: outcome === 'pass',
      reasons,
      notes,
    };
  }
}

/** A settled state farther than this (rad) from the predicted continued state is worth a note. */
const CONTINUED_NOTE = 0.1;

/** How far the fault moved a ring that kept its pattern, and how long it took to settle. */
function settleNote(m: {
  shift: number;
  largest: number;
  restored: boolean;
  fromContinued: number | null;
  after: Span | null;
  tolerance: number;
}): string {
  const toContinued = m.fromContinued !== null && m.fromContinued <= CONTINUED_NOTE;
  const when =
    m.after && m.after.slow > 0
      ? `, settled in ${Number(m.after.slow.toPrecision(2))} slow units${m.restored ? ' after the restore' : ''}`
      : ', never left the lock tolerance';
  if (m.restored)
    return `moved up to ${m.largest.toFixed(2)} rad during the fault and came back to within ${m.shift.toFixed(2)} rad${toContinued ? ' of the continued state' : ''}${when}`;
  return `moved ${m.shift.toFixed(2)} rad${toContinued ? ' to the continued state' : ''}${when}`;
}

function lossDescription(track: SystemTrackState): string {
  const parts: string[] = [];
  if (track.slips > 0)
    parts.push(
      `${track.slips === 1 ? 'a cycle slip' : `${track.slips} cycle slips`} (a phase difference moved ${track.maxExcursion.toFixed(2)} rad)`,
    );
  if (track.modeChanged) parts.push('the carrying mode changed');
  const others = track.became.filter((l) => l !== 'unlocked');
  if (others.length > 0) parts.push(`${track.slips > 0 ? 'then' : 'moved without a cycle slip into'} ${others.join(', then ')}`);
  return parts.join('; ') || 'lost';
}

function spanText(tau: number, base: TimeBase): string {
  return `${(tau * base.epsilon).toPrecision(3)} slow time units (tau ${tau.toPrecision(4)})`;
}
