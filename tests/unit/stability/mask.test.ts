/**
 * MTIE/TDEV masks (src/stability/mask.ts): reading JSON and CSV with errors that name the field or
 * line, log-log interpolation (a straight line on log-log axes, common practice for masks drawn
 * that way; checked by hand below), and the margin on several invented boards: one well below,
 * one crossing at long tau, one with a fault bump in the middle, one touching the limit exactly,
 * one outside the mask's range. Every mask here is invented for the test.
 */
import { describe, expect, test } from 'vitest';
import { maskLimit, maskMargin, parseMask, parseMaskCsv, type StabilityMask } from '../../../src/stability/index.js';
import { builtInMaskNames, builtInMaskRaw } from '../../../src/scenarios/masks.js';

const mask: StabilityMask = {
  name: 'test mask',
  metric: 'tdev',
  points: [
    [1e-3, 1e-9],
    [1e-1, 1e-7],
    [10, 1e-7],
  ],
};

describe('parseMask (JSON)', () => {
  test('reads a valid mask and keeps its note', () => {
    const m = parseMask({ name: 'a', metric: 'mtie', points: [[1, 2e-9]], note: 'invented' });
    expect(m).toEqual({ name: 'a', metric: 'mtie', points: [[1, 2e-9]], note: 'invented' });
  });

  test('errors name the field', () => {
    const bad = (raw: unknown) => () => parseMask(raw, 'm.json');
    expect(bad({ name: 'a', metric: 'adev', points: [[1, 1]] })).toThrow(/m\.json: metric: must be "mtie" or "tdev" \(got "adev"\)/);
    expect(bad({ name: '', metric: 'tdev', points: [[1, 1]] })).toThrow(/name: must be a non-empty string/);
    expect(bad({ name: 'a', metric: 'tdev', points: [[1, -1]] })).toThrow(/points\[0\]\[1\]/);
    expect(bad({ name: 'a', metric: 'tdev', points: [[1, 1, 3]] })).toThrow(/points\[0\]/);
    expect(
      bad({
        name: 'a',
        metric: 'tdev',
        points: [
          [1, 1],
          [1, 2],
        ],
      }),
    ).toThrow(/points\[1\]\[0\]: tau must increase/);
    expect(bad({ name: 'a', metric: 'tdev', points: [] })).toThrow(/points: must hold at least one/);
    expect(bad({ name: 'a', metric: 'tdev', points: [[1, 1]], limit: 3 })).toThrow(/limit/);
  });

  test('the built-in mask is labelled invented and parses', () => {
    expect(builtInMaskNames).toEqual(['invented-demo-tdev-mask']);
    const m = parseMask(builtInMaskRaw('invented-demo-tdev-mask'));
    expect(m.name).toMatch(/invented/);
    expect(m.note).toMatch(/not come from, or stand for, any standard/);
  });
});

describe('parseMaskCsv', () => {
  test('a header names the metric; comments name the mask; blanks, tabs and semicolons separate', () => {
    const m = parseMaskCsv('# name: bench mask\ntau,mtie\n0.001, 1e-8\n\n0.01\t2e-8\n1;5e-8 # last\n', 'm.csv', 'm');
    expect(m).toEqual({
      name: 'bench mask',
      metric: 'mtie',
      points: [
        [0.001, 1e-8],
        [0.01, 2e-8],
        [1, 5e-8],
      ],
    });
  });

  test('tau,limit with a metric comment; the file name is the default name', () => {
    const m = parseMaskCsv('# metric: tdev\ntau,limit\n1 1e-9\n', 'lab.csv', 'lab');
    expect(m.metric).toBe('tdev');
    expect(m.name).toBe('lab');
  });

  test('errors name the line', () => {
    expect(() => parseMaskCsv('tau,mtie\n1,1e-9\n2,abc\n', 'm.csv', 'm')).toThrow(/m\.csv: line 3: limit "abc" is not a number/);
    expect(() => parseMaskCsv('tau,mtie\n1,1e-9\n0.5,1e-9\n', 'm.csv', 'm')).toThrow(/line 3: tau must increase/);
    expect(() => parseMaskCsv('tau,mtie\n1,-1\n', 'm.csv', 'm')).toThrow(/line 2: limit must be > 0/);
    expect(() => parseMaskCsv('tau,mtie\n1,2,3\n', 'm.csv', 'm')).toThrow(/line 2: expected two values/);
    expect(() => parseMaskCsv('1,1e-9\n', 'm.csv', 'm')).toThrow(/no metric/);
    expect(() => parseMaskCsv('tau,adev\n1,1e-9\n', 'm.csv', 'm')).toThrow(/line 1: the second column must be mtie, tdev or limit/);
    expect(() => parseMaskCsv('# metric: tdev\n', 'm.csv', 'm')).toThrow(/no mask points/);
  });
});

