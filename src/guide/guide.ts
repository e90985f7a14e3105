import type { ModelParameters } from '../model/parameters.js';
import { DormandPrince } from '../integrate/dormand-prince.js';
import { TorusAverage } from './torus-average.js';

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
  tau = 0;
  private readonly solver: DormandPrince;
  /** Set when the step size collapsed (the averaged flow blew up). */
  failed = false;

  constructor(readonly params: ModelParameters, initial: Float64Array, grid: number, tolerance = 1e-10) {
    this.average = new TorusAverage(params, grid);
    this.state = Float64Array.from(initial);
    this.solver = new DormandPrince(initial.length, (_s, y, dy) => this.average.evaluate(y, dy), {
      rtol: tolerance,
      atol: tolerance * 1e-2,
      maxSteps: 100_000,
    });
  }

  get evaluations(): number {
    return this.solver.evaluations;
  }

  /** Advance to tauEnd. */
  advance(tauEnd: number): boolean {
    const eps = this.params.epsilon;
    if (tauEnd > this.tau && eps > 0 && !this.failed) {
      const ok = this.solver.integrate(eps * this.tau, eps * tauEnd, this.state);
      if (!ok) this.failed = true;
    }
    this.tau = tauEnd;
    return !this.failed;
  }

  /** The adaptive step the solver will try next (slow time); part of a bit-exact checkpoint. */
  get nextStep(): number {
    return this.solver.step;
  }

  set nextStep(step: number) {
    this.solver.step = step;
    this.solver.invalidate();
  }

  /** Tell the solver that the state or the parameters changed outside it. */
  invalidate(): void {
    this.solver.invalidate();
  }
}
