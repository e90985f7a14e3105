import { describe, expect, test } from 'vitest';
import {
  deltaToPpm,
  lossToQuality,
  offsetPpmToOmega,
  omegaToOffsetPpm,
  ppmToDelta,
  qualityToLoss,
  secondsToTau,
  tauToSeconds,
} from '../../../src/scenario/index.js';

describe('worked numbers', () => {
  test('2 ppm at eps = 1e-5 is Delta = 0.2', () => {
    // hand arithmetic from docs/model.md, 'Reference model': Delta = delta / eps = 2e-6 / 1e-5
    expect(ppmToDelta(2, 1e-5)).toBeCloseTo(0.2, 14);
    expect(deltaToPpm(0.2, 1e-5)).toBeCloseTo(2, 12);
  });

  test('Q = 2e5 at eps = 1e-5, omega = 1 is d = 0.5', () => {
    // damped oscillator x'' + (omega/Q) x' + omega^2 x = 0 (textbook definition of Q, common
    // practice) with the model's damping eps*d: d = 1 / (1e-5 * 2e5) by hand
    expect(qualityToLoss(2e5, 1, 1e-5)).toBeCloseTo(0.5, 14);
    expect(lossToQuality(0.5, 1, 1e-5)).toBeCloseTo(2e5, 6);
  });

  test('quality scales with the mode frequency', () => {
    // same definition: omega = 2, Q = 1e5, eps = 1e-5 gives d = 2 / 1 = 2 (hand arithmetic)
    expect(qualityToLoss(1e5, 2, 1e-5)).toBeCloseTo(2, 14);
  });

  test('a mode 1500 ppm above omega_0 = 1 has omega = 1.0015', () => {
    // hand arithmetic: 1 * (1 + 1500e-6)
    expect(offsetPpmToOmega(1500, 1)).toBeCloseTo(1.0015, 15);
    expect(offsetPpmToOmega(1500, 2)).toBeCloseTo(2.003, 15);
    expect(omegaToOffsetPpm(1.0015, 1)).toBeCloseTo(1500, 8);
  });

  test('one carrier period of mode 0 lasts 1/f0 seconds', () => {
    // hand arithmetic from the definition: period 2 pi / omega_0 in tau; at 10 MHz it is 100 ns
    expect(tauToSeconds(2 * Math.PI, 10e6, 1)).toBeCloseTo(1e-7, 20);
    // with omega_0 = 0.5 the period is 2 pi / 0.5 = 4 pi in tau
    expect(tauToSeconds(4 * Math.PI, 10e6, 0.5)).toBeCloseTo(1e-7, 20);
    // one second at 10 MHz is 1e7 periods = 2 pi 1e7 in tau
    expect(secondsToTau(1, 10e6, 1)).toBeCloseTo(2 * Math.PI * 1e7, 5);
  });

  test('loss 0 has infinite quality', () => {
    // limit of omega / (eps * d) as d -> 0 (common practice: an undamped resonator)
    expect(lossToQuality(0, 1, 1e-5)).toBe(Infinity);
  });
});

describe('round trips', () => {
  // each mapping and its inverse must compose to the identity up to rounding (common practice)
  const values = [-3.7, -0.15, 0, 0.02, 1, 12.5, 1500];
  const epsilons = [1e-7, 1e-5, 1e-3, 0.5];

  test.each(epsilons)('ppm <-> Delta at eps = %s', (eps) => {
    for (const ppm of values) {
      expect(deltaToPpm(ppmToDelta(ppm, eps), eps)).toBeCloseTo(ppm, 9);
    }
  });

  test.each(epsilons)('quality <-> loss at eps = %s', (eps) => {
    for (const q of [10, 6e4, 1.5e5, 2e6]) {
      for (const omega of [0.5, 1, 1.0015]) {
        const back = lossToQuality(qualityToLoss(q, omega, eps), omega, eps);
        expect(Math.abs(back - q) / q).toBeLessThan(1e-14);
      }
    }
  });

  test('offset ppm <-> omega', () => {
    for (const ppm of values) {
      expect(omegaToOffsetPpm(offsetPpmToOmega(ppm, 1.2), 1.2)).toBeCloseTo(ppm, 7);
    }
  });

  test('tau <-> seconds', () => {
    for (const tau of [0, 1, 2 * Math.PI, 1e6, 3.3e9]) {
      const back = secondsToTau(tauToSeconds(tau, 32768, 1.0015), 32768, 1.0015);
      expect(Math.abs(back - tau)).toBeLessThanOrEqual(1e-14 * Math.max(1, tau));
    }
  });
});

describe('bad arguments are refused with the argument named', () => {
  test('eps = 0 has no ppm or quality mapping', () => {
    expect(() => ppmToDelta(1, 0)).toThrow('epsilon must be a finite number > 0 (got 0)');
    expect(() => qualityToLoss(1e5, 1, 0)).toThrow('epsilon must be a finite number > 0 (got 0)');
  });

  test('non-positive quality and frequency', () => {
    expect(() => qualityToLoss(0, 1, 1e-5)).toThrow('quality must be a finite number > 0 (got 0)');
    expect(() => tauToSeconds(1, -5, 1)).toThrow('nominalFrequencyHz must be a finite number > 0 (got -5)');
    expect(() => lossToQuality(-1, 1, 1e-5)).toThrow('loss must be >= 0');
    expect(() => ppmToDelta(NaN, 1e-5)).toThrow('ppm must be a finite number (got NaN)');
  });
});
