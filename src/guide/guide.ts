import type { ModelParameters } from '../model/parameters.js';
import { ABSOLUTE_PER_RELATIVE, DormandPrince } from '../integrate/dormand-prince.js';
import { TorusAverage } from './torus-average.js';

/**
 * Default relative tolerance (README, 'Guiding system'): keeps the guide's own integration error
 * far below the O(eps) gap to the full system that it is compared with.
 */
export const GUIDE_TOLERANCE = 1e-10;
/**
 * Accepted plus rejected steps per tick: a guide whose averaged flow blows up (its step keeps
 * shrinking) fails within the tick, and the run goes on without it, instead of stalling there.
 */
const GUIDE_STEPS_PER_TICK = 100_000;

/**
 * The guiding system Y' = eps fbar(Y), integrated in slow time s = eps tau with an adaptive
 * Dormand-Prince 5(4) method, so its cost per slow time unit does not depend on eps.
 * Its state lives in the same rotating frame as the full system's and is sampled on the same
 * clock; by the first-order averaging theorem the two stay O(eps) apart for tau = O(1/eps)
 * (Sanders, Verhulst, Murdock 2007).
 */
export class GuideSystem {
  readonly average: TorusAverage;
  readonly state: Float64Array;
  private readonly solver: DormandPrince;
  /** The time of `state`; moved only by advance and restore. */
  private clock = 0;
  private collapsed = false;

  constructor(
    readonly params: ModelParameters,
    initial: Float64Array,
    grid: number,
    tolerance = GUIDE_TOLERANCE,
  ) {
    this.average = new TorusAverage(params, grid);
    this.state = Float64Array.from(initial);
    this.solver = new DormandPrince(initial.length, (_s, y, dy) => this.average.evaluate(y, dy), {
      rtol: tolerance,
      atol: tolerance * ABSOLUTE_PER_RELATIVE,
      maxSteps: GUIDE_STEPS_PER_TICK,
    });
  }

  get evaluations(): number {
    return this.solver.evaluations;
  }

  get tau(): number {
    return this.clock;
  }

  /** Set when the step size collapsed (the averaged flow blew up); the state then stays as it was and only the clock moves on. */
  get failed(): boolean {
    return this.collapsed;
  }

  /** Advance to tauEnd (a failed guide only moves its clock); false once it has failed. */
  advance(tauEnd: number): boolean {
    const eps = this.params.epsilon;
    if (tauEnd > this.clock && eps > 0 && !this.collapsed) {
      const ok = this.solver.integrate(eps * this.clock, eps * tauEnd, this.state);
      if (!ok) this.collapsed = true;
    }
    this.clock = tauEnd;
    return !this.collapsed;
  }

  /** The adaptive step the solver will try next (slow time); part of a bit-exact checkpoint. */
  get nextStep(): number {
    return this.solver.step;
  }

  /**
   * Continue as a checkpoint saved it: state, clock, whether it had failed, and the step the
   * solver was about to try (a step of 0, saved before the first one, leaves the solver's own
   * choice in place).
   */
  restore(saved: { state: ArrayLike<number>; tau: number; failed: boolean; nextStep: number }): void {
    if (saved.state.length !== this.state.length) {
      throw new RangeError(`GuideSystem.restore: the state has ${saved.state.length} numbers, expected ${this.state.length}`);
    }
    this.state.set(saved.state);
    this.clock = saved.tau;
    this.collapsed = saved.failed;
    this.solver.resume(saved.nextStep > 0 ? saved.nextStep : this.solver.step);
  }

  /** Tell the solver that the state or the parameters changed outside it. */
  invalidate(): void {
    this.solver.invalidate();
  }
}
