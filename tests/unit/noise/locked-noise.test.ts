import { describe, expect, test } from 'vitest';
import { GuideModel } from '../../../src/predict/guide-model.js';
import { solveLockedState, type LockedState } from '../../../src/predict/locked-state.js';
import { linearNoiseModel, phaseSpectra } from '../../../src/noise/linear-response.js';
import { NO_POWER_LAW_NOISE, type PowerLawNoise } from '../../../src/noise/power-law.js';
import { lockedPatternNoise } from '../../../src/noise/locked-noise.js';
import { tauToSeconds } from '../../../src/scenario/units.js';
import { makeScenario } from '../../support/scenarios.js';

/**
 * The linear noise analysis of a locked pattern checked against closed forms (docs/model.md,
 * 'Noise of a locked pattern').
 */

const F0 = 10e6;

function ring(nodes: number, twoWay: boolean, strength: number, epsilon = 1e-5, q = 0): { model: GuideModel; locked: LockedState } {
  const model = new GuideModel(
    makeScenario({ nodes, twoWay, epsilon, modes: [{ omega: 1, gain: 1, loss: 0 }], coupling: { strength, reactive: 0, dissipative: 1 } }),
  );
  const seed = new Float64Array(2 * nodes);
  for (let k = 0; k < nodes; k++) {
    const angle = (-2 * Math.PI * q * k) / nodes; // a = u - i v = 2 e^{i angle}
    seed[2 * k] = 2 * Math.cos(angle);
    seed[2 * k + 1] = -2 * Math.sin(angle);
  }
  const locked = solveLockedState(model.field, seed, 1, { parts: model.parts() });
  expect(locked.converged).toBe(true);
  return { model, locked };
}

const white = (h0: number): PowerLawNoise => ({ ...NO_POWER_LAW_NOISE, h0 });

describe('one uncoupled part', () => {
  test('frequency noise of every power law becomes S_phi = (f0/f)^2 S_y at every offset (phase is the integral of frequency)', () => {
    const { model, locked } = ring(1, false, 0);
    const linear = linearNoiseModel(model, locked);
    const f = [1e-4, 1e-2, 1, 100, 1e4];
    for (const noise of [
      { ...NO_POWER_LAW_NOISE, h0: 3e-24 },
      { ...NO_POWER_LAW_NOISE, hm1: 2e-25 },
      { ...NO_POWER_LAW_NOISE, hm2: 5e-27 },
    ]) {
      const s = phaseSpectra(linear, [noise], f).nodes[0];
      f.forEach((x, i) => {
        const sy = noise.h0 + noise.hm1 / x + noise.hm2 / (x * x);
        expect(s[i] / ((F0 / x) ** 2 * sy)).toBeCloseTo(1, 7); // the detuning response is a central difference
      });
    }
  });

  test('phase-modulation noise is added at the output unchanged: S_phi = (f0/f)^2 (h2 f^2 + h1 f)', () => {
    const { model, locked } = ring(1, false, 0);
    const noise = { ...NO_POWER_LAW_NOISE, h2: 1e-30, h1: 4e-28 };
    const f = [0.1, 10, 1e3];
    const s = phaseSpectra(linearNoiseModel(model, locked), [noise], f).nodes[0];
    f.forEach((x, i) => expect(s[i] / (F0 * F0 * (noise.h2 + noise.h1 / x))).toBeCloseTo(1, 9));
  });

  test("the model's additive noise q is white FM with h0 = D / (2 pi^2 f0^2), D = q / (2 omega^2 r^2) per tau in seconds", () => {
    // Tangential diffusion of a point at radius r whose coordinates each diffuse at q / (2 omega^2)
    // per tau (src/envelope/averaged-noise.ts) is a phase random walk of rate q / (2 omega^2 r^2);
    // a random walk of rate D per second has S_phi(f) = D / (2 pi^2 f^2) one-sided, so S_y is white
    // (the phase diffusion of a free-running oscillator, common practice). r = 2 for van der Pol.
    const model = new GuideModel(
      makeScenario({ nodes: 1, epsilon: 1e-5, modes: [{ omega: 1, gain: 1, loss: 0 }], noise: { intensity: 1e-9 } }),
    );
    const locked = solveLockedState(model.field, Float64Array.of(2, 0), 1, { parts: model.parts() });
    const secondsPerTau = tauToSeconds(1, F0, 1);
    const rate = 1e-9 / (2 * 4) / secondsPerTau;
    const h0 = rate / (2 * Math.PI ** 2 * F0 * F0);
    // well below the amplitude relaxation (eps g per tau) the amplitude part does not reach the phase at all
    const f = [1e-3, 1, 1e3];
    const s = phaseSpectra(linearNoiseModel(model, locked), [NO_POWER_LAW_NOISE], f).nodes[0];
    f.forEach((x, i) => expect(s[i] / ((F0 / x) ** 2 * h0)).toBeCloseTo(1, 6));
  });
});

