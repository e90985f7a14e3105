import { describe, expect, test } from 'vitest';
import { CoSimulation } from '../../../src/session/session.js';
import { wrapAngle } from '../../../src/util/angles.js';
import { makeScenario } from '../../support/scenarios.js';

/**
 * Adler, "A Study of Locking Phenomena in Oscillators", Proc. IRE 34 (1946): the phase difference
 * obeys psi' = dw - K sin psi, locks at sin psi = dw / K when |dw| <= K and otherwise slips at
 * the beat frequency sqrt(dw^2 - K^2). For two nodes of the reference model with two-way
 * dissipative coupling and equal amplitudes, dw = eps omega (Delta_0 - Delta_1) and
 * K = eps kappa sigma (derived in docs/model.md, 'Adler pair'; valid for kappa sigma << g).
 */
const eps = 0.005;
const coupling = 0.05; // kappa sigma, small against g = 1
const K = eps * coupling;

function pair(ratio: number) {
  // Delta_0 - Delta_1 = ratio * kappa sigma / omega, so dw = ratio * K
  const half = (ratio * coupling) / 2;
  return new CoSimulation(
    makeScenario({
      nodes: 2,
      twoWay: true,
      epsilon: eps,
      modes: [{ omega: 1, gain: 1, loss: 0 }],
      coupling: { strength: coupling, reactive: 0, dissipative: 1 },
      detuning: [half, -half],
      initial: { pattern: { q: 0, amplitude: 2, mode: 0 } },
      stepsPerPeriod: 32,
      macroPeriods: 4,
    }),
  );
}

/** psi = arg a_0 - arg a_1 from a frame. */
const psiOf = (phase: number[][]) => wrapAngle(phase[0][0] - phase[1][0]);

describe('Adler locking of a detuned pair', () => {
  test.each([0.4, 0.7, 0.9])('dw = %s K locks at sin psi = dw / K (within 3%)', (ratio) => {
    const session = pair(ratio);
    const last = session.runUntil(12 / K)!;
    expect(last.full.pattern.locked).toBe(true);
    const psi = psiOf(last.full.phase);
    expect(Math.abs(Math.sin(psi) - ratio)).toBeLessThan(0.03 * ratio);
  });

  test.each([1.3, 1.6, 2.2])('dw = %s K beats at sqrt(dw^2 - K^2) (within 3%)', (ratio) => {
    const session = pair(ratio);
    const expected = Math.sqrt(ratio * ratio - 1) * K;
    const settle = 2 / K;
    session.runUntil(settle);
    // follow the unwrapped phase difference over about four beats
    let unwrapped = 0;
    let previous = psiOf(session.step()!.full.phase);
    const tauStart = session.tau;
    const span = (4 * 2 * Math.PI) / expected;
    session.runUntil(tauStart + span, (frame) => {
      const psi = psiOf(frame.full.phase);
      unwrapped += wrapAngle(psi - previous);
      previous = psi;
      expect(frame.full.pattern.locked).toBe(false);
    });
    const measured = Math.abs(unwrapped) / (session.tau - tauStart);
    expect(Math.abs(unwrapped)).toBeGreaterThan(3.5 * 2 * Math.PI);
    expect(Math.abs(measured - expected) / expected).toBeLessThan(0.03);
  });
});
