import { describe, expect, test } from 'vitest';
import { parseScenario, scenarioToJSON } from '../../../src/scenario/parse.js';
import { agingPpm, curvePpm, profileValue } from '../../../src/environment/drift.js';
import { CoSimulation } from '../../../src/session/session.js';
import { wrapAngle } from '../../../src/util/angles.js';
import { InputError } from '../../../src/util/input-error.js';
import { thrown } from '../../support/thrown.js';

const F0 = 10e6;
const EPS = 1e-4;
const lone = (environment: unknown, nodes = 1) =>
  parseScenario({
    nodes,
    topology: { edges: [] },
    epsilon: EPS,
    nominalFrequencyHz: F0,
    modes: [{ omega: 1, gain: 1, loss: 0 }],
    coupling: { strength: 0 },
    noise: { seed: 1, intensity: 0 },
    initial: { pattern: { q: 0, amplitude: 2 } },
    integrator: { macroPeriods: 16 },
    environment,
  });

/** AT-cut-like curve (invented part, common-practice magnitudes: a3 about 1e-4 ppm/C^3, turning points about 30 C from the inflection). */
const CURVE = { inflectionC: 27, a1PpmPerC: -0.27, a3PpmPerC3: 1e-4 };
/** The cubic written out here by hand: ppm = a1 d + a3 d^3, d = T - 27. */
const cubic = (t: number) => -0.27 * (t - 27) + 1e-4 * (t - 27) ** 3;

/**
 * Node k's fractional frequency over each tick, measured from its phase, y = dphi / (omega_0 dtau),
 * less that of the same board without an environment (the oscillator's own O(eps^2) frequency and
 * its start-up are then no part of the comparison).
 */
function measuredFrequencies(sim: CoSimulation, ticks: number): { t: number; y: number[] }[] {
  const reference = new CoSimulation({ ...sim.scenario, environment: undefined }, { integrator: 'micro' });
  const out: { t: number; y: number[] }[] = [];
  let last = sim.step()!;
  let lastReference = reference.step()!;
  for (let n = 0; n < ticks; n++) {
    const frame = sim.step()!;
    const frameReference = reference.step()!;
    const dt = frame.tau - last.tau;
    const y = frame.full.phase.map(
      (p, k) =>
        (wrapAngle(p[0] - last.full.phase[k][0]) - wrapAngle(frameReference.full.phase[k][0] - lastReference.full.phase[k][0])) / dt,
    );
    out.push({ t: (last.seconds + frame.seconds) / 2, y });
    last = frame;
    lastReference = frameReference;
  }
  return out;
}

describe('closed forms', () => {
  test('the cubic at its turning points and beyond (hand-computed)', () => {
    const curve = { ...CURVE, a2PpmPerC2: 0 };
    // turning points at d = +-sqrt(a1 / (-3 a3)) = +-30 C: ppm = -0.27 * 30 + 1e-4 * 27000 = -5.4 and +5.4
    expect(curvePpm(curve, 57)).toBeCloseTo(-5.4, 12);
    expect(curvePpm(curve, -3)).toBeCloseTo(5.4, 12);
    expect(curvePpm(curve, 27)).toBeCloseTo(0, 15);
    expect(curvePpm({ ...curve, a2PpmPerC2: 0.01 }, 37)).toBeCloseTo(-2.7 + 1 + 0.1, 12);
  });

  test('log aging A ln(1 + t / t1) and linear ppm per day', () => {
    expect(agingPpm({ logPpm: 0.5, timeConstantS: 86400 }, 86400 * (Math.E - 1))).toBeCloseTo(0.5, 12);
    expect(agingPpm({ logPpm: 0.5, timeConstantS: 10 }, 90)).toBeCloseTo(0.5 * Math.log(10), 12);
    expect(agingPpm({ ppmPerDay: 0.002 }, 30 * 86400)).toBeCloseTo(0.06, 12);
  });

  test('a profile of steps, ramps and a daily cycle', () => {
    const p = {
      start: 25,
      changes: [
        { at: 10, by: 5, over: 0 },
        { at: 20, by: -10, over: 10 },
      ],
      cycle: { amplitude: 2, periodS: 86400, phaseS: 0 },
    };
    const noCycle = { ...p, cycle: null };
    expect(profileValue(noCycle, 9.99)).toBe(25);
    expect(profileValue(noCycle, 10)).toBe(30);
    expect(profileValue(noCycle, 25)).toBe(25);
    expect(profileValue(noCycle, 100)).toBe(20);
    expect(profileValue(p, 21600)).toBeCloseTo(22, 12); // a quarter day: the cycle's crest
  });
});

