/** stabilitySweep: ladders of averaging factors and plot-ready series. */
import { describe, expect, it } from 'vitest';
import {
  adev,
  averagingFactors,
  hdev,
  hdevNonOverlapping,
  largestSweepFactor,
  mdev,
  METRIC_NAMES,
  mtie,
  oadev,
  stabilitySweep,
  tdev,
  type StabilityMetric,
} from '../../../src/stability/index.js';

/** NIST SP 1065 1000-point set (generator in docs/model.md, 'Reference values'). */
function nistSeries(count: number): Float64Array {
  const values = new Float64Array(count);
  let n = 1234567890;
  for (let i = 0; i < count; i++) {
    values[i] = n / 2147483647;
    n = (16807 * n) % 2147483647;
  }
  return values;
}

const y = nistSeries(1000);
const sevenDigits = (v: number): number => Number(v.toPrecision(7));

describe('averaging-factor ladders', () => {
  it('are octave (1, 2, 4, ...) or decade (1, 10, 100, ...) up to a third of the samples', () => {
    // Common practice (SP 1065 plots use octave or decade tau steps, up to about N/3).
    expect(largestSweepFactor(1001)).toBe(333);
    expect(averagingFactors(333)).toEqual([1, 2, 4, 8, 16, 32, 64, 128, 256]);
    expect(averagingFactors(333, 'decade')).toEqual([1, 10, 100]);
    expect(averagingFactors(1000, 'decade')).toEqual([1, 10, 100, 1000]);
  });
});

describe('stabilitySweep', () => {
  it('reproduces the NIST SP 1065 table on a decade sweep of the 1000-point set', () => {
    const sweep = stabilitySweep(y, 1, {
      metrics: ['adev', 'oadev', 'mdev'],
      spacing: 'decade',
      input: 'frequency',
    });
    expect(sweep.m).toEqual([1, 10, 100]);
    expect(sweep.tau).toEqual([1, 10, 100]);
    // NIST SP 1065 test-set table, 7 significant digits.
    expect(sweep.series.adev?.deviation.map(sevenDigits)).toEqual([0.2922319, 0.09965736, 0.03897804]);
    expect(sweep.series.oadev?.deviation.map(sevenDigits)).toEqual([0.2922319, 0.09159953, 0.03241343]);
    expect(sweep.series.mdev?.deviation.map(sevenDigits)).toEqual([0.2922319, 0.06172376, 0.02170921]);
    expect(sweep.series.tdev).toBeUndefined();
  });

  it('defaults to octaves up to N/3 and agrees with the single-m functions for every metric', () => {
    // Common practice: a sweep is the single statistics evaluated on a ladder.
    const single: Record<StabilityMetric, typeof adev> = {
      adev,
      oadev,
      mdev,
      tdev,
      hdev,
      hdevNonOverlapping,
      mtie,
    };
    const tau0 = 0.1;
    const sweep = stabilitySweep(y, tau0, { metrics: METRIC_NAMES, input: 'frequency' });
    expect(sweep.m).toEqual([1, 2, 4, 8, 16, 32, 64, 128, 256]);
    sweep.m.forEach((m, i) => expect(sweep.tau[i]).toBeCloseTo(m * tau0, 14));
    for (const metric of METRIC_NAMES) {
      const series = sweep.series[metric];
      expect(series?.deviation).toHaveLength(sweep.m.length);
      sweep.m.forEach((m, i) => {
        const point = single[metric](y, tau0, m, { input: 'frequency' });
        expect(series?.deviation[i]).toBe(point.deviation);
        expect(series?.n[i]).toBe(point.n);
      });
    }
  });

  it('returns plain arrays that survive JSON', () => {
    // Common practice: results travel to the dashboard as JSON.
    const sweep = stabilitySweep(y, 1, { metrics: ['oadev'], mValues: [3, 5] });
    expect(JSON.parse(JSON.stringify(sweep))).toEqual(sweep);
    expect(Array.isArray(sweep.series.oadev?.deviation)).toBe(true);
  });

  it('refuses explicit m values that a requested metric cannot use, naming both', () => {
    expect(() => stabilitySweep(y, 1, { metrics: ['oadev', 'mdev'], mValues: [1, 400] })).toThrow(
      /stabilitySweep \(mdev\): averaging factor m = 400 needs at least 1200 phase points/,
    );
    expect(() => stabilitySweep(y, 1, { metrics: ['adev'], mValues: [1, 2.5] })).toThrow(/options\.mValues\[1\].*integer >= 1, got 2\.5/);
  });

  it('names an unknown metric and lists the known ones', () => {
    expect(() => stabilitySweep(y, 1, { metrics: ['adev', 'totdev' as StabilityMetric] })).toThrow(
      /options\.metrics\[1\] is "totdev"; known metrics: adev, oadev/,
    );
    expect(() => stabilitySweep(y, 1, { metrics: [] })).toThrow(/options\.metrics must be a non-empty list/);
    expect(() => stabilitySweep(y, 1, { metrics: ['adev'], spacing: 'third' as 'octave' })).toThrow(
      /options\.spacing must be "octave", "decade" or "1-2-5", got "third"/,
    );
  });

  it('refuses a series too short for any sweep', () => {
    expect(() => stabilitySweep([1, 2, 3], 1, { metrics: ['adev'] })).toThrow(/needs at least 4 phase points/);
  });
});