/**
 * N identical nodes locked in a rotating wave, each with independent white FM. Near the locked
 * state the phases obey phi_k' = omega Delta_k + (kappa sigma / 2) sum_l A_kl (phi_l - phi_k) cos psi
 * in slow time (docs/model.md, 'Phase equations', cos psi = 1 in phase), a circulant system: its
 * Fourier modes m have rates lambda_m = (kappa sigma / 2) cos(psi) (2 - 2 cos(2 pi m / N)) on the
 * two-way ring and (kappa sigma / 2) cos(psi) (1 - e^{-2 pi i m / N}) on the one-way ring. The
 * noise of one node filtered by mode m reaches each node with weight 1/N, so
 *   S_node(w) / S_alone(w) = (1/N) sum_m w^2 / |i w + lambda_m|^2,   S_array / S_alone = 1/N
 * (the array mean sees only m = 0). This is the noise reduction of coupled-oscillator arrays
 * (Chang, Cao, Mishra, York, IEEE Trans. MTT 45(5), 1997), here derived for these rings.
 */
describe('rings of identical nodes with independent white FM', () => {
  const strength = 0.004; // stiff amplitudes: kappa sigma << g, so the phase equations hold
  const h0 = 1e-22;
  for (const [nodes, twoWay, q] of [
    [5, true, 0],
    [8, true, 0],
    [8, false, 1],
    [6, true, 1],
  ] as const) {
    test(`${nodes} nodes, ${twoWay ? 'two' : 'one'}-way, q = ${q}: node and array spectra follow the circulant modes`, () => {
      const { model, locked } = ring(nodes, twoWay, strength, 1e-5, q);
      const linear = linearNoiseModel(model, locked);
      const c = linear.slowPerSecond;
      const cos = Math.cos((2 * Math.PI * q) / nodes);
      const lambda = (m: number): { re: number; im: number } => {
        const a = (2 * Math.PI * m) / nodes;
        const k = (strength / 2) * cos;
        return twoWay ? { re: k * (2 - 2 * Math.cos(a)), im: 0 } : { re: k * (1 - Math.cos(a)), im: k * Math.sin(a) };
      };
      // offsets from far inside the locking bandwidth to far outside it, all far below the amplitude relaxation (g = 1)
      const offsets = [1e-4, 1e-3, 3e-3, 1e-2, 0.1].map((w) => (w * c) / (2 * Math.PI));
      const s = phaseSpectra(
        linear,
        Array.from({ length: nodes }, () => white(h0)),
        offsets,
      );
      offsets.forEach((f, i) => {
        const alone = (F0 / f) ** 2 * h0;
        const w = (2 * Math.PI * f) / c;
        let ratio = 0;
        for (let m = 0; m < nodes; m++) {
          const l = lambda(m);
          ratio += (w * w) / (l.re * l.re + (w + l.im) ** 2) / nodes;
        }
        for (let k = 0; k < nodes; k++) expect(s.nodes[k][i] / alone / ratio).toBeCloseTo(1, 2);
        expect((s.array[i] / alone) * nodes).toBeCloseTo(1, 3);
      });
    });
  }

  test('the locking bandwidth scales with the coupling rate, and a node gains 10 log10 N dB inside it', () => {
    const one = lockedPatternNoise(ring(5, true, 0.004).model, ring(5, true, 0.004).locked, { partNoise: Array(5).fill(white(h0)) });
    const two = lockedPatternNoise(ring(5, true, 0.008).model, ring(5, true, 0.008).locked, { partNoise: Array(5).fill(white(h0)) });
    expect(one.lockingBandwidthHz).not.toBeNull();
    expect(two.lockingBandwidthHz! / one.lockingBandwidthHz!).toBeCloseTo(2, 1);
    expect(one.nodeImprovementDb).toBeCloseTo(10 * Math.log10(5), 1);
    expect(one.arrayImprovementDb).toBeCloseTo(10 * Math.log10(5), 2);
  });
});
