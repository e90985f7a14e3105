/**
 * Sample points on the torus of fast angles (one per mode) and the harmonics e^{i m.theta} that
 * the rotating-frame field can carry, with the tables the second-order average needs.
 *
 * Harmonic content: F is a cubic, odd polynomial in (x, x') and f = F (-sin, cos) / omega, so
 * f(y, theta) is a trigonometric polynomial of total degree |m_0| + ... + |m_{M-1}| <= 4 with
 * even total degree only (shifting every angle by pi flips x and x', hence F, and the sin/cos
 * factor: f is unchanged). SecondOrderField.checkFieldContent verifies both on the actual field.
 *
 * Two point sets, both exact for what the method needs: the coefficients of f (|m| <= 4) without
 * aliasing, and the torus mean of a product of two such fields (total degree <= 8):
 *
 * - tensor(P): the P^M trapezoid grid. e^{i k theta} averages to zero on P points unless k is a
 *   non-zero multiple of P; products reach degree 8 per angle and differences of two kept
 *   harmonics too, so P > 8: P >= 2 * 4 + 1 = 9 (81 points for two modes).
 * - parity(): uses the even degree. For M = 2 write m.theta = a psi_a + b psi_b with
 *   psi_a = theta_0 + theta_1, psi_b = theta_0 - theta_1, a = (m_0 + m_1)/2, b = (m_0 - m_1)/2
 *   (integers for even m); |m_0| + |m_1| = 2 max(|a|, |b|), so f has degree <= 2 and the products
 *   degree <= 4 in each of psi_a, psi_b, and a 5 x 5 trapezoid grid in (psi_a, psi_b) is exact:
 *   25 points instead of 81. For M = 1, psi = 2 theta on 5 points. (Functions with even degrees
 *   only do not change under theta -> theta + pi, so the half angles are unambiguous.)
 */
export const FIELD_HARMONIC_DEGREE = 4;

/** Smallest tensor grid per angle for which a degree-D field's coefficients and products average exactly. */
export function minimumEnvelopeGrid(degree = FIELD_HARMONIC_DEGREE): number {
  return 2 * degree + 1;
}

export class TorusHarmonics {
  readonly modes: number;
  readonly points: number;
  /** Number of harmonics kept: one m of each pair {m, -m}, even total degree 2..4. */
  readonly count: number;
  /** count x modes: the integer vectors m (first non-zero entry positive). */
  readonly orders: Int32Array;
  /** m . omega per harmonic (zero at an exact resonance). */
  readonly divisor: Float64Array;
  /** Per point: cos and sin of its angle for every mode. */
  readonly pointCos: Float64Array[];
  readonly pointSin: Float64Array[];
  /** points x count, interleaved: [cos(m.theta_p), sin(m.theta_p)] per harmonic. */
  readonly table: Float64Array;

  /** The P^M trapezoid grid (P >= 9). */
  static tensor(omega: Float64Array, grid: number): TorusHarmonics {
    const least = minimumEnvelopeGrid();
    if (!Number.isInteger(grid) || grid < least) {
      throw new RangeError(
        `TorusHarmonics: grid must be an integer >= ${least} (2 x harmonic degree ${FIELD_HARMONIC_DEGREE} + 1) so that products of the field average exactly (got ${grid})`,
      );
    }
    const m = omega.length;
    const count = grid ** m;
    const angles = new Float64Array(count * m);
    for (let p = 0; p < count; p++) {
      let index = p;
      for (let j = 0; j < m; j++) {
        angles[p * m + j] = (2 * Math.PI * (index % grid)) / grid;
        index = Math.floor(index / grid);
      }
    }
    return new TorusHarmonics(omega, angles);
  }

  /** The 5^M grid in sum and difference angles (M = 1 or 2), exact for even-degree fields. */
  static parity(omega: Float64Array): TorusHarmonics {
    const m = omega.length;
    const q = 5;
    if (m === 1)
      return new TorusHarmonics(
        omega,
        Float64Array.from({ length: q }, (_, p) => (Math.PI * p) / q),
      );
    if (m !== 2) throw new RangeError(`TorusHarmonics: the parity grid is for one or two modes (got ${m}); use the tensor grid`);
    const angles = new Float64Array(q * q * 2);
    for (let a = 0; a < q; a++) {
      for (let b = 0; b < q; b++) {
        const psiA = (2 * Math.PI * a) / q;
        const psiB = (2 * Math.PI * b) / q;
        const p = a * q + b;
        angles[2 * p] = (psiA + psiB) / 2;
        angles[2 * p + 1] = (psiA - psiB) / 2;
      }
    }
    return new TorusHarmonics(omega, angles);
  }

  /** `angles`: points x modes. */
  constructor(omega: Float64Array, angles: Float64Array) {
    const m = omega.length;
    if (m < 1) throw new RangeError('TorusHarmonics: at least one mode is needed');
    this.modes = m;
    this.points = angles.length / m;
    const orders = evenHarmonics(m, FIELD_HARMONIC_DEGREE);
    this.count = orders.length;
    this.orders = Int32Array.from(orders.flat());
    this.divisor = Float64Array.from(orders, (order) => order.reduce((sum, k, j) => sum + k * omega[j], 0));
    const cosAll = Float64Array.from(angles, Math.cos);
    const sinAll = Float64Array.from(angles, Math.sin);
    this.pointCos = Array.from({ length: this.points }, (_, p) => cosAll.subarray(p * m, (p + 1) * m));
    this.pointSin = Array.from({ length: this.points }, (_, p) => sinAll.subarray(p * m, (p + 1) * m));
    this.table = new Float64Array(this.points * this.count * 2);
    for (let p = 0; p < this.points; p++) {
      for (let h = 0; h < this.count; h++) {
        let phase = 0;
        for (let j = 0; j < m; j++) phase += orders[h][j] * angles[p * m + j];
        this.table[2 * (p * this.count + h)] = Math.cos(phase);
        this.table[2 * (p * this.count + h) + 1] = Math.sin(phase);
      }
    }
  }

  /** "(m_0, m_1)" for messages. */
  describe(h: number): string {
    return `(${Array.from(this.orders.subarray(h * this.modes, (h + 1) * this.modes)).join(', ')})`;
  }
}

/** Integer vectors m with even total degree 2..degree, one of each pair {m, -m}. */
function evenHarmonics(modes: number, degree: number): number[][] {
  const out: number[][] = [];
  const current = new Array<number>(modes).fill(0);
  const visit = (j: number, used: number) => {
    if (j === modes) {
      const first = current.find((k) => k !== 0);
      if (used > 0 && used % 2 === 0 && first !== undefined && first > 0) out.push([...current]);
      return;
    }
    for (let k = -(degree - used); k <= degree - used; k++) {
      current[j] = k;
      visit(j + 1, used + Math.abs(k));
    }
    current[j] = 0;
  };
  visit(0, 0);
  return out;
}
