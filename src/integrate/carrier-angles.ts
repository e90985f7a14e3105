/**
 * cos(omega_j tau) and sin(omega_j tau) for every mode on an equally spaced time grid, advanced by
 * a rotation recurrence (two multiplications per mode and step instead of two libm calls).
 * `reset` recomputes them exactly from omega tau, so rounding of the recurrence never builds up
 * beyond `RESEED_STEPS` steps.
 */
export class CarrierAngles {
  /** Steps after which the angles are recomputed from scratch. */
  static readonly RESEED_STEPS = 1024;

  readonly cos: Float64Array;
  readonly sin: Float64Array;
  private readonly cosStep: Float64Array;
  private readonly sinStep: Float64Array;
  private step = Number.NaN;

  constructor(readonly omega: Float64Array) {
    const m = omega.length;
    this.cos = new Float64Array(m);
    this.sin = new Float64Array(m);
    this.cosStep = new Float64Array(m);
    this.sinStep = new Float64Array(m);
  }

  /** Exact angles at tau. */
  reset(tau: number): void {
    const { omega, cos, sin } = this;
    for (let j = 0; j < omega.length; j++) {
      cos[j] = Math.cos(omega[j] * tau);
      sin[j] = Math.sin(omega[j] * tau);
    }
  }

  /** Set the increment used by `advance`. */
  setStep(h: number): void {
    if (h === this.step) return;
    const { omega, cosStep, sinStep } = this;
    for (let j = 0; j < omega.length; j++) {
      cosStep[j] = Math.cos(omega[j] * h);
      sinStep[j] = Math.sin(omega[j] * h);
    }
    this.step = h;
  }

  /** Rotate every angle by the step. */
  advance(): void {
    const { cos, sin, cosStep, sinStep } = this;
    for (let j = 0; j < cos.length; j++) {
      const c = cos[j];
      const s = sin[j];
      cos[j] = c * cosStep[j] - s * sinStep[j];
      sin[j] = s * cosStep[j] + c * sinStep[j];
    }
  }

  /** Copy the current angles into another pair of arrays. */
  copyTo(cos: Float64Array, sin: Float64Array): void {
    cos.set(this.cos);
    sin.set(this.sin);
  }
}
