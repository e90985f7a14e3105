/**
 * Degrees of freedom, intervals, reliability marks, slope fits and noise identification as the
 * tables use them (src/stability/confidence.ts, tables.ts, noise-id.ts). Worked numbers: the white
 * FM edf of NIST SP 1065 section 5.3.3 evaluated by hand, and its chi-squared quantiles from SciPy
 * 1.17.1 (scipy.stats.chi2.ppf, run while writing the test).
 */
import { describe, expect, test } from 'vitest';
import { nistTestSet } from '../../support/nist-test-set.js';
import {
  deviationConfidence,
  deviationIntervals,
  FIT_MIN_EDF,
  identifyNoise,
  stabilityTables,
  type NoiseEstimate,
} from '../../../src/stability/index.js';
import { PowerLawNoise } from '../../support/power-law-noise.js';

const whiteFm: NoiseEstimate = { alpha: 0, type: 'white FM', basis: 'assumed', method: 'test' };

describe('deviationConfidence (one value at one tau)', () => {
  test('white FM, N = 1001 phase points, tau = 10 tau0: edf and one-sigma and 95 % intervals', () => {
    // SP 1065 white FM: edf = (3 (N - 1) / (2m) - 2 (N - 2) / N) 4m^2 / (4m^2 + 5)
    // = (150 - 1998 / 1001) 400 / 405 = 146.1768 (by hand).
    const c = deviationConfidence({ metric: 'oadev', deviation: 2e-11, tau: 10, tau0: 1, phasePoints: 1001, noise: 0 });
    expect(c.m).toBe(10);
    expect(c.edf!).toBeCloseTo(146.1768, 3);
    // sqrt(edf / chi2_{0.8413}(edf)) = 0.946304, sqrt(edf / chi2_{0.1587}(edf)) = 1.064012 (SciPy 1.17.1)
    expect(c.low! / 2e-11).toBeCloseTo(0.9463042, 6);
    expect(c.high! / 2e-11).toBeCloseTo(1.0640117, 6);
    const wide = deviationConfidence({
      metric: 'oadev',
      deviation: 2e-11,
      tau: 10,
      tau0: 1,
      phasePoints: 1001,
      noise: whiteFm,
      level: 0.95,
    });
    expect(wide.low! / 2e-11).toBeCloseTo(0.8973287, 6); // SciPy 1.17.1: chi2.ppf(0.975, 146.1768)
    expect(wide.high! / 2e-11).toBeCloseTo(1.1294116, 6); // SciPy 1.17.1: chi2.ppf(0.025, 146.1768)
    expect(c.reliable).toBe(true);
    expect(c.usedInFits).toBe(true);
    expect(c.noise.type).toBe('white FM');
  });

  test('TDEV takes the MDEV edf (TDEV is a fixed multiple of MDEV) and scales its interval with the value', () => {
    const mdev = deviationConfidence({ metric: 'mdev', deviation: 3e-12, tau: 0.5, tau0: 0.125, phasePoints: 600, noise: -1 });
    const tdev = deviationConfidence({ metric: 'tdev', deviation: 7e-10, tau: 0.5, tau0: 0.125, phasePoints: 600, noise: -1 });
    expect(tdev.edf).toBe(mdev.edf);
    expect(tdev.low! / 7e-10).toBeCloseTo(mdev.low! / 3e-12, 12);
  });

  test('values on 2 or 3 independent terms are unreliable and left out of fits; 4 terms are kept', () => {
    // N = 1001 phase points: floor(1000 / m) - 1 non-overlapping second differences.
    const at = (m: number) => deviationConfidence({ metric: 'oadev', deviation: 1, tau: m, tau0: 1, phasePoints: 1001, noise: 0 });
    expect(at(333).independentTerms).toBe(2);
    expect(at(250).independentTerms).toBe(3);
    expect(at(200).independentTerms).toBe(4);
    expect(at(333).reliable).toBe(false);
    expect(at(250).reliable).toBe(false);
    expect(at(250).usedInFits).toBe(false);
    expect(at(200).reliable).toBe(true);
    // an edf still comes with the unreliable values, and their intervals are wide
    expect(at(333).high! / at(333).low!).toBeGreaterThan(2);
  });

  test('refuses a tau off the grid, too few points and an unknown metric, naming what is wrong', () => {
    const base = { metric: 'oadev' as const, deviation: 1, tau: 10, tau0: 1, phasePoints: 1001, noise: 0 as const };
    expect(() => deviationConfidence({ ...base, tau: 10.5 })).toThrow(/tau 10.5 s is not a whole multiple of tau0 1 s/);
    expect(() => deviationConfidence({ ...base, phasePoints: 20 })).toThrow(/needs at least 21 phase points, got 20/);
    expect(() => deviationConfidence({ ...base, metric: 'hdev' as 'oadev' })).toThrow(/metric must be "oadev", "mdev" or "tdev"/);
    expect(() => deviationConfidence({ ...base, level: 1 })).toThrow(/level must be between 0 and 1/);
  });

  test('an estimate between two types takes the edf of the one with fewer degrees of freedom', () => {
    const between: NoiseEstimate = { alpha: -1, type: 'flicker FM', basis: 'identified', method: 'test', candidates: [-2, -1] };
    const [mixed, flicker, walk] = [
      between,
      { ...between, candidates: undefined },
      { ...between, alpha: -2 as const, candidates: undefined },
    ].map((noise) => deviationIntervals('oadev', 257, [16], [1], [noise])[0].edf!);
    expect(mixed).toBe(Math.min(flicker, walk));
    expect(flicker).not.toBe(walk);
  });
});

