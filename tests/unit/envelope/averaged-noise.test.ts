import { describe, expect, test } from 'vitest';
import { EnvelopeSystem } from '../../../src/envelope/envelope-system.js';
import { FullSystem, type FullIntegrator } from '../../../src/integrate/full-system.js';
import { CoSimulation } from '../../../src/session/session.js';
import { Random } from '../../../src/util/random.js';
import { makeScenario } from '../../support/scenarios.js';
import { compiled } from './problems.js';

/**
 * The envelope's noise is the averaged diffusion of the slow variables: u and v of mode j each
 * diffuse with variance q / (2 omega_j^2) per unit tau. It is statistically, not pathwise,
 * equivalent to the exact increments of micro-stepping, so these tests compare statistics.
 */
describe('averaged-diffusion noise', () => {
  test('free harmonic nodes: each rotating-frame component has variance q T / (2 omega^2)', () => {
    // Ito isometry for u(T) - u(0) = -(sqrt q / omega) int sin(omega t) dW over whole periods
    // (common practice); with g = d = 0 and no links the slow field vanishes.
    const nodes = 400;
    const q = 1e-3;
    const omega = 1.3;
    const { params, y0 } = compiled(
      makeScenario({
        nodes,
        links: [],
        epsilon: 1e-9,
        modes: [{ omega, gain: 0, loss: 0 }],
        noise: { intensity: q, seed: 9 },
        initial: { state: Array.from({ length: nodes }, () => [{ x: 0, xdot: 0 }]) },
      }),
    );
    const envelope = new EnvelopeSystem(params, y0, 0, new Random(9));
    const T = (30 * 2 * Math.PI) / omega;
    for (let k = 1; k <= 10; k++) expect(envelope.advance((T * k) / 10).ok).toBe(true);
    let su = 0;
    let sv = 0;
    for (let k = 0; k < nodes; k++) {
      su += envelope.state[2 * k] ** 2;
      sv += envelope.state[2 * k + 1] ** 2;
    }
    const expected = (q * T) / (2 * omega * omega);
    // 400 samples: the sample variance has a relative standard error of sqrt(2/400) = 7%
    expect(Math.abs(su / nodes / expected - 1)).toBeLessThan(0.25);
    expect(Math.abs(sv / nodes / expected - 1)).toBeLessThan(0.25);
  });

  test('noisy van der Pol nodes: the amplitude fluctuations have the same variance as with micro-stepping', () => {
    // Linearised about the limit cycle r = 2, r' = (g/2) r (1 - r^2/4) relaxes at rate g in slow
    // time, and the radial noise has variance q / (2 omega^2 eps) per slow time unit, so the
    // stationary variance of r is q / (4 omega^2 eps g) (Ornstein-Uhlenbeck, derived).
    const nodes = 100;
    const eps = 1e-3;
    const q = 4e-6;
    // a one-way ring with coupling strength 0: uncoupled nodes on the field's fast ring path
    const scenario = makeScenario({
      nodes,
      epsilon: eps,
      modes: [{ omega: 1, gain: 1, loss: 0 }],
      noise: { intensity: q, seed: 21 },
      initial: { pattern: { q: 0, amplitude: 2, mode: 0 } },
    });
    const predicted = q / (4 * eps);
    const radialVariance = (make: (state: Float64Array, random: Random) => FullIntegrator) => {
      const { y0 } = compiled(scenario);
      const system = make(y0, new Random(21));
      const tick = 0.05 / eps;
      let sum = 0;
      let sumSquares = 0;
      let count = 0;
      for (let k = 1; k <= 320; k++) {
        expect(system.advance(k * tick).ok).toBe(true);
        if (k <= 20) continue; // one slow time unit of burn-in (the start is on the cycle anyway)
        for (let n = 0; n < nodes; n++) {
          const r = Math.hypot(system.state[2 * n], system.state[2 * n + 1]);
          sum += r;
          sumSquares += r * r;
          count++;
        }
      }
      const mean = sum / count;
      return sumSquares / count - mean * mean;
    };
    const envelope = radialVariance((y0, random) => new EnvelopeSystem(compiled(scenario).params, y0, 0, random));
    const micro = radialVariance((y0) => new FullSystem(compiled(scenario).params, y0, 16, 21));
    expect(Math.abs(envelope / predicted - 1)).toBeLessThan(0.15);
    expect(Math.abs(micro / predicted - 1)).toBeLessThan(0.15);
    expect(envelope / micro).toBeGreaterThan(0.85);
    expect(envelope / micro).toBeLessThan(1.18);
  });

  test('frames say which noise model made them', () => {
    const scenario = makeScenario({
      nodes: 3,
      twoWay: true,
      epsilon: 1e-3,
      modes: [{ omega: 1, gain: 1, loss: 0.1 }],
      coupling: { strength: 0.2, reactive: 0, dissipative: 1 },
      noise: { intensity: 1e-7, seed: 3 },
      macroPeriods: 10,
    });
    expect(new CoSimulation(scenario, { integrator: 'envelope' }).step()!.noiseModel).toBe('averaged-diffusion');
    expect(new CoSimulation(scenario, { integrator: 'micro' }).step()!.noiseModel).toBe('exact-increments');
    const quiet = new CoSimulation({ ...scenario, noise: { ...scenario.noise, intensity: 0 } }, { integrator: 'envelope' });
    expect(quiet.step()!.noiseModel).toBe('none');
  });
});
