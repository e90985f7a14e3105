import { describe, expect, test } from 'vitest';
import { Matrix } from 'ml-matrix';
import { borderedMatrix, dot, norm, solveLinear, squaredNorm } from '../../../src/util/linear-algebra.js';

// Every expected value below is worked out by hand.
describe('real-vector helpers', () => {
  test('dot, squared norm and norm of small integer vectors', () => {
    expect(dot([1, 2, 3], Float64Array.from([4, -5, 6]))).toBe(12); // 4 - 10 + 18
    expect(squaredNorm([3, 4])).toBe(25);
    expect(norm(Float64Array.from([3, 4]))).toBe(5);
    expect(norm([])).toBe(0);
  });
});

describe('bordered matrix', () => {
  test('places the core, the extra columns and the extra rows; a short row leaves the corner zero', () => {
    const core = new Matrix([
      [1, 2],
      [3, 4],
    ]);
    const m = borderedMatrix(core, [[5, 6]], [[7, 8]]);
    expect(m.to2DArray()).toEqual([
      [1, 2, 5],
      [3, 4, 6],
      [7, 8, 0],
    ]);
    // a full-width row fills the corner; no extra columns makes a core with rows appended
    expect(borderedMatrix(core, [], [[9, 10]]).to2DArray()).toEqual([
      [1, 2],
      [3, 4],
      [9, 10],
    ]);
    expect(borderedMatrix(core, [[5, 6]], [[7, 8, 9]]).get(2, 2)).toBe(9);
  });

  test('a row longer than the bordered width is refused', () => {
    expect(() => borderedMatrix(new Matrix(1, 1), [], [[1, 2]])).toThrow(RangeError);
  });

  test('solveLinear solves a bordered 3 x 3 system', () => {
    // [[2, 0, 1], [0, 3, 1], [1, 1, 0]] x = [3, 4, 2] has x = (1, 1, 1)
    const system = borderedMatrix(
      new Matrix([
        [2, 0],
        [0, 3],
      ]),
      [[1, 1]],
      [[1, 1]],
    );
    const x = solveLinear(system, [3, 4, 2]);
    expect(Array.from(x).map((v) => Number(v.toFixed(12)))).toEqual([1, 1, 1]);
  });
});
