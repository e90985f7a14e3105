import { describe, expect, test } from 'vitest';
import { deviationFromSpectrum, timeDeviationFromSpectrum } from '../../../src/noise/spectral-deviations.js';

/**
 * The integrals from S_y(f) to the deviations against the closed forms for the power-law noises,
 * NIST SP 1065 (Riley, Handbook of Frequency Stability Analysis, 2008), Table of
 * "Allan variance and modified Allan variance for power-law noise": sigma_y^2 = h0 / (2 tau)
 * (white FM), 2 ln 2 h-1 (flicker FM), (2 pi^2 / 3) h-2 tau (random-walk FM), 3 fh h2 / (4 pi^2 tau^2)
 * (white PM, 2 pi fh tau >> 1); Mod sigma_y^2 = h0 / (4 tau), (11 pi^2 / 20) h-2 tau. For flicker FM
 * the modified variance is (27/8 ln 3 - 4 ln 2) h-1 = 0.9351 h-1 (from memory; it is the ratio 0.674
 * of Mod sigma^2 to sigma^2 tabulated in SP 1065).
 */
const fh = 1e4;
const cases = [
  { name: 'white FM', s: () => 1e-22, adev: (tau: number) => 1e-22 / (2 * tau), mdev: (tau: number) => 1e-22 / (4 * tau) },
  {
    name: 'flicker FM',
    s: (f: number) => 1e-24 / f,
    adev: () => 2 * Math.LN2 * 1e-24,
    mdev: () => ((27 / 8) * Math.log(3) - 4 * Math.LN2) * 1e-24,
  },
  {
    name: 'random-walk FM',
    s: (f: number) => 1e-26 / (f * f),
    adev: (tau: number) => ((2 * Math.PI ** 2) / 3) * 1e-26 * tau,
    mdev: (tau: number) => ((11 * Math.PI ** 2) / 20) * 1e-26 * tau,
  },
];

describe('deviations of the power-law noises from their spectra', () => {
  for (const c of cases) {
    test(`${c.name}: ADEV and MDEV within 5e-4 of SP 1065 at tau = 0.1 .. 1e3 s (fh tau >> 1)`, () => {
      for (const tau of [0.1, 10, 1e3]) {
        expect(deviationFromSpectrum(c.s, tau, fh, 'adev') ** 2 / c.adev(tau)).toBeCloseTo(1, 3);
        expect(deviationFromSpectrum(c.s, tau, fh, 'mdev') ** 2 / c.mdev(tau)).toBeCloseTo(1, 3);
      }
    });
  }

  test('white PM: ADEV grows with the bandwidth as 3 fh h2 / (4 pi^2 tau^2); MDEV falls as tau^-3/2', () => {
    const h2 = 1e-26;
    for (const tau of [1, 10, 100]) {
      expect(deviationFromSpectrum((f) => h2 * f * f, tau, fh, 'adev') ** 2 / ((3 * fh * h2) / (4 * Math.PI ** 2 * tau * tau))).toBeCloseTo(
        1,
        2,
      );
    }
    const a = deviationFromSpectrum((f) => h2 * f * f, 1, fh, 'mdev');
    const b = deviationFromSpectrum((f) => h2 * f * f, 100, fh, 'mdev');
    expect(Math.log10(a / b) / 2).toBeCloseTo(1.5, 1);
  });

  test('TDEV = tau / sqrt(3) MDEV; non-positive tau or bandwidth is refused', () => {
    const s = () => 1e-22;
    expect(timeDeviationFromSpectrum(s, 5, fh)).toBeCloseTo((5 / Math.sqrt(3)) * deviationFromSpectrum(s, 5, fh, 'mdev'), 20);
    expect(() => deviationFromSpectrum(s, 0, fh, 'adev')).toThrow(RangeError);
    expect(() => deviationFromSpectrum(s, 1, -1, 'adev')).toThrow(RangeError);
  });
});
