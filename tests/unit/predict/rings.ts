import { GuideModel } from '../../../src/predict/guide-model.js';
import { makeScenario } from '../../support/scenarios.js';

/** Guide model of a ring of identical van der Pol nodes (g = 1, d = 0, omega = 1) for the predict tests. */
export function ringModel(options: {
  nodes: number;
  twoWay: boolean;
  strength: number;
  dissipative?: number;
  reactive?: number;
  epsilon?: number;
  detuning?: number[];
}): GuideModel {
  return new GuideModel(
    makeScenario({
      nodes: options.nodes,
      twoWay: options.twoWay,
      epsilon: options.epsilon ?? 1e-5,
      modes: [{ omega: 1, gain: 1, loss: 0 }],
      coupling: { strength: options.strength, reactive: options.reactive ?? 0, dissipative: options.dissipative ?? 1 },
      detuning: options.detuning,
    }),
  );
}

export const TWO_PI = 2 * Math.PI;
