import { wrapAngle } from '../util/angles.js';

/**
 * Lock detection over a sliding window: the pattern counts as locked when every neighbour
 * phase difference has stayed within `tolerance` radians of its newest value over the last
 * `window` ticks, and the carrying mode is actually oscillating. Once locked, it counts as
 * unlocked only when the excursion exceeds `hysteresis` times the tolerance, so noise near the
 * threshold does not make the verdict flap. The window is in ticks; the session sizes it in
 * slow time so the test means the same thing at every eps.
 */
export class LockDetector {
  private readonly history: Float64Array;
  private count = 0;
  private head = 0;
  /** tau at which the current locked stretch began, or null when unlocked. */
  lockedSince: number | null = null;

  constructor(
    readonly size: number,
    readonly window: number,
    readonly tolerance = 0.05,
    readonly amplitudeFloor = 1e-3,
    readonly hysteresis = 2,
  ) {
    this.history = new Float64Array(size * window);
  }

  reset(): void {
    this.count = 0;
    this.head = 0;
    this.lockedSince = null;
  }

  /** Record one tick; returns whether the pattern is locked now. */
  push(tau: number, phaseDifferences: ArrayLike<number>, meanAmplitude: number): boolean {
    this.history.set(phaseDifferences, this.head * this.size);
    this.head = (this.head + 1) % this.window;
    this.count = Math.min(this.count + 1, this.window);
    const limit = this.lockedSince === null ? this.tolerance : this.hysteresis * this.tolerance;
    const locked = meanAmplitude > this.amplitudeFloor && this.count === this.window && this.excursion(phaseDifferences) < limit;
    if (!locked) this.lockedSince = null;
    else if (this.lockedSince === null) this.lockedSince = tau;
    return locked;
  }

  /** Largest excursion of any phase difference from its newest value over the window. */
  excursion(newest: ArrayLike<number>): number {
    let worst = 0;
    for (let t = 0; t < this.count; t++) {
      const row = t * this.size;
      for (let k = 0; k < this.size; k++) worst = Math.max(worst, Math.abs(wrapAngle(this.history[row + k] - newest[k])));
    }
    return worst;
  }

  /** Everything needed to continue exactly where it was (for checkpoints). */
  save(): { history: number[]; count: number; head: number; lockedSince: number | null } {
    return { history: Array.from(this.history), count: this.count, head: this.head, lockedSince: this.lockedSince };
  }

  load(saved: ReturnType<LockDetector['save']>): void {
    if (saved.history.length !== this.history.length) throw new RangeError('lock detector checkpoint does not match this window');
    this.history.set(saved.history);
    this.count = saved.count;
    this.head = saved.head;
    this.lockedSince = saved.lockedSince;
  }

}
