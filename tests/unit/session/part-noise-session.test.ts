import { describe, expect, test } from 'vitest';
import { parseScenario } from '../../../src/scenario/parse.js';
import { CoSimulation } from '../../../src/session/session.js';
import { oadev } from '../../../src/stability/index.js';
import { wrapAngle } from '../../../src/util/angles.js';
import { BAND_STANDARD_ERRORS, seedBand } from '../../support/seed-band.js';

/**
 * Part noise inside the engine: one uncoupled part (a lone node, no links) is run by the full
 * co-simulation and its phase, read off the node as every stability record reads it, is held
 * against the NIST SP 1065 Allan-variance relations (Riley 2008): h0 / (2 tau) for white FM,
 * 2 ln 2 h-1 for flicker FM. The band is the spread over SEEDS independent noise seeds
 * (tests/support/seed-band.ts).
 */
const F0 = 10e6;
const SEEDS = 6;
const TICKS = 3000;

function lonePart(noise: Record<string, unknown>, extra: Record<string, unknown> = {}) {
  return parseScenario({
    nodes: 1,
    topology: { edges: [] },
    epsilon: 1e-4,
    nominalFrequencyHz: F0,
    modes: [{ omega: 1, gain: 1, loss: 0 }],
    coupling: { strength: 0 },
    noise,
    initial: { pattern: { q: 0, amplitude: 2 } },
    integrator: { macroPeriods: 16 },
    ...extra,
  });
}

/** Time error x (s) of node 0 at every tick, from its unwrapped phase, and the tick in seconds. */
function timeErrorRecord(sim: CoSimulation, ticks: number): { x: Float64Array; tick: number } {
  const x = new Float64Array(ticks);
  let last = 0;
  let unwrapped = 0;
  for (let n = 0; n < ticks; n++) {
    const frame = sim.step()!;
    const phase = frame.full.phase[0][0];
    unwrapped = n === 0 ? phase : unwrapped + wrapAngle(phase - last);
    last = phase;
    x[n] = unwrapped / (2 * Math.PI * F0);
  }
  return { x, tick: sim.macroStep / (2 * Math.PI * F0) };
}

function avarBand(powerLaw: Record<string, number>, m: number) {
  let tick = 0;
  const values = Array.from({ length: SEEDS }, (_, s) => {
    const record = timeErrorRecord(new CoSimulation(lonePart({ seed: 40 + s, powerLaw }), { integrator: 'micro' }), TICKS);
    tick = record.tick;
    return oadev(record.x, record.tick, m).deviation ** 2;
  });
  return { ...seedBand(values), tau: m * tick };
}

describe('an uncoupled part in the engine follows the SP 1065 relations', () => {
  test.each([1, 16])('white FM: h0 / (2 tau) at m = %i', (m) => {
    const h0 = 1e-18;
    const band = avarBand({ h0 }, m);
    const expected = h0 / (2 * band.tau);
    expect(Math.abs(band.mean - expected)).toBeLessThan(BAND_STANDARD_ERRORS * band.standardError);
    expect(band.standardError / expected).toBeLessThan(0.1);
  });

  test.each([2, 16])('flicker FM: 2 ln 2 h-1 at m = %i', (m) => {
    const hm1 = 1e-16;
    const band = avarBand({ 'h-1': hm1 }, m);
    const expected = 2 * Math.LN2 * hm1;
    // plus the flicker sum's own accuracy (FLICKER_ACCURACY_DB, 0.05 dB: 1.2 % in power)
    expect(Math.abs(band.mean - expected)).toBeLessThan(BAND_STANDARD_ERRORS * band.standardError + 0.012 * expected);
    expect(band.standardError / expected).toBeLessThan(0.15);
  });
});

