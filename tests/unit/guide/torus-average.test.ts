import { describe, expect, test } from 'vitest';
import { ModelParameters } from '../../../src/model/parameters.js';
import { TorusAverage } from '../../../src/guide/torus-average.js';
import { Random } from '../../../src/util/random.js';
import { makeScenario, ringLinks } from '../../support/scenarios.js';

/**
 * Closed-form first-order averaged equations (derived by hand in docs/model.md, 'Closed form for
 * M = 1' and 'Two modes away from resonance'; the van der Pol part is the classical
 * r' = (mu/2) r (1 - r^2/4), Sanders, Verhulst, Murdock 2007):
 *   a'_kj = (eps/2) [ g_j (1 - |a_kj|^2/4 - |a_ko|^2/2) a_kj - d_j a_kj + 2 i omega_j Delta_k a_kj
 *                     + kappa sum_l A_kl (sigma - i rho/omega_j) (a_lj - a_kj) ]
 * with a = u - i v, returned here without the factor eps (the average fbar).
 */
function closedForm(params: ModelParameters, y: Float64Array): Float64Array {
  const n = params.nodes;
  const m = params.modes;
  const out = new Float64Array(y.length);
  const a = (k: number, j: number) => ({ re: y[2 * (k * m + j)], im: -y[2 * (k * m + j) + 1] });
  for (let k = 0; k < n; k++) {
    for (let j = 0; j < m; j++) {
      const akj = a(k, j);
      const self = akj.re ** 2 + akj.im ** 2;
      const other = m === 2 ? a(k, 1 - j).re ** 2 + a(k, 1 - j).im ** 2 : 0;
      const w = params.omega[j];
      const real = params.gain[j] * (1 - self / 4 - other / 2) - params.loss[j];
      let re = real * akj.re - 2 * w * params.detuning[k] * akj.im;
      let im = real * akj.im + 2 * w * params.detuning[k] * akj.re;
      const cr = params.strength * params.dissipative;
      const ci = -(params.strength * params.reactive) / w;
      for (let e = 0; e < params.linkFrom.length; e++) {
        if (params.linkTo[e] !== k) continue;
        const al = a(params.linkFrom[e], j);
        const dr = params.linkWeight[e] * (al.re - akj.re);
        const di = params.linkWeight[e] * (al.im - akj.im);
        re += cr * dr - ci * di;
        im += cr * di + ci * dr;
      }
      // a' = (1/2)(re + i im)  ->  u' = re/2, v' = -im/2
      out[2 * (k * m + j)] = re / 2;
      out[2 * (k * m + j) + 1] = -im / 2;
    }
  }
  return out;
}

function randomState(size: number, seed: number): Float64Array {
  const random = new Random(seed);
  return Float64Array.from({ length: size }, () => 2 * random.uniform() - 1);
}

describe('torus average of the rotating-frame field', () => {
  test('M = 1: equals the closed form to 1e-12 on a weighted graph with detuning', () => {
    const links = [...ringLinks(5, true).slice(0, 7), { from: 0, to: 2, weight: 0.4 }];
    const params = new ModelParameters(
      makeScenario({
        nodes: 5,
        links,
        epsilon: 1e-3,
        modes: [{ omega: 1.3, gain: 0.9, loss: 0.2 }],
        coupling: { strength: 0.7, reactive: 0.6, dissipative: 0.3 },
        detuning: [0.3, -0.1, 0.0, 0.25, -0.4],
      }),
    );
    const average = new TorusAverage(params, 8);
    for (let trial = 0; trial < 5; trial++) {
      const y = randomState(10, 11 + trial);
      const out = new Float64Array(10);
      average.evaluate(y, out);
      const expected = closedForm(params, y);
      for (let i = 0; i < 10; i++) expect(Math.abs(out[i] - expected[i])).toBeLessThan(1e-12);
    }
  });

  test('M = 2, away from resonance: cross-saturation twice the self term, to 1e-12', () => {
    const params = new ModelParameters(
      makeScenario({
        nodes: 4,
        twoWay: true,
        epsilon: 1e-3,
        modes: [
          { omega: 1, gain: 1, loss: 0.3 },
          { omega: 1.37, gain: 0.7, loss: 0.1 },
        ],
        coupling: { strength: 0.5, reactive: 0.4, dissipative: 0.8 },
        detuning: [0.2, -0.3, 0.1, 0],
      }),
    );
    for (const grid of [5, 8, 12]) {
      const average = new TorusAverage(params, grid);
      for (let trial = 0; trial < 5; trial++) {
        const y = randomState(16, 100 + trial);
        const out = new Float64Array(16);
        average.evaluate(y, out);
        const expected = closedForm(params, y);
        for (let i = 0; i < 16; i++) expect(Math.abs(out[i] - expected[i])).toBeLessThan(1e-12);
      }
    }
  });

  // For M = 1 the field holds only the harmonics 0, 2 and 4 of theta, so P = 4 aliases the fourth
  // onto the mean (P = 3 happens to be exact). This shows the comparison above can fail.
  test('a grid of 4 points aliases the fourth harmonic and does not match', () => {
    const params = new ModelParameters(makeScenario({ nodes: 2, twoWay: true, epsilon: 1e-3, modes: [{ omega: 1, gain: 1, loss: 0 }] }));
    const average = new TorusAverage(params, 4);
    const y = randomState(4, 5);
    const out = new Float64Array(4);
    average.evaluate(y, out);
    const expected = closedForm(params, y);
    const worst = Math.max(...out.map((v, i) => Math.abs(v - expected[i])));
    expect(worst).toBeGreaterThan(1e-6);
  });
});
