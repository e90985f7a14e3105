import { describe, expect, test } from 'vitest';
import { EnvelopeSystem } from '../../../src/envelope/envelope-system.js';
import { CoSimulation } from '../../../src/session/session.js';
import { Random } from '../../../src/util/random.js';
import { compiled, ringOfFour } from './problems.js';

/**
 * Small divisors: near p omega_0 = q omega_1 the harmonic (p, -q) has |m.omega| = |p omega_0 - q omega_1|
 * and the near-identity correction eps f_m / (m.omega) is no longer small, so the envelope must
 * refuse within some tens of eps of 1:1, 1:3, 3:1 (docs/model.md, 'Integrators': small divisors).
 */
describe('the envelope refuses near a resonance', () => {
  const eps = 1e-3;

  test('near 1:1 (omega_1 = 1 + 10 eps) it refuses the first tick, names the harmonic, and changes nothing', () => {
    const { params, y0 } = compiled(ringOfFour(eps, 1 + 10 * eps, { noise: { intensity: 1e-6, seed: 4 } }));
    const random = new Random(11);
    const envelope = new EnvelopeSystem(params, y0, 0, random);
    const before = { state: Array.from(envelope.state), random: random.getState() };
    const outcome = envelope.advance(50);
    expect(outcome.ok).toBe(false);
    expect(outcome.fallBack).toBe(true);
    expect(outcome.reason).toMatch(/small divisor: harmonic \(1, -1\) has \|m.omega\| = 0\.0100 = 10\.0 eps < 30 eps/);
    expect(Array.from(envelope.state)).toEqual(before.state);
    expect(envelope.tau).toBe(0);
    expect(random.getState()).toEqual(before.random);
  });

  test('near 3:1 (omega_1 = 3 + 10 eps) it names the harmonic (3, -1)', () => {
    const { params, y0 } = compiled(ringOfFour(eps, 3 + 10 * eps));
    const outcome = new EnvelopeSystem(params, y0, 0, new Random(1)).advance(50);
    expect(outcome.fallBack).toBe(true);
    expect(outcome.reason).toMatch(/harmonic \(3, -1\)/);
  });

  test('far from resonance (omega_1 = 1.37) it runs', () => {
    const { params, y0 } = compiled(ringOfFour(eps));
    const envelope = new EnvelopeSystem(params, y0, 0, new Random(1));
    expect(envelope.advance(50)).toMatchObject({ ok: true });
    expect(envelope.health.smallestDivisor).toBeCloseTo(0.37, 12);
    expect(envelope.health.harmonic).toBe('(1, -1)');
  });

  test('a session asked for the envelope near 1:1 micro-steps instead and says why, in its mode and its events', () => {
    const session = new CoSimulation(ringOfFour(eps, 1 + 10 * eps, { stepsPerPeriod: 16 }), { integrator: 'envelope' });
    const frame = session.step()!;
    expect(frame.mode).toBe('micro');
    expect(session.integrator.reason).toMatch(/not trusted here: small divisor: harmonic \(1, -1\)/);
    const refusal = frame.events.find((e) => e.kind === 'warning' && /envelope mode was requested but micro-stepping runs/.test(e.message));
    expect(refusal?.message).toMatch(/small divisor/);
    const auto = new CoSimulation(ringOfFour(eps, 1 + 10 * eps, { stepsPerPeriod: 16 }));
    expect(auto.step()!.mode).toBe('micro');
    expect(auto.integrator.reason).toMatch(/small divisor/);
  });
});

describe('validity is checked again after perturbations', () => {
  test('a large kick makes the forced envelope untrustworthy: micro-stepping takes over at that tick', () => {
    const eps = 1e-3;
    const session = new CoSimulation(ringOfFour(eps, 1.37, { stepsPerPeriod: 16, macroPeriods: 5 }), { integrator: 'envelope' });
    expect(session.runUntil(1 / eps)!.mode).toBe('envelope');
    // |f| grows like |y|^3, so the indicator eps |u| / |y| like |y|^2: an amplitude of 40 multiplies it by hundreds
    session.submit({ action: 'kick-mode', node: 1, mode: 0, amount: 40 }, 'op');
    const frame = session.step()!;
    expect(frame.mode).toBe('micro');
    const warning = frame.events.find((e) => e.kind === 'warning');
    expect(warning?.message).toMatch(/envelope mode stops at tau = .*micro-stepping takes over: .*indicator .* is above 0\.01/);
    expect(frame.status).toBe('running');
  });

  test("in 'auto' a kick sends the session to micro steps and it returns to the envelope once the kick has relaxed", () => {
    const eps = 1e-5;
    const session = new CoSimulation(ringOfFour(eps, 1.37, { stepsPerPeriod: 16, macroPeriods: 159 }));
    expect(session.runUntil(1 / eps)!.mode).toBe('envelope');
    expect(session.integrator.reason).toMatch(/valid .* times cheaper than micro-stepping/);
    session.submit({ action: 'kick-mode', node: 2, mode: 0, amount: 10 }, 'op');
    const kicked = session.step()!;
    expect(kicked.mode).toBe('micro');
    expect(kicked.events.some((e) => e.kind === 'warning' && /estimated error .* is above 1e-8/.test(e.message))).toBe(true);
    const events: string[] = [];
    const last = session.runUntil(5 / eps, (f) => f.events.forEach((e) => events.push(`${e.kind}: ${e.message}`)))!;
    expect(last.mode).toBe('envelope');
    expect(events.some((e) => /^control: envelope mode \(second-order averaging, near-identity reconstruction\) from tau/.test(e))).toBe(
      true,
    );
  });
});
