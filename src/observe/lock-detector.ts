import { wrapAngle } from '../util/angles.js';
import { accumulateExcursion, SLIP_EXCURSION } from './phase-excursion.js';

/**
 * The one definition of lock, loss of lock and pattern change, shared by the live timeline, the
 * soak verdicts and (through phase-excursion.ts) the live look-ahead.
 *
 * A ring is locked when it is frequency-locked: the phase differences of its coupled pairs stay
 * bounded, with no cycle slip. The detector reads one tick at a time and is in one of three states:
 *
 * Settled means the phase differences no longer move: over the last `window` ticks the drift
 * between the window's two halves (the mean of the newer half minus that of the older) stays
 * below half the `tolerance`, i.e. a steady move of less than the tolerance over the window.
 * Noise may spread the differences more widely than that without moving them, and a noisy lock
 * is still a lock.
 *
 * - `unlocked`: not (yet) locked. It locks once the window is settled, no difference strays more
 *   than a quarter turn from its newest value (ACQUIRE_SPREAD: far from slipping), the carrying
 *   mode oscillates (mean amplitude above `amplitudeFloor`) and the pattern's identity (a label
 *   the caller computes from the snapshot) has been the same for the whole window. That identity
 *   becomes the committed pattern.
 * - `locked`: settled, or in the band up to `hysteresis` times the settling drift, so noise near
 *   the threshold does not flap; the snapshot has the committed identity.
 * - `settling`: still frequency-locked, but moving: the differences drift by more than the
 *   hysteresis band over the window, or the snapshot's shape differs from the committed pattern
 *   and has not yet held over a window (an amplitude kick deforms the shape for a moment). A
 *   transient is not a pattern change. The caller may keep the committed identity for a state it
 *   knows to be the committed pattern's continuation although its shape differs (a strained
 *   in-phase state can classify as a cluster); once that shape has held over a window the
 *   detector settles in the committed pattern.
 *
 * The differences are those of the coupled pairs (coupled-pairs.ts). While locked or settling,
 * each is unwrapped from where it was the last time the window was converged. A move of pi or
 * more is a cycle slip (the difference went past the unstable equilibrium of sine-like
 * coupling): the ring is unlocked. So is a collapse of the
 * amplitude. Any smooth move to a new locked state, by whatever amount, is not a loss: the
 * detector settles again. When it settles with another identity that has held over the whole
 * window, that is a pattern change. Nothing else changes the committed pattern.
 *
 * The window is in ticks; the session sizes it in slow time so the test means the same at
 * every eps.
 */
export type LockStatus = 'unlocked' | 'settling' | 'locked';

/** A lock is acquired only while every difference stays within a quarter turn over the window. */
export const ACQUIRE_SPREAD = Math.PI / 2;

/**
 * The default lock tolerance (rad; README, 'Patterns and symmetry'): how far a coupled pair's
 * phase difference may move over a lock window and still count as settled. The session, the
 * live prediction and its look-ahead all default to it, so "arrived" means what "locked" means.
 */
export const LOCK_TOLERANCE = 0.05;

/** What a lock detector was set up with: its tolerance (rad) and its window (tau). */
export interface LockSettings {
  tolerance: number;
  window: number;
}

/** Why a ring counts as unlocked after having been locked. */
export type UnlockCause = 'slip' | 'amplitude' | 'mode';

/** A change of the committed lock state at one tick (none on most ticks). */
export type LockTransition =
  | { kind: 'lock'; label: string }
  | {
      kind: 'unlock';
      was: string;
      cause: UnlockCause;
      /** Index of the difference (the caller's pair) that slipped. */ pair?: number;
      move?: number;
    }
  | { kind: 'pattern-change'; from: string; to: string; move: number }
  | { kind: 'settled'; label: string; move: number };

export interface LockDetectorState {
  version: 2;
  history: number[];
  count: number;
  head: number;
  status: LockStatus;
  label: string | null;
  candidate: string | null;
  candidateTicks: number;
  shape: string | null;
  shapeTicks: number;
  lockedSince: number | null;
  settledSince: number | null;
  settlingSince: number | null;
  last: number[];
  offsets: number[];
  largestMove: number;
  slips: number;
}

