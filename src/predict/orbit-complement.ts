import { Matrix } from 'ml-matrix';
import { dot, norm } from '../util/linear-algebra.js';

/**
 * Shared pieces of the locked-state computations. The averaged field is equivariant under a
 * common phase shift of each mode (per connected part of the graph), so a locked state is a
 * relative equilibrium whose Jacobian kills the orbit tangents; those forced zero eigenvalues
 * are removed by construction, by restricting the Jacobian to the orthogonal complement of the
 * tangents (complementBasis), never by a tolerance.
 */

/** A slow vector field y -> out (rotating-frame layout). */
export type Field = (y: Float64Array, out: Float64Array) => void;

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

/** The Jacobian restricted to the orthogonal complement of the orbit tangents: Q^T J Q with Q = complementBasis(tangents). */
export function restrictToComplement(jacobian: Matrix, tangents: Float64Array[]): Matrix {
  const q = complementBasis(tangents, jacobian.rows);
  return q.transpose().mmul(jacobian).mmul(q);
}
