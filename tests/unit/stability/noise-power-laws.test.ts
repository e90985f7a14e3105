/**
 * Power-law behaviour of the deviations on synthetic noise and drift (NIST SP 1065 section
 * 5.2.10; Rubiola, Phase Noise and Frequency Stability in Oscillators, 2008), plus the log-log fit.
 * Tolerances on noise are several standard deviations of the estimate, measured over 40 seeds
 * while writing the test; the seeds used here are fixed so the run is reproducible.
 */
import { describe, expect, it } from 'vitest';
import { adev, averagingFactors, hdev, mdev, oadev, powerLawFit, powerLawSlope, tdev } from '../../../src/stability/index.js';

/** Standard normal samples: Box-Muller on a 32-bit xorshift (Marsaglia 2003). */
function gaussianSamples(count: number, seed: number, scale = 1): Float64Array {
  let state = seed >>> 0 || 1;
  const uniform = (): number => {
    state ^= state << 13;
    state >>>= 0;
    state ^= state >>> 17;
    state ^= state << 5;
    state >>>= 0;
    return (state + 1) / 4294967297; // in (0, 1): log() below stays finite
  };
  const out = new Float64Array(count);
  for (let i = 0; i < count; i += 2) {
    const radius = Math.sqrt(-2 * Math.log(uniform()));
    const angle = 2 * Math.PI * uniform();
    out[i] = scale * radius * Math.cos(angle);
    if (i + 1 < count) out[i + 1] = scale * radius * Math.sin(angle);
  }
  return out;
}

const N = 1 << 16;
// Octave m with at least about 1000 terms each, so every point of the fit is well estimated.
const factors = averagingFactors(Math.floor(N / 1000));
const asFrequency = { input: 'frequency' } as const;

describe('powerLawFit', () => {
  it('recovers the exponent and level of an exact power law', () => {
    // Arithmetic: dev = 3e-11 tau^-0.5 exactly.
    const taus = [1, 2, 4, 8, 16, 1000];
    const devs = taus.map((t) => 3e-11 * t ** -0.5);
    const fit = powerLawFit(taus, devs);
    expect(fit.slope).toBeCloseTo(-0.5, 12);
    expect(10 ** fit.intercept).toBeCloseTo(3e-11, 22);
    expect(fit.points).toBe(6);
    expect(powerLawSlope([1, 10], [1, 10])).toBeCloseTo(1, 12);
  });

  it('gives the least-squares line, not a two-point slope, on scattered points', () => {
    // Arithmetic: log10 pairs (0, 0), (1, 1), (2, 0) -> least-squares slope 0.
    expect(powerLawSlope([1, 10, 100], [1, 10, 1])).toBeCloseTo(0, 12);
  });
});

describe('white frequency noise (white FM)', () => {
  const sigma = 2e-11;
  const y = gaussianSamples(N, 20240601, sigma);

  it('has ADEV slope -1/2 within 0.05', () => {
    // NIST SP 1065: white FM gives sigma_y(tau) ~ tau^-1/2.
    const devs = factors.map((m) => adev(y, 1, m, asFrequency).deviation);
    expect(Math.abs(powerLawSlope(factors, devs) + 0.5)).toBeLessThan(0.05);
  });

  it('has ADEV level sigma / sqrt(m), i.e. sigma_y^2 = h0 / (2 tau) with h0 = 2 sigma^2 tau0', () => {
    // Follows from the definition (SP 1065 / Rubiola: sigma_y^2 = h0 / (2 tau)); 5 % is about
    // fourteen standard deviations of the estimate at m = 1 and six at m = 4.
    for (const m of [1, 4]) {
      const expected = sigma / Math.sqrt(m);
      expect(Math.abs(adev(y, 1, m, asFrequency).deviation / expected - 1)).toBeLessThan(0.05);
    }
  });

  it('has overlapping Hadamard deviation equal to the Allan deviation on average', () => {
    // Follows from the definitions: for independent averages both variances are sigma^2 / m.
    for (const m of [1, 8, 64]) {
      const ratio = hdev(y, 1, m, asFrequency).deviation / oadev(y, 1, m, asFrequency).deviation;
      expect(Math.abs(ratio - 1)).toBeLessThan(0.03);
    }
  });

  it('has Mod AVAR / AVAR near 1/2 at large m', () => {
    // SP 1065 ratio of modified to normal Allan variance for white FM, 0.5 (from memory).
    const ratio = (mdev(y, 1, 64, asFrequency).deviation / oadev(y, 1, 64, asFrequency).deviation) ** 2;
    expect(Math.abs(ratio - 0.5)).toBeLessThan(0.05);
  });
});

