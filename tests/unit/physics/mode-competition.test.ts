import { describe, expect, test } from 'vitest';
import { CoSimulation } from '../../../src/session/session.js';
import { makeScenario } from '../../support/scenarios.js';
import { stateFromAmplitudes } from '../../support/states.js';

/**
 * Two modes with equal gains on one sustaining element: averaging gives
 * a_j' = (eps/2) g (1 - |a_j|^2/4 - |a_o|^2/2) a_j (derived in docs/model.md, 'Two modes away from
 * resonance': cross-saturation twice the self term), so both single-mode states are stable (the
 * other mode's growth rate there is g (1 - 4/2) < 0) and the winner depends on the start:
 * winner-take-all mode competition (common practice in multimode oscillator theory).
 */
function node(mode0: number, mode1: number) {
  return new CoSimulation(
    makeScenario({
      nodes: 1,
      links: [],
      epsilon: 0.01,
      modes: [
        { omega: 1, gain: 1, loss: 0 },
        { omega: 1.37, gain: 1, loss: 0 },
      ],
      initial: {
        state: stateFromAmplitudes(
          [
            [
              { re: mode0, im: 0 },
              { re: 0, im: mode1 },
            ],
          ],
          [1, 1.37],
        ),
      },
      stepsPerPeriod: 32,
    }),
  );
}

describe('two-mode competition with equal gains', () => {
  test.each([
    [0.5, 0.3, 0],
    [0.3, 0.5, 1],
  ])('start |a0| = %s, |a1| = %s ends on mode %s alone', (a0, a1, winner) => {
    const last = node(a0, a1).runUntil(30 / 0.01)!;
    // The guide's loser decays like e^{-g tau eps / 2}; the full system keeps an O(eps) ripple
    // of the near-identity transformation on the losing mode (averaging theorem).
    for (const [system, floor] of [
      [last.full, 3 * 0.01],
      [last.guide, 1e-3],
    ] as const) {
      expect(system.dominantMode).toBe(winner);
      expect(Math.abs(system.amplitude[0][winner] - 2)).toBeLessThan(0.05);
      expect(system.amplitude[0][1 - winner]).toBeLessThan(floor);
    }
  });
});