export class LockDetector {
  private readonly history: Float64Array;
  private count = 0;
  private head = 0;
  status: LockStatus = 'unlocked';
  /** The committed pattern identity while locked or settling, else null. */
  label: string | null = null;
  /** The snapshot identity of the latest ticks and for how many ticks in a row it has held. */
  private candidate: string | null = null;
  private candidateTicks = 0;
  /** The same for the snapshot's own shape (equal to the identity unless the caller kept the committed one). */
  private shape: string | null = null;
  private shapeTicks = 0;
  /** tau at which the current lock (locked or settling, no slip) began, or null when unlocked. */
  lockedSince: number | null = null;
  /** tau at which the detector last entered `locked` (first lock or the end of a settling). */
  settledSince: number | null = null;
  /** tau at which the current settling began, null unless settling. */
  settlingSince: number | null = null;
  /** Unwrapped move of each difference since the window was last converged. */
  private readonly last: Float64Array;
  private readonly offsets: Float64Array;
  /** Largest |offset| of the current move (0 when converged). */
  largestMove = 0;
  /** Largest excursion over the window (as far as it is filled) at the latest tick. */
  windowExcursion = 0;
  /** Largest drift between the window's halves at the latest tick (0 with fewer than two ticks). */
  windowDrift = 0;
  /** Per-difference sums over the older and the newer half of the window (scratch of measureWindow). */
  private readonly older: Float64Array;
  private readonly newer: Float64Array;
  /** Cycle slips seen since the detector was made (never reset, so callers can count per span). */
  slips = 0;

  constructor(
    readonly size: number,
    readonly window: number,
    readonly tolerance = LOCK_TOLERANCE,
    readonly amplitudeFloor = 1e-3,
    readonly hysteresis = 2,
  ) {
    this.history = new Float64Array(size * window);
    this.last = new Float64Array(size);
    this.offsets = new Float64Array(size);
    this.older = new Float64Array(size);
    this.newer = new Float64Array(size);
  }

  get locked(): boolean {
    return this.status !== 'unlocked';
  }

  /** Forget the window and any lock (the slip count is kept). */
  reset(): void {
    this.count = 0;
    this.head = 0;
    this.candidate = null;
    this.candidateTicks = 0;
    this.shape = null;
    this.shapeTicks = 0;
    this.unlock();
  }

  /**
   * Record one tick: the carrying mode's phase differences of the coupled pairs (coupled-pairs.ts),
   * its mean amplitude, the snapshot's pattern identity and its own shape (the identity unless
   * the caller kept the committed one); `watched[k]` = 0 exempts difference k from slipping for
   * now. Returns the transition this tick made, if any.
   */
  push(
    tau: number,
    differences: ArrayLike<number>,
    meanAmplitude: number,
    identity: string,
    watched?: ArrayLike<number>,
    shape = identity,
  ): LockTransition | null {
    this.history.set(differences, this.head * this.size);
    this.head = (this.head + 1) % this.window;
    this.count = Math.min(this.count + 1, this.window);
    if (identity === this.candidate) this.candidateTicks++;
    else {
      this.candidate = identity;
      this.candidateTicks = 1;
    }
    if (shape === this.shape) this.shapeTicks++;
    else {
      this.shape = shape;
      this.shapeTicks = 1;
    }
    const transientShape = shape !== this.label && this.shapeTicks < this.window;
    const oscillating = meanAmplitude > this.amplitudeFloor;
    this.measureWindow(differences);
    const excursion = this.windowExcursion;
    const full = this.count === this.window;
    const steadyIdentity = this.candidateTicks >= this.window;

    // noise may spread the differences over the window; what matters is whether they still
    // move, which the drift between the window's halves measures
    const drift = this.windowDrift;
    const converged = full && drift < this.tolerance / 2;

    if (this.status === 'unlocked') {
      if (!(oscillating && converged && excursion < ACQUIRE_SPREAD && steadyIdentity)) return null;
      this.status = 'locked';
      this.label = identity;
      this.lockedSince = tau;
      this.settledSince = tau;
      this.rebase(differences);
      return { kind: 'lock', label: identity };
    }

    const was = this.label!;
    if (!oscillating) {
      this.unlock();
      return { kind: 'unlock', was, cause: 'amplitude' };
    }
    this.largestMove = accumulateExcursion(this.last, this.offsets, differences, watched);
    if (this.largestMove >= SLIP_EXCURSION) {
      const pair = this.largestOffsetIndex();
      const move = this.offsets[pair];
      this.slips++;
      this.unlock();
      return { kind: 'unlock', was, cause: 'slip', pair, move };
    }
    const move = this.largestMove;
    if (converged && identity === was && !transientShape) {
      const settledNow = this.status === 'settling';
      this.enterLocked(tau, differences);
      return settledNow ? { kind: 'settled', label: was, move } : null;
    }
    if (converged && identity !== was && steadyIdentity) {
      this.label = identity;
      this.enterLocked(tau, differences);
      return { kind: 'pattern-change', from: was, to: identity, move };
    }
    if (this.status === 'locked' && (identity !== was || transientShape || drift >= (this.hysteresis * this.tolerance) / 2)) {
      this.status = 'settling';
      this.settlingSince = tau;
    }
    return null;
  }

