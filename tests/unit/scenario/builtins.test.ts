import { describe, expect, test } from 'vitest';
import { parseScenario, scenarioToJSON } from '../../../src/scenario/index.js';
import { builtInScenarioNames, builtInScenarioRaw, loadBuiltInScenario } from '../../../src/scenarios/index.js';

describe('built-in scenarios', () => {
  test('the three scenarios are listed, demo first', () => {
    expect(builtInScenarioNames).toEqual(['timing-board-8', 'ring-one-way-5', 'pair-adler']);
  });

  test('the demo loads with the expected sizes and mapped values', () => {
    const s = loadBuiltInScenario('timing-board-8');
    expect(s.name).toBe('Timing board, 8 resonators');
    expect(s.nodes).toBe(8);
    expect(s.modes).toHaveLength(2);
    expect(s.topology).toBe('ring-two-way');
    expect(s.links).toHaveLength(16); // two links into each of 8 nodes (docs/model.md, 'Reference model')
    expect(s.detuning).toHaveLength(8);
    expect(s.units.nominalFrequencyHz).toBe(10e6);
    // The demo is described by its parts (docs/parts.md); hand arithmetic on its nominal crystal,
    // f_s = 9 996 925 Hz, R1 = 12 ohm, C1 = 12 fF, C0 = 3.5 pF, C_L = 16 pF, R_n = -100 ohm:
    //   L1 = 1 / ((2 pi 9 996 925)^2 12e-15) = 1 / (3.945414e15 * 12e-15) = 21.12157 mH; 2 pi f0 L1 = 1.327107e6 ohm at f0 = 10 MHz
    //   d_0 = R1 / (eps 2 pi f0 L1) = 12 / 13.27107 = 0.904222 (the nodes' f_s tolerances move L1 by a few 1e-6)
    //   m = 100 (16 / 19.5)^2 / 12 = 100 * 0.6732413 / 12 = 5.61034 at the nominal load (the trims move it by about 1 %)
    //   spurious: f_s,1 = 10 028 925 Hz, C1 = 4 fF: 12e-15/39e-12 = 307.692 ppm and 4e-15/39e-12 = 102.564 ppm of pulling,
    //   so omega_1 = 1.0032009 * 1.000102564 / 1.000307692 = 1.0029955 (hand: 3200.9 + 102.6 - 307.7 - cross terms)
    expect(s.modes[0]!.omega).toBe(1);
    expect(s.modes[0]!.loss).toBeCloseTo(0.904222, 5);
    expect(s.modes[0]!.gain / s.modes[0]!.loss).toBeCloseTo(5.61034, 1);
    expect(s.modes[1]!.omega).toBeCloseTo(1.0029955, 6);
    // shared 5.8 ohm + 13.7 nF branch: P = (t / 2) |Z| / (2 pi f0 L1) with |Z| = hypot(5.8, 1/(2 pi 1e7 13.7e-9) = 1.16171) = 5.91520:
    //   0.6732413 / 2 * 5.91520 / 1.327107e6 = 1.50039e-6 (the trims move t by about 0.1 %); kappa = 2 P / eps = 0.300
    expect(s.coupling.strength).toBeCloseTo(0.3, 2);
    expect(s.coupling.reactive / s.coupling.dissipative).toBeCloseTo(1.16171 / 5.8, 4); // tan alpha = -X / R
    // trimmed detunings stay within 0.3 ppm: Delta = ppm 1e-6 / eps (README, 'Units')
    for (const d of s.detuning) expect(Math.abs(d * 1e-5 * 1e6)).toBeLessThan(0.3);
    // a plausible 10 MHz crystal oscillator (values from memory, README 'Noise of the parts'): the same part noise on every node
    const part = { h2: 2e-30, h0: 5e-23, hm1: 7e-23, hm2: 1.5e-24 };
    expect(s.noise).toEqual({ intensity: 0, seed: 2026, detuningWalk: 0, parts: new Array(8).fill(part) });
    // SP 1065 Allan variance of one part at 1 s, by hand: 5e-23 / 2 + 2 ln 2 * 7e-23 + (2 pi^2 / 3) * 1.5e-24 = 1.320e-22
    // (white PM adds 3 fh h2 / (4 pi^2) = 7.6e-19 at fh = 5 MHz only at tau well below 1 ms), so ADEV(1 s) = 1.15e-11
    const avar = part.h0 / 2 + 2 * Math.LN2 * part.hm1 + ((2 * Math.PI * Math.PI) / 3) * part.hm2;
    expect(Math.sqrt(avar)).toBeCloseTo(1.15e-11, 13);
    expect(s.initial).toEqual({ random: { seed: 5, amplitude: [1.0, 0.02] } });
    expect(s.integrator.macroPeriods).toBe(159); // round(1 / (2 pi 100 * 1e-5)) by hand
  });

  test('the one-way ring and the pair have their stated shape', () => {
    const ring = loadBuiltInScenario('ring-one-way-5');
    expect(ring.links).toHaveLength(5);
    expect(ring.initial).toEqual({ pattern: { q: 1, amplitude: 2, mode: 0 } });
    const pair = loadBuiltInScenario('pair-adler');
    expect(pair.links).toEqual([
      { from: 0, to: 1, weight: 1 },
      { from: 1, to: 0, weight: 1 },
    ]);
    expect(pair.detuning).toEqual([0.005, -0.005]);
  });

  test.each(builtInScenarioNames)('%s survives scenarioToJSON -> JSON text -> parseScenario', (name) => {
    // a scenario made from parts keeps its derivation in `parts`; its JSON is the derived model alone
    const { parts: _parts, ...s } = loadBuiltInScenario(name);
    const json = scenarioToJSON(s);
    const text = JSON.stringify(json);
    expect(text).not.toMatch(/Ppm|quality|parts/);
    expect(parseScenario(JSON.parse(text))).toEqual(s);
  });

  test('scenarioToJSON round-trips an explicit state and an edge list', () => {
    const s = parseScenario({
      name: 'explicit',
      nodes: 2,
      topology: { edges: [[1, 0, 0.25]] },
      epsilon: 2e-3,
      modes: [
        { omega: 1, gain: 1, loss: 0.1 },
        { omega: 1.7, gain: 0.5, loss: 0 },
      ],
      coupling: { strength: 0.1, reactive: -0.3, dissipative: 1 },
      initial: {
        state: [
          [
            { x: 1, xdot: 0 },
            { x: 0.1, xdot: -0.2 },
          ],
          [
            { x: -1, xdot: 0.5 },
            { x: 0, xdot: 0 },
          ],
        ],
      },
      integrator: { stepsPerPeriod: 32, macroPeriods: 7, averagingGrid: 12 },
    });
    const json = scenarioToJSON(s);
    expect(json.topology).toEqual({ edges: [[1, 0, 0.25]] });
    expect(parseScenario(JSON.parse(JSON.stringify(json)))).toEqual(s);
  });

  test('builtInScenarioRaw returns a fresh copy each time', () => {
    const raw = builtInScenarioRaw('pair-adler') as { nodes: number };
    raw.nodes = 99;
    expect((builtInScenarioRaw('pair-adler') as { nodes: number }).nodes).toBe(2);
  });

  test('an unknown name lists the available ones', () => {
    expect(() => loadBuiltInScenario('timing-board')).toThrow(
      'unknown built-in scenario "timing-board"; available: timing-board-8, ring-one-way-5, pair-adler',
    );
  });
});