describe('part noise and the rest of the session', () => {
  const parts = { h2: 1e-22, h0: 1e-18, 'h-1': 1e-17, 'h-2': 1e-14 };
  const environment = {
    temperature: {
      ambient: { start: 20, changes: [{ at: 1e-5, by: 30, over: 1e-4 }] },
      curve: { inflectionC: 27, a1PpmPerC: -0.3, a3PpmPerC3: 1e-4 },
    },
    aging: { logPpm: 0.5, timeConstantS: 1e-5 },
  };

  test.each(['micro', 'auto'] as const)('a checkpoint taken mid-run resumes bit for bit (%s)', (integrator) => {
    const scenario = lonePart({ seed: 5, intensity: 1e-10, powerLaw: parts }, { environment });
    const a = new CoSimulation(scenario, { integrator });
    for (let n = 0; n < 120; n++) a.step();
    const saved = JSON.parse(JSON.stringify(a.checkpoint()));
    expect(saved.drive).toBeDefined();
    const b = CoSimulation.fromCheckpoint(scenario, saved, { integrator });
    for (let n = 0; n < 80; n++) {
      const fa = a.step()!;
      const fb = b.step()!;
      expect(fb.full.phase).toEqual(fa.full.phase);
      expect(fb.full.amplitude).toEqual(fa.full.amplitude);
    }
    expect(Array.from(b.full.state)).toEqual(Array.from(a.full.state));
    expect(Array.from(b.params.detuning)).toEqual(Array.from(a.params.detuning));
  });

  test('scenarios in model units are unchanged: no drive, no drive in the checkpoint', () => {
    const sim = new CoSimulation(lonePart({ seed: 5, intensity: 1e-10 }));
    expect(sim.drive).toBeNull();
    sim.step();
    expect('drive' in sim.checkpoint()).toBe(false);
  });

  test("adding part noise leaves the model's white-noise stream as it was (its own generator)", () => {
    const plain = new CoSimulation(lonePart({ seed: 5, intensity: 1e-8 }), { integrator: 'micro' });
    const withZero = new CoSimulation(lonePart({ seed: 5, intensity: 1e-8, powerLaw: { h0: 0 } }), { integrator: 'micro' });
    for (let n = 0; n < 50; n++) {
      plain.step();
      withZero.step();
    }
    expect(withZero.drive).not.toBeNull();
    expect(Array.from(withZero.full.state)).toEqual(Array.from(plain.full.state));
  });

  test('white PM is in the phase read off the node, not in the resonator', () => {
    const quiet = new CoSimulation(lonePart({ seed: 5, intensity: 0 }), { integrator: 'micro' });
    const pm = new CoSimulation(lonePart({ seed: 5, powerLaw: { h2: 1e-20 } }), { integrator: 'micro' });
    let differs = 0;
    for (let n = 0; n < 40; n++) {
      const q = quiet.step()!;
      const p = pm.step()!;
      expect(Array.from(pm.full.state)).toEqual(Array.from(quiet.full.state));
      const shift = wrapAngle(p.full.phase[0][0] - q.full.phase[0][0]);
      expect(shift).toBeCloseTo(pm.drive!.outputPhase[0], 12);
      if (shift !== 0) differs++;
    }
    expect(differs).toBe(40);
  });

  test('a detuning set by an operator is the nominal value: the drive stays on top of it', () => {
    const sim = new CoSimulation(lonePart({ seed: 5, powerLaw: { h0: 1e-18 } }), { integrator: 'micro' });
    for (let n = 0; n < 10; n++) sim.step();
    sim.submit({ action: 'set-detuning', node: 0, delta: 0.01 }, 'test');
    sim.step();
    // applied to the tick that just ran: the new tick's drive is in params now
    expect(sim.params.detuning[0]).toBeCloseTo(0.01 + sim.drive!.applied[0], 14);
    expect(sim.drive!.applied[0]).not.toBe(0);
    // what the board is, as the catalogue and the controls see it: exactly, tick after tick (never a running sum)
    for (let n = 0; n < 200; n++) sim.step();
    expect(sim.nominalDetuning()[0]).toBe(0.01);
    expect(sim.params.detuning[0]).toBe(0.01 + sim.drive!.applied[0]);
  });

  test('a detuning walk moves the nominal value, the drive stays on top of it', () => {
    const sim = new CoSimulation(lonePart({ seed: 5, detuningWalk: 1e-6, powerLaw: { h0: 1e-18 } }), { integrator: 'micro' });
    for (let n = 0; n < 100; n++) sim.step();
    const nominal = sim.nominalDetuning()[0];
    expect(nominal).not.toBe(0);
    // the walk's last step comes after the drive's write: the detuning is nominal + applied up to that step
    expect(Math.abs(sim.params.detuning[0] - nominal - sim.drive!.applied[0])).toBeLessThan(5 * Math.sqrt(1e-6 * sim.macroStep));
  });
});
