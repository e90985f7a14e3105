import { describe, expect, test } from 'vitest';
import { ModelParameters } from '../../../src/model/parameters.js';
import { makeScenario } from '../../support/scenarios.js';

const scenario = makeScenario({
  nodes: 3,
  twoWay: true,
  epsilon: 1e-3,
  modes: [{ omega: 1, gain: 1, loss: 0.1 }],
  coupling: { strength: 0.3, reactive: 0.2, dissipative: 1 },
});

describe('mutable parameter values', () => {
  test('survive JSON onto another parameter set, link weight sums included', () => {
    const a = new ModelParameters(scenario);
    a.detuning.set([0.5, -0.25, 0.125]);
    a.setLinkWeight(0, 0); // ring links: link 0 carries node 2 into node 0
    a.strength = 0.7;
    a.reactive = -0.1;
    a.dissipative = 0.9;
    a.noiseIntensity = 1e-6;
    a.detuningWalk = 2e-3;
    const b = new ModelParameters(scenario);
    b.restoreValues(JSON.parse(JSON.stringify(a.mutableValues())));
    expect(Array.from(b.detuning)).toEqual([0.5, -0.25, 0.125]);
    expect(b.linkWeight[0]).toBe(0);
    expect([b.strength, b.reactive, b.dissipative, b.noiseIntensity, b.detuningWalk]).toEqual([0.7, -0.1, 0.9, 1e-6, 2e-3]);
    // node 0 keeps only its link from node 1: in-weight 1; the others keep both links
    expect(Array.from(b.inWeightSum)).toEqual([1, 2, 2]);
  });

  test('values of another network are refused', () => {
    const other = new ModelParameters(makeScenario({ nodes: 4, twoWay: true, epsilon: 1e-3, modes: [{ omega: 1, gain: 1, loss: 0.1 }] }));
    expect(() => new ModelParameters(scenario).restoreValues(other.mutableValues())).toThrow(RangeError);
  });
});
