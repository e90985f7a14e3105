import { expect, test } from 'vitest';
import { divergence } from '../../../src/observe/amplitudes.js';

// Elementary complex arithmetic: a common rotation e^{i phi} of every amplitude of a mode is
// removed by the aligned measure and counted in full by the raw one.
test('a common phase rotation counts in max but not in aligned; a pattern change counts in both', () => {
  const guide = Float64Array.from([1, 0, 0.5, 0.2, 0, -1, -0.3, 0.4]); // 2 nodes x 2 modes, (u, v)
  const rotate = (y: Float64Array, mode: number, phi: number) => {
    const out = Float64Array.from(y);
    for (let i = 2 * mode; i < y.length; i += 4) {
      const re = y[i];
      const im = -y[i + 1];
      out[i] = re * Math.cos(phi) - im * Math.sin(phi);
      out[i + 1] = -(re * Math.sin(phi) + im * Math.cos(phi));
    }
    return out;
  };
  const rotated = rotate(rotate(guide, 0, 0.7), 1, -0.3);
  const d = divergence(rotated, guide, 2);
  expect(d.max).toBeGreaterThan(0.3);
  expect(d.aligned).toBeLessThan(1e-12);
  const changed = Float64Array.from(rotated);
  changed[0] += 0.1;
  expect(divergence(changed, guide, 2).aligned).toBeGreaterThan(0.05);
});
