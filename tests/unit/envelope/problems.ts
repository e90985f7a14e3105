import { ModelParameters } from '../../../src/model/parameters.js';
import { initialRotatingState } from '../../../src/model/initial.js';
import type { Scenario } from '../../../src/scenario/types.js';
import { makeScenario } from '../../support/scenarios.js';
import { stateFromAmplitudes } from '../../support/states.js';

/** Invented test problems for the envelope: two-mode two-way rings away from (or near) resonance. */

const START = [
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

/** A 4-node two-way ring with two modes (omega_1 = 1.37 unless given) started from fixed amplitudes. */
export function ringOfFour(epsilon: number, omega1 = 1.37, extra: Partial<Parameters<typeof makeScenario>[0]> = {}): Scenario {
  return makeScenario({
    nodes: 4,
    twoWay: true,
    epsilon,
    modes: [
      { omega: 1, gain: 1, loss: 0.2 },
      { omega: omega1, gain: 0.8, loss: 0.1 },
    ],
    coupling: { strength: 0.4, reactive: 0.3, dissipative: 0.6 },
    detuning: [0.2, -0.1, 0.15, -0.25],
    initial: { state: stateFromAmplitudes(START, [1, omega1]) },
    stepsPerPeriod: 64,
    ...extra,
  });
}

export function compiled(scenario: Scenario): { params: ModelParameters; y0: Float64Array } {
  const params = new ModelParameters(scenario);
  return { params, y0: initialRotatingState(scenario, params) };
}

/** max |a - b| / max |b| */
export function relativeGap(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let gap = 0;
  let size = 0;
  for (let i = 0; i < b.length; i++) {
    gap = Math.max(gap, Math.abs(a[i] - b[i]));
    size = Math.max(size, Math.abs(b[i]));
  }
  return gap / size;
}
