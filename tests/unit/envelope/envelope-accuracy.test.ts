import { describe, expect, test } from 'vitest';
import { MicroStepper } from '../../../src/integrate/micro-stepper.js';
import { EnvelopeSystem } from '../../../src/envelope/envelope-system.js';
import { Random } from '../../../src/util/random.js';
import { logLogSlope } from '../../support/states.js';
import { compiled, relativeGap, ringOfFour } from './problems.js';

/**
 * Second-order averaging with near-identity reconstruction (Sanders, Verhulst, Murdock 2007,
 * second-order periodic averaging): away from resonance the rebuilt full state stays within
 * O(eps^2) of the true solution for tau in [0, L/eps], at a cost per slow time unit that does not
 * depend on eps. The reference is micro-stepping at 64 steps per period, whose own error here is
 * far below the envelope's (RK4 at S steps per period: about 8.4e5 eps^2 / S^4 relative per 1000
 * periods; README, 'Integrators and their error bounds').
 */
const EPSILONS = [4e-3, 2e-3, 1e-3, 5e-4];
const TICKS = 100;

interface Run {
  worst: number;
  final: number;
  slowEvaluations: number;
  largestIndicator: number;
}

function runAgainstMicro(epsilon: number, omega1 = 1.37): Run {
  const { params, y0 } = compiled(ringOfFour(epsilon, omega1));
  const micro = new MicroStepper(params, y0, 64);
  const envelope = new EnvelopeSystem(params, y0, 0, new Random(1));
  const span = 2 / epsilon;
  let worst = 0;
  let final = 0;
  let largestIndicator = 0;
  for (let k = 1; k <= TICKS; k++) {
    const tau = (span * k) / TICKS;
    micro.advance(tau);
    expect(envelope.advance(tau).ok).toBe(true);
    final = relativeGap(envelope.state, micro.state);
    worst = Math.max(worst, final);
    largestIndicator = Math.max(largestIndicator, envelope.health.indicator);
  }
  return { worst, final, slowEvaluations: envelope.slowEvaluations, largestIndicator };
}

describe('envelope mode against micro-stepping (omega_1 = 1.37, away from resonance)', () => {
  const runs = EPSILONS.map((eps) => runAgainstMicro(eps));

  test('the largest full-state error over tau in [0, 2/eps] falls like eps^2 (fitted slope 2 +/- 0.3)', () => {
    const slope = logLogSlope(
      EPSILONS,
      runs.map((r) => r.worst),
    );
    expect(slope).toBeGreaterThan(1.7);
    expect(slope).toBeLessThan(2.3);
    // and the error is small in absolute terms: a few eps^2 (first order would be a few eps)
    runs.forEach((r, i) => expect(r.worst).toBeLessThan(20 * EPSILONS[i] ** 2));
  });

  test('the number of slow right-hand-side evaluations over tau = 2/eps does not grow as eps shrinks', () => {
    const counts = runs.map((r) => r.slowEvaluations);
    for (let i = 1; i < counts.length; i++) expect(counts[i]).toBeLessThanOrEqual(Math.ceil(1.05 * counts[0]));
    // a few hundred at most, against 64 x 4 evaluations per carrier period for the micro steps
    expect(Math.max(...counts)).toBeLessThan(400);
  });

  test('the first- vs second-order reconstruction indicator scales like eps and its square bounds the error', () => {
    const slope = logLogSlope(
      EPSILONS,
      runs.map((r) => r.largestIndicator),
    );
    expect(slope).toBeGreaterThan(0.9);
    expect(slope).toBeLessThan(1.1);
    // indicator^2 estimates the neglected O(eps^2) terms: the real error is of that order
    // (common practice for asymptotic series: the first neglected term sizes the error)
    for (const r of runs) {
      const ratio = r.worst / r.largestIndicator ** 2;
      expect(ratio).toBeGreaterThan(0.3);
      expect(ratio).toBeLessThan(15);
    }
  });
});

describe('the indicator near a resonance', () => {
  test('grows like 1 / |omega_0 - omega_1| as the modes approach 1:1', () => {
    const eps = 1e-4;
    const gaps = [0.2, 0.1, 0.05, 0.025];
    const indicators = gaps.map((gap) => {
      const { params, y0 } = compiled(ringOfFour(eps, 1 + gap));
      return new EnvelopeSystem(params, y0, 0, new Random(1)).probe(y0, 0).indicator;
    });
    // u carries f_m / (m.omega) and the (1, -1) harmonic dominates as its divisor shrinks
    const slope = logLogSlope(gaps, indicators);
    expect(slope).toBeLessThan(-0.8);
    expect(slope).toBeGreaterThan(-1.2);
  });
});
