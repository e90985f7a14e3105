import { describe, expect, test } from 'vitest';
import { parseScenario, scenarioToJSON } from '../../../src/scenario/index.js';

const minimal = (extra: Record<string, unknown> = {}) => ({
  nodes: 4,
  topology: 'ring-two-way',
  epsilon: 1e-3,
  modes: [{ omega: 1, gain: 1, loss: 0 }],
  coupling: { strength: 0.1 },
  ...extra,
});

describe('defaults', () => {
  // the defaults are the ones fixed in the brief for this module (common practice for the project)
  test('a minimal scenario gets every documented default', () => {
    const s = parseScenario(minimal());
    expect(s.name).toBe('Untitled scenario');
    expect(s.coupling).toEqual({ strength: 0.1, reactive: 0, dissipative: 0 });
    expect(s.detuning).toEqual([0, 0, 0, 0]);
    expect(s.noise).toEqual({ intensity: 0, seed: 1, detuningWalk: 0 });
    expect(s.initial).toEqual({ random: { seed: 1, amplitude: 0.1 } });
    expect(s.units).toEqual({ nominalFrequencyHz: 10e6, nominalFrequencyAssumed: true });
    // macroPeriods = max(1, round(1 / (2 pi 100 eps))): 1 / (0.2 pi) = 1.59 -> 2 (hand arithmetic)
    // 8 ceil(1700 sqrt(1e-3) / 8) = 8 ceil(6.72) = 56
    expect(s.integrator).toEqual({ stepsPerPeriod: 56, macroPeriods: 2, averagingGrid: 8 });
  });

  test.each([
    [0, 1], // stated special case
    [1e-5, 159], // 1 / (2 pi 1e-3) = 159.15 (hand arithmetic)
    [1e-4, 16], // 15.92 -> 16
    [0.5, 1], // 0.0032 -> 0 -> clamped to 1
  ])('default macroPeriods at eps = %s is %s', (eps, expected) => {
    expect(parseScenario(minimal({ epsilon: eps })).integrator.macroPeriods).toBe(expected);
  });

  test('given integrator fields override only themselves', () => {
    const s = parseScenario(minimal({ integrator: { stepsPerPeriod: 64 } }));
    expect(s.integrator).toEqual({ stepsPerPeriod: 64, macroPeriods: 2, averagingGrid: 8 });
  });

  test('noise.detuningWalk defaults to 0 when noise is given', () => {
    const s = parseScenario(minimal({ noise: { intensity: 1e-9, seed: 99 } }));
    expect(s.noise).toEqual({ intensity: 1e-9, seed: 99, detuningWalk: 0 });
  });

  test('pattern.mode defaults to 0', () => {
    const s = parseScenario(minimal({ initial: { pattern: { q: 2, amplitude: 1.5 } } }));
    expect(s.initial).toEqual({ pattern: { q: 2, amplitude: 1.5, mode: 0 } });
  });

  test('eps = 0 is allowed for pure harmonic runs', () => {
    expect(parseScenario(minimal({ epsilon: 0 })).epsilon).toBe(0);
  });
});

describe('engineering-unit fields are mapped to the dimensionless model', () => {
  test('detuningPpm becomes Delta = ppm * 1e-6 / eps', () => {
    // hand arithmetic: 2 ppm / 1e-5 = 0.2, -0.5 ppm / 1e-5 = -0.05 (README, 'Units')
    const s = parseScenario(minimal({ epsilon: 1e-5, detuningPpm: [2, -0.5, 0, 1] }));
    expect(s.detuning[0]).toBeCloseTo(0.2, 14);
    expect(s.detuning[1]).toBeCloseTo(-0.05, 14);
    expect(s.detuning[2]).toBe(0);
    expect(s.detuning[3]).toBeCloseTo(0.1, 14);
  });

  test('offsetPpm is relative to mode 0, and mode 0 itself is relative to 1', () => {
    const s = parseScenario(
      minimal({
        modes: [
          { offsetPpm: 100, gain: 1, loss: 0 },
          { offsetPpm: 1500, gain: 1, loss: 0 },
        ],
      }),
    );
    // hand arithmetic: 1 + 1e-4, then (1 + 1e-4)(1 + 1.5e-3)
    expect(s.modes[0]!.omega).toBeCloseTo(1.0001, 15);
    expect(s.modes[1]!.omega).toBeCloseTo(1.0001 * 1.0015, 15);
  });

  test("quality uses the mode's own omega", () => {
    const s = parseScenario(
      minimal({
        epsilon: 1e-5,
        modes: [
          { omega: 2, gain: 1, quality: 1e5 },
          { omega: 3, gain: 1, loss: 0.25 },
        ],
      }),
    );
    // d = omega / (eps Q) = 2 / (1e-5 * 1e5) = 2 (hand arithmetic, Q definition: common practice)
    expect(s.modes[0]!.loss).toBeCloseTo(2, 14);
    expect(s.modes[1]!.loss).toBe(0.25);
  });

  test('the output never carries engineering fields except units.nominalFrequencyHz', () => {
    const s = parseScenario(minimal({ epsilon: 1e-5, nominalFrequencyHz: 32768, detuningPpm: [1, 0, 0, 0] }));
    expect(s.units).toEqual({ nominalFrequencyHz: 32768, nominalFrequencyAssumed: false });
    expect(Object.keys(s)).not.toContain('detuningPpm');
    expect(Object.keys(s.modes[0]!).sort()).toEqual(['gain', 'loss', 'omega']);
  });
});

