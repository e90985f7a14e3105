/**
 * Plain-text data files (src/stability/data-file.ts): one value per line or two columns (time,
 * value), '#' comments, errors that name the line, and the writer the soak export uses read back.
 */
import { describe, expect, test } from 'vitest';
import { formatDataText, parseDataText } from '../../../src/stability/index.js';

describe('parseDataText', () => {
  test('one column with comments and blank lines; no sample interval of its own', () => {
    const d = parseDataText('# counter export\n1.5e-12\n\n-2e-12   # a note\n3e-12\n', 'y.txt');
    expect(Array.from(d.values)).toEqual([1.5e-12, -2e-12, 3e-12]);
    expect(d.times).toBeNull();
    expect(d.tau0FromTimes).toBeNull();
    expect(Array.from(d.lines)).toEqual([2, 4, 5]);
  });

  test('two columns, blank-, comma-, semicolon- or tab-separated; tau0 from the time column', () => {
    for (const sep of [' ', ',', ';', '\t', ' , ']) {
      const d = parseDataText(`0${sep}1e-9\n0.25${sep}2e-9\n0.5${sep}4e-9\n`, 'x.txt');
      expect(Array.from(d.values)).toEqual([1e-9, 2e-9, 4e-9]);
      expect(d.tau0FromTimes).toBe(0.25);
    }
  });

  test('printed times rounded to a few digits still count as uniform', () => {
    const text = Array.from({ length: 30 }, (_, i) => `${(i / 3).toFixed(4)} ${i}`).join('\n');
    expect(parseDataText(text, 'x.txt').tau0FromTimes).toBeCloseTo(1 / 3, 4);
  });

  test('errors name the file and line', () => {
    expect(() => parseDataText('1\n2\nabc\n', 'y.txt')).toThrow(/y\.txt: line 3: "abc" is not a finite number/);
    expect(() => parseDataText('0 1\n1 2\n3\n', 'x.txt')).toThrow(/line 3: has 1 column but line 1 has 2/);
    expect(() => parseDataText('0 1 2\n', 'x.txt')).toThrow(/line 1: expected one value, or two columns/);
    expect(() => parseDataText('0 1\n1 2\n3 3\n4 4\n', 'x.txt')).toThrow(
      /line 3: the time step 2 s after line 2 differs from the usual \(median\) step 1 s/,
    );
    expect(() => parseDataText('# nothing\n\n', 'x.txt')).toThrow(/x\.txt: holds no data/);
    expect(() => parseDataText('1 1\n0 2\n', 'x.txt')).toThrow(/line 2: time must increase/);
    expect(() => parseDataText('0 1\n1 2\n2 3\n1.5 4\n', 'x.txt')).toThrow(/line 4: the time step -0.5 s/);
    expect(() => parseDataText('1 NaN\n', 'x.txt')).toThrow(/line 1: "NaN" is not a finite number/);
  });

  test('what formatDataText writes reads back exactly, header as comments', () => {
    const t = [0, 0.125, 0.25, 0.375];
    const x = [0, 1.234567890123e-12, -3.3e-13, 7e-12];
    const text = formatDataText(['a soak series', 'columns: t (s)  x (s)'], t, x);
    expect(text.startsWith('# a soak series\n# columns: t (s)  x (s)\n')).toBe(true);
    const d = parseDataText(text, 'round-trip');
    expect(Array.from(d.values)).toEqual(x);
    expect(d.tau0FromTimes).toBe(0.125);
  });
});
