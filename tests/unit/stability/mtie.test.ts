/** Maximum time interval error (ITU-T G.810) against its definition. */
import { describe, expect, it } from 'vitest';
import { mtie } from '../../../src/stability/index.js';

/** Park-Miller minimal standard generator (Park and Miller, CACM 1988), values in (0, 1). */
function uniformSamples(count: number, seed: number): Float64Array {
  const modulus = 2147483647;
  const out = new Float64Array(count);
  let n = seed;
  for (let i = 0; i < count; i++) {
    n = (16807 * n) % modulus;
    out[i] = n / modulus;
  }
  return out;
}

/** Brute force straight from ITU-T G.810: max over k of (max - min of x_k .. x_{k+m}). */
function mtieByDefinition(x: ArrayLike<number>, m: number): number {
  let largest = 0;
  for (let k = 0; k + m < x.length; k++) {
    let high = -Infinity;
    let low = Infinity;
    for (let i = k; i <= k + m; i++) {
      high = Math.max(high, x[i]);
      low = Math.min(low, x[i]);
    }
    largest = Math.max(largest, high - low);
  }
  return largest;
}

describe('mtie', () => {
  it('equals y0 m tau0 for a constant frequency offset', () => {
    // Arithmetic: the phase ramps by y0 tau0 per sample, so a window of m intervals spans y0 m tau0.
    const y0 = 2.5e-7;
    const tau0 = 0.01;
    const y = new Float64Array(1000).fill(y0);
    for (const m of [1, 3, 64, 999]) {
      const point = mtie(y, tau0, m, { input: 'frequency' });
      expect(point.deviation / (y0 * m * tau0)).toBeCloseTo(1, 12);
      expect(point.tau).toBeCloseTo(m * tau0, 15);
      expect(point.n).toBe(1001 - m);
    }
    // The same offset given as phase, falling: MTIE does not care about the sign.
    const x = Float64Array.from({ length: 200 }, (_, i) => -y0 * i * tau0);
    expect(mtie(x, tau0, 50).deviation / (y0 * 50 * tau0)).toBeCloseTo(1, 12);
  });

  it('equals a brute-force O(n m) evaluation on random data for every m', () => {
    // Definition (ITU-T G.810), evaluated independently above; max/min are exact, so equality is exact.
    const walk = uniformSamples(400, 42);
    for (let i = 1; i < walk.length; i++) walk[i] = walk[i - 1] + walk[i] - 0.5;
    const noise = uniformSamples(400, 7);
    for (const x of [walk, noise]) {
      for (let m = 1; m < x.length; m++) expect(mtie(x, 1, m).deviation).toBe(mtieByDefinition(x, m));
    }
  });

  it('keeps the offset for frequency data: MTIE of y0 + noise grows with the window', () => {
    // Common practice: unlike the deviations, MTIE includes the accumulated offset.
    const y = uniformSamples(500, 3).map((v) => 1e-6 + 1e-9 * (v - 0.5));
    expect(mtie(y, 1, 400, { input: 'frequency' }).deviation).toBeGreaterThan(0.99 * 1e-6 * 400);
  });

  it('handles two million samples with a million-sample window in linear time', { timeout: 10_000 }, () => {
    // Common practice (sliding-window extrema): a brute-force O(n m) pass would take ~1e12 steps.
    const y0 = 1e-8;
    const point = mtie(new Float64Array(2_000_000).fill(y0), 1, 1_000_000, { input: 'frequency' });
    expect(point.deviation / (y0 * 1_000_000)).toBeCloseTo(1, 9);
    const x = uniformSamples(2_000_000, 11);
    expect(mtie(x, 1, 1_000_000).deviation).toBeGreaterThan(0.999); // range of uniform (0, 1) data
  });
});