describe('in the engine', () => {
  test('a ramp through the cubic: each node follows the cubic at its own temperature (a board gradient)', () => {
    // ambient from 0 C to 60 C over 2 ms; node 1 runs 5 C warmer
    const sim = new CoSimulation(
      lone({ temperature: { ambient: { start: 0, changes: [{ at: 0, by: 60, over: 2e-3 }] }, offsetsC: [0, 5], curve: CURVE } }, 2),
      { integrator: 'micro' },
    );
    const samples = measuredFrequencies(sim, 1300);
    let worst = 0;
    for (const { t, y } of samples) {
      const ambient = Math.min(60, (60 * t) / 2e-3);
      for (const [k, offset] of [0, 5].entries()) {
        const expected = cubic(ambient + offset) * 1e-6;
        worst = Math.max(worst, Math.abs(y[k] - expected));
      }
    }
    // a tick is 1.6 us, the ramp moves 0.05 C in it; the cubic's slope is at most 0.27 ppm/C here, so the
    // midpoint rule and the model's second-order frequency shift (eps Delta)^2 stay far below 1e-9
    expect(worst).toBeLessThan(1e-9);
    // and the range swept is what the check is about: from +5.4 ppm near -3 C .. the minimum near 57 C
    const ys = samples.map((s) => s.y[1]);
    expect(Math.min(...ys)).toBeLessThan(-5.3e-6);
  });

  test('log aging at given times, and a supply step pushes by ppm/V', () => {
    const sim = new CoSimulation(
      lone({
        aging: { logPpm: 2, timeConstantS: 2e-4 },
        supply: { voltage: { start: 3.3, changes: [{ at: 1e-3, by: -0.2 }] }, pushingPpmPerV: 0.5 },
      }),
      { integrator: 'micro' },
    );
    const samples = measuredFrequencies(sim, 1000);
    for (const { t, y } of samples) {
      const expected = (2 * Math.log(1 + t / 2e-4) + (t >= 1e-3 ? 0.5 * -0.2 : 0)) * 1e-6;
      // the tick that holds the step sees it at its midpoint: allow it the whole step
      // 1e-9 as for the ramp: the first ticks, where the log law grows by half its value per tick, lag by about 1 % of it
      const tolerance = Math.abs(t - 1e-3) < 2e-6 ? 0.11e-6 : 1e-9;
      expect(Math.abs(y[0] - expected)).toBeLessThan(tolerance);
    }
  });
});

describe('the environment section', () => {
  test('reads back equal from its normalized JSON', () => {
    const s = lone({
      temperature: { ambient: { start: 25, cycle: { amplitude: 3 } }, curve: [CURVE] },
      aging: [{ ppmPerDay: 0.001 }],
      supply: { voltage: { start: 3.3 }, nominalV: 3.3, pushingPpmPerV: [0.1] },
    });
    expect(s.environment!.temperature!.ambient.cycle).toEqual({ amplitude: 3, periodS: 86400, phaseS: 0 });
    expect(parseScenario(scenarioToJSON(s))).toEqual(s);
  });

  test.each([
    [{ temperature: { curve: CURVE } }, 'environment.temperature.ambient: is required'],
    [{ temperature: { ambient: { start: 25 } } }, 'environment.temperature.curve: is required'],
    [
      { temperature: { ambient: { start: 25 }, curve: { inflectionC: 25, a1PpmPerC: 0 } } },
      'environment.temperature.curve.a3PpmPerC3: is required',
    ],
    [{ temperature: { ambient: { start: 25 }, curve: CURVE, offsetsC: [1, 2] } }, 'environment.temperature.offsetsC: must have 1 entries'],
    [
      {
        temperature: {
          ambient: {
            start: 25,
            changes: [
              { at: 5, by: 1 },
              { at: 1, by: 1 },
            ],
          },
          curve: CURVE,
        },
      },
      'environment.temperature.ambient.changes[1].at: changes must be in time order',
    ],
    [{ temperature: { ambient: { start: 25, changes: [{ at: 0, by: 1, over: -1 }] }, curve: CURVE } }, 'changes[0].over: must be >= 0'],
    [{ temperature: { ambient: { start: 25, cycle: { amplitude: 1, periodS: 0 } }, curve: CURVE } }, 'cycle.periodS: must be > 0'],
    [{ aging: { logPpm: 1 } }, 'environment.aging.timeConstantS: is required'],
    [{ aging: { logPpm: 1, timeConstantS: 5, ppmPerDay: 1 } }, 'environment.aging: give either ppmPerDay or logPpm'],
    [{ supply: { voltage: { start: 3.3 } } }, 'environment.supply.pushingPpmPerV: is required'],
    [{ humidity: 1 }, 'environment.humidity: unknown field'],
  ])('bad sections are refused with their field: %j', (environment, message) => {
    expect(thrown(() => lone(environment), InputError).message).toContain(message);
  });
});
