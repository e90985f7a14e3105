import { describe, expect, test } from 'vitest';
import { parseScenario, scenarioToJSON } from '../../../src/scenario/parse.js';
import { fitPhaseNoise } from '../../../src/scenario/noise-spec.js';
import { InputError } from '../../../src/util/input-error.js';
import { thrown } from '../../support/thrown.js';

const F0 = 10e6;
const base = {
  nodes: 2,
  topology: 'ring-two-way',
  epsilon: 1e-5,
  nominalFrequencyHz: F0,
  modes: [{ omega: 1, gain: 1, loss: 0 }],
  coupling: { strength: 0.1, dissipative: 1 },
};
const withNoise = (noise: unknown, extra: Record<string, unknown> = {}) => parseScenario({ ...base, noise, ...extra });
const errorOf = (noise: unknown, extra: Record<string, unknown> = {}) => thrown(() => withNoise(noise, extra), InputError);

/** L(f) written out here from its definition (IEEE Std 1139: L = S_phi / 2, S_phi = (f0/f)^2 S_y), not from the code under test. */
function dbc(h: { h2: number; h0: number; hm1: number; hm2: number }, f: number): number {
  const sy = h.h2 * f * f + h.h0 + h.hm1 / f + h.hm2 / (f * f);
  return 10 * Math.log10(((F0 / f) ** 2 * sy) / 2);
}

describe('noise.powerLaw', () => {
  test('one object for every node, named as the trade writes them; q becomes optional', () => {
    const s = withNoise({ seed: 3, powerLaw: { h2: 2e-30, h0: 5e-23, 'h-1': 7e-23, 'h-2': 1e-24 } });
    expect(s.noise.intensity).toBe(0);
    expect(s.noise.parts).toEqual([
      { h2: 2e-30, h0: 5e-23, hm1: 7e-23, hm2: 1e-24 },
      { h2: 2e-30, h0: 5e-23, hm1: 7e-23, hm2: 1e-24 },
    ]);
  });

  test('one per node, missing terms 0; the normalized JSON reads back equal', () => {
    const s = withNoise({ seed: 3, intensity: 1e-12, powerLaw: [{ h0: 1e-22 }, { 'h-1': 1e-23 }] });
    expect(s.noise.parts).toEqual([
      { h2: 0, h0: 1e-22, hm1: 0, hm2: 0 },
      { h2: 0, h0: 0, hm1: 1e-23, hm2: 0 },
    ]);
    expect(parseScenario(scenarioToJSON(s))).toEqual(s);
  });

  test('a scenario without part noise keeps its noise section as it was', () => {
    const s = withNoise({ seed: 3, intensity: 1e-9 });
    expect(s.noise).toEqual({ intensity: 1e-9, seed: 3, detuningWalk: 0 });
    expect(scenarioToJSON(s).noise).toEqual({ intensity: 1e-9, seed: 3, detuningWalk: 0 });
    expect(errorOf({ seed: 3 }).message).toBe('noise.intensity: is required');
  });

  test.each([
    [{ seed: 1, powerLaw: { h0: -1 } }, 'noise.powerLaw.h0: must be >= 0 (got -1)'],
    [{ seed: 1, powerLaw: { h1: 1e-25 } }, 'noise.powerLaw.h1: flicker PM (h1) is not generated'],
    [{ seed: 1, powerLaw: { hm1: 1e-25 } }, 'noise.powerLaw.hm1: unknown field'],
    [{ seed: 1, powerLaw: [{ h0: 1 }] }, 'noise.powerLaw: must have 2 entries, one per node'],
    [{ seed: 1, powerLaw: [{ h0: 1 }, { h0: 'x' }] }, 'noise.powerLaw[1].h0: must be a number'],
    [{ seed: 1, powerLaw: { h0: 1 }, phaseNoise: { points: [] } }, 'noise: give either powerLaw or phaseNoise, not both'],
  ])('bad coefficients are refused with their field: %j', (noise, message) => {
    expect(errorOf(noise).message).toContain(message);
  });

  test('part noise needs epsilon > 0 (it acts through the detuning)', () => {
    const error = thrown(() => parseScenario({ ...base, epsilon: 0, noise: { seed: 1, powerLaw: { h0: 1e-22 } } }), InputError);
    expect(error.path).toBe('noise');
    expect(error.reason).toContain('epsilon > 0');
  });
});

