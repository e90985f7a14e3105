import type { ModelParameters } from '../model/parameters.js';
import { SlowField } from '../model/slow-field.js';
import { Random } from '../util/random.js';
import { TorusHarmonics, minimumEnvelopeGrid } from './torus-harmonics.js';

/** Which torus sample points: the parity grid (5^M points, M <= 2), a P^M tensor grid (P >= 9), or given ones. */
export type EnvelopeGrid = 'parity' | number | TorusHarmonics;

/**
 * Second-order averaging with a near-identity transformation (Sanders, Verhulst, Murdock 2007,
 * second-order periodic averaging) of y' = eps f(y, theta), theta' = omega, with f the model's
 * own SlowField sampled on the torus points of TorusHarmonics:
 *
 *   u(Y, theta) = sum_{m != 0} f_m(Y) e^{i m.theta} / (i m.omega)   (zero mean, omega . d_theta u = f - fbar)
 *   dY/ds = fbar(Y) + eps < D_y f(Y, theta) u(Y, theta) >          (s = eps tau, < > = torus mean)
 *   y = Y + eps u(Y, omega tau)                                     (full state, error O(eps^2))
 *
 * With A_m, B_m the sample means of f cos(m.theta), f sin(m.theta) (f_m = A_m - i B_m), each pair
 * {m, -m} contributes (2 / m.omega) (A_m sin(m.theta) - B_m cos(m.theta)) to u.
 *
 * The directional derivative is exact: f is a cubic polynomial in y, so along a line
 * f(Y + t u) = c0 + c1 t + c2 t^2 + c3 t^3, and the Lagrange stencil on t = -h, 0, h, 2h,
 *   c1 = (-2 f(-h) - 3 f(0) + 6 f(h) - f(2h)) / (6 h),
 * has no truncation error; h = max(|Y|, 1) / (4 |u|) keeps its rounding near the best possible.
 *
 * u at the torus points comes from one kernel product of the samples (analysis and synthesis
 * folded together), u at any other angle from one weighted sum of them.
 *
 * Health figures: `evaluate` leaves the near-identity indicator eps max|u| / max|Y| (the gap
 * between the first-order reconstruction y = Y and the second-order one y = Y + eps u, relative
 * to the state); `findCarriedDivisor` the smallest divisor |m.omega| among the harmonics that
 * carry a non-zero coefficient. All work arrays are preallocated.
 */
export class SecondOrderField {
  readonly field: SlowField;
  readonly torus: TorusHarmonics;
  /** SlowField evaluations so far. */
  fieldEvaluations = 0;
  /** eps max|u| / max|Y| of the last `evaluate` (maximum over the points) or `correctionAt` (at its angle). */
  indicator = 0;
  /** Smallest |m.omega| with a non-zero coefficient at the last sampled state (Infinity if none); see findCarriedDivisor. */
  smallestDivisor = Number.POSITIVE_INFINITY;
  /** Index of that harmonic in `torus` (-1 if none). */
  smallestHarmonic = -1;

  private readonly size: number;
  /** points x size: f(Y, theta_p), one view per point. */
  private readonly samples: Float64Array;
  private readonly sampleRows: Float64Array[];
  /**
   * points x points: u(theta_p) = sum_q K[p][q] f(theta_q), K[p][q] = sum_m c_m sin(m.(theta_p - theta_q))
   * with c_m = 2 / (points m.omega): analysis and synthesis in one product.
   */
  private readonly kernel: Float64Array;
  /** c_m per harmonic (0 where the divisor is exactly zero). */
  private readonly scale: Float64Array;
  private readonly weights: Float64Array;
  private readonly harmonicNorm: Float64Array;
  private readonly correction: Float64Array;
  private readonly mean: Float64Array;
  private readonly drift: Float64Array;
  private readonly probe: Float64Array;
  private readonly out1: Float64Array;
  private readonly out2: Float64Array;
  private readonly out3: Float64Array;

  constructor(
    readonly params: ModelParameters,
    grid: EnvelopeGrid = 'parity',
  ) {
    this.field = new SlowField(params);
    if (grid instanceof TorusHarmonics) this.torus = grid;
    else if (grid === 'parity')
      this.torus = params.modes <= 2 ? TorusHarmonics.parity(params.omega) : TorusHarmonics.tensor(params.omega, minimumEnvelopeGrid());
    else this.torus = TorusHarmonics.tensor(params.omega, grid);
    if (this.torus.modes !== params.modes)
      throw new RangeError(`SecondOrderField: the torus has ${this.torus.modes} angles but the model ${params.modes} modes`);
    const size = 2 * params.nodes * params.modes;
    this.size = size;
    const { points, count, table, divisor } = this.torus;
    this.samples = new Float64Array(points * size);
    this.sampleRows = Array.from({ length: points }, (_, p) => this.samples.subarray(p * size, (p + 1) * size));
    this.correction = new Float64Array(points * size);
    this.scale = Float64Array.from(divisor, (d) => (d === 0 ? 0 : 2 / (points * d)));
    this.kernel = new Float64Array(points * points);
    for (let p = 0; p < points; p++) {
      for (let q = 0; q < points; q++) {
        let k = 0;
        for (let h = 0; h < count; h++) {
          const tp = 2 * (p * count + h);
          const tq = 2 * (q * count + h);
          k += this.scale[h] * (table[tp + 1] * table[tq] - table[tp] * table[tq + 1]);
        }
        this.kernel[p * points + q] = k;
      }
    }
    this.weights = new Float64Array(points);
    this.harmonicNorm = new Float64Array(count);
    const make = () => new Float64Array(size);
    this.mean = make();
    this.drift = make();
    this.probe = make();
    this.out1 = make();
    this.out2 = make();
    this.out3 = make();
  }

