/**
 * Monte Carlo check of the equivalent degrees of freedom (src/stability/edf.ts). For each
 * power-law noise type, K seeded series of N phase points (Kasdin-Walter 1/f^a generator,
 * tests/support/power-law-noise.ts) give K variance estimates s^2 at averaging factor m; a
 * variance read as sigma^2 chi2(edf) / edf has mean sigma^2 and variance 2 sigma^4 / edf, so
 * edf_measured = 2 mean(s^2)^2 / var(s^2) (definition of the edf, NIST SP 1065 section 5.3).
 *
 * Tolerance, derived: with kurtosis 3 + 12 / edf (that of chi2(edf) / edf), the sample variance of
 * K values has relative standard error sqrt((2 + 12 / edf) / K), and the squared mean adds
 * 2 sqrt(2 / (edf K)); 4 of those combined standard errors, plus an allowance of 8 % for the
 * formulas themselves (approximations good to a few per cent, as SP 1065 states; from memory),
 * make a test that a wrong formula, a swapped noise type or a factor of two fails.
 * Measured when written (N = 257, K = 3000): agreement within 0-10 % everywhere below (the largest
 * gaps: flicker FM and random-walk FM at m = 1, 6-10 %, the estimate below the formula).
 */
import { describe, expect, test } from 'vitest';
import { oadevKernel } from '../../../src/stability/allan.js';
import { mdevKernel } from '../../../src/stability/modified-allan.js';
import { mdevEdf, oadevEdf, NOISE_NAMES, type NoiseAlpha } from '../../../src/stability/edf.js';
import { PowerLawNoise } from '../../support/power-law-noise.js';

const N = 257;
const K = 3000;
const FORMULA_ALLOWANCE = 0.08;
const OADEV_M = [1, 8, 32];
const MDEV_M = [4, 16, 48];

function measuredEdf(values: number[]): number {
  const mean = values.reduce((a, b) => a + b, 0) / values.length;
  const variance = values.reduce((a, b) => a + (b - mean) ** 2, 0) / (values.length - 1);
  return (2 * mean * mean) / variance;
}

function tolerance(edf: number): number {
  const se = Math.sqrt((2 + 12 / edf) / K + 8 / (edf * K));
  return 4 * se + FORMULA_ALLOWANCE;
}

describe('equivalent degrees of freedom against Monte Carlo (Kasdin-Walter noise, seeded)', () => {
  for (const alpha of [2, 1, 0, -1, -2] as NoiseAlpha[]) {
    test(`${NOISE_NAMES[alpha]} (alpha ${alpha}): overlapping ADEV at m = ${OADEV_M.join(', ')}, MDEV at m = ${MDEV_M.join(', ')}`, () => {
      const noise = new PowerLawNoise(4100 + alpha);
      const o: number[][] = OADEV_M.map(() => []);
      const d: number[][] = MDEV_M.map(() => []);
      for (let k = 0; k < K; k++) {
        const x = noise.phase(alpha, N);
        OADEV_M.forEach((m, i) => o[i].push(oadevKernel.evaluate(x, 1, m).deviation ** 2));
        MDEV_M.forEach((m, i) => d[i].push(mdevKernel.evaluate(x, 1, m).deviation ** 2));
      }
      OADEV_M.forEach((m, i) => {
        const formula = oadevEdf(alpha, N, m);
        const measured = measuredEdf(o[i]);
        expect(
          Math.abs(measured / formula - 1),
          `oadev m = ${m}: measured ${measured.toFixed(1)}, formula ${formula.toFixed(1)}`,
        ).toBeLessThan(tolerance(formula));
      });
      MDEV_M.forEach((m, i) => {
        const formula = mdevEdf(alpha, N, m);
        const measured = measuredEdf(d[i]);
        expect(
          Math.abs(measured / formula - 1),
          `mdev m = ${m}: measured ${measured.toFixed(1)}, formula ${formula.toFixed(1)}`,
        ).toBeLessThan(tolerance(formula));
      });
    });
  }
});
