import { describe, expect, test } from 'vitest';
import { CoSimulation } from '../../../src/session/session.js';
import { InputError } from '../../../src/util/input-error.js';
import { makeScenario } from '../../support/scenarios.js';
import { stateFromAmplitudes, twistedAmplitudes } from '../../support/states.js';

const ring = (extra: Partial<Parameters<typeof makeScenario>[0]> = {}) =>
  makeScenario({
    nodes: 4,
    twoWay: true,
    epsilon: 0.01,
    modes: [{ omega: 1, gain: 1, loss: 0 }],
    coupling: { strength: 0.2, reactive: 0, dissipative: 1 },
    initial: { state: stateFromAmplitudes(twistedAmplitudes(4, 0, 2), [1], 0.05, 3) },
    stepsPerPeriod: 16,
    ...extra,
  });

describe('co-simulation session', () => {
  test('an in-phase start on a dissipatively coupled ring locks in-phase with the full D_4 symmetry at phase 0', () => {
    const session = new CoSimulation(ring());
    const last = session.runUntil(40 / 0.01)!;
    expect(last.full.pattern).toMatchObject({ kind: 'in-phase', q: 0, locked: true, mode: 0 });
    // D_4 has 8 elements; the in-phase state is fixed by all of them with no phase shift
    expect(last.full.pattern.symmetry).toHaveLength(8);
    for (const s of last.full.pattern.symmetry) expect(Math.abs(s.phase)).toBeLessThan(0.02);
    expect(last.guide.pattern.kind).toBe('in-phase');
    expect(last.guide.margin!).toBeLessThan(0);
  });

  test('repulsive (negative dissipative) coupling on an even ring locks anti-phase; rotation by 1 has phase pi', () => {
    const session = new CoSimulation(
      ring({
        coupling: { strength: 0.2, reactive: 0, dissipative: -1 },
        initial: { state: stateFromAmplitudes(twistedAmplitudes(4, 2, 2), [1], 0.05, 5) },
      }),
    );
    const last = session.runUntil(40 / 0.01)!;
    expect(last.full.pattern).toMatchObject({ kind: 'anti-phase', q: 2, locked: true });
    const rotation = last.full.pattern.symmetry.find((s) => s.element === 'rotation by 1');
    expect(rotation).toBeDefined();
    expect(Math.abs(Math.abs(rotation!.phase) - Math.PI)).toBeLessThan(0.02);
  });

  test('perturbations apply at the tick boundary, to both systems, and are recorded as events', () => {
    const session = new CoSimulation(ring());
    session.runUntil(5 / 0.01);
    const before = session.step()!;
    session.submit({ action: 'set-detuning', node: 1, delta: 0.3 }, 'alice');
    session.submit({ action: 'break-link', from: 0, to: 1 }, 'alice');
    session.submit({ action: 'kick-mode', node: 2, mode: 0, amount: 0.5 }, 'bob');
    session.submit({ action: 'set-coupling', strength: 0.3 }, 'bob');
    session.submit({ action: 'set-noise', intensity: 1e-8 }, 'bob');
    expect(session.params.detuning[1]).toBe(0); // queued, not yet applied
    const after = session.step()!;
    expect(after.events.map((e) => [e.kind, e.by])).toEqual([
      ['perturbation', 'alice'],
      ['perturbation', 'alice'],
      ['perturbation', 'bob'],
      ['perturbation', 'bob'],
      ['perturbation', 'bob'],
    ]);
    expect(after.events[0].tau).toBe(before.tau);
    expect(session.params.detuning[1]).toBe(0.3);
    expect(session.params.linkWeight[session.params.findLink(0, 1)]).toBe(0);
    expect(session.params.strength).toBe(0.3);
    expect(session.params.noiseIntensity).toBe(1e-8);
    // the kick moved both systems' node 2 by about 0.5 in amplitude
    expect(after.full.amplitude[2][0] - before.full.amplitude[2][0]).toBeGreaterThan(0.3);
    expect(after.guide.amplitude[2][0] - before.guide.amplitude[2][0]).toBeGreaterThan(0.3);
    // a broken link lowers the symmetry: D_4 (8 elements) -> only what maps the one-way gap to itself
    expect(session.group.length).toBeLessThan(8);
    session.submit({ action: 'restore-link', from: 0, to: 1 }, 'alice');
    session.step();
    expect(session.params.linkWeight[session.params.findLink(0, 1)]).toBe(1);
    expect(session.group.length).toBe(8);
  });

  test('bad perturbations are refused with a precise reason and change nothing', () => {
    const session = new CoSimulation(ring());
    const cases: [unknown, string][] = [
      [{ action: 'set-detuning', node: 9, delta: 1 }, 'node: must be between 0 and 3 (got 9)'],
      [{ action: 'break-link', from: 0, to: 2 }, 'there is no link from node 0 to node 2 in this network'],
      [{ action: 'set-detuning', node: 1 }, 'give exactly one of delta or ppm'],
      [{ action: 'explode' }, 'action: must be one of'],
      [{ action: 'kick-mode', node: 0, mode: 1, amount: 1 }, 'mode: must be between 0 and 0 (got 1)'],
      [{ action: 'set-noise', intensity: -1 }, 'intensity: must be >= 0 (got -1)'],
      [{ action: 'set-coupling', strength: 1, colour: 'red' }, 'colour: unknown field'],
      ['break', 'must be an object'],
    ];
    for (const [raw, message] of cases) {
      expect(() => session.submit(raw, 'x'), JSON.stringify(raw)).toThrow(InputError);
      expect(() => session.submit(raw, 'x')).toThrow(message);
    }
    const frame = session.step()!;
    expect(frame.events.filter((e) => e.kind === 'perturbation')).toHaveLength(0);
  });

  test('ppm detuning maps through eps (Delta = ppm 1e-6 / eps)', () => {
    const session = new CoSimulation(ring({ epsilon: 1e-5, stepsPerPeriod: 8 }));
    session.submit({ action: 'set-detuning', node: 0, ppm: 2 }, 'x');
    session.step();
    expect(session.params.detuning[0]).toBeCloseTo(0.2, 12);
  });

  test('a blow-up halts the run with an event, keeps the last good state and never yields NaN', () => {
    const session = new CoSimulation(ring());
    session.runUntil(1 / 0.01);
    const before = session.step()!.full.amplitude[0][0];
    const tau = session.tau;
    session.submit({ action: 'kick-mode', node: 0, mode: 0, amount: 5e3 }, 'x');
    const frame = session.step()!;
    expect(frame.status).toBe('halted');
    expect(frame.events.some((e) => e.kind === 'blow-up' && /non-finite|runaway/.test(e.message))).toBe(true);
    const numbers = [frame.full.amplitude, frame.full.phase, frame.full.phaseDifferences, frame.guide.amplitude, frame.divergence.max].flat(
      3,
    );
    expect(numbers.length).toBeGreaterThan(10);
    expect(numbers.every((n) => typeof n === 'number' && Number.isFinite(n))).toBe(true);
    expect(session.tau).toBe(tau);
    // the state is the one before the failed tick (the kick included, which is what blew up)
    expect(Math.abs(frame.full.amplitude[0][0] - before - 5e3)).toBeLessThan(1);
    expect(session.step()).toBeNull();
  });

  test('noise is reproducible bit for bit from its seed and differs with another seed', () => {
    const run = (seed: number) => {
      const session = new CoSimulation(ring({ noise: { intensity: 1e-4, seed } }));
      session.runUntil(3 / 0.01);
      return Array.from(session.full.state);
    };
    expect(run(42)).toEqual(run(42));
    expect(run(42)).not.toEqual(run(43));
  });

  test('the noise increment has the Ito variance q T / (2 omega^2) per rotating-frame component', () => {
    // Free harmonic nodes (g = d = 0, eps -> 0 so the flow is the pure rotation): by the Ito
    // isometry u(T) - u(0) = -(sqrt q / omega) int sin(omega t) dW has variance (q/omega^2) int sin^2,
    // which is q T / (2 omega^2) over whole periods (common practice).
    const nodes = 400;
    const q = 1e-3;
    const omega = 1.3;
    const session = new CoSimulation(
      makeScenario({
        nodes,
        links: [],
        epsilon: 1e-9,
        modes: [{ omega, gain: 0, loss: 0 }],
        noise: { intensity: q, seed: 9 },
        initial: { state: Array.from({ length: nodes }, () => [{ x: 0, xdot: 0 }]) },
        stepsPerPeriod: 8,
        macroPeriods: 3,
      }),
      // the exact macro-step increments are under test, not the envelope's averaged diffusion
      { integrator: 'micro' },
    );
    expect(session.integrator.mode).toBe('micro');
    const periods = 30;
    const T = (periods * 2 * Math.PI) / omega;
    session.runUntil(T - 1e-9);
    const y = session.full.state;
    let su = 0;
    let sv = 0;
    for (let k = 0; k < nodes; k++) {
      su += y[2 * k] ** 2;
      sv += y[2 * k + 1] ** 2;
    }
    const expected = (q * T) / (2 * omega * omega);
    // 400 samples: the sample variance has a relative standard error of sqrt(2/400) = 7%
    expect(Math.abs(su / nodes / expected - 1)).toBeLessThan(0.25);
    expect(Math.abs(sv / nodes / expected - 1)).toBeLessThan(0.25);
  });

  test('modes near a 1:1 resonance raise a warning event naming it', () => {
    const session = new CoSimulation(
      makeScenario({
        nodes: 2,
        twoWay: true,
        epsilon: 1e-3,
        modes: [
          { omega: 1, gain: 1, loss: 0 },
          { omega: 1.0015, gain: 1, loss: 0 },
        ],
      }),
    );
    expect(session.warnings.map((w) => w.resonance)).toEqual(['1:1']);
    const frame = session.step()!;
    expect(frame.events[0].kind).toBe('warning');
    expect(frame.events[0].message).toMatch(/1:1 resonance/);
    // the same offset is far from resonance when eps = 1e-5 (150 eps away)
    const far = new CoSimulation(
      makeScenario({
        nodes: 2,
        twoWay: true,
        epsilon: 1e-5,
        modes: [
          { omega: 1, gain: 1, loss: 0 },
          { omega: 1.0015, gain: 1, loss: 0 },
        ],
      }),
    );
    expect(far.warnings).toHaveLength(0);
  });
});

