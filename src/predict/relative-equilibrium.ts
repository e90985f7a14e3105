import { EigenvalueDecomposition, Matrix, solve } from 'ml-matrix';

/**
 * Relative equilibria of the guiding system and their stability (design sections 3 and 4).
 * The averaged field is equivariant under a common phase shift of each mode, a -> e^{i phi} a,
 * whose generator on the real state (u, v) = (Re a, -Im a) is G: (u, v) -> (v, -u). A locked
 * state rotates along that orbit at a fixed rate Omega_j per mode, so it solves
 *     fbar(y) - sum_j Omega_j G_j y = 0,
 * one phase condition per oscillating mode fixing where on the orbit it sits. The Jacobian there
 * kills each tangent G_j y; those forced zero eigenvalues are removed by construction, by
 * restricting the Jacobian to the orthogonal complement of the tangents, never by a tolerance.
 */
export type Field = (y: Float64Array, out: Float64Array) => void;

export interface RelativeEquilibrium {
  /** The state on the orbit, rotating-frame layout. */
  state: Float64Array;
  /** Rotation rate per mode in slow time (0 for a mode at rest); the collective frequency shift. */
  rotation: number[];
  /** Modes that oscillate (carry a symmetry direction). */
  activeModes: number[];
  residual: number;
  iterations: number;
  converged: boolean;
}

export interface Stability {
  /** Eigenvalues of the reduced Jacobian (slow-time units), sorted by decreasing real part. */
  eigenvalues: { re: number; im: number }[];
  /** Largest real part: negative means linearly stable. */
  margin: number;
  stable: boolean;
}

/** Apply the mode-j phase generator: (u, v) -> (v, -u) on every node's mode j. */
export function applyGenerator(y: Float64Array, modes: number, mode: number, out: Float64Array): Float64Array {
  out.fill(0);
  for (let i = mode; 2 * i < y.length; i += modes) {
    out[2 * i] = y[2 * i + 1];
    out[2 * i + 1] = -y[2 * i];
  }
  return out;
}

function norm(v: Float64Array): number {
  let s = 0;
  for (let i = 0; i < v.length; i++) s += v[i] * v[i];
  return Math.sqrt(s);
}

function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}

/** Modes with a share of the energy above `threshold`. */
export function oscillatingModes(y: Float64Array, modes: number, threshold = 1e-8): number[] {
  const energy = new Array<number>(modes).fill(0);
  for (let i = 0; 2 * i < y.length; i++) energy[i % modes] += y[2 * i] ** 2 + y[2 * i + 1] ** 2;
  const total = energy.reduce((a, b) => a + b, 0);
  return energy.flatMap((e, j) => (total > 0 && e > threshold * total ? [j] : []));
}

/** Finite-difference Jacobian of y -> field(y) - sum Omega_j G_j y (central differences). */
export function rotatingJacobian(field: Field, y: Float64Array, modes: number, rotation: number[]): Matrix {
  const n = y.length;
  const jac = new Matrix(n, n);
  const plus = new Float64Array(n);
  const minus = new Float64Array(n);
  const probe = Float64Array.from(y);
  for (let c = 0; c < n; c++) {
    const h = 1e-6 * Math.max(1, Math.abs(y[c]));
    probe[c] = y[c] + h;
    field(probe, plus);
    probe[c] = y[c] - h;
    field(probe, minus);
    probe[c] = y[c];
    for (let r = 0; r < n; r++) jac.set(r, c, (plus[r] - minus[r]) / (2 * h));
  }
  // - Omega_j G_j is linear: G maps (u, v) to (v, -u).
  for (const [j, omega] of rotation.entries()) {
    if (omega === 0) continue;
    for (let i = j; 2 * i < n; i += modes) {
      jac.set(2 * i, 2 * i + 1, jac.get(2 * i, 2 * i + 1) - omega);
      jac.set(2 * i + 1, 2 * i, jac.get(2 * i + 1, 2 * i) + omega);
    }
  }
  return jac;
}

/**
 * Newton's method for a relative equilibrium near `guess`. Unknowns: the state and one
 * rotation rate per oscillating mode; equations: the rotating-frame residual and the phase
 * conditions <G_j y0, y - y0> = 0.
 */
