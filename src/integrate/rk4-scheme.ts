import type { SlowField } from '../model/slow-field.js';
import { CarrierAngles } from './carrier-angles.js';

/**
 * Classic fourth-order Runge-Kutta on y' = eps f(y, tau) (Hairer, Norsett, Wanner, Solving ODEs I,
 * II.1), four evaluations per step. Each stage is one fused pass of the field kernel
 * (SlowField.combine) that also forms the next stage argument and the running sum of the update.
 * The angles at tau, tau + h/2 and tau + h come from a half-step rotation recurrence.
 */
export class Rk4Scheme {
  readonly angles: CarrierAngles;
  private readonly trial: Float64Array;
  private readonly sum: Float64Array;

  constructor(readonly field: SlowField) {
    const p = field.params;
    this.angles = new CarrierAngles(p.omega);
    const size = 2 * p.nodes * p.modes;
    this.trial = new Float64Array(size);
    this.sum = new Float64Array(size);
  }

  /** `steps` equal steps from tau0 to tauEnd on y in place; returns the evaluations used. */
  run(y: Float64Array, tau0: number, tauEnd: number, steps: number): number {
    const h = (tauEnd - tau0) / steps;
    const { field, angles, trial, sum } = this;
    const eps = field.params.epsilon;
    const half = 0.5 * h * eps;
    const full = h * eps;
    const sixth = full / 6;
    const third = full / 3;
    const { cos, sin } = angles;
    angles.setStep(0.5 * h);
    angles.reset(tau0);
    field.prepare();
    for (let step = 0; step < steps; step++) {
      field.combinePrepared(cos, sin, y, y, half, trial, y, sixth, sum);
      angles.advance();
      field.combinePrepared(cos, sin, trial, y, half, trial, sum, third, sum);
      field.combinePrepared(cos, sin, trial, y, full, trial, sum, third, sum);
      angles.advance();
      field.combinePrepared(cos, sin, trial, y, 0, trial, sum, sixth, y);
      if ((step + 1) % CarrierAngles.RESEED_STEPS === 0) angles.reset(tau0 + (step + 1) * h);
    }
    return 4 * steps;
  }
}