  /**
   * Both window measures at once from the newest differences, in one pass over the window (the
   * window holds up to thousands of ticks, and this runs every tick for two trackers):
   * - drift: the largest drift of a phase difference over the window, the mean of the newer half
   *   minus the mean of the older half (each measured from the newest value, so wrapping does not
   *   matter). A steady move of d over the window drifts by d / 2; noise averages out of the means.
   * - excursion: the largest excursion of any phase difference from its newest value.
   * The sums run over the ticks oldest first for each difference, as a separate pass per
   * difference would add them, so the results are the same to the bit.
   */
  private measureWindow(newest: ArrayLike<number>): void {
    const { history, size, window, older, newer } = this;
    const n = this.count;
    const half = Math.floor(n / 2);
    older.fill(0);
    newer.fill(0);
    let excursion = 0;
    // oldest tick first: slot (head - n + i) mod window
    let slot = (this.head - n + 2 * window) % window;
    for (let i = 0; i < n; i++) {
      const row = slot * size;
      const sums = i < half ? older : newer;
      for (let k = 0; k < size; k++) {
        const d = wrappedDifference(history[row + k] - newest[k]);
        sums[k] += d;
        excursion = Math.max(excursion, Math.abs(d));
      }
      slot = slot + 1 === window ? 0 : slot + 1;
    }
    let drift = 0;
    if (n >= 2) for (let k = 0; k < size; k++) drift = Math.max(drift, Math.abs(newer[k] / (n - half) - older[k] / half));
    this.windowExcursion = excursion;
    this.windowDrift = drift;
  }

  /** Everything needed to continue exactly where it was (for checkpoints). */
  save(): LockDetectorState {
    return {
      version: 2,
      history: Array.from(this.history),
      count: this.count,
      head: this.head,
      status: this.status,
      label: this.label,
      candidate: this.candidate,
      candidateTicks: this.candidateTicks,
      shape: this.shape,
      shapeTicks: this.shapeTicks,
      lockedSince: this.lockedSince,
      settledSince: this.settledSince,
      settlingSince: this.settlingSince,
      last: Array.from(this.last),
      offsets: Array.from(this.offsets),
      largestMove: this.largestMove,
      slips: this.slips,
    };
  }

  load(saved: LockDetectorState): void {
    if (saved.history.length !== this.history.length) throw new RangeError('lock detector checkpoint does not match this window');
    if (saved.version !== 2) {
      // a checkpoint of the older detector (no slip tracking): start over, unlocked
      this.reset();
      return;
    }
    this.history.set(saved.history);
    this.count = saved.count;
    this.head = saved.head;
    this.status = saved.status;
    this.label = saved.label;
    this.candidate = saved.candidate;
    this.candidateTicks = saved.candidateTicks;
    this.shape = saved.shape;
    this.shapeTicks = saved.shapeTicks;
    this.lockedSince = saved.lockedSince;
    this.settledSince = saved.settledSince;
    this.settlingSince = saved.settlingSince;
    this.last.set(saved.last);
    this.offsets.set(saved.offsets);
    this.largestMove = saved.largestMove;
    this.slips = saved.slips;
  }

  private enterLocked(tau: number, differences: ArrayLike<number>): void {
    if (this.status !== 'locked') this.settledSince = tau;
    this.status = 'locked';
    this.settlingSince = null;
    this.rebase(differences);
  }

  /** The current differences become the point moves are measured from. */
  private rebase(differences: ArrayLike<number>): void {
    this.last.set(differences);
    this.offsets.fill(0);
    this.largestMove = 0;
  }

  private unlock(): void {
    this.status = 'unlocked';
    this.label = null;
    this.lockedSince = null;
    this.settledSince = null;
    this.settlingSince = null;
    this.offsets.fill(0);
    this.largestMove = 0;
  }

  private largestOffsetIndex(): number {
    let best = 0;
    for (let k = 1; k < this.size; k++) if (Math.abs(this.offsets[k]) > Math.abs(this.offsets[best])) best = k;
    return best;
  }
}

/** wrapAngle, with the common case (already in (-pi, pi), where wrapAngle returns its argument) first. */
function wrappedDifference(d: number): number {
  return d > -Math.PI && d < Math.PI ? d : wrapAngle(d);
}
