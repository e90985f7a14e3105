import { expect, test } from 'vitest';
import { LockDetector } from '../../../src/observe/lock-detector.js';

// Definitions of the detector itself (module header): window, tolerance, hysteresis.
test('locks once the window is full and steady, holds through excursions below twice the tolerance, unlocks above', () => {
  const detector = new LockDetector(2, 5, 0.05);
  const push = (tau: number, a: number, b: number) => detector.push(tau, [a, b], 1);
  for (let t = 0; t < 4; t++) expect(push(t, 0.3, -0.1)).toBe(false); // window not yet full
  expect(push(4, 0.3, -0.1)).toBe(true);
  expect(detector.lockedSince).toBe(4);
  expect(push(5, 0.3 + 0.08, -0.1)).toBe(true); // 0.08 < 2 x 0.05: still locked
  expect(push(6, 0.3 + 0.12, -0.1)).toBe(false); // 0.12 > 0.1: unlocked
  expect(detector.lockedSince).toBeNull();
  // relocking needs the strict tolerance again over a full window
  for (let t = 7; t < 11; t++) push(t, 0.42, -0.1);
  expect(push(11, 0.42, -0.1)).toBe(true);
});

test('a phase difference that wraps across pi is not mistaken for a jump', () => {
  const detector = new LockDetector(1, 3, 0.05);
  detector.push(0, [Math.PI - 0.01], 1);
  detector.push(1, [-Math.PI + 0.01], 1);
  expect(detector.push(2, [Math.PI - 0.005], 1)).toBe(true);
});

test('a quiet (non-oscillating) system is never locked', () => {
  const detector = new LockDetector(1, 2, 0.05);
  detector.push(0, [0], 1e-6);
  expect(detector.push(1, [0], 1e-6)).toBe(false);
});