export function solveRelativeEquilibrium(
  field: Field,
  guess: Float64Array,
  modes: number,
  options: { tolerance?: number; maxIterations?: number } = {},
): RelativeEquilibrium {
  const tolerance = options.tolerance ?? 1e-11;
  const maxIterations = options.maxIterations ?? 30;
  const n = guess.length;
  const y = Float64Array.from(guess);
  const active = oscillatingModes(y, modes);
  const anchors = active.map((j) => applyGenerator(guess, modes, j, new Float64Array(n)));
  const rate = new Float64Array(n);
  field(y, rate);
  const rotation = new Array<number>(modes).fill(0);
  active.forEach((j, a) => (rotation[j] = dot(anchors[a], rate) / Math.max(dot(anchors[a], anchors[a]), 1e-300)));

  const residualVector = (): Float64Array => {
    const r = new Float64Array(n);
    field(y, r);
    const g = new Float64Array(n);
    for (const j of active) {
      applyGenerator(y, modes, j, g);
      for (let i = 0; i < n; i++) r[i] -= rotation[j] * g[i];
    }
    return r;
  };

  let residual = norm(residualVector());
  let iterations = 0;
  while (residual > tolerance && iterations < maxIterations) {
    iterations++;
    const size = n + active.length;
    const system = new Matrix(size, size);
    const jac = rotatingJacobian(field, y, modes, rotation);
    const rhs = new Matrix(size, 1);
    const r = residualVector();
    for (let i = 0; i < n; i++) {
      for (let c = 0; c < n; c++) system.set(i, c, jac.get(i, c));
      rhs.set(i, 0, -r[i]);
    }
    const g = new Float64Array(n);
    active.forEach((j, a) => {
      applyGenerator(y, modes, j, g);
      for (let i = 0; i < n; i++) {
        system.set(i, n + a, -g[i]);
        system.set(n + a, i, anchors[a][i]);
      }
      let offset = 0;
      for (let i = 0; i < n; i++) offset += anchors[a][i] * (y[i] - guess[i]);
      rhs.set(n + a, 0, -offset);
    });
    let step: Matrix;
    try {
      step = solve(system, rhs);
    } catch {
      break;
    }
    for (let i = 0; i < n; i++) y[i] += step.get(i, 0);
    active.forEach((j, a) => (rotation[j] += step.get(n + a, 0)));
    const next = norm(residualVector());
    if (!Number.isFinite(next)) break;
    residual = next;
  }
  return { state: y, rotation, activeModes: active, residual, iterations, converged: residual <= tolerance * 10 };
}

/** Orthonormal basis (as matrix columns) of the complement of the given vectors. */
export function complementBasis(vectors: Float64Array[], n: number): Matrix {
  const basis: Float64Array[] = [];
  const add = (v: Float64Array): boolean => {
    const w = Float64Array.from(v);
    for (let pass = 0; pass < 2; pass++) {
      for (const b of basis) {
        const c = dot(b, w);
        for (let i = 0; i < n; i++) w[i] -= c * b[i];
      }
    }
    const len = norm(w);
    if (len < 1e-8) return false;
    for (let i = 0; i < n; i++) w[i] /= len;
    basis.push(w);
    return true;
  };
  const kept = vectors.filter((v) => norm(v) > 0).filter((v) => add(v)).length;
  for (let e = 0; e < n && basis.length < n; e++) {
    const unit = new Float64Array(n);
    unit[e] = 1;
    add(unit);
  }
  const q = new Matrix(n, n - kept);
  for (let c = kept; c < n; c++) for (let r = 0; r < n; r++) q.set(r, c - kept, basis[c][r]);
  return q;
}

/** Linear stability of a relative equilibrium, with the symmetry directions removed. */
export function relativeEquilibriumStability(field: Field, eq: RelativeEquilibrium, modes: number): Stability {
  const n = eq.state.length;
  const jac = rotatingJacobian(field, eq.state, modes, eq.rotation);
  const tangents = eq.activeModes.map((j) => applyGenerator(eq.state, modes, j, new Float64Array(n)));
  const q = complementBasis(tangents, n);
  const reduced = q.transpose().mmul(jac).mmul(q);
  const decomposition = new EigenvalueDecomposition(reduced);
  const eigenvalues = decomposition.realEigenvalues
    .map((re, i) => ({ re, im: decomposition.imaginaryEigenvalues[i] }))
    .sort((a, b) => b.re - a.re || b.im - a.im);
  const margin = eigenvalues.length > 0 ? eigenvalues[0].re : Number.NEGATIVE_INFINITY;
  return { eigenvalues, margin, stable: margin < 0 };
}
