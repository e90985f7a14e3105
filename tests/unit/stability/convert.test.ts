/** Phase <-> fractional-frequency conversion and the time interval error series. */
import { describe, expect, it } from 'vitest';
import { frequencyToPhase, phaseToFrequency, timeIntervalError } from '../../../src/stability/index.js';

describe('frequencyToPhase / phaseToFrequency', () => {
  it('integrates with x_0 = 0 and x_{i+1} = x_i + y_i tau0', () => {
    // Definition (NIST SP 1065 section 4): phase is the running integral of fractional frequency.
    const x = frequencyToPhase([1e-6, -2e-6, 4e-6], 0.5);
    expect(x).toHaveLength(4);
    expect(x[0]).toBe(0);
    expect(x[1]).toBeCloseTo(0.5e-6, 20);
    expect(x[2]).toBeCloseTo(-0.5e-6, 20);
    expect(x[3]).toBeCloseTo(1.5e-6, 20);
  });

  it('turns 1 ppm into 86.4 ms a day and 1 ppb into 86.4 us a day', () => {
    // Arithmetic: 1e-6 x 86400 s = 86.4e-3 s. (86.4 microseconds a day, sometimes quoted for
    // 1 ppm, belongs to 1 ppb: 1e-9 x 86400 s.)
    for (const [offset, perDay] of [
      [1e-6, 86.4e-3],
      [1e-9, 86.4e-6],
    ]) {
      const x = frequencyToPhase(new Float64Array(86400).fill(offset), 1);
      // Compensated summation keeps 86400 additions within a few ulps of the exact product.
      expect(Math.abs(x[86400] / perDay - 1)).toBeLessThan(1e-15);
    }
  });

  it('round-trips frequency -> phase -> frequency', () => {
    // Common practice: differencing undoes the running sum.
    const y = Float64Array.from({ length: 500 }, (_, i) => Math.sin(i * 0.37) * 1e-9 + 3e-7);
    const back = phaseToFrequency(frequencyToPhase(y, 2), 2);
    expect(back).toHaveLength(500);
    for (let i = 0; i < y.length; i++) expect(Math.abs(back[i] - y[i])).toBeLessThan(1e-12 * 3e-7);
  });

  it('differentiates phase with the sample interval', () => {
    // Definition: y_i = (x_{i+1} - x_i) / tau0.
    const y = phaseToFrequency([0, 2e-9, 3e-9], 1e-3);
    expect(y).toHaveLength(2);
    expect(y[0]).toBeCloseTo(2e-6, 18);
    expect(y[1]).toBeCloseTo(1e-6, 18);
  });
});

describe('timeIntervalError', () => {
  it('is x_{i+m} - x_i, and y0 m tau0 everywhere for a constant offset', () => {
    // ITU-T G.810 TIE; a constant offset y0 gives y0 tau (arithmetic).
    const tie = timeIntervalError(new Float64Array(100).fill(2e-6), 0.1, 30, { input: 'frequency' });
    expect(tie).toHaveLength(101 - 30);
    for (const value of tie) expect(value).toBeCloseTo(2e-6 * 30 * 0.1, 18);
    expect(Array.from(timeIntervalError([0, 1, 4, 9], 1, 2))).toEqual([4, 8]);
  });
});
