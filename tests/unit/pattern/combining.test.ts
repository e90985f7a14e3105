import { expect, test } from 'vitest';
import { combining } from '../../../src/pattern/combining.js';

// Phasor sums by hand (common practice: N equal phasors in phase add to N times one; the summed
// amplitude of phasors at angles theta_k is |sum e^{i theta_k}|; an amplitude ratio in dB is 20 log10).
const phasors = (angles: number[], moduli = angles.map(() => 1)) => ({
  re: angles.map((a, k) => moduli[k] * Math.cos(a)),
  im: angles.map((a, k) => moduli[k] * Math.sin(a)),
});

test('equal phasors in phase: ratio 1, 0 dB, no spread', () => {
  const { re, im } = phasors([0.7, 0.7, 0.7, 0.7]);
  const c = combining(re, im);
  expect(c.ratio).toBeCloseTo(1, 14);
  expect(c.lossDb).toBeCloseTo(0, 12);
  expect(c.spread).toBeCloseTo(0, 14);
});

test('two phasors +-pi/4 about the mean: ratio cos(pi/4), -3.01 dB, spread pi/4', () => {
  const { re, im } = phasors([0.2 + Math.PI / 4, 0.2 - Math.PI / 4]);
  const c = combining(re, im);
  expect(c.ratio).toBeCloseTo(Math.SQRT1_2, 14);
  expect(c.lossDb).toBeCloseTo(-3.0103, 4);
  expect(c.spread).toBeCloseTo(Math.PI / 4, 14);
});

test('a strained in-phase state at the edge of a locking range: spread near pi/2 is shown, not hidden', () => {
  // three nodes at 0 and one at 1.5 rad: |1 + 1 + 1 + e^{1.5i}| / 4
  const { re, im } = phasors([0, 0, 0, 1.5]);
  const c = combining(re, im);
  const sum = Math.hypot(3 + Math.cos(1.5), Math.sin(1.5));
  expect(c.ratio).toBeCloseTo(sum / 4, 14);
  const mean = Math.atan2(Math.sin(1.5), 3 + Math.cos(1.5));
  expect(c.spread).toBeCloseTo(1.5 - mean, 14);
});

test('a balanced rotating wave sums to nothing: no loss figure, no spread', () => {
  const { re, im } = phasors([0, (2 * Math.PI) / 3, (4 * Math.PI) / 3]);
  const c = combining(re, im);
  expect(c.ratio).toBeLessThan(1e-15);
  expect(c.lossDb === null || c.lossDb < -300).toBe(true);
  expect(c.spread).toBeNull();
});