describe('noise.phaseNoise: L(f) in dBc/Hz fitted with the four power laws', () => {
  test('a worked example: -84.4 dBc/Hz at 1 Hz falling 30 dB per decade is flicker FM, h-1 = 2 10^-8.44 / f0^2 = 7.262e-23', () => {
    // S_phi = 2 * 10^(-84.4/10) = 7.262e-9 rad^2/Hz at 1 Hz = f0^2 h-1 / f^3 (hand-computed)
    const s = withNoise({
      seed: 1,
      phaseNoise: {
        points: [
          [1, -84.4],
          [10, -114.4],
          [100, -144.4],
        ],
      },
    });
    const p = s.noise.parts![0];
    expect(p.hm1).toBeCloseTo(7.262e-23, 25);
    expect(p.h0 + p.h2 * 1e6 + p.hm2).toBeLessThan(1e-3 * p.hm1);
  });

  test('points made from known coefficients give them back', () => {
    const h = { h2: 2e-30, h0: 5e-23, hm1: 7e-23, hm2: 1.5e-24 };
    const points = [0.1, 1, 10, 100, 1e3, 1e4, 1e5].map((f): [number, number] => [f, dbc(h, f)]);
    const fit = fitPhaseNoise(points, F0);
    for (const key of ['h2', 'h0', 'hm1', 'hm2'] as const) expect(fit.noise[key] / h[key]).toBeCloseTo(1, 6);
    expect(fit.worstErrorDb).toBeLessThan(1e-6);
  });

  test('a datasheet-like spec (invented values) is met within a few tenths of a dB, with non-negative terms', () => {
    const points: [number, number][] = [
      [1, -85],
      [10, -110],
      [100, -130],
      [1e3, -148],
      [1e4, -158],
      [1e5, -160],
    ];
    const s = withNoise({ seed: 1, phaseNoise: { points } });
    const p = s.noise.parts![0];
    for (const v of Object.values(p)) expect(v).toBeGreaterThanOrEqual(0);
    for (const [f, l] of points) expect(Math.abs(dbc(p, f) - l)).toBeLessThan(3);
  });

  test('the carrier is the nominal frequency unless the spec names its own: L scales with f0^2', () => {
    const points = [
      [1, -84.4],
      [10, -114.4],
    ];
    const own = withNoise({ seed: 1, phaseNoise: { points } }).noise.parts![0].hm1;
    const at5 = withNoise({ seed: 1, phaseNoise: { points, carrierHz: 5e6 } }).noise.parts![0].hm1;
    expect(at5 / own).toBeCloseTo(4, 9);
  });

  test.each([
    [{ points: [[1, -80]] }, 'noise.phaseNoise.points: needs at least 2'],
    [
      {
        points: [
          [10, -80],
          [1, -100],
        ],
      },
      'noise.phaseNoise.points[1][0]: offsets must increase',
    ],
    [
      {
        points: [
          [1, -80],
          [10, 5],
        ],
      },
      'noise.phaseNoise.points[1][1]: must be below 0 dBc/Hz',
    ],
    [
      {
        points: [
          [-1, -80],
          [10, -90],
        ],
      },
      'noise.phaseNoise.points[0][0]: must be > 0',
    ],
    [
      {
        points: [
          [1, -80],
          [6e6, -150],
        ],
      },
      'must be below half the carrier',
    ],
    [
      {
        points: [
          [1, -80],
          [10, -80],
        ],
        carrierHz: 0,
      },
      'noise.phaseNoise.carrierHz: must be > 0',
    ],
  ])('bad specs are refused with their field: %j', (phaseNoise, message) => {
    expect(errorOf({ seed: 1, phaseNoise }).message).toContain(message);
  });

  test('a spec no power law can make (a bump) is refused, saying how far off the best fit is', () => {
    const error = errorOf({
      seed: 1,
      phaseNoise: {
        points: [
          [1, -100],
          [10, -80],
          [100, -130],
          [1000, -110],
        ],
      },
    });
    expect(error.path).toBe('noise.phaseNoise.points');
    expect(error.reason).toMatch(/fit these points only within \d+\.\d dB \(limit 3 dB\)/);
  });
});
