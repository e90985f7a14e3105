import { describe, expect, test } from 'vitest';
import { CoSimulation, type Frame } from '../../../src/session/session.js';
import { GuideModel } from '../../../src/predict/guide-model.js';
import { patternCatalogue } from '../../../src/predict/catalogue.js';
import { makeScenario } from '../../support/scenarios.js';
import { stateFromAmplitudes, twistedAmplitudes } from '../../support/states.js';

/**
 * The live prediction carried by session frames after a perturbation, against what the full
 * system then does. eps = 0.01 keeps the runs short (slow time 1 = 100 tau).
 */
const eps = 0.01;

function ring(nodes: number, twoWay: boolean, q: number, dissipative: number, detuning?: number[]) {
  return makeScenario({
    nodes,
    twoWay,
    epsilon: eps,
    modes: [{ omega: 1, gain: 1, loss: 0 }],
    coupling: { strength: 0.05, reactive: 0, dissipative },
    detuning,
    initial: { state: stateFromAmplitudes(twistedAmplitudes(nodes, q, 2), [1], 0.02, 11 + q) },
    stepsPerPeriod: 16,
    macroPeriods: 2,
  });
}

/** Runs until the guide is locked (or the time runs out) and returns the last frame. */
function settle(session: CoSimulation, slowTime: number): Frame {
  let last = session.step()!;
  const end = session.tau + slowTime / eps;
  while (session.tau < end) last = session.step()!;
  return last;
}

describe('live prediction after a perturbation', () => {
  test('one-way ring of 5 at q = 1: a broken link is predicted to lose the wave and end in-phase, as the catalogue and the full system say', () => {
    const scenario = ring(5, false, 1, 1);
    const session = new CoSimulation(scenario);
    const before = settle(session, 60);
    expect(before.prediction).toBeNull(); // nothing predicted before any perturbation
    expect(before.guide.pattern).toMatchObject({ locked: true, kind: 'rotating-wave', q: 1 });

    session.submit({ action: 'break-link', from: 4, to: 0 }, 'test');
    const after = session.step()!;
    const prediction = after.prediction!;
    expect(prediction.verdict).toBe('lost');
    expect(prediction.current).toMatchObject({ kind: 'rotating-wave', q: 1, locked: true });
    expect(prediction.lostAt?.kind).toBe('fold');
    expect(prediction.pattern).toMatchObject({ kind: 'in-phase', locked: true, stable: true });
    // computed once per batch: later frames carry the same object
    expect(session.step()!.prediction).toBe(prediction);

    // the catalogue of the broken ring (a chain) holds one stable pattern, in-phase
    const broken = new GuideModel(scenario, session.params);
    const stable = patternCatalogue(broken).patterns.filter((p) => p.stable === true);
    expect(stable.map((p) => p.kind)).toEqual(['in-phase']);

    // observed: the full system ends in-phase, with the catalogue's phase differences (all 0).
    // A one-way chain relaxes slowly (each node follows the one before it at the rate
    // kappa sigma / 2, one Jordan block along the chain), hence the long run.
    const final = settle(session, 450);
    expect(final.full.pattern).toMatchObject({ locked: true, kind: 'in-phase' });
    for (const d of final.full.phaseDifferences.slice(0, 4)) expect(Math.abs(d - 0)).toBeLessThan(0.05);
  });

  test('two-way ring of 6 in anti-phase (repulsive coupling): cutting one edge is predicted to keep the pattern, and it does', () => {
    const session = new CoSimulation(ring(6, true, 3, -1));
    const before = settle(session, 60);
    expect(before.guide.pattern).toMatchObject({ locked: true, kind: 'anti-phase' });
    session.submit({ action: 'break-link', from: 0, to: 1 }, 'test');
    session.submit({ action: 'break-link', from: 1, to: 0 }, 'test');
    const prediction = session.step()!.prediction!;
    // a path is bipartite, so alternating phases stay an equilibrium of repulsive coupling (elementary)
    expect(prediction.verdict).toBe('persists');
    expect(prediction.margin!).toBeLessThan(0);
    expect(prediction.pattern?.kind).toBe('anti-phase');
    const final = settle(session, 100);
    expect(final.full.pattern).toMatchObject({ locked: true, kind: 'anti-phase' });
  });

  test("a detuning 5% inside the pair's locking range persists, 5% outside is lost at 1/1.05 of the change", () => {
    // Adler 1946: the range is |Delta_0 - Delta_1| <= kappa sigma / omega = 0.05 here
    for (const [ratio, verdict] of [
      [0.95, 'persists'],
      [1.05, 'lost'],
    ] as const) {
      const session = new CoSimulation(ring(2, true, 0, 1));
      settle(session, 40);
      session.submit({ action: 'set-detuning', node: 0, delta: ratio * 0.05 }, 'test');
      const prediction = session.step()!.prediction!;
      expect(prediction.verdict).toBe(verdict);
      if (verdict === 'lost') {
        expect(prediction.lostAt?.kind).toBe('fold');
        expect(Math.abs(prediction.lostAt!.fraction - 1 / 1.05)).toBeLessThan(0.005);
        expect(prediction.pattern?.locked).toBe(false); // it beats (Adler 1946)
      } else {
        expect(prediction.pattern?.stable).toBe(true);
        // Adler 1946: sin psi = 0.95 on the continued state
        expect(Math.abs(Math.sin(-prediction.pattern!.phaseDifferences[0]) - 0.95)).toBeLessThan(0.02);
      }
    }
  });

  test('the same parameters and pattern come from the cache; a kick is judged by looking ahead', () => {
    const session = new CoSimulation(ring(5, false, 1, 1));
    settle(session, 60);
    session.submit({ action: 'break-link', from: 4, to: 0 }, 'test');
    const first = session.step()!.prediction!;
    session.submit({ action: 'restore-link', from: 4, to: 0 }, 'test');
    const restored = session.step()!.prediction!;
    expect(restored.verdict).toBe('persists'); // the guide has not yet left q = 1
    session.submit({ action: 'break-link', from: 4, to: 0 }, 'test');
    const again = session.step()!.prediction!;
    expect(again.fromCache).toBe(true);
    expect(again.verdict).toBe(first.verdict);

    const kicked = new CoSimulation(ring(5, false, 1, 1));
    settle(kicked, 60);
    kicked.submit({ action: 'kick-mode', node: 2, mode: 0, amount: 0.1 }, 'test');
    const prediction = kicked.step()!.prediction!;
    expect(prediction.verdict).toBe('persists');
    expect(prediction.lookAhead?.settled).toBe(true);
    expect(prediction.pattern).toMatchObject({ kind: 'rotating-wave', q: 1 });
  });

  test("a checkpoint keeps the prediction: the restored run's frames equal the uninterrupted ones", () => {
    const scenario = ring(5, false, 1, 1);
    const straight = new CoSimulation(scenario);
    settle(straight, 30);
    straight.submit({ action: 'set-coupling', strength: 0.04 }, 'test');
    straight.step();
    const saved = JSON.parse(JSON.stringify(straight.checkpoint()));
    const straightFrames = [straight.step()!, straight.step()!];
    const resumed = CoSimulation.fromCheckpoint(scenario, saved);
    const resumedFrames = [resumed.step()!, resumed.step()!];
    expect(straightFrames[0].prediction).not.toBeNull();
    expect(resumedFrames).toEqual(straightFrames);
  });
});
