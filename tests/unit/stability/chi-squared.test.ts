/**
 * The chi-squared quantiles behind the confidence intervals (src/stability/chi-squared.ts):
 * against SciPy's scipy.stats.chi2.ppf on a grid of non-integer degrees of freedom
 * (tests/reference/chi-squared.scipy.json, made by tests/reference/make_chi_squared.py), against
 * the printed table of critical values of the NIST/SEMATECH e-Handbook of Statistical Methods,
 * section 1.3.6.7.4 (values recalled from memory, printed to 3 decimals; SciPy confirms them),
 * against closed forms derived here, and against the Wilson-Hilferty approximation for large
 * degrees of freedom.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { chiSquaredCdf, chiSquaredQuantile, regularizedGammaP, regularizedGammaQ } from '../../../src/stability/index.js';
import { wilsonHilfertyQuantile } from '../../../src/stability/chi-squared.js';

describe('chi-squared quantiles', () => {
  test('agrees with SciPy 1.17.1 chi2.ppf to 1e-9 relative, nu from 0.37 to 5000, p from 1e-6 to 1 - 1e-6', () => {
    const reference = JSON.parse(readFileSync(new URL('../../reference/chi-squared.scipy.json', import.meta.url), 'utf8')) as {
      rows: { p: number; nu: number; quantile: number }[];
    };
    expect(reference.rows.length).toBe(108);
    for (const { p, nu, quantile } of reference.rows) {
      expect(Math.abs(chiSquaredQuantile(p, nu) / quantile - 1), `chi2_${p}(${nu}) against SciPy ${quantile}`).toBeLessThan(1e-9);
    }
  });

  // NIST/SEMATECH e-Handbook, 1.3.6.7.4 "Critical values of the chi-square distribution", recalled from memory; printed to 3 decimals
  const table: [p: number, nu: number, value: number, decimals: number][] = [
    [0.975, 10, 20.483, 3],
    [0.025, 10, 3.247, 3],
    [0.95, 1, 3.841, 3],
    [0.05, 1, 0.00393, 5],
    [0.95, 5, 11.07, 3],
    [0.05, 5, 1.145, 3],
    [0.99, 20, 37.566, 3],
    [0.01, 20, 8.26, 3],
    [0.95, 30, 43.773, 3],
    [0.975, 100, 129.561, 3],
    [0.025, 100, 74.222, 3],
  ];
  for (const [p, nu, value, decimals] of table) {
    test(`chi2_${p}(${nu}) = ${value} (NIST/SEMATECH e-Handbook table)`, () => {
      expect(Math.abs(chiSquaredQuantile(p, nu) - value)).toBeLessThanOrEqual(0.5 * 10 ** -decimals + 1e-12);
    });
  }

  test('two degrees of freedom: P(chi2 <= x) = 1 - exp(-x / 2), so chi2_p(2) = -2 ln(1 - p) (exponential distribution)', () => {
    for (const p of [1e-6, 0.025, 0.16, 0.5, 0.84, 0.975, 1 - 1e-9]) {
      expect(chiSquaredQuantile(p, 2) / (-2 * Math.log1p(-p)) - 1).toBeLessThan(1e-10);
    }
  });

  test('whole shapes: P(n, x) = 1 - exp(-x) sum_{k<n} x^k / k! (Poisson sum), and Q = 1 - P', () => {
    for (const n of [1, 3, 7, 25]) {
      for (const x of [0.1, 1, n, 3 * n + 4]) {
        let term = 1;
        let sum = 1;
        for (let k = 1; k < n; k++) {
          term *= x / k;
          sum += term;
        }
        const q = Math.exp(-x) * sum;
        expect(Math.abs(regularizedGammaQ(n, x) - q)).toBeLessThan(1e-13 + 1e-12 * q);
        expect(Math.abs(regularizedGammaP(n, x) - (1 - q))).toBeLessThan(1e-13);
      }
    }
  });

  test('the quantile inverts the distribution function for non-integer degrees of freedom', () => {
    for (const nu of [0.37, 0.87, 1.5, 2.7, 7.3, 41.6, 666.2]) {
      for (const p of [0.001, 0.1587, 0.5, 0.8413, 0.999]) {
        const x = chiSquaredQuantile(p, nu);
        expect(Math.abs(chiSquaredCdf(x, nu) - p)).toBeLessThan(1e-10);
      }
    }
  });

  test('large degrees of freedom agree with Wilson-Hilferty (from memory; its error falls like nu^-3/2, here below 1e-4)', () => {
    for (const nu of [500, 1000, 5000]) {
      for (const p of [0.025, 0.1587, 0.8413, 0.975]) {
        expect(Math.abs(chiSquaredQuantile(p, nu) / wilsonHilfertyQuantile(p, nu) - 1)).toBeLessThan(1e-4);
      }
    }
  });

  test('refuses nonsense', () => {
    expect(() => chiSquaredQuantile(0.5, 0)).toThrow(/degrees of freedom must be > 0/);
    expect(() => chiSquaredQuantile(1.5, 3)).toThrow(/p must be in \[0, 1\]/);
  });
});
