/**
 * Locked states of the guiding system as relative equilibria (the one solver for them: the
 * catalogue, the continuation, the live predictor and the session's guide margin all use it):
 * - the unknowns may be restricted to a linear subspace y = B z (a fixed-point subspace of a
 *   spatio-temporal symmetry, which the averaged flow leaves invariant), so Newton works with
 *   fewer unknowns and cannot slide off into a less symmetric state;
 * - one rotation rate per phase generator (per mode and per connected part of the graph).
 * Equations: fbar(y) - sum_c Omega_c G_c y = 0 and one phase condition <G_c y0, y - y0> = 0 per
 * generator. Stability uses the Jacobian restricted to the orthogonal complement of the group
 * orbit's tangents G_c y (complementBasis in orbit-complement.ts), so the zero eigenvalues
 * forced by the phase symmetry are removed by construction.
 */
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { borderedMatrix, dot, norm, solveLinear } from '../util/linear-algebra.js';
import { restrictToComplement, type Field } from './orbit-complement.js';
import { activePhaseGenerators, applyPhaseGenerator, subtractRotation, type PhaseGenerator } from './phase-orbits.js';

/**
 * Default absolute residual norm of a solved locked state: the field is of order one near a lock
 * (amplitudes near 2), so this asks for about ten digits, well above the field's own rounding
 * (near 1e-15), which Newton could not get below.
 */
export const LOCKED_STATE_TOLERANCE = 1e-10;
/** Default Newton iterations: near a solution a handful suffice; the rest is for far seeds, which the step halving pulls in slowly. */
const NEWTON_ITERATIONS = 30;
/** A Newton step that does not lower the residual is halved up to this many times before the solve counts as stalled: keeps far seeds from running away. */
const NEWTON_HALVINGS = 6;
/** Relative central-difference step of the Jacobians (fieldJacobian says why it balances truncation and rounding). */
export const DIFFERENCE_STEP = 1e-6;
/** Floor of the marginal band, times max(1, rateScale): it covers the finite-difference Jacobian's rounding (marginTolerance). */
const MARGIN_FLOOR = 1e-8;

export interface LockedState {
  /** The state on the orbit (rotating-frame layout, node-major, mode-minor). */
  state: Float64Array;
  generators: PhaseGenerator[];
  /** Rotation rate per generator in slow time (rad per unit eps tau): the collective frequency shift. */
  rates: number[];
  residual: number;
  iterations: number;
  converged: boolean;
}

export interface LockedStateOptions {
  /** Connected parts of the coupling graph (couplingComponents); default: one part, every node. */
  parts?: readonly Int32Array[];
  /** Generators to use instead of the ones active in the guess. */
  generators?: readonly PhaseGenerator[];
  /** Orthonormal columns spanning an invariant subspace that contains the guess: solve in it. */
  basis?: Matrix;
  /** Absolute residual norm that counts as solved; default LOCKED_STATE_TOLERANCE. */
  tolerance?: number;
  maxIterations?: number;
}

export type Verdict = 'stable' | 'unstable' | 'marginal';

export interface LockedStability {
  /** Eigenvalues of the reduced Jacobian (slow time), sorted by decreasing real part. */
  eigenvalues: { re: number; im: number }[];
  /** Largest real part (slow time); negative is linearly stable. */
  margin: number;
  /** Largest |eigenvalue|: the fastest rate of the linearised flow. */
  rateScale: number;
  /** |margin| at or below this is reported as marginal (see marginTolerance). */
  tolerance: number;
  verdict: Verdict;
}

/** One part holding every node. */
export function wholeGraph(nodes: number): Int32Array[] {
  return [Int32Array.from({ length: nodes }, (_, k) => k)];
}

/** r = fbar(y) - sum_c rate_c G_c y. */
export function rotatingResidual(
  field: Field,
  y: Float64Array,
  generators: readonly PhaseGenerator[],
  rates: ArrayLike<number>,
  modes: number,
  out: Float64Array,
  scratch: Float64Array,
): Float64Array {
  field(y, out);
  generators.forEach((g, c) => {
    applyPhaseGenerator(g, modes, y, scratch);
    for (let i = 0; i < out.length; i++) out[i] -= rates[c] * scratch[i];
  });
  return out;
}

/**
 * The Jacobian of the locked-state equations in the unknowns (y, Omega_c) (see the module
 * header): `rotating` (D fbar - sum_c Omega_c G_c, n x n) bordered by one column -G_c y per
 * generator (the derivative in its rate, from `tangents` G_c y) and one phase-condition row per
 * generator (`anchors`, G_c y0); `extraColumns` (the continuation's parameter derivative) come
 * last.
 */
export function lockedStateSystem(
  rotating: Matrix,
  tangents: readonly Float64Array[],
  anchors: readonly ArrayLike<number>[],
  extraColumns: readonly ArrayLike<number>[] = [],
): Matrix {
  return borderedMatrix(rotating, [...tangents.map((t) => Float64Array.from(t, (v) => -v)), ...extraColumns], anchors);
}