  /**
   * Why the field's harmonic content is not what TorusHarmonics assumes (total degree <= 4,
   * even degrees only), or null. Checked at a fixed pseudo-random state on the 9^M tensor grid
   * (where the kept harmonics do not interpolate every sample) and under theta -> theta + pi.
   */
  static checkFieldContent(params: ModelParameters): string | null {
    const field = new SlowField(params);
    const torus = TorusHarmonics.tensor(params.omega, minimumEnvelopeGrid());
    const size = 2 * params.nodes * params.modes;
    const random = new Random(20_260_417);
    const y = Float64Array.from({ length: size }, () => 2 * random.uniform() - 1);
    const samples = torus.pointCos.map((cos, p) => {
      const out = new Float64Array(size);
      field.evaluate(cos, torus.pointSin[p], y, out);
      return out;
    });
    const largest = Math.max(...samples.map((s) => maxAbs(s)));
    if (largest === 0) return null;
    const shifted = new Float64Array(size);
    let parityGap = 0;
    for (let p = 0; p < torus.points; p++) {
      field.evaluate(
        torus.pointCos[p].map((c) => -c),
        torus.pointSin[p].map((s) => -s),
        y,
        shifted,
      );
      for (let i = 0; i < size; i++) parityGap = Math.max(parityGap, Math.abs(shifted[i] - samples[p][i]));
    }
    if (parityGap > 1e-12 * largest)
      return `the field changes when every carrier angle moves by pi (gap ${(parityGap / largest).toExponential(2)}): it has odd harmonics, which the envelope does not model`;
    let gap = 0;
    const expansion = samples.map(() => new Float64Array(size));
    const points = torus.points;
    for (let p = 0; p < points; p++) for (let i = 0; i < size; i++) expansion[p][i] = samples.reduce((sum, s) => sum + s[i], 0) / points;
    for (let h = 0; h < torus.count; h++) {
      for (let i = 0; i < size; i++) {
        let a = 0;
        let b = 0;
        for (let p = 0; p < points; p++) {
          a += (torus.table[2 * (p * torus.count + h)] * samples[p][i]) / points;
          b += (torus.table[2 * (p * torus.count + h) + 1] * samples[p][i]) / points;
        }
        for (let p = 0; p < points; p++)
          expansion[p][i] += 2 * (a * torus.table[2 * (p * torus.count + h)] + b * torus.table[2 * (p * torus.count + h) + 1]);
      }
    }
    for (let p = 0; p < points; p++) for (let i = 0; i < size; i++) gap = Math.max(gap, Math.abs(expansion[p][i] - samples[p][i]));
    if (gap > 1e-12 * largest)
      return `the field has harmonics above total degree 4 (residual ${(gap / largest).toExponential(2)}), which the envelope does not model`;
    return null;
  }