describe('stabilityTables', () => {
  test('NIST SP 1065 1000-point set as frequency: published OADEV and MDEV, white FM identified where it can be, assumed beyond', () => {
    const t = stabilityTables(nistTestSet(1000), 1, { metrics: ['oadev', 'mdev', 'tdev'], input: 'frequency', mValues: [1, 10, 100] });
    // NIST SP 1065 test-set table (as in nist-1000.test.ts)
    expect(Number(t.sweep.series.oadev!.deviation[0].toPrecision(7))).toBe(0.2922319);
    expect(Number(t.sweep.series.oadev!.deviation[1].toPrecision(7))).toBe(0.09159953);
    expect(Number(t.sweep.series.oadev!.deviation[2].toPrecision(7))).toBe(0.03241343);
    expect(Number(t.sweep.series.mdev!.deviation[2].toPrecision(7))).toBe(0.02170921);
    expect(t.phasePoints).toBe(1001);
    // the set is independent uniform draws: white frequency noise by construction
    expect(t.noise.map((n) => n.type)).toEqual(['white FM', 'white FM', 'white FM']);
    expect(t.noise.map((n) => n.basis)).toEqual(['identified', 'identified', 'assumed']); // 11 points at m = 100
    expect(t.noise[2].method).toMatch(/carried over from m = 10/);
    const oadev = t.intervals.oadev!;
    expect(oadev[1].edf!).toBeCloseTo(146.1768, 3); // by hand, as above
    for (const [i, iv] of oadev.entries()) {
      const v = t.sweep.series.oadev!.deviation[i];
      expect(iv.low!).toBeLessThan(v);
      expect(iv.high!).toBeGreaterThan(v);
    }
    // TDEV intervals are the MDEV intervals times tau / sqrt 3
    t.intervals.tdev!.forEach((iv, i) => expect(iv.high! / t.intervals.mdev![i].high!).toBeCloseTo(t.sweep.tau[i] / Math.sqrt(3), 9));
  });

  test('the ADEV slope is fit only over taus with edf >= 8 and 4 or more independent terms', () => {
    const noise = new PowerLawNoise(31);
    const x = noise.phase(0, 4097); // white FM
    const t = stabilityTables(x, 1, { metrics: ['oadev'] });
    const iv = t.intervals.oadev!;
    const used = t.sweep.m.filter((_, i) => iv[i].usedInFits);
    expect(t.sweep.m[t.sweep.m.length - 1]).toBe(1024); // a third of the record
    expect(iv[t.sweep.m.indexOf(1024)].independentTerms).toBe(3);
    expect(used).not.toContain(1024);
    for (const i of t.sweep.m.keys()) expect(iv[i].usedInFits, `m = ${t.sweep.m[i]}`).toBe(iv[i].reliable && iv[i].edf! >= FIT_MIN_EDF);
    expect(t.oadevFit.points).toBe(used.length);
    expect(t.oadevFit.toTau).toBe(used[used.length - 1]);
    expect(t.oadevFit.slope!).toBeGreaterThan(-0.6); // white FM: -1/2 (NIST SP 1065 section 5.2.10)
    expect(t.oadevFit.slope!).toBeLessThan(-0.4);
  });
});

describe('identifyNoise (lag-1 autocorrelation)', () => {
  test('white PM, white FM and random-walk FM on 4097 points are identified up to m = 64, carried over at m = 256', () => {
    // 65 points at m = 64; with 33 (m = 128) a white FM estimate of 0.54 was seen, so the test stops at 64
    const mValues = [1, 4, 16, 64, 256];
    for (const [alpha, type] of [
      [2, 'white PM'],
      [0, 'white FM'],
      [-2, 'random-walk FM'],
    ] as const) {
      const estimates = identifyNoise(new PowerLawNoise(70 + alpha).phase(alpha, 4097), mValues);
      expect(estimates.map((e) => e.type)).toEqual(mValues.map(() => type));
      // 4096 / 256 + 1 = 17 points at m = 256: fewer than 30
      expect(estimates.map((e) => e.basis)).toEqual(['identified', 'identified', 'identified', 'identified', 'assumed']);
      expect(estimates[4].method).toMatch(/carried over from m = 64/);
    }
  });

  test('a frequency offset and drift (linear and quadratic phase) do not change the type', () => {
    const x = new PowerLawNoise(5).phase(2, 2049).map((v, i) => v + 0.01 * i + 1e-5 * i * i);
    expect(identifyNoise(x, [1, 8]).map((e) => e.type)).toEqual(['white PM', 'white PM']);
  });

  test('a record too short to identify anything gets the stated default, marked assumed', () => {
    const [e] = identifyNoise(new PowerLawNoise(6).phase(0, 20), [1]);
    expect(e.basis).toBe('assumed');
    expect(e.type).toBe('white FM');
    expect(e.method).toMatch(/too short/);
  });
});
