import type { ModelParameters } from '../model/parameters.js';
import { SlowField } from '../model/slow-field.js';

/**
 * Full-system integrator: classic RK4 applied to the rotating-frame system y' = eps f(y, omega tau).
 * The carrier e^{i omega tau} is carried exactly by the frame, so the linear oscillation has no
 * numerical damping at all (with eps = 0 the state does not change by a single bit); RK4 only
 * sees the O(eps) slow field, so its error per unit tau is O(eps h^4). The angles at the stage
 * times (tau, tau + h/2, tau + h) come from a rotation recurrence; they are recomputed exactly
 * from omega tau at the start of every `advance` so rounding never accumulates across calls.
 */
export class MicroStepper {
  readonly field: SlowField;
  /** Rotating-frame state [u, v] per node and mode. */
  readonly state: Float64Array;
  tau = 0;
  /** Nominal micro step (2 pi / (stepsPerPeriod * max omega)). */
  readonly nominalStep: number;
  /** Right-hand-side evaluations so far (four per micro step). */
  evaluations = 0;

  private readonly k1: Float64Array;
  private readonly k2: Float64Array;
  private readonly k3: Float64Array;
  private readonly k4: Float64Array;
  private readonly trial: Float64Array;
  private readonly cos0: Float64Array;
  private readonly sin0: Float64Array;
  private readonly cosMid: Float64Array;
  private readonly sinMid: Float64Array;
  private readonly cosEnd: Float64Array;
  private readonly sinEnd: Float64Array;
  private readonly cosHalf: Float64Array;
  private readonly sinHalf: Float64Array;
  private halfStepFor = Number.NaN;

  constructor(readonly params: ModelParameters, initial: Float64Array, stepsPerPeriod: number) {
    this.field = new SlowField(params);
    const size = initial.length;
    this.state = Float64Array.from(initial);
    this.k1 = new Float64Array(size);
    this.k2 = new Float64Array(size);
    this.k3 = new Float64Array(size);
    this.k4 = new Float64Array(size);
    this.trial = new Float64Array(size);
    const m = params.modes;
    this.cos0 = new Float64Array(m);
    this.sin0 = new Float64Array(m);
    this.cosMid = new Float64Array(m);
    this.sinMid = new Float64Array(m);
    this.cosEnd = new Float64Array(m);
    this.sinEnd = new Float64Array(m);
    this.cosHalf = new Float64Array(m);
    this.sinHalf = new Float64Array(m);
    this.nominalStep = (2 * Math.PI) / (stepsPerPeriod * Math.max(...params.omega));
  }

  /** Number of equal micro steps `advance` will take to reach tauEnd. */
  stepsTo(tauEnd: number): number {
    // The relative slack absorbs rounding in tauEnd - tau when tau is large.
    return Math.max(1, Math.ceil(((tauEnd - this.tau) / this.nominalStep) * (1 - 1e-10)));
  }

  /** Integrate to tauEnd (> tau) in equal steps no longer than the nominal step. */
  advance(tauEnd: number): void {
    const span = tauEnd - this.tau;
    if (!(span > 0)) return;
    const steps = this.stepsTo(tauEnd);
    const h = span / steps;
    this.prepareAngles(h);
    const eps = this.params.epsilon;
    const { state: y, k1, k2, k3, k4, trial, field, cos0, sin0, cosMid, sinMid, cosEnd, sinEnd, cosHalf, sinHalf } = this;
    const m = this.params.modes;
    const size = y.length;
    const half = 0.5 * h * eps;
    const full = h * eps;
    const sixth = full / 6;
    for (let step = 0; step < steps; step++) {
      for (let j = 0; j < m; j++) {
        const c = cos0[j];
        const s = sin0[j];
        const cm = c * cosHalf[j] - s * sinHalf[j];
        const sm = s * cosHalf[j] + c * sinHalf[j];
        cosMid[j] = cm;
        sinMid[j] = sm;
        cosEnd[j] = cm * cosHalf[j] - sm * sinHalf[j];
        sinEnd[j] = sm * cosHalf[j] + cm * sinHalf[j];
      }
      field.evaluate(cos0, sin0, y, k1);
      for (let i = 0; i < size; i++) trial[i] = y[i] + half * k1[i];
      field.evaluate(cosMid, sinMid, trial, k2);
      for (let i = 0; i < size; i++) trial[i] = y[i] + half * k2[i];
      field.evaluate(cosMid, sinMid, trial, k3);
      for (let i = 0; i < size; i++) trial[i] = y[i] + full * k3[i];
      field.evaluate(cosEnd, sinEnd, trial, k4);
      for (let i = 0; i < size; i++) y[i] += sixth * (k1[i] + 2 * (k2[i] + k3[i]) + k4[i]);
      cos0.set(cosEnd);
      sin0.set(sinEnd);
    }
    this.evaluations += 4 * steps;
    this.tau = tauEnd;
  }

  private prepareAngles(h: number): void {
    const omega = this.params.omega;
    for (let j = 0; j < omega.length; j++) {
      this.cos0[j] = Math.cos(omega[j] * this.tau);
      this.sin0[j] = Math.sin(omega[j] * this.tau);
    }
    if (h !== this.halfStepFor) {
      for (let j = 0; j < omega.length; j++) {
        this.cosHalf[j] = Math.cos(0.5 * omega[j] * h);
        this.sinHalf[j] = Math.sin(0.5 * omega[j] * h);
      }
      this.halfStepFor = h;
    }
  }
}