describe('checkpoints', () => {
  test('a session restored from a JSON checkpoint continues bit for bit, noise, queue and lock windows included', () => {
    const scenario = ring({ noise: { intensity: 1e-5, seed: 77, detuningWalk: 1e-7 } });
    const straight = new CoSimulation(scenario);
    straight.runUntil(6 / 0.01);
    straight.submit({ action: 'break-link', from: 1, to: 2 }, 'op');
    const straightFrames: unknown[] = [];
    straight.runUntil(12 / 0.01, (f) => straightFrames.push(f));

    const first = new CoSimulation(scenario);
    first.runUntil(6 / 0.01);
    first.submit({ action: 'break-link', from: 1, to: 2 }, 'op');
    const saved = JSON.parse(JSON.stringify(first.checkpoint()));
    const resumed = CoSimulation.fromCheckpoint(scenario, saved);
    const resumedFrames: unknown[] = [];
    resumed.runUntil(12 / 0.01, (f) => resumedFrames.push(f));

    expect(Array.from(resumed.full.state)).toEqual(Array.from(straight.full.state));
    expect(Array.from(resumed.guide.state)).toEqual(Array.from(straight.guide.state));
    expect(Array.from(resumed.params.detuning)).toEqual(Array.from(straight.params.detuning));
    expect(resumedFrames).toEqual(straightFrames);
  });

  test('a checkpoint of another scenario is refused', () => {
    const saved = new CoSimulation(ring()).checkpoint();
    expect(() => CoSimulation.fromCheckpoint(ring({ nodes: 5, initial: { random: { seed: 1, amplitude: 1 } } }), saved)).toThrow(
      /does not belong/,
    );
  });
});