describe('maskLimit', () => {
  test('straight lines on log-log axes between the points, flat where the limits are equal, none outside', () => {
    // by hand: from (1e-3, 1e-9) to (1e-1, 1e-7) the slope is 1 on log-log axes, so at 1e-2 the limit is 1e-8
    expect(maskLimit(mask, 1e-2)! / 1e-8 - 1).toBeLessThan(1e-12);
    // at 10^-2.5: 10^-8.5
    expect(Math.abs(maskLimit(mask, 10 ** -2.5)! / 10 ** -8.5 - 1)).toBeLessThan(1e-12);
    expect(maskLimit(mask, 1)).toBeCloseTo(1e-7, 20);
    expect(maskLimit(mask, 1e-3)).toBe(1e-9);
    expect(maskLimit(mask, 10)).toBe(1e-7);
    expect(maskLimit(mask, 9e-4)).toBeNull();
    expect(maskLimit(mask, 11)).toBeNull();
  });
});

describe('maskMargin on invented boards', () => {
  const tau = [1e-4, 1e-3, 1e-2, 1e-1, 1, 10, 100];

  test('a board well below: margin is the smallest limit / value, in dB, at the tau where it is smallest', () => {
    const value = [5e-11, 1e-10, 5e-10, 2e-9, 4e-9, 2e-8, 1e-7];
    const m = maskMargin(mask, tau, value);
    expect(m.checked).toBe(5); // 1e-4 and 100 are outside the mask's range
    // limit / value: 10, 20, 50, 25, 5 -> 5 at tau 10
    expect(m.factor).toBeCloseTo(5, 12);
    expect(m.db).toBeCloseTo(20 * Math.log10(5), 12);
    expect(m.tau).toBe(10);
    expect(m.meets).toBe(true);
  });

  test('a board whose random walk crosses at long tau fails there', () => {
    const m = maskMargin(mask, tau, [5e-11, 1e-10, 5e-10, 2e-9, 4e-8, 3e-7, 1e-6]);
    expect(m.meets).toBe(false);
    expect(m.tau).toBe(10);
    expect(m.factor).toBeCloseTo(1 / 3, 12);
    expect(m.db!).toBeLessThan(0);
  });

  test('a fault bump at one middle tau is found there, though both ends are fine', () => {
    const m = maskMargin(mask, tau, [5e-11, 1e-10, 3e-8, 2e-9, 4e-9, 2e-8, 1e-7]);
    expect(m.meets).toBe(false);
    expect(m.tau).toBe(1e-2);
    expect(m.value).toBe(3e-8);
  });

  test('touching the limit exactly meets it (0 dB)', () => {
    const m = maskMargin(mask, [1e-3, 1], [1e-9, 1e-8]);
    expect(m.meets).toBe(true);
    expect(m.db).toBe(0);
  });

  test('the interval upper ends give a second, smaller margin', () => {
    const m = maskMargin(mask, [1e-3, 1], [1e-10, 1e-8], [2e-10, 5e-8]);
    expect(m.factor).toBeCloseTo(10, 12);
    expect(m.factorAtUpperBound).toBeCloseTo(2, 12);
  });

  test('a record entirely outside the mask range is not checked (meets null), and zeros are below any limit', () => {
    const outside = maskMargin(mask, [20, 40], [1, 1]);
    expect(outside.checked).toBe(0);
    expect(outside.meets).toBeNull();
    expect(outside.factor).toBeNull();
    const zeros = maskMargin(mask, [1e-3, 1e-2], [0, 0]);
    expect(zeros.meets).toBe(true);
    expect(zeros.factor).toBeNull();
  });
});