/** B^T v for the orthonormal columns B of a subspace: v in the subspace's coordinates. */
function inBasis(basis: Matrix, v: ArrayLike<number>): Float64Array {
  const n = basis.rows;
  return Float64Array.from({ length: basis.columns }, (_, i) => {
    let s = 0;
    for (let k = 0; k < n; k++) s += basis.get(k, i) * v[k];
    return s;
  });
}

/**
 * Central-difference Jacobian of fbar at y, as an n x n matrix, or (with `basis`) its action on
 * the basis columns, D fbar(y) B (n x p). The step is 1e-6 relative: the field is a cubic
 * polynomial, so the truncation error (h^2 f''' / 6) is about 1e-12 and rounding about 1e-10.
 */
export function fieldJacobian(field: Field, y: Float64Array, basis?: Matrix): Matrix {
  const n = y.length;
  const columns = basis ? basis.columns : n;
  const jac = new Matrix(n, columns);
  const plus = new Float64Array(n);
  const minus = new Float64Array(n);
  const probe = Float64Array.from(y);
  let size = 1;
  for (let i = 0; i < n; i++) size = Math.max(size, Math.abs(y[i]));
  for (let c = 0; c < columns; c++) {
    const h = DIFFERENCE_STEP * size;
    if (basis) {
      for (let i = 0; i < n; i++) probe[i] = y[i] + h * basis.get(i, c);
      field(probe, plus);
      for (let i = 0; i < n; i++) probe[i] = y[i] - h * basis.get(i, c);
      field(probe, minus);
      probe.set(y);
    } else {
      probe[c] = y[c] + h;
      field(probe, plus);
      probe[c] = y[c] - h;
      field(probe, minus);
      probe[c] = y[c];
    }
    for (let r = 0; r < n; r++) jac.set(r, c, (plus[r] - minus[r]) / (2 * h));
  }
  return jac;
}

/**
 * Newton's method for a locked state near `guess` (see the module header). A step that does not
 * lower the residual is halved up to six times, which keeps far seeds from running away.
 */
export function solveLockedState(field: Field, guess: Float64Array, modes: number, options: LockedStateOptions = {}): LockedState {
  const tolerance = options.tolerance ?? LOCKED_STATE_TOLERANCE;
  const maxIterations = options.maxIterations ?? NEWTON_ITERATIONS;
  const n = guess.length;
  const parts = options.parts ?? wholeGraph(n / (2 * modes));
  const generators = options.generators ? [...options.generators] : activePhaseGenerators(guess, modes, parts);
  const basis = options.basis;
  const p = basis ? basis.columns : n;
  const y = Float64Array.from(guess);
  const scratch = new Float64Array(n);
  const residualVector = new Float64Array(n);

  // Anchors of the phase conditions, in the unknowns' coordinates.
  const anchors = generators.map((g) => {
    const t = applyPhaseGenerator(g, modes, guess, new Float64Array(n));
    return basis ? inBasis(basis, t) : t;
  });
  const rates = generators.map((g) => {
    const t = applyPhaseGenerator(g, modes, guess, new Float64Array(n));
    field(guess, scratch);
    return dot(t, scratch) / Math.max(dot(t, t), 1e-300);
  });

  const residualNorm = (): number => norm(rotatingResidual(field, y, generators, rates, modes, residualVector, scratch));
  let residual = residualNorm();
  let iterations = 0;
  const offset = new Float64Array(p); // z - z0 (or y - y0)
  while (residual > tolerance && iterations < maxIterations && Number.isFinite(residual)) {
    iterations++;
    const jac = fieldJacobian(field, y, basis); // n x p
    const tangents = generators.map((g) => applyPhaseGenerator(g, modes, y, new Float64Array(n)));
    const rhs = new Float64Array(p + generators.length);
    let system: Matrix;
    if (basis) {
      // Project rows onto the subspace: B^T (D fbar B - sum Omega G B) and B^T r.
      const bt = basis.transpose();
      const reduced = bt.mmul(jac);
      const rotated = new Matrix(n, p);
      for (let c = 0; c < p; c++) {
        const column = Float64Array.from({ length: n }, (_, i) => basis.get(i, c));
        generators.forEach((g, gi) => {
          applyPhaseGenerator(g, modes, column, scratch);
          for (let i = 0; i < n; i++) rotated.set(i, c, rotated.get(i, c) - rates[gi] * scratch[i]);
        });
      }
      const projectedResidual = inBasis(basis, residualVector);
      for (let i = 0; i < p; i++) rhs[i] = -projectedResidual[i];
      system = lockedStateSystem(
        reduced.add(bt.mmul(rotated)),
        tangents.map((t) => inBasis(basis, t)),
        anchors,
      );
    } else {
      subtractRotation(jac, generators, rates, modes);
      for (let i = 0; i < n; i++) rhs[i] = -residualVector[i];
      system = lockedStateSystem(jac, tangents, anchors);
    }
    anchors.forEach((a, gi) => (rhs[p + gi] = -dot(a, offset)));
    let step: Float64Array;
    try {
      step = solveLinear(system, rhs);
    } catch {
      break;
    }
    if (!step.every(Number.isFinite)) break;
    const y0 = Float64Array.from(y);
    const rates0 = [...rates];
    const offset0 = Float64Array.from(offset);
    let scale = 1;
    let next = Number.POSITIVE_INFINITY;
    for (let attempt = 0; attempt <= NEWTON_HALVINGS; attempt++) {
      for (let i = 0; i < p; i++) offset[i] = offset0[i] + scale * step[i];
      if (basis) {
        for (let k = 0; k < n; k++) {
          let s = 0;
          for (let i = 0; i < p; i++) s += basis.get(k, i) * step[i];
          y[k] = y0[k] + scale * s;
        }
      } else {
        for (let k = 0; k < n; k++) y[k] = y0[k] + scale * step[k];
      }
      generators.forEach((_, gi) => (rates[gi] = rates0[gi] + scale * step[p + gi]));
      next = residualNorm();
      if (next < residual) break;
      scale /= 2;
    }
    if (!Number.isFinite(next)) break;
    if (!(next < residual)) {
      // No descent even for a short step: Newton has stalled far from a solution.
      y.set(y0);
      generators.forEach((_, gi) => (rates[gi] = rates0[gi]));
      offset.set(offset0);
      residualNorm();
      break;
    }
    residual = next;
  }
  return { state: y, generators, rates, residual, iterations, converged: residual <= tolerance };
}

