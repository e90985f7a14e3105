import { describe, expect, it } from 'vitest';
import { wilsonInterval } from '../../../src/yield/interval.js';
import { erf, normalCdf, normalQuantile } from '../../../src/util/normal.js';

describe('erf and the normal quantile', () => {
  // reference values: Python's math.erf (the C library's erf), printed to 16 digits
  const ERF: [number, number][] = [
    [0.1, 0.1124629160182849],
    [0.5, 0.5204998778130465],
    [1.0, 0.8427007929497149],
    [2.0, 0.9953222650189527],
    [2.9, 0.9999589021219005],
    [3.1, 0.9999883513426328],
    [4.0, 0.9999999845827421],
    [5.5, 0.9999999999999927],
  ];
  it.each(ERF)('erf(%f) matches the C library to 1e-12, on both sides of the series/continued-fraction switch', (x, expected) => {
    expect(Math.abs(erf(x) - expected)).toBeLessThan(1e-12);
    expect(Math.abs(erf(-x) + expected)).toBeLessThan(1e-12);
  });

  // two-sided normal quantiles z_{(1+c)/2}: SciPy 1.17 norm.ppf (and every statistics table: 1.645, 1.960, 2.576)
  it.each([
    [0.9, 1.6448536269514722],
    [0.95, 1.959963984540054],
    [0.99, 2.5758293035489004],
  ])('the quantile of a %f two-sided interval is %f', (confidence, z) => {
    expect(Math.abs(normalQuantile(0.5 + confidence / 2) - z)).toBeLessThan(1e-9);
    expect(Math.abs(normalCdf(z) - (0.5 + confidence / 2))).toBeLessThan(1e-12);
  });
});

describe('the Wilson score interval', () => {
  // Newcombe, "Two-sided confidence intervals for the single proportion: comparison of seven
  // methods", Statistics in Medicine 17 (1998) 857-872, Table II, method 3 (score interval without
  // continuity correction), 95 %, given there to four decimals (from memory; the four cases are
  // the paper's worked examples)
  it.each([
    [81, 263, 0.2553, 0.3662],
    [15, 148, 0.0624, 0.1605],
    [0, 20, 0.0, 0.1611],
    [1, 29, 0.0061, 0.1718],
  ])('%i of %i gives [%f, %f]', (passed, samples, low, high) => {
    const interval = wilsonInterval(passed, samples, 0.95);
    expect(interval.low).toBeCloseTo(low, 4);
    expect(interval.high).toBeCloseTo(high, 4);
    expect(interval.estimate).toBe(passed / samples);
    expect(interval.method).toBe('wilson');
  });

  it('is [0, 1]-bounded, exact at the ends, and narrows as the confidence falls and the samples grow', () => {
    const all = wilsonInterval(50, 50, 0.95);
    expect(all.high).toBe(1);
    expect(all.low).toBeGreaterThan(0.9);
    expect(all.low).toBeLessThan(1);
    const wide = wilsonInterval(30, 60, 0.99);
    const narrow = wilsonInterval(30, 60, 0.9);
    expect(wide.high - wide.low).toBeGreaterThan(narrow.high - narrow.low);
    const more = wilsonInterval(300, 600, 0.99);
    expect(more.high - more.low).toBeLessThan(wide.high - wide.low);
    // symmetric about 1/2 for x = n/2
    expect(wide.low + wide.high).toBeCloseTo(1, 12);
  });

  it('refuses counts that are not a proportion', () => {
    expect(() => wilsonInterval(5, 3, 0.95)).toThrow(RangeError);
    expect(() => wilsonInterval(1.5, 3, 0.95)).toThrow(RangeError);
    expect(() => wilsonInterval(1, 3, 1)).toThrow(RangeError);
  });
});
