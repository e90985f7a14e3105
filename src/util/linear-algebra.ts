/**
 * The small linear algebra the locked-state solvers share: dot products and norms of real
 * vectors, and the bordered matrix [[A, B], [C, D]] that Newton's method for a locked state and
 * the continuation's tangent and corrector solve (the rotating-frame Jacobian bordered by the
 * rotation-rate columns and the phase-condition rows, docs/model.md, 'Relative equilibria and the
 * phase-symmetry zero eigenvalues'; the continuation borders it once more). The vector helpers
 * allocate nothing, so they may sit in loops.
 */
import { Matrix, solve } from 'ml-matrix';

/** sum_i a_i b_i, over the length of a. */
export function dot(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}

/** sum_i v_i^2. */
export function squaredNorm(v: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < v.length; i++) s += v[i] * v[i];
  return s;
}

/** The Euclidean norm. */
export function norm(v: ArrayLike<number>): number {
  return Math.sqrt(squaredNorm(v));
}

/**
 * The matrix [[core, columns], [rows]]: `core` (r x c) with the extra columns (r numbers each)
 * appended on the right and the extra rows appended below. A row holds up to c + columns.length
 * numbers; what it leaves out (the corner, for a row of c numbers) is zero.
 */
export function borderedMatrix(core: Matrix, columns: readonly ArrayLike<number>[], rows: readonly ArrayLike<number>[]): Matrix {
  const width = core.columns + columns.length;
  const out = new Matrix(core.rows + rows.length, width);
  for (let r = 0; r < core.rows; r++) for (let c = 0; c < core.columns; c++) out.set(r, c, core.get(r, c));
  columns.forEach((column, j) => {
    for (let r = 0; r < core.rows; r++) out.set(r, core.columns + j, column[r]);
  });
  rows.forEach((row, i) => {
    if (row.length > width) throw new RangeError(`borderedMatrix: a row of ${row.length} numbers does not fit ${width} columns`);
    for (let c = 0; c < row.length; c++) out.set(core.rows + i, c, row[c]);
  });
  return out;
}

/** x with system x = rhs (ml-matrix's LU solve; it throws when the system is singular). */
export function solveLinear(system: Matrix, rhs: ArrayLike<number>): Float64Array {
  return Float64Array.from(solve(system, Matrix.columnVector(Array.from(rhs))).to1DArray());
}
