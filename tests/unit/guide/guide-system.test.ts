import { describe, expect, test } from 'vitest';
import { ModelParameters } from '../../../src/model/parameters.js';
import { initialRotatingState } from '../../../src/model/initial.js';
import { GuideSystem } from '../../../src/guide/guide.js';
import { makeScenario } from '../../support/scenarios.js';

const scenario = makeScenario({
  nodes: 4,
  twoWay: true,
  epsilon: 0.01,
  modes: [{ omega: 1, gain: 1, loss: 0 }],
  coupling: { strength: 0.2, reactive: 0.1, dissipative: 1 },
  detuning: [0.1, -0.05, 0, 0.02],
});

function guide(): GuideSystem {
  const params = new ModelParameters(scenario);
  return new GuideSystem(params, initialRotatingState(scenario, params), 8);
}

describe('guiding system: restore', () => {
  test('a guide restored from another one (state, clock, next step) continues bit for bit like it', () => {
    const straight = guide();
    straight.advance(300);
    const saved = { state: Float64Array.from(straight.state), tau: straight.tau, failed: straight.failed, nextStep: straight.nextStep };
    expect(saved.nextStep).toBeGreaterThan(0);
    const other = guide();
    other.advance(170); // somewhere else, with a step of its own
    other.restore(saved);
    expect(other.tau).toBe(300);
    expect(other.nextStep).toBe(saved.nextStep);
    for (const tau of [400, 500, 650]) {
      straight.advance(tau);
      other.advance(tau);
    }
    expect(Array.from(other.state)).toEqual(Array.from(straight.state));
  });

  test('a guide restored as failed keeps its state and only moves its clock', () => {
    const g = guide();
    const state = Float64Array.from(g.state);
    g.restore({ state, tau: 50, failed: true, nextStep: 0 });
    expect(g.advance(120)).toBe(false);
    expect(g.tau).toBe(120);
    expect(Array.from(g.state)).toEqual(Array.from(state));
    expect(() => g.restore({ state: new Float64Array(2), tau: 0, failed: false, nextStep: 0 })).toThrow(RangeError);
  });
});
