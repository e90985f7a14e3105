import { describe, expect, test } from 'vitest';
import { CoSimulation } from '../../../src/session/session.js';
import { makeScenario } from '../../support/scenarios.js';
import { stateFromAmplitudes, twistedAmplitudes } from '../../support/states.js';

/**
 * Twisted (rotating-wave) states of a 7-node two-way ring with dissipative coupling.
 * For phase oscillators with nearest-neighbour sine coupling a q-twisted state is linearly
 * stable iff cos(2 pi q / N) > 0 (Wiley, Strogatz, Girvan, Chaos 16, 015103, 2006):
 * for N = 7, q = 1 (cos 0.898 = 0.62) is stable and q = 2 (cos 1.795 = -0.22) is not.
 * That holds when the amplitudes are stiff, kappa sigma << g. With coupling as strong as the
 * gain the amplitudes take part: the dissipative coupling of a twisted state acts as an extra
 * loss 2 kappa sigma (1 - cos(2 pi q / N)) that shrinks its amplitude (to 0.99 for q = 1 at
 * kappa sigma = g = 1, against 2 in-phase), and the amplitude-phase interplay destabilises
 * q = 1 too: the guiding system's reduced Jacobian has a positive eigenvalue (+0.26 in slow
 * time, computed here by the engine), and the full system leaves q = 1.
 */
const nodes = 7;

function ring(strength: number, q: number) {
  return new CoSimulation(
    makeScenario({
      nodes,
      twoWay: true,
      epsilon: 0.01,
      modes: [{ omega: 1, gain: 1, loss: 0 }],
      coupling: { strength, reactive: 0, dissipative: 1 },
      initial: { state: stateFromAmplitudes(twistedAmplitudes(nodes, q, 2), [1], 0.02, 17 + q) },
      stepsPerPeriod: 32,
    }),
  );
}

describe('twisted states on a 7-node two-way ring', () => {
  test('weak coupling (kappa sigma = 0.05 g): a start near q = 1 stays locked at q = 1', () => {
    const session = ring(0.05, 1);
    const last = session.runUntil(60 / 0.01)!;
    expect(last.full.pattern.locked).toBe(true);
    expect(last.full.pattern.kind).toBe('rotating-wave');
    expect(last.full.pattern.q).toBe(1);
    // the guide agrees and calls it stable
    expect(last.guide.pattern.q).toBe(1);
    expect(last.guide.margin).not.toBeNull();
    expect(last.guide.margin!).toBeLessThan(0);
  });

  test('weak coupling: a start near q = 2 leaves it', () => {
    const session = ring(0.05, 2);
    let leftAt: number | null = null;
    session.runUntil(400 / 0.01, (frame) => {
      const p = frame.full.pattern;
      if (leftAt === null && frame.tau > 10 / 0.01 && (p.shape !== 'rotating-wave' || p.q !== 2)) leftAt = frame.tau;
    });
    expect(leftAt).not.toBeNull();
    const final = session.step()!;
    expect(final.full.pattern.q === 2 && final.full.pattern.shape === 'rotating-wave').toBe(false);
  });

  test('strong coupling (kappa sigma = g): the amplitude dynamics destabilise q = 1 as well', () => {
    const session = ring(1, 1);
    const early = session.runUntil(5 / 0.01)!;
    // the guide, still near the twisted state, predicts it unstable
    expect(early.full.pattern.q).toBe(1);
    let left = false;
    session.runUntil(200 / 0.01, (frame) => {
      if (frame.full.pattern.shape !== 'rotating-wave' || frame.full.pattern.q !== 1) left = true;
    });
    expect(left).toBe(true);
  });
});
