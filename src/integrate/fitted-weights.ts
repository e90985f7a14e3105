import { LuDecomposition, Matrix } from 'ml-matrix';

/**
 * Quadrature weights that are exact on a space of functions fitted to the carrier harmonics.
 *
 * In scaled time s = t / h the space is spanned by
 *   1, s, s^2                                            (slow drift of the amplitudes)
 *   cos(m c s), sin(m c s)          for m in harmonics   (the fast harmonics, c = omegaBar h)
 *   s cos(m c s), s sin(m c s)      if `modulated`       (their slow modulation: nearby mode
 *                                                        frequencies beat against omegaBar)
 * and the samples sit at s = 0, -1, ..., -(k-1), k being the dimension of the space. A weight
 * vector w for the interval [s0, s1] satisfies sum_j w_j phi(-j) = int_{s0}^{s1} phi(s) ds for
 * every basis function phi; it is found by one LU solve (ml-matrix). As h -> 0 the space tends
 * to the polynomials of degree < k, so the weights tend to those of the k-step Adams formulas
 * (Hairer, Norsett, Wanner, Solving ODEs I, III.1); exponentially fitted multistep rules of this
 * kind go back to Gautschi (Numer. Math. 3, 1961).
 */
export interface FittedSpace {
  /** omegaBar * h, the carrier phase advance per step. */
  phase: number;
  /** Multiples of the carrier frequency that are fitted exactly. */
  harmonics: readonly number[];
  /** Include the s cos, s sin companions of every harmonic. */
  modulated: boolean;
}

export function fittedDimension(space: FittedSpace): number {
  return 3 + space.harmonics.length * (space.modulated ? 4 : 2);
}

/** Values of every basis function at s (length fittedDimension). */
export function basisValues(space: FittedSpace, s: number, out: Float64Array): void {
  out[0] = 1;
  out[1] = s;
  out[2] = s * s;
  let r = 3;
  for (const m of space.harmonics) {
    const c = Math.cos(m * space.phase * s);
    const sn = Math.sin(m * space.phase * s);
    out[r++] = c;
    out[r++] = sn;
    if (space.modulated) {
      out[r++] = s * c;
      out[r++] = s * sn;
    }
  }
}

/** Exact integrals of every basis function over [s0, s1] (closed forms). */
export function basisIntegrals(space: FittedSpace, s0: number, s1: number, out: Float64Array): void {
  out[0] = s1 - s0;
  out[1] = (s1 * s1 - s0 * s0) / 2;
  out[2] = (s1 * s1 * s1 - s0 * s0 * s0) / 3;
  let r = 3;
  for (const m of space.harmonics) {
    const a = m * space.phase;
    const c0 = Math.cos(a * s0),
      c1 = Math.cos(a * s1);
    const n0 = Math.sin(a * s0),
      n1 = Math.sin(a * s1);
    out[r++] = (n1 - n0) / a;
    out[r++] = -(c1 - c0) / a;
    if (space.modulated) {
      // d/ds [cos/a^2 + s sin/a] = s cos;  d/ds [sin/a^2 - s cos/a] = s sin
      out[r++] = (c1 - c0) / (a * a) + (s1 * n1 - s0 * n0) / a;
      out[r++] = (n1 - n0) / (a * a) - (s1 * c1 - s0 * c0) / a;
    }
  }
}

export interface FittedWeights {
  /** Number of samples k. */
  size: number;
  /** Weights of one forward step [0, 1], in scaled time (multiply by h). */
  step: Float64Array;
  /** Rows j = 0..k-1: weights of the backward interval [-j, 0], in scaled time. */
  back: Float64Array[];
  /** Largest |V w - integral| over all weight vectors and basis functions (scaled time). */
  residual: number;
}

/** Largest residual accepted: beyond it the sample times cannot tell the basis functions apart. */
const MAX_RESIDUAL = 1e-10;

/**
 * Weights for the forward step and every backward interval, or null if the system is singular
 * or so ill-conditioned that the weights do not reproduce the integrals (residual > 1e-10).
 */
export function fittedWeights(space: FittedSpace): FittedWeights | null {
  const k = fittedDimension(space);
  const values = new Float64Array(k);
  const vandermonde = new Matrix(k, k);
  for (let j = 0; j < k; j++) {
    basisValues(space, -j, values);
    for (let r = 0; r < k; r++) vandermonde.set(r, j, values[r]);
  }
  const lu = new LuDecomposition(vandermonde);
  if (lu.isSingular()) return null;
  // Right-hand sides: column 0 is the step [0, 1], column j >= 1 the interval [-j, 0].
  const rhs = new Matrix(k, k);
  for (let col = 0; col < k; col++) {
    if (col === 0) basisIntegrals(space, 0, 1, values);
    else basisIntegrals(space, -col, 0, values);
    for (let r = 0; r < k; r++) rhs.set(r, col, values[r]);
  }
  const solution = lu.solve(rhs);
  const column = (col: number) => Float64Array.from({ length: k }, (_, j) => solution.get(j, col));
  const step = column(0);
  const back = [new Float64Array(k), ...Array.from({ length: k - 1 }, (_, j) => column(j + 1))];
  let residual = 0;
  const product = vandermonde.mmul(solution);
  for (let r = 0; r < k; r++) {
    for (let col = 0; col < k; col++) residual = Math.max(residual, Math.abs(product.get(r, col) - rhs.get(r, col)));
  }
  if (!step.every(Number.isFinite) || !(residual <= MAX_RESIDUAL)) return null;
  return { size: k, step, back, residual };
}
