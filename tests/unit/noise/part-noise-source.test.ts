import { describe, expect, test } from 'vitest';
import { FLICKER_ACCURACY_DB, PartNoiseSource, flickerBand, flickerSumSpectrum } from '../../../src/noise/part-noise-source.js';
import { deviationFromSpectrum } from '../../../src/noise/spectral-deviations.js';
import { oadev } from '../../../src/stability/index.js';
import type { PartNoise } from '../../../src/scenario/types.js';
import { BAND_STANDARD_ERRORS, seedBand } from '../../support/seed-band.js';

/**
 * The generated part noise against the power-law relations of NIST SP 1065 (Riley 2008, table of
 * Allan variances per noise type): sigma_y^2(tau) = h0 / (2 tau) (white FM), 2 ln 2 h-1 (flicker
 * FM), (2 pi^2 / 3) h-2 tau (random-walk FM), 3 fh h2 / (4 pi^2 tau^2) (white PM). The band is the
 * spread of the overlapping Allan variance over SEEDS independent seeds (tests/support/seed-band.ts),
 * not the EDF/chi-squared interval of one record.
 */
const STEP = 1e-3;
const STEPS = 1 << 14;
const SEEDS = 10;
const ZERO: PartNoise = { h2: 0, h0: 0, hm1: 0, hm2: 0 };

/** Time error x (s) at the step boundaries of one node. */
function phaseRecord(noise: PartNoise, seed: number, steps = STEPS, h = STEP): Float64Array {
  const source = new PartNoiseSource([noise], STEP, seed);
  const x = new Float64Array(steps + 1);
  let integral = 0;
  for (let n = 1; n <= steps; n++) {
    source.step(h);
    integral += source.meanFrequency[0] * h;
    x[n] = integral + source.outputTimeError[0];
  }
  x[0] = NaN; // the white PM of sample 0 is not drawn: leave it out
  return x.subarray(1);
}

function avarBand(noise: PartNoise, m: number) {
  const values = Array.from({ length: SEEDS }, (_, s) => oadev(phaseRecord(noise, 100 + s), STEP, m).deviation ** 2);
  return seedBand(values);
}

function expectInBand(noise: PartNoise, m: number, expected: number, bias = 0): void {
  const { mean, standardError } = avarBand(noise, m);
  expect(Math.abs(mean - expected)).toBeLessThan(BAND_STANDARD_ERRORS * standardError + bias * expected);
  // and the band is narrow enough to mean something
  expect(standardError / expected).toBeLessThan(0.15);
}

describe('generated part noise follows the SP 1065 Allan-variance relations', () => {
  test.each([1, 8, 64, 512])('white FM: h0 / (2 tau) at m = %i', (m) => {
    const h0 = 2e-22;
    expectInBand({ ...ZERO, h0 }, m, h0 / (2 * m * STEP));
  });

  test.each([4, 32, 256])('flicker FM: 2 ln 2 h-1 at m = %i', (m) => {
    const hm1 = 5e-23;
    // the sum of relaxation processes is h-1/f within FLICKER_ACCURACY_DB, so the mean may sit that far off
    const bias = 10 ** (FLICKER_ACCURACY_DB / 10) - 1;
    expect(bias).toBeLessThan(0.012);
    expectInBand({ ...ZERO, hm1 }, m, 2 * Math.LN2 * hm1, bias);
  });

  test.each([1, 16, 256])('random-walk FM: (2 pi^2 / 3) h-2 tau at m = %i', (m) => {
    const hm2 = 1e-20;
    expectInBand({ ...ZERO, hm2 }, m, ((2 * Math.PI * Math.PI) / 3) * hm2 * m * STEP);
  });

  test.each([1, 4, 32])('white PM: 3 fh h2 / (4 pi^2 tau^2) with fh the Nyquist frequency 1 / (2 step), m = %i', (m) => {
    const h2 = 1e-26;
    const fh = 1 / (2 * STEP);
    const tau = m * STEP;
    expectInBand({ ...ZERO, h2 }, m, (3 * fh * h2) / (4 * Math.PI * Math.PI * tau * tau));
  });

  test('terms add: white FM and flicker FM together follow the SP 1065 integral of their spectrum', () => {
    const noise = { ...ZERO, h0: 1e-22, hm1: 1e-23 };
    const m = 16;
    const tau = m * STEP;
    // sampled phase at the step boundaries is the continuous process' phase: no bandwidth limit below 1/step
    const expected = deviationFromSpectrum((f) => noise.h0 + noise.hm1 / f, tau, 1e3 / STEP, 'adev') ** 2;
    expect(Math.abs(expected / (noise.h0 / (2 * tau) + 2 * Math.LN2 * noise.hm1) - 1)).toBeLessThan(1e-4);
    expectInBand(noise, m, expected, 0.05);
  });
});