  /** out = dY/ds = fbar(Y) + eps < D_y f u > (the slow-time right-hand side). */
  evaluate(y: Float64Array, out: Float64Array): void {
    this.sample(y);
    const { torus, samples, kernel, correction, size, probe, out1, out2, out3, drift, mean, field } = this;
    const points = torus.points;
    for (let i = 0; i < size; i++) {
      let total = 0;
      for (let p = 0, at = i; p < points; p++, at += size) total += samples[at];
      mean[i] = total / points;
    }
    correction.fill(0);
    for (let p = 0; p < points; p++) {
      const base = p * size;
      for (let q = 0; q < points; q++) {
        const k = kernel[p * points + q];
        if (k === 0) continue;
        const from = q * size;
        for (let i = 0; i < size; i++) correction[base + i] += k * samples[from + i];
      }
    }
    const scale = Math.max(maxAbs(y), 1);
    drift.fill(0);
    let largest = 0;
    for (let p = 0; p < points; p++) {
      const base = p * size;
      let norm = 0;
      for (let i = 0; i < size; i++) {
        const magnitude = Math.abs(correction[base + i]);
        if (magnitude > norm) norm = magnitude;
      }
      if (norm > largest) largest = norm;
      if (norm === 0) continue;
      const step = scale / (4 * norm);
      const cos = torus.pointCos[p];
      const sin = torus.pointSin[p];
      for (let i = 0; i < size; i++) probe[i] = y[i] - step * correction[base + i];
      field.evaluatePrepared(cos, sin, probe, out1);
      for (let i = 0; i < size; i++) probe[i] = y[i] + step * correction[base + i];
      field.evaluatePrepared(cos, sin, probe, out2);
      for (let i = 0; i < size; i++) probe[i] = y[i] + 2 * step * correction[base + i];
      field.evaluatePrepared(cos, sin, probe, out3);
      this.fieldEvaluations += 3;
      const weight = 1 / (6 * step);
      for (let i = 0; i < size; i++) {
        drift[i] += (-2 * out1[i] - 3 * samples[base + i] + 6 * out2[i] - out3[i]) * weight;
      }
    }
    const eps = this.params.epsilon;
    const perPoint = eps / points;
    for (let i = 0; i < size; i++) out[i] = mean[i] + perPoint * drift[i];
    const amplitude = maxAbs(y);
    this.indicator = amplitude > 0 ? (eps * largest) / amplitude : 0;
  }

  /** out = u(Y, omega tau), the near-identity correction at the carrier angles of tau. */
  correctionAt(y: Float64Array, tau: number, out: Float64Array): void {
    this.sample(y);
    const { torus, samples, size, weights, scale } = this;
    const { modes, count, orders, table, points } = torus;
    const omega = this.params.omega;
    weights.fill(0);
    for (let h = 0; h < count; h++) {
      if (scale[h] === 0) continue;
      let angle = 0;
      for (let j = 0; j < modes; j++) angle += orders[h * modes + j] * (omega[j] * tau);
      // sin(m.(theta - theta_q)) = sin(m.theta) cos(m.theta_q) - cos(m.theta) sin(m.theta_q)
      const c = scale[h] * Math.cos(angle);
      const s = scale[h] * Math.sin(angle);
      for (let q = 0; q < points; q++) weights[q] += s * table[2 * (q * count + h)] - c * table[2 * (q * count + h) + 1];
    }
    out.fill(0);
    for (let q = 0; q < points; q++) {
      const w = weights[q];
      const from = q * size;
      for (let i = 0; i < size; i++) out[i] += w * samples[from + i];
    }
    const amplitude = maxAbs(y);
    this.indicator = amplitude > 0 ? (this.params.epsilon * maxAbs(out)) / amplitude : 0;
  }

  /**
   * smallestDivisor and smallestHarmonic for the state last sampled (by evaluate or
   * correctionAt): the smallest |m.omega| among the harmonics whose coefficient stands above the
   * rounding of the samples. Harmonics with a zero divisor get no correction (kernel and weights
   * leave them out), so a carried one shows up here as a zero divisor, which validity refuses.
   */
  findCarriedDivisor(): void {
    const { torus, samples, size } = this;
    const { points, count, table, divisor } = torus;
    let reference = 0;
    for (let i = 0; i < size; i++) {
      let total = 0;
      for (let p = 0, at = i; p < points; p++, at += size) total += samples[at];
      reference = Math.max(reference, Math.abs(total / points));
    }
    let best = Number.POSITIVE_INFINITY;
    let bestHarmonic = -1;
    const norms = this.harmonicNorm;
    for (let h = 0; h < count; h++) {
      let norm = 0;
      for (let i = 0; i < size; i++) {
        let a = 0;
        let b = 0;
        for (let p = 0, at = i, t = 2 * h; p < points; p++, at += size, t += 2 * count) {
          a += table[t] * samples[at];
          b += table[t + 1] * samples[at];
        }
        norm = Math.max(norm, Math.abs(a) / points, Math.abs(b) / points);
      }
      norms[h] = norm;
      if (norm > reference) reference = norm;
    }
    const threshold = 1e-12 * reference;
    for (let h = 0; h < count; h++) {
      if (reference > 0 && norms[h] > threshold && Math.abs(divisor[h]) < best) {
        best = Math.abs(divisor[h]);
        bestHarmonic = h;
      }
    }
    this.smallestDivisor = best;
    this.smallestHarmonic = bestHarmonic;
  }

  /** f at every torus point into `samples`. */
  private sample(y: Float64Array): void {
    const { torus, sampleRows, field } = this;
    field.prepare();
    for (let p = 0; p < torus.points; p++) field.evaluatePrepared(torus.pointCos[p], torus.pointSin[p], y, sampleRows[p]);
    this.fieldEvaluations += torus.points;
  }
}

function maxAbs(a: Float64Array): number {
  let best = 0;
  for (let i = 0; i < a.length; i++) {
    const v = Math.abs(a[i]);
    if (v > best) best = v;
  }
  return best;
}
