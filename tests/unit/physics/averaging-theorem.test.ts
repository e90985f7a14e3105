import { expect, test } from 'vitest';
import { CoSimulation } from '../../../src/session/session.js';
import { makeScenario } from '../../support/scenarios.js';
import { logLogSlope, stateFromAmplitudes } from '../../support/states.js';

/**
 * First-order averaging theorem (Sanders, Verhulst, Murdock 2007, periodic averaging): on
 * tau in [0, L/eps] the full solution stays within O(eps) of the averaged one, so the largest
 * full-vs-guide gap over tau in [0, 2/eps] scales like eps (fitted log-log slope 1).
 */
test('largest full-vs-guide gap over tau in [0, 2/eps] scales like eps (slope 1 +/- 0.15)', () => {
  const epsilons = [4e-3, 2e-3, 1e-3, 5e-4];
  const omega = [1, 1.37];
  const amplitudes = [
    [
      { re: 1.2, im: 0.4 },
      { re: 0.5, im: -0.2 },
    ],
    [
      { re: -0.3, im: 1.5 },
      { re: 0.2, im: 0.6 },
    ],
    [
      { re: -1.1, im: -0.9 },
      { re: -0.4, im: 0.1 },
    ],
    [
      { re: 0.8, im: -1.3 },
      { re: 0.3, im: 0.3 },
    ],
  ];
  const gaps = epsilons.map((epsilon) => {
    const session = new CoSimulation(
      makeScenario({
        nodes: 4,
        twoWay: true,
        epsilon,
        modes: [
          { omega: 1, gain: 1, loss: 0.2 },
          { omega: 1.37, gain: 0.8, loss: 0.1 },
        ],
        coupling: { strength: 0.4, reactive: 0.3, dissipative: 0.6 },
        detuning: [0.2, -0.1, 0.15, -0.25],
        initial: { state: stateFromAmplitudes(amplitudes, omega) },
        stepsPerPeriod: 32,
        macroPeriods: 1,
      }),
    );
    let worst = 0;
    session.runUntil(2 / epsilon, (frame) => (worst = Math.max(worst, frame.divergence.max)));
    return worst;
  });
  const slope = logLogSlope(epsilons, gaps);
  expect(slope).toBeGreaterThan(0.85);
  expect(slope).toBeLessThan(1.15);
  // and the gap is small in absolute terms: a few eps
  gaps.forEach((gap, i) => expect(gap).toBeLessThan(20 * epsilons[i]));
});
