import { accumulateExcursion } from '../observe/phase-excursion.js';
import type { LockStatus } from '../observe/lock-detector.js';
import { wrapAngle } from '../util/angles.js';
import { emptyDecimated, pushDecimated, type DecimatedItems } from '../observe/decimating-history.js';
import type { SystemView } from './tick-view.js';

/**
 * How one system (full or guide) behaves from a fault's start to the end of its judged span,
 * measured against its state just before the fault. The lock, the slips and the pattern are the
 * lock detector's (src/observe/lock-detector.ts): the live timeline and the verdicts share one
 * definition. This track adds what a verdict reports on top of it:
 *
 * - phase excursion: the phase difference of each coupled pair unwrapped tick by tick from its
 *   pre-fault value (a pair that may wind freely for now is held, as the detector does); the
 *   largest |change| is reported, and the final change is the shift the fault left;
 * - became / lostAt: committed patterns other than the pre-fault one (after a slip, "unlocked";
 *   after a pattern change held over a lock window, the new one), in order of first appearance;
 * - re-lock: the first tick at or after the reference time (the restore, or the fault itself
 *   when nothing is restored) at which the detector has the pre-fault pattern locked again
 *   after it was lost (its lock already requires a full converged window);
 * - settling: a bounded history of the unwrapped differences, so that the time after which they
 *   stayed within the lock tolerance of their final values can be read at the end.
 */
export interface SystemTrackState {
  baseline: string;
  baselineMode: number;
  /** The detector's slip count just before the fault. */
  baselineSlips: number;
  /** Coupled pairs' differences at the latest tick, and their unwrapped change since the fault. */
  lastDifferences: number[];
  offsets: number[];
  /** Neighbour differences at the latest tick (to compare with a predicted state). */
  finalDifferences: number[];
  maxExcursion: number;
  /** Slips during the span (the detector's count since the fault). */
  slips: number;
  became: string[];
  lostAt: number | null;
  modeChanged: boolean;
  relockedAt: number | null;
  final: string;
  finalStatus: LockStatus;
  /** Decimated (tau, offsets) samples for the settling time. */
  samples: DecimatedItems<{ tau: number; offsets: number[] }>;
}

/** Samples kept for the settling time; the stride doubles when they fill up. */
const SETTLE_SAMPLES = 256;

export function startTrack(before: SystemView): SystemTrackState {
  return {
    baseline: before.label,
    baselineMode: before.mode,
    baselineSlips: before.slips,
    lastDifferences: before.pairDifferences.slice(),
    offsets: before.pairDifferences.map(() => 0),
    finalDifferences: before.phaseDifferences.slice(),
    maxExcursion: 0,
    slips: 0,
    became: [],
    lostAt: null,
    modeChanged: false,
    relockedAt: null,
    final: before.label,
    finalStatus: before.status,
    samples: emptyDecimated(),
  };
}

/** One tick at `tau`; `reference` is the restore (or fault) time once it has passed, else null. */
export function observeTrack(track: SystemTrackState, view: SystemView, tau: number, reference: number | null): void {
  const d = view.pairDifferences;
  if (track.lastDifferences.length !== d.length) {
    // no tick before the fault: measure from the first one after it
    track.lastDifferences = d.slice();
    track.offsets = d.map(() => 0);
  }
  track.maxExcursion = Math.max(track.maxExcursion, accumulateExcursion(track.lastDifferences, track.offsets, d, view.watched));
  track.finalDifferences = view.phaseDifferences;
  pushDecimated(track.samples, { tau, offsets: track.offsets.slice() }, SETTLE_SAMPLES);
  track.slips = view.slips - track.baselineSlips;
  track.final = view.label;
  track.finalStatus = view.status;
  if (view.mode !== track.baselineMode) track.modeChanged = true;
  if (view.label !== track.baseline) {
    if (!track.became.includes(view.label)) track.became.push(view.label);
    track.lostAt ??= tau;
    return;
  }
  if (track.lostAt !== null && track.relockedAt === null && reference !== null && tau >= reference && view.status !== 'unlocked')
    track.relockedAt = tau;
}

/** The pattern was lost during the span: a slip, another committed pattern, or another carrying mode. */
export function lost(track: SystemTrackState): boolean {
  return track.slips > 0 || track.became.length > 0 || track.modeChanged;
}

/** Settled at the end of the span in the pre-fault pattern. */
export function settledInBaseline(track: SystemTrackState): boolean {
  return track.finalStatus === 'locked' && track.final === track.baseline;
}

/** The locked pattern persisted: locked before, not lost, and settled in it at the end. */
export function persisted(track: SystemTrackState): boolean {
  return track.baseline !== 'unlocked' && !lost(track) && settledInBaseline(track);
}

/** Largest |final change| of a neighbour phase difference from its pre-fault value (rad). */
export function finalShift(track: SystemTrackState): number {
  return track.offsets.reduce((m, o) => Math.max(m, Math.abs(o)), 0);
}

/**
 * tau after which every phase difference stayed within `tolerance` of its final value (the
 * start of the span when it never left); resolved to the sample stride.
 */
export function settledAfter(track: SystemTrackState, tolerance: number): number | null {
  const samples = track.samples.items;
  if (samples.length === 0) return null;
  for (let i = samples.length - 1; i >= 0; i--) {
    const far = samples[i].offsets.some((o, k) => Math.abs(o - track.offsets[k]) > tolerance);
    if (far) return i + 1 < samples.length ? samples[i + 1].tau : samples[i].tau;
  }
  return samples[0].tau;
}

/** Largest wrapped distance (rad) between the final neighbour differences and a predicted set. */
export function distanceTo(track: SystemTrackState, reference: readonly number[]): number {
  let largest = 0;
  track.finalDifferences.forEach((d, k) => (largest = Math.max(largest, Math.abs(wrapAngle(d - reference[k])))));
  return largest;
}
