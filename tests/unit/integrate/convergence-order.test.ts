import { expect, test } from 'vitest';
import { ModelParameters } from '../../../src/model/parameters.js';
import { MicroStepper } from '../../../src/integrate/micro-stepper.js';
import { makeScenario } from '../../support/scenarios.js';
import { logLogSlope, stateFromAmplitudes } from '../../support/states.js';
import { rotatingFromOriginal } from '../../../src/model/coordinates.js';

/**
 * Observed order of the micro-step integrator against a fine reference (same method at 1024
 * steps per period, whose own error is below 1e-14 here). Classic RK4 has order 4 (Hairer,
 * Norsett, Wanner, Solving ODEs I, II.1); the observed order must be within 0.3 of it.
 */
test('observed convergence order of the micro stepper is 4 +/- 0.3', () => {
  const scenario = makeScenario({
    nodes: 4,
    twoWay: true,
    epsilon: 0.02,
    modes: [
      { omega: 1, gain: 1, loss: 0.2 },
      { omega: 1.37, gain: 0.8, loss: 0.1 },
    ],
    coupling: { strength: 0.4, reactive: 0.3, dissipative: 0.6 },
    detuning: [0.2, -0.1, 0.15, -0.25],
  });
  const params = new ModelParameters(scenario);
  const start = rotatingFromOriginal(
    params,
    0,
    stateFromAmplitudes(
      [0, 1, 2, 3].map((k) => [
        { re: 1.5 * Math.cos(k), im: 1.5 * Math.sin(k) },
        { re: 0.4, im: 0.1 * k },
      ]),
      [1, 1.37],
    ),
  );
  const end = 2 * Math.PI * 50;
  const run = (steps: number) => {
    const stepper = new MicroStepper(params, start, steps);
    stepper.advance(end);
    return stepper.state;
  };
  const reference = run(1024);
  // Below about 16 steps per period the error is still pre-asymptotic (the harmonics of the
  // field, up to 4 omega_1, are barely resolved), so the order is measured from 16 to 64.
  const counts = [16, 24, 32, 48, 64];
  const errors = counts.map((steps) => {
    const y = run(steps);
    return Math.max(...y.map((v, i) => Math.abs(v - reference[i])));
  });
  const order = logLogSlope(
    counts.map((s) => 1 / s),
    errors,
  );
  expect(order).toBeGreaterThan(3.7);
  expect(order).toBeLessThan(4.3);
});