/** What the marginal band needs to know about the model (GuideModel.accuracy). */
export interface Accuracy {
  epsilon: number;
  /** Slowest carrier frequency. */
  omegaMin: number;
  /** Fastest phase-coupling rate kappa |sigma + i rho / omega_0| max_k sum_l A_kl (slow time). */
  couplingRate: number;
}

/**
 * Margins this close to zero are not resolved. The guiding system is the first-order average; the
 * next term, eps <Df u> with u of size |f| / omega (Sanders, Verhulst, Murdock 2007, second-order
 * averaging; docs/model.md, 'Second-order averaging (envelope mode)'), shifts the Jacobian by
 * eps |Df|^2 / omega in size. The eigenvalues that decide locking belong to phase directions,
 * which are exactly neutral at zero coupling to every order of averaging (each node keeps its own
 * phase symmetry), so their shift carries one factor of the coupling rate K and one of the fastest
 * rate: eps rateScale K / omega. Inside that band the sign would be set by terms the model does
 * not contain: the verdict is "marginal". A floor of 1e-8 max(1, rateScale) covers the
 * finite-difference Jacobian's rounding. (Eigenvalues that do not vanish with the coupling, such
 * as a second mode at the edge of winning, can carry errors up to eps rateScale^2 / omega; the
 * band does not widen for them.)
 */
export function marginTolerance(rateScale: number, accuracy: Accuracy): number {
  return (accuracy.epsilon * rateScale * accuracy.couplingRate) / accuracy.omegaMin + MARGIN_FLOOR * Math.max(1, rateScale);
}

/** Reduced Jacobian (orthonormal coordinates on the complement of the orbit tangents) at a locked state. */
export function reducedJacobian(field: Field, locked: LockedState, modes: number): Matrix {
  const n = locked.state.length;
  const jac = fieldJacobian(field, locked.state);
  subtractRotation(jac, locked.generators, locked.rates, modes);
  const tangents = locked.generators.map((g) => applyPhaseGenerator(g, modes, locked.state, new Float64Array(n)));
  return restrictToComplement(jac, tangents);
}

/** Eigenvalues of a real square matrix, sorted by decreasing real part (then imaginary part). */
export function sortedEigenvalues(matrix: Matrix): { re: number; im: number }[] {
  if (matrix.rows === 0) return [];
  const decomposition = new EigenvalueDecomposition(matrix);
  return decomposition.realEigenvalues
    .map((re, i) => ({ re, im: decomposition.imaginaryEigenvalues[i] }))
    .sort((a, b) => b.re - a.re || b.im - a.im);
}

/** Linear stability with the symmetry directions removed and a marginal band (marginTolerance). */
export function lockedStateStability(field: Field, locked: LockedState, modes: number, accuracy: Accuracy): LockedStability {
  return stabilityOf(sortedEigenvalues(reducedJacobian(field, locked, modes)), accuracy);
}

/** Margin, scale and verdict from eigenvalues already computed. */
export function stabilityOf(eigenvalues: { re: number; im: number }[], accuracy: Accuracy): LockedStability {
  const margin = eigenvalues.length > 0 ? eigenvalues[0].re : Number.NEGATIVE_INFINITY;
  const rateScale = eigenvalues.reduce((m, e) => Math.max(m, Math.hypot(e.re, e.im)), 0);
  const tolerance = marginTolerance(rateScale, accuracy);
  const verdict: Verdict = Math.abs(margin) <= tolerance ? 'marginal' : margin < 0 ? 'stable' : 'unstable';
  return { eigenvalues, margin, rateScale, tolerance, verdict };
}
