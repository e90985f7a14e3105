/** Bad input gets an error naming the function, the argument and, for samples, the index. */
import { describe, expect, it } from 'vitest';
import {
  adev,
  frequencyToPhase,
  hdev,
  mdev,
  mtie,
  oadev,
  phaseToFrequency,
  powerLawFit,
  summarize,
  tdev,
  timeIntervalError,
} from '../../../src/stability/index.js';

const x = Float64Array.from({ length: 50 }, (_, i) => Math.sin(i));

describe('input validation', () => {
  it('names a sample that is not a finite number', () => {
    const bad = Array.from(x);
    bad[17] = Number.NaN;
    expect(() => adev(bad, 1, 1)).toThrow('adev: x (phase data)[17] is NaN; samples must be finite numbers');
    bad[17] = Number.POSITIVE_INFINITY;
    expect(() => oadev(bad, 1, 1, { input: 'frequency' })).toThrow(/oadev: y \(frequency data\)\[17\] is Infinity/);
    expect(() => frequencyToPhase([0, '1' as unknown as number], 1)).toThrow(/frequencyToPhase: y\[1\] is "1"/);
    expect(() => mdev(null as unknown as number[], 1, 1)).toThrow(/mdev: x \(phase data\) must be an array of numbers, got null/);
  });

  it('names a bad sample interval or averaging factor', () => {
    expect(() => tdev(x, 0, 1)).toThrow('tdev: tau0 must be a finite number > 0 (seconds), got 0');
    expect(() => hdev(x, Number.NaN, 1)).toThrow(/hdev: tau0 .* got NaN/);
    expect(() => mtie(x, 1, 0)).toThrow('mtie: averaging factor m must be an integer >= 1, got 0');
    expect(() => adev(x, 1, 1.5)).toThrow(/adev: averaging factor m .* got 1\.5/);
  });

  it('says how many points an averaging factor needs', () => {
    // Minimum lengths from the definitions: ADEV 2m + 1, MDEV 3m, HDEV 3m + 1, MTIE m + 1 points.
    expect(() => adev(x, 1, 25)).toThrow(
      'adev: averaging factor m = 25 needs at least 51 phase points (50 frequency samples); the series gives 50',
    );
    expect(adev(x, 1, 24).n).toBe(1);
    expect(() => mdev(x, 1, 17)).toThrow(/mdev: averaging factor m = 17 needs at least 51 phase points/);
    expect(mdev(x, 1, 16).n).toBe(3);
    expect(() => hdev(x, 1, 17)).toThrow(/hdev: averaging factor m = 17 needs at least 52/);
    expect(hdev(x, 1, 16).n).toBe(2);
    expect(() => mtie(x, 1, 50)).toThrow(/mtie: averaging factor m = 50 needs at least 51/);
    expect(() => timeIntervalError(x, 1, 50)).toThrow(/timeIntervalError: averaging factor m = 50/);
    // Frequency data: 49 samples integrate to 50 phase points.
    expect(() => adev(x.subarray(0, 49), 1, 25, { input: 'frequency' })).toThrow(/the series gives 50/);
  });

  it('names an unknown input kind', () => {
    expect(() => adev(x, 1, 1, { input: 'phaze' as 'phase' })).toThrow('adev: options.input must be "phase" or "frequency", got "phaze"');
  });

  it('checks the conversions, the summary and the log-log fit', () => {
    expect(() => phaseToFrequency([], 1)).toThrow(/phaseToFrequency: x has 0 samples; at least 1/);
    expect(() => frequencyToPhase([1], -1)).toThrow(/frequencyToPhase: tau0 must be .* got -1/);
    expect(() => summarize([1])).toThrow(/summarize: values has 1 samples; at least 2/);
    expect(() => powerLawFit([1, 2], [1, 0])).toThrow('powerLawFit: devs[1] is 0; a log-log fit needs finite values > 0');
    expect(() => powerLawFit([1, 2, 4], [1, 2])).toThrow(/taus has 3 values but devs has 2/);
    expect(() => powerLawFit([3, 3], [1, 2])).toThrow(/all taus are equal/);
    expect(() => powerLawFit([1], [1])).toThrow(/at least 2 points/);
  });
});