describe('checkpoints with the fitted micro-step method', () => {
  test('a resumed session computes the same fitted weights as an uninterrupted one (bit for bit)', () => {
    // Two close modes at small eps run the fitted Adams method; a macro tick that is not a whole
    // number of micro steps makes every tick's step differ in its last bits.
    const scenario = makeScenario({
      nodes: 4,
      twoWay: true,
      epsilon: 1e-5,
      modes: [
        { omega: 1, gain: 1, loss: 0.25 },
        { omega: 1.0015, gain: 1, loss: 0.4 },
      ],
      coupling: { strength: 0.3, reactive: 0.2, dissipative: 1 },
      detuning: [0.01, -0.02, 0.015, 0],
      noise: { intensity: 1e-9, seed: 5 },
      initial: { random: { seed: 2, amplitude: [1, 0.02] } },
      stepsPerPeriod: 5,
      macroPeriods: 37,
    });
    const straight = new CoSimulation(scenario, { integrator: 'micro' });
    expect(straight.integrator.micro.stepper.method).toBe('fitted-adams');
    for (let i = 0; i < 40; i++) straight.step();
    const first = new CoSimulation(scenario, { integrator: 'micro' });
    for (let i = 0; i < 25; i++) first.step();
    const resumed = CoSimulation.fromCheckpoint(scenario, JSON.parse(JSON.stringify(first.checkpoint())), { integrator: 'micro' });
    for (let i = 0; i < 15; i++) resumed.step();
    expect(Array.from(resumed.full.state)).toEqual(Array.from(straight.full.state));
  });
});
