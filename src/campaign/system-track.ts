import { accumulateExcursion, SLIP_EXCURSION } from '../observe/phase-excursion.js';
import type { SystemView } from './tick-view.js';

/**
 * How one system (full or guide) behaves from a fault's start to the end of its evaluation
 * window, measured against its state just before the fault.
 *
 * - Phase excursion: each neighbour phase difference is unwrapped tick by tick from its
 *   pre-fault value; the excursion is the largest |change|. Reaching pi means the lock was
 *   left (past the unstable equilibrium of sine-like coupling, i.e. a cycle slip under way).
 * - Pattern: the lock detector's labels other than the pre-fault one, in order of first
 *   appearance. While the fault lasts the ring may show a deformed pattern (a strained in-phase
 *   state can classify as a cluster) or "unlocked" while the phases settle; neither is a loss.
 *   Settling into another locked pattern after the restore (for at least `hold`) is.
 * - Re-lock: the first stretch of the pre-fault label that begins at or after the reference
 *   time (the restore, or the fault itself when nothing is restored) and lasts at least `hold`
 *   (one lock window) or reaches the end of the window.
 */
export interface SystemTrackState {
  baseline: string;
  baselineMode: number;
  lastDifferences: number[];
  offsets: number[];
  maxExcursion: number;
  became: string[];
  lostAt: number | null;
  lockedOther: boolean;
  modeChanged: boolean;
  stretchStart: number | null;
  otherStart: number | null;
  relockedAt: number | null;
  final: string;
}

export function startTrack(before: SystemView): SystemTrackState {
  return {
    baseline: before.label,
    baselineMode: before.mode,
    lastDifferences: before.phaseDifferences.slice(),
    offsets: before.phaseDifferences.map(() => 0),
    maxExcursion: 0,
    became: [],
    lostAt: null,
    lockedOther: false,
    modeChanged: false,
    stretchStart: null,
    otherStart: null,
    relockedAt: null,
    final: before.label,
  };
}

/** One tick at `tau`; `reference` is the restore (or fault) time once it has passed, else null. */
export function observeTrack(track: SystemTrackState, view: SystemView, tau: number, reference: number | null, hold: number): void {
  const d = view.phaseDifferences;
  if (track.lastDifferences.length !== d.length) {
    // no tick before the fault: measure from the first one after it
    track.lastDifferences = d.slice();
    track.offsets = d.map(() => 0);
  }
  track.maxExcursion = Math.max(track.maxExcursion, accumulateExcursion(track.lastDifferences, track.offsets, d));
  track.final = view.label;
  if (view.mode !== track.baselineMode) track.modeChanged = true;
  if (view.label !== track.baseline) {
    if (!track.became.includes(view.label)) track.became.push(view.label);
    track.lostAt ??= tau;
    track.stretchStart = null;
    if (reference === null || view.label === 'unlocked') {
      track.otherStart = null;
      return;
    }
    track.otherStart = track.otherStart === null ? tau : Math.max(track.otherStart, reference);
    if (tau - track.otherStart >= hold) track.lockedOther = true;
    return;
  }
  track.otherStart = null;
  if (reference === null) return;
  track.stretchStart = track.stretchStart === null ? tau : Math.max(track.stretchStart, reference);
  if (track.relockedAt === null && tau - track.stretchStart >= hold) track.relockedAt = track.stretchStart;
}

/** Close the track at the end of the window: an ongoing stretch of the pre-fault label counts. */
export function closeTrack(track: SystemTrackState): void {
  if (track.relockedAt === null && track.stretchStart !== null) track.relockedAt = track.stretchStart;
  // an ongoing other locked pattern at the end counts too (once the fault is over)
  if (track.otherStart !== null && track.relockedAt === null) track.lockedOther = true;
}

export function slipped(track: SystemTrackState): boolean {
  return track.maxExcursion >= SLIP_EXCURSION;
}

/** The locked pattern persisted: locked before, no slip, no change of carrying mode, no other pattern once the fault is over. */
export function persisted(track: SystemTrackState): boolean {
  return track.baseline !== 'unlocked' && !slipped(track) && !track.lockedOther && !track.modeChanged;
}