describe('an assumed nominal frequency', () => {
  test('a scenario without nominalFrequencyHz is marked assumed, and its JSON form leaves the field out so the mark survives', () => {
    const assumed = parseScenario(minimal());
    const json = scenarioToJSON(assumed);
    expect('nominalFrequencyHz' in json).toBe(false);
    expect(parseScenario(JSON.parse(JSON.stringify(json))).units).toEqual({ nominalFrequencyHz: 10e6, nominalFrequencyAssumed: true });
    // the same 10 MHz written out is a given frequency, not an assumption
    const given = parseScenario(minimal({ nominalFrequencyHz: 10e6 }));
    expect(given.units.nominalFrequencyAssumed).toBe(false);
    expect(scenarioToJSON(given).nominalFrequencyHz).toBe(10e6);
  });
});

describe('purity', () => {
  test('the raw input is not modified and shares nothing with the result', () => {
    const raw = minimal({
      topology: {
        edges: [
          [0, 1, 1],
          [1, 2, 1],
        ],
      },
      detuning: [0.1, 0, 0, 0],
      initial: { state: [0, 1, 2, 3].map(() => [{ x: 1, xdot: 0 }]) },
    });
    const before = JSON.stringify(raw);
    const s = parseScenario(deepFreeze(structuredClone(raw)));
    s.detuning[0] = 9;
    expect(JSON.stringify(raw)).toBe(before);
    expect(scenarioToJSON(s).detuning[0]).toBe(9);
  });
});

function deepFreeze<T>(value: T): T {
  if (value !== null && typeof value === 'object') {
    for (const v of Object.values(value)) deepFreeze(v);
    Object.freeze(value);
  }
  return value;
}

describe('default micro step follows eps and the method that applies', () => {
  test.each([
    [1e-7, 5], // fitted Adams at 5 steps per period (eps <= 1e-4, one mode)
    [1e-5, 5],
    [1e-4, 5],
    [1e-3, 56], // RK4: 8 ceil(1700 sqrt(1e-3) / 8) = 8 ceil(6.72)
    [1e-2, 176], // 8 ceil(21.25)
    [0.5, 1024], // 8 ceil(150.3) = 1208, capped at 1024
  ])('eps = %s gives %s steps per period', (eps, expected) => {
    // arithmetic on the documented rule of src/integrate/default-steps.ts
    expect(parseScenario(minimal({ epsilon: eps })).integrator.stepsPerPeriod).toBe(expected);
  });

  test('two modes far apart in frequency keep RK4 even at small eps (the fitted method does not apply)', () => {
    const far = minimal({
      epsilon: 1e-5,
      modes: [
        { omega: 1, gain: 1, loss: 0 },
        { omega: 1.37, gain: 1, loss: 0 },
      ],
    });
    expect(parseScenario(far).integrator.stepsPerPeriod).toBe(8);
    // the demo's spurious mode 1500 ppm away is close enough for the fitted method
    const near = minimal({
      epsilon: 1e-5,
      modes: [
        { omega: 1, gain: 1, loss: 0 },
        { omega: 1.0015, gain: 1, loss: 0 },
      ],
    });
    expect(parseScenario(near).integrator.stepsPerPeriod).toBe(5);
  });
});

describe('random start with one amplitude per mode', () => {
  const twoModes = (random: unknown) =>
    minimal({
      modes: [
        { omega: 1, gain: 1, loss: 0 },
        { omega: 1.5, gain: 1, loss: 0 },
      ],
      initial: { random },
    });

  test('is accepted and kept', () => {
    const s = parseScenario(twoModes({ seed: 4, amplitude: [1, 0.02] }));
    expect(s.initial).toEqual({ random: { seed: 4, amplitude: [1, 0.02] } });
  });

  test.each([
    [{ seed: 4, amplitude: [1] }, 'initial.random.amplitude: must have 2 entries (one per mode) (got 1)'],
    [{ seed: 4, amplitude: [1, -0.1] }, 'initial.random.amplitude[1]: must be >= 0 (got -0.1)'],
    [{ seed: 4, amplitude: [0, 0] }, 'initial.random.amplitude: must have at least one amplitude > 0'],
  ])('%j is refused: %s', (random, message) => {
    expect(() => parseScenario(twoModes(random))).toThrow(message);
  });
});
