/**
 * The small 9-point "NBS" set of NIST SP 1065 (fractional frequency, tau0 = 1); the values and
 * which of them are published are listed in docs/model.md, 'Reference values'.
 */
import { describe, expect, it } from 'vitest';
import { adev, oadev } from '../../../src/stability/index.js';

const nbs = [892, 809, 823, 798, 671, 644, 883, 903, 677];
const asFrequency = { input: 'frequency' } as const;
const sevenDigits = (v: number): number => Number(v.toPrecision(7));

describe('NBS 9-point set', () => {
  it('has ADEV(1) = 91.22945', () => {
    const a = adev(nbs, 1, 1, asFrequency);
    expect(sevenDigits(a.deviation)).toBe(91.22945); // NIST SP 1065, published value
    expect(a.n).toBe(8); // 9 samples give 8 first differences (definition)
  });

  it('has overlapping ADEV(2) = 85.95287', () => {
    const o = oadev(nbs, 1, 2, asFrequency);
    expect(sevenDigits(o.deviation)).toBe(85.95287); // computed from the SP 1065 formula, not published
    expect(o.n).toBe(10 - 4); // 10 phase points, N - 2m terms
  });

  it('agrees with a hand evaluation of the two-sample variance at m = 1', () => {
    // Common practice: AVAR(tau0) = mean of (y_{i+1} - y_i)^2 / 2, written out independently.
    let sum = 0;
    for (let i = 0; i + 1 < nbs.length; i++) sum += (nbs[i + 1] - nbs[i]) ** 2;
    expect(adev(nbs, 1, 1, asFrequency).deviation).toBeCloseTo(Math.sqrt(sum / (2 * 8)), 10);
  });

  it('scales with tau0 as the definition says: ADEV is dimensionless, tau = m tau0', () => {
    // Common practice: frequency samples y with interval tau0 give the same ADEV for any tau0.
    const a = adev(nbs, 0.25, 1, asFrequency);
    expect(sevenDigits(a.deviation)).toBe(91.22945);
    expect(a.tau).toBe(0.25);
  });
});
