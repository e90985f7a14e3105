/**
 * Adaptive embedded Runge-Kutta 5(4) of Dormand and Prince (J. Comput. Appl. Math. 6, 1980),
 * with first-same-as-last and the usual error-per-step control (Hairer, Norsett, Wanner,
 * Solving ODEs I, section II.4). Used for everything that lives in slow time: the guiding
 * system, the prediction's look-ahead, the envelope. All work arrays are preallocated.
 */

// Step control: after a step with error norm err (1 = at tolerance) the next step is
// h * clamp(SAFETY * err^ERROR_EXPONENT, MAX_SHRINK, MAX_GROWTH).
/** Aims a little below the step the error estimate allows, so the next step is less often rejected; 0.9 is common practice. */
const SAFETY = 0.9;
/** -1 / (4 + 1): the embedded estimate is of a 4th-order solution, whose error per step scales like h^5. */
const ERROR_EXPONENT = -1 / 5;
/** Largest growth in one step: keeps one lucky (near-zero) error estimate from throwing the step far out; common practice. */
const MAX_GROWTH = 5;
/** Largest shrink in one step (also after a non-finite error), so one bad estimate cannot collapse the step; common practice. */
const MAX_SHRINK = 0.2;
/** A step below this fraction of max(1, |t|) is a few dozen roundings of t: the step size has collapsed and the integration has failed. */
const STEP_COLLAPSE = 1e-14;
/** A step that would end this close to t1 (relative to |t1|) is stretched to t1, so no sliver of a step is left. */
const END_SLACK = 1e-12;
/** The starting-step heuristic (common practice): h = START_FRACTION * |y| / |y'| in the error norm, or START_FALLBACK when either norm is below START_TINY. */
const START_FRACTION = 0.01;
const START_TINY = 1e-5;
const START_FALLBACK = 1e-6;

/** Defaults for a caller that gives none; the guide, the envelope and the look-ahead each pass their own tolerances and budget. */
const DEFAULT_RTOL = 1e-9;
const DEFAULT_ATOL = 1e-12;
/** Accepted plus rejected steps one `integrate` call may take: a flow that keeps shrinking the step returns false instead of running on. */
const DEFAULT_MAX_STEPS = 1_000_000;
/**
 * Absolute tolerance per unit of relative tolerance for the slow-time integrations of the guide
 * and the envelope: amplitudes sit near 2 (docs/model.md, 'Closed form for M = 1'), so the
 * absolute part matters only for components passing near zero (u or v of a turning phase), which
 * would otherwise be held to a relative accuracy of a vanishing number.
 */
export const ABSOLUTE_PER_RELATIVE = 1e-2;

export type VectorField = (t: number, y: Float64Array, dy: Float64Array) => void;

export interface DormandPrinceOptions {
  rtol?: number;
  atol?: number;
  /** Largest step (in the integrator's own time). */
  maxStep?: number;
  /** Upper bound on accepted plus rejected steps in one `integrate` call. */
  maxSteps?: number;
}

const C2 = 1 / 5,
  C3 = 3 / 10,
  C4 = 4 / 5,
  C5 = 8 / 9;
const A21 = 1 / 5;
const A31 = 3 / 40,
  A32 = 9 / 40;
const A41 = 44 / 45,
  A42 = -56 / 15,
  A43 = 32 / 9;
const A51 = 19372 / 6561,
  A52 = -25360 / 2187,
  A53 = 64448 / 6561,
  A54 = -212 / 729;
const A61 = 9017 / 3168,
  A62 = -355 / 33,
  A63 = 46732 / 5247,
  A64 = 49 / 176,
  A65 = -5103 / 18656;
const B1 = 35 / 384,
  B3 = 500 / 1113,
  B4 = 125 / 192,
  B5 = -2187 / 6784,
  B6 = 11 / 84;
const E1 = 71 / 57600,
  E3 = -71 / 16695,
  E4 = 71 / 1920,
  E5 = -17253 / 339200,
  E6 = 22 / 525,
  E7 = -1 / 40;

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

  constructor(
    readonly dimension: number,
    readonly field: VectorField,
    options: DormandPrinceOptions = {},
  ) {
    this.rtol = options.rtol ?? DEFAULT_RTOL;
    this.atol = options.atol ?? DEFAULT_ATOL;
    this.maxStep = options.maxStep ?? Number.POSITIVE_INFINITY;
    this.maxSteps = options.maxSteps ?? DEFAULT_MAX_STEPS;
    const make = () => new Float64Array(dimension);
    this.k1 = make();
    this.k2 = make();
    this.k3 = make();
    this.k4 = make();
    this.k5 = make();
    this.k6 = make();
    this.k7 = make();
    this.trial = make();
    this.next = make();
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
      const last = t + h >= t1 || t1 - (t + h) < END_SLACK * Math.abs(t1);
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
        this.proposal = h * MAX_SHRINK;
        this.rejected++;
        if (this.proposal < STEP_COLLAPSE * Math.max(1, Math.abs(t))) return false;
        continue;
      }
      const factor = err === 0 ? MAX_GROWTH : Math.min(MAX_GROWTH, Math.max(MAX_SHRINK, SAFETY * Math.pow(err, ERROR_EXPONENT)));
      if (err <= 1) {
        t = last ? t1 : t + h;
        y.set(next);
        k1.set(k7);
        this.accepted++;
        // A short last step says nothing about the next: keep the previous proposal then.
        if (!last) this.proposal = h * factor;
        else this.proposal = Math.max(this.proposal, h * factor);
      } else {
        this.proposal = h * Math.max(MAX_SHRINK, factor);
        this.rejected++;
        if (this.proposal < STEP_COLLAPSE * Math.max(1, Math.abs(t))) return false;
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
    const h = d0 < START_TINY || d1 < START_TINY ? START_FALLBACK : START_FRACTION * (d0 / d1);
    return Math.min(h, Math.abs(span), this.maxStep);
  }
}
