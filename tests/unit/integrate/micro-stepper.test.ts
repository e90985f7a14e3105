import { describe, expect, test } from 'vitest';
import { ModelParameters } from '../../../src/model/parameters.js';
import { MicroStepper } from '../../../src/integrate/micro-stepper.js';
import { initialRotatingState } from '../../../src/model/initial.js';
import { originalFromRotating, rotatingFromOriginal } from '../../../src/model/coordinates.js';
import { makeScenario } from '../../support/scenarios.js';

const TWO_PI = 2 * Math.PI;

describe('micro stepper (RK4 in the rotating frame)', () => {
  test('eps = 0: the oscillation keeps its amplitude to 1e-12 relative over 1e6 periods', () => {
    // The harmonic oscillator x'' + omega^2 x = 0 conserves x^2 + (x'/omega)^2 exactly
    // (elementary mechanics); a scheme with numerical damping would lose it period by period.
    const scenario = makeScenario({
      nodes: 2,
      twoWay: true,
      epsilon: 0,
      modes: [{ omega: 1, gain: 1, loss: 0.5 }],
      coupling: { strength: 1, reactive: 1, dissipative: 1 },
      initial: { state: [[{ x: 1.7, xdot: -0.4 }], [{ x: -0.3, xdot: 2.1 }]] },
      stepsPerPeriod: 8,
    });
    const params = new ModelParameters(scenario);
    const stepper = new MicroStepper(params, initialRotatingState(scenario, params), 8);
    const periods = 1e6;
    const chunk = 1e4;
    for (let p = chunk; p <= periods; p += chunk) stepper.advance(TWO_PI * p);
    expect(stepper.evaluations).toBe(4 * 8 * periods);
    const end = originalFromRotating(params, stepper.tau, stepper.state);
    const start = scenario.initial as { state: { x: number; xdot: number }[][] };
    for (let k = 0; k < 2; k++) {
      const e0 = start.state[k][0].x ** 2 + start.state[k][0].xdot ** 2;
      const e1 = end[k][0].x ** 2 + end[k][0].xdot ** 2;
      expect(Math.abs(Math.sqrt(e1 / e0) - 1)).toBeLessThan(1e-12);
      // and the phase is exact too: after whole periods the state is back where it began
      expect(Math.abs(end[k][0].x - start.state[k][0].x)).toBeLessThan(1e-9);
    }
  });

  test('coordinates round trip at an arbitrary tau', () => {
    const scenario = makeScenario({
      nodes: 3,
      epsilon: 1e-3,
      modes: [
        { omega: 1, gain: 1, loss: 0 },
        { omega: 1.37, gain: 1, loss: 0 },
      ],
    });
    const params = new ModelParameters(scenario);
    const y = Float64Array.from({ length: 12 }, (_, i) => Math.sin(1 + i * 0.7));
    const back = rotatingFromOriginal(params, 123.456, originalFromRotating(params, 123.456, y));
    for (let i = 0; i < 12; i++) expect(back[i]).toBeCloseTo(y[i], 13);
  });
});
