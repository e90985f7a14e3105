import { describe, expect, test } from 'vitest';
import { CoSimulation } from '../../../src/session/session.js';
import { ModelParameters } from '../../../src/model/parameters.js';
import { MicroStepper } from '../../../src/integrate/micro-stepper.js';
import { GuideSystem } from '../../../src/guide/guide.js';
import { initialRotatingState } from '../../../src/model/initial.js';
import { originalFromRotating } from '../../../src/model/coordinates.js';
import { loadReference } from '../../support/reference-data.js';
import { makeScenario } from '../../support/scenarios.js';

/**
 * One node, one mode, no coupling: x'' + x = eps (1 - x^2) x', the van der Pol oscillator.
 * First-order averaging gives r' = (eps/2) r (1 - r^2/4) (Sanders, Verhulst, Murdock 2007), whose
 * solution is r(tau)^2 = 4 / (1 + (4/r0^2 - 1) e^{-eps tau}); the limit cycle has amplitude 2.
 */
const vdp = (epsilon: number, r0: number) =>
  makeScenario({
    nodes: 1,
    links: [],
    epsilon,
    modes: [{ omega: 1, gain: 1, loss: 0 }],
    initial: { state: [[{ x: r0, xdot: 0 }]] },
    macroPeriods: 10,
  });

const averagedRadius = (eps: number, r0: number, tau: number) => Math.sqrt(4 / (1 + (4 / (r0 * r0) - 1) * Math.exp(-eps * tau)));

describe('van der Pol oscillator', () => {
  test('the guiding system follows the averaged growth law to 1e-8', () => {
    const scenario = vdp(0.01, 0.3);
    const params = new ModelParameters(scenario);
    const guide = new GuideSystem(params, initialRotatingState(scenario, params), 8);
    for (const tau of [50, 200, 500, 1000, 3000]) {
      guide.advance(tau);
      const r = Math.hypot(guide.state[0], guide.state[1]);
      expect(Math.abs(r - averagedRadius(0.01, 0.3, tau))).toBeLessThan(1e-8);
    }
  });

  test('the full system grows to the limit cycle of amplitude 2 and tracks the growth law to O(eps)', () => {
    const eps = 0.01;
    const session = new CoSimulation(vdp(eps, 0.3));
    let worst = 0;
    session.runUntil(2000, (frame) => {
      worst = Math.max(worst, Math.abs(frame.full.amplitude[0][0] - averagedRadius(eps, 0.3, frame.tau)));
    });
    expect(worst).toBeLessThan(3 * eps);
    const last = session.step()!;
    expect(Math.abs(last.full.amplitude[0][0] - 2)).toBeLessThan(2 * eps);
    expect(Math.abs(last.guide.amplitude[0][0] - 2)).toBeLessThan(1e-6);
  });

  test('at eps = 0.1 the full system matches SciPy DOP853 to 1e-7 (tests/reference, van-der-pol case)', () => {
    const reference = loadReference('van-der-pol');
    const { scenario } = reference;
    const params = new ModelParameters(scenario);
    const stepper = new MicroStepper(params, initialRotatingState(scenario, params), scenario.integrator.stepsPerPeriod);
    let worst = 0;
    for (const sample of reference.samples.slice(1)) {
      stepper.advance(sample.tau);
      const state = originalFromRotating(params, stepper.tau, stepper.state);
      worst = Math.max(worst, Math.abs(state[0][0].x - sample.state[0][0].x), Math.abs(state[0][0].xdot - sample.state[0][0].xdot));
    }
    expect(worst).toBeLessThan(1e-7);
  });
});