describe('white phase noise (white PM)', () => {
  const sigmaX = 1e-9; // seconds
  const x = gaussianSamples(N, 77, sigmaX);

  it('has ADEV slope about -1', () => {
    // NIST SP 1065: white PM gives sigma_y(tau) ~ tau^-1.
    const devs = factors.map((m) => adev(x, 1, m).deviation);
    expect(Math.abs(powerLawSlope(factors, devs) + 1)).toBeLessThan(0.05);
  });

  it('has ADEV = sqrt(3) sigma_x / tau and TDEV = sigma_x / sqrt(m)', () => {
    // Follows from the definitions: a second difference of independent x has variance 6 sigma_x^2;
    // the modified sum S_j has 3m independent terms with squared weights summing to 6m.
    // 5 % is at least five standard deviations of each estimate here.
    const tau0 = 0.5;
    for (const m of [1, 4]) {
      const a = adev(x, tau0, m);
      expect(Math.abs(a.deviation / ((Math.sqrt(3) * sigmaX) / (m * tau0)) - 1)).toBeLessThan(0.05);
    }
    for (const m of [1, 16]) {
      const t = tdev(x, tau0, m);
      expect(Math.abs(t.deviation / (sigmaX / Math.sqrt(m)) - 1)).toBeLessThan(0.05);
    }
  });
});

describe('linear frequency drift', () => {
  // y(t) = D t sampled at t_i = i tau0: adjacent m-averages differ by exactly D tau.
  const drift = 3e-9; // per second
  const tau0 = 0.5;
  const y = Float64Array.from({ length: 4000 }, (_, i) => drift * i * tau0);

  it('gives ADEV = D tau / sqrt 2, overlapping or not', () => {
    // sigma_y(tau) = D tau / sqrt 2: averages over tau differ by D tau, so AVAR = (D tau)^2 / 2
    // (follows from the definition; docs/model.md, 'Reference values').
    for (const m of [1, 7, 100, 1000]) {
      const expected = (drift * m * tau0) / Math.SQRT2;
      expect(adev(y, tau0, m, asFrequency).deviation / expected).toBeCloseTo(1, 9);
      expect(oadev(y, tau0, m, asFrequency).deviation / expected).toBeCloseTo(1, 9);
    }
  });

  it('is removed by the Hadamard deviation', () => {
    // NIST SP 1065 section 5.2.8: the Hadamard variance rejects linear frequency drift.
    for (const m of [1, 10, 100]) {
      expect(hdev(y, tau0, m, asFrequency).deviation).toBeLessThan(1e-9 * drift * m * tau0);
    }
  });
});

describe('a large constant frequency offset', () => {
  it('leaves the deviations of frequency data untouched to 1e-10', () => {
    // Follows from the definitions (second and third differences of phase cancel a constant
    // frequency); 1e-6 offset on 1e-12 noise over 2^20 samples, the case where integrating the
    // raw offset would lose about six digits.
    const noise = gaussianSamples(1 << 20, 5, 1e-12);
    const offset = noise.map((v) => v + 1e-6);
    for (const m of [1, 1024]) {
      for (const metric of [adev, oadev, mdev, hdev]) {
        const plain = metric(noise, 1, m, asFrequency).deviation;
        expect(Math.abs(metric(offset, 1, m, asFrequency).deviation / plain - 1)).toBeLessThan(1e-10);
      }
    }
  });
});
