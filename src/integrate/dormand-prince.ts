/**
 * Adaptive embedded Runge-Kutta 5(4) of Dormand and Prince (J. Comput. Appl. Math. 6, 1980),
 * with first-same-as-last and the usual error-per-step control (Hairer, Norsett, Wanner,
 * Solving ODEs I, section II.4). Used for everything that lives in slow time: the guiding
 * system, continuation corrector steps, the envelope. All work arrays are preallocated.
 */
export type VectorField = (t: number, y: Float64Array, dy: Float64Array) => void;

export interface DormandPrinceOptions {
  rtol?: number;
  atol?: number;
  /** Largest step (in the integrator's own time). */
  maxStep?: number;
  /** Upper bound on accepted plus rejected steps in one `integrate` call. */
  maxSteps?: number;
}

const C2 = 1 / 5, C3 = 3 / 10, C4 = 4 / 5, C5 = 8 / 9;
const A21 = 1 / 5;
const A31 = 3 / 40, A32 = 9 / 40;
const A41 = 44 / 45, A42 = -56 / 15, A43 = 32 / 9;
const A51 = 19372 / 6561, A52 = -25360 / 2187, A53 = 64448 / 6561, A54 = -212 / 729;
const A61 = 9017 / 3168, A62 = -355 / 33, A63 = 46732 / 5247, A64 = 49 / 176, A65 = -5103 / 18656;
const B1 = 35 / 384, B3 = 500 / 1113, B4 = 125 / 192, B5 = -2187 / 6784, B6 = 11 / 84;
const E1 = 71 / 57600, E3 = -71 / 16695, E4 = 71 / 1920, E5 = -17253 / 339200, E6 = 22 / 525, E7 = -1 / 40;

export class DormandPrince {
  readonly rtol: number;
  readonly atol: number;
  readonly maxStep: number;
  readonly maxSteps: number;
  /** The step the next call tries first, carried over between calls (0: none yet, choose one). */
  private proposal = 0;
  accepted = 0;
  rejected = 0;
  evaluations = 0;

  private readonly k1: Float64Array;
  private readonly k2: Float64Array;
  private readonly k3: Float64Array;
  private readonly k4: Float64Array;
  private readonly k5: Float64Array;
  private readonly k6: Float64Array;
  private readonly k7: Float64Array;
  private readonly trial: Float64Array;
  private readonly next: Float64Array;
  private firstValid = false;

  constructor(readonly dimension: number, readonly field: VectorField, options: DormandPrinceOptions = {}) {
    this.rtol = options.rtol ?? 1e-9;
    this.atol = options.atol ?? 1e-12;
    this.maxStep = options.maxStep ?? Number.POSITIVE_INFINITY;
    this.maxSteps = options.maxSteps ?? 1_000_000;
    const make = () => new Float64Array(dimension);
    this.k1 = make(); this.k2 = make(); this.k3 = make(); this.k4 = make();
    this.k5 = make(); this.k6 = make(); this.k7 = make();
    this.trial = make(); this.next = make();
  }

  /** The step the next call tries first (0 before the first call). */
  get step(): number {
    return this.proposal;
  }

  /** Forget the cached derivative (call after y or the field's parameters change outside). */
  invalidate(): void {
    this.firstValid = false;
  }

  /** Continue with `step` as the next step to try and a fresh derivative (a restart, a checkpoint). */
  resume(step: number): void {
    this.proposal = step;
    this.firstValid = false;
  }

  /**
   * Integrate y in place from t0 to t1 (t1 > t0). Returns false if the step size collapsed or
   * the step budget ran out (y then holds the last accepted state).
   */
  integrate(t0: number, t1: number, y: Float64Array): boolean {
    const n = this.dimension;
    const { k1, k2, k3, k4, k5, k6, k7, trial, next, field } = this;
    let t = t0;
    if (!this.firstValid) {
      field(t, y, k1);
      this.evaluations++;
      this.firstValid = true;
    }
    if (!(this.proposal > 0)) this.proposal = this.initialStep(t, y, t1 - t0);
    let steps = 0;
    while (t < t1) {
      if (++steps > this.maxSteps) return false;
      let h = Math.min(this.proposal, this.maxStep);
      const last = t + h >= t1 || t1 - (t + h) < 1e-12 * Math.abs(t1);
      if (last) h = t1 - t;
      for (let i = 0; i < n; i++) trial[i] = y[i] + h * A21 * k1[i];
      field(t + C2 * h, trial, k2);
      for (let i = 0; i < n; i++) trial[i] = y[i] + h * (A31 * k1[i] + A32 * k2[i]);
      field(t + C3 * h, trial, k3);
      for (let i = 0; i < n; i++) trial[i] = y[i] + h * (A41 * k1[i] + A42 * k2[i] + A43 * k3[i]);
      field(t + C4 * h, trial, k4);
      for (let i = 0; i < n; i++) trial[i] = y[i] + h * (A51 * k1[i] + A52 * k2[i] + A53 * k3[i] + A54 * k4[i]);
      field(t + C5 * h, trial, k5);
      for (let i = 0; i < n; i++) trial[i] = y[i] + h * (A61 * k1[i] + A62 * k2[i] + A63 * k3[i] + A64 * k4[i] + A65 * k5[i]);
      field(t + h, trial, k6);
      for (let i = 0; i < n; i++) next[i] = y[i] + h * (B1 * k1[i] + B3 * k3[i] + B4 * k4[i] + B5 * k5[i] + B6 * k6[i]);
      field(t + h, next, k7);
      this.evaluations += 6;

      let sum = 0;
      for (let i = 0; i < n; i++) {
        const e = h * (E1 * k1[i] + E3 * k3[i] + E4 * k4[i] + E5 * k5[i] + E6 * k6[i] + E7 * k7[i]);
        const scale = this.atol + this.rtol * Math.max(Math.abs(y[i]), Math.abs(next[i]));
        sum += (e / scale) * (e / scale);
      }
      const err = Math.sqrt(sum / n);
      if (!Number.isFinite(err)) {
        this.proposal = h * 0.2;
        this.rejected++;
        if (this.proposal < 1e-14 * Math.max(1, Math.abs(t))) return false;
        continue;
      }
      const factor = err === 0 ? 5 : Math.min(5, Math.max(0.2, 0.9 * Math.pow(err, -0.2)));
      if (err <= 1) {
        t = last ? t1 : t + h;
        y.set(next);
        k1.set(k7);
        this.accepted++;
        // A short last step says nothing about the next: keep the previous proposal then.
        if (!last) this.proposal = h * factor;
        else this.proposal = Math.max(this.proposal, h * factor);
      } else {
        this.proposal = h * Math.max(0.2, factor);
        this.rejected++;
        if (this.proposal < 1e-14 * Math.max(1, Math.abs(t))) return false;
      }
    }
    return true;
  }

  private initialStep(t: number, y: Float64Array, span: number): number {
    // Hairer-Norsett-Wanner's starting-step heuristic, first part.
    let d0 = 0;
    let d1 = 0;
    for (let i = 0; i < this.dimension; i++) {
      const scale = this.atol + this.rtol * Math.abs(y[i]);
      d0 += (y[i] / scale) ** 2;
      d1 += (this.k1[i] / scale) ** 2;
    }
    d0 = Math.sqrt(d0 / this.dimension);
    d1 = Math.sqrt(d1 / this.dimension);
    const h = d0 < 1e-5 || d1 < 1e-5 ? 1e-6 : 0.01 * (d0 / d1);
    return Math.min(h, Math.abs(span), this.maxStep);
  }
}