describe('the flicker sum', () => {
  test(`is h-1 / f within ${FLICKER_ACCURACY_DB} dB over its band of ${Math.log10(1e8)} decades`, () => {
    const { lowHz, highHz } = flickerBand(STEP);
    expect(highHz).toBe(500);
    expect(lowHz).toBeCloseTo(5e-6, 18);
    let worst = 0;
    for (let i = 0; i <= 800; i++) {
      const f = lowHz * (highHz / lowHz) ** (i / 800);
      worst = Math.max(worst, Math.abs(10 * Math.log10(flickerSumSpectrum(1, STEP, f) * f)));
    }
    expect(worst).toBeLessThan(FLICKER_ACCURACY_DB);
    expect(worst).toBeGreaterThan(0.001); // a sum of Lorentzians is not exactly 1/f: the check sees the ripple
  });

  test('its variance over a record grows like the log of the record length (1/f, not white or a walk)', () => {
    // the variance of the mean frequency over a block of n steps is flat in n for flicker FM
    // (the Allan variance plateau); white FM would fall as 1/n, random walk rise as n
    const a = avarBand({ ...ZERO, hm1: 1e-22 }, 2).mean;
    const b = avarBand({ ...ZERO, hm1: 1e-22 }, 512).mean;
    expect(b / a).toBeGreaterThan(0.85);
    expect(b / a).toBeLessThan(1.15);
  });
});

describe('determinism', () => {
  const noise: PartNoise = { h2: 1e-26, h0: 1e-22, hm1: 1e-23, hm2: 1e-24 };
  test('one seed gives one record; another seed another', () => {
    expect(Array.from(phaseRecord(noise, 5, 200))).toEqual(Array.from(phaseRecord(noise, 5, 200)));
    expect(phaseRecord(noise, 6, 200)[100]).not.toBe(phaseRecord(noise, 5, 200)[100]);
  });

  test('save and load through JSON continue bit for bit, also across a step of another length', () => {
    const a = new PartNoiseSource([noise, noise], STEP, 9);
    for (let n = 0; n < 50; n++) a.step(STEP);
    const saved = JSON.parse(JSON.stringify(a.save()));
    const b = new PartNoiseSource([noise, noise], STEP, 1);
    b.load(saved);
    for (const h of [STEP, STEP / 3, STEP]) {
      a.step(h);
      b.step(h);
      expect(Array.from(b.meanFrequency)).toEqual(Array.from(a.meanFrequency));
      expect(Array.from(b.outputTimeError)).toEqual(Array.from(a.outputTimeError));
    }
  });

  test('a checkpoint of another board is refused', () => {
    const a = new PartNoiseSource([noise], STEP, 9);
    const b = new PartNoiseSource([noise, noise], STEP, 9);
    expect(() => b.load(a.save())).toThrow(/does not belong/);
  });
});

describe('steps of any length', () => {
  test('white FM over uneven steps keeps variance h0 / (2 h) per step (the exact law does not assume the nominal step)', () => {
    const h0 = 1e-22;
    const source = new PartNoiseSource([{ ...ZERO, h0 }], STEP, 4);
    const h = STEP / 7;
    let sum = 0;
    const n = 20000;
    for (let i = 0; i < n; i++) {
      source.step(h);
      sum += source.meanFrequency[0] ** 2;
    }
    // chi-squared with n degrees of freedom: relative standard deviation sqrt(2 / n) = 1 %
    expect(sum / n / (h0 / (2 * h))).toBeCloseTo(1, 1);
  });
});
