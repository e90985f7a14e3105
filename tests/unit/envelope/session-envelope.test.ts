import { describe, expect, test } from 'vitest';
import { CoSimulation, type Frame } from '../../../src/session/session.js';
import { ringOfFour } from './problems.js';

describe('a session in envelope mode', () => {
  test('checkpoints and resumes bit for bit: noise, detuning walk, a queued perturbation and the envelope chunk included', () => {
    const eps = 1e-3;
    const scenario = ringOfFour(eps, 1.37, {
      stepsPerPeriod: 16,
      macroPeriods: 5,
      noise: { intensity: 1e-6, detuningWalk: 1e-7, seed: 31 },
    });
    const options = { integrator: 'envelope' as const };
    const straight = new CoSimulation(scenario, options);
    straight.runUntil(1.5 / eps);
    straight.submit({ action: 'set-detuning', node: 2, delta: 0.4 }, 'op');
    const straightFrames: Frame[] = [];
    straight.runUntil(3 / eps, (f) => straightFrames.push(f));

    const first = new CoSimulation(scenario, options);
    first.runUntil(1.5 / eps);
    first.submit({ action: 'set-detuning', node: 2, delta: 0.4 }, 'op');
    const saved = JSON.parse(JSON.stringify(first.checkpoint()));
    expect(saved.integrator.mode).toBe('envelope');
    expect(saved.integrator.envelope.chunk.end).toBeGreaterThan(0);
    const resumed = CoSimulation.fromCheckpoint(scenario, saved, options);
    const resumedFrames: Frame[] = [];
    resumed.runUntil(3 / eps, (f) => resumedFrames.push(f));

    expect(straightFrames.length).toBeGreaterThan(40);
    expect(straightFrames.every((f) => f.mode === 'envelope' && f.noiseModel === 'averaged-diffusion')).toBe(true);
    expect(Array.from(resumed.full.state)).toEqual(Array.from(straight.full.state));
    expect(Array.from(resumed.guide.state)).toEqual(Array.from(straight.guide.state));
    expect(Array.from(resumed.params.detuning)).toEqual(Array.from(straight.params.detuning));
    expect(resumedFrames).toEqual(straightFrames);
  });

  test('announces itself and its statistically equivalent noise in an event', () => {
    const session = new CoSimulation(ringOfFour(1e-3, 1.37, { noise: { intensity: 1e-6, seed: 2 } }), { integrator: 'envelope' });
    const frame = session.step()!;
    const notice = frame.events.find((e) => e.kind === 'control');
    expect(notice?.message).toMatch(/^envelope mode \(second-order averaging, near-identity reconstruction\) from tau = 0/);
    expect(notice?.message).toMatch(/averaged diffusion of the slow variables \(statistically, not pathwise, equivalent/);
    expect(frame.noiseModel).toBe('averaged-diffusion');
  });
});

describe("'auto' picks the integrator", () => {
  test('the envelope at small eps away from resonance, where it is accurate and cheaper', () => {
    const session = new CoSimulation(ringOfFour(1e-6, 1.37, { stepsPerPeriod: 8, macroPeriods: 1592 }));
    expect(session.integrator.mode).toBe('envelope');
    expect(session.integrator.reason).toMatch(/the envelope is valid \(smallest divisor 3\.70e\+5 eps at \(1, -1\).*times cheaper/);
    expect(session.step()!.mode).toBe('envelope');
  });

  test('micro steps where the envelope would be less accurate (eps = 1e-3) or not cheaper (one period per tick)', () => {
    const coarse = new CoSimulation(ringOfFour(1e-3, 1.37, { macroPeriods: 50 }));
    expect(coarse.integrator.mode).toBe('micro');
    expect(coarse.integrator.reason).toMatch(/more accurate here: the envelope's estimated error .* is above 1e-8/);
    const shortTicks = new CoSimulation(ringOfFour(1e-6, 1.37, { stepsPerPeriod: 8, macroPeriods: 1 }));
    expect(shortTicks.integrator.mode).toBe('micro');
    expect(shortTicks.integrator.reason).toMatch(/about as cheap \(\d+ against about \d+ field evaluations per tick\)/);
    const frame = shortTicks.step()!;
    expect(frame.mode).toBe('micro');
    expect(frame.noiseModel).toBe('none');
  });

  test("'micro' is obeyed, and an unknown request is refused by name", () => {
    const session = new CoSimulation(ringOfFour(1e-6, 1.37, { stepsPerPeriod: 8, macroPeriods: 1592 }), { integrator: 'micro' });
    expect(session.step()!.mode).toBe('micro');
    expect(() => new CoSimulation(ringOfFour(1e-3), { integrator: 'fast' as never })).toThrow(
      /integrator: must be one of micro, envelope, auto \(got "fast"\)/,
    );
  });
});
