/**
 * The two-node scenario the soak tests run (two-way dissipative coupling, in-phase start, a
 * little noise): fast, and its locking limit is Adler's |dw| = K with dw = eps omega (Delta_0 -
 * Delta_1) and K = eps kappa sigma (docs/model.md, 'Adler pair').
 */
export function adlerPairScenario(epsilon = 0.01, kappaSigma = 0.05): Record<string, unknown> {
  return {
    name: 'Adler pair',
    nodes: 2,
    topology: {
      edges: [
        [0, 1, 1],
        [1, 0, 1],
      ],
    },
    epsilon,
    modes: [{ omega: 1, gain: 1, loss: 0 }],
    coupling: { strength: kappaSigma, reactive: 0, dissipative: 1 },
    detuning: [0, 0],
    noise: { intensity: 1e-7, seed: 11 },
    initial: { pattern: { q: 0, amplitude: 2 } },
    integrator: { stepsPerPeriod: 16 },
  };
}
