import { beforeAll, describe, expect, test } from 'vitest';
import { makeScenario } from '../../support/scenarios.js';
import { CoSimulation, type SessionCheckpoint } from '../../../src/session/session.js';
import { GuideModel } from '../../../src/predict/guide-model.js';
import { LivePredictor } from '../../../src/predict/live.js';
import { DormandPrince } from '../../../src/integrate/dormand-prince.js';
import { ModelParameters } from '../../../src/model/parameters.js';
import { readObservables } from '../../../src/observe/amplitudes.js';
import { accumulateExcursion, SLIP_EXCURSION } from '../../../src/observe/phase-excursion.js';

/**
 * A fault is a jump: the locked state can still exist and be stable under the new parameters
 * while the state the ring is in lies outside its basin. With strong reactive coupling
 * (non-isochronous coupling, rho = 8 sigma) a detuning step of one node well inside the
 * continued locking range makes the amplitudes swing and throws a phase difference over
 * (a cycle slip). The predictor must say "lost" there; continuation alone said "persists".
 *
 * Observed side, outside the predictor: (1) the guiding system integrated with Dormand-Prince
 * at rtol 1e-10, phase differences sampled every 0.01 slow time; (2) the full system (micro
 * steps) of the same ring at eps = 1e-3. The slip definition is the soak verdicts': a neighbour
 * phase difference moves by pi or more.
 */
const strength = 0.03;
const scenario = makeScenario({
  nodes: 5,
  twoWay: true,
  epsilon: 1e-3,
  modes: [{ omega: 1, gain: 1, loss: 0 }],
  coupling: { strength, reactive: 8, dissipative: 1 },
  initial: { pattern: { q: 0, amplitude: 2, mode: 0 } },
  stepsPerPeriod: 8,
});
const nodes = scenario.nodes;

function guideSlips(state: Float64Array, delta: number, slowTime: number): boolean {
  const params = new ModelParameters(scenario);
  params.detuning[0] = delta;
  const model = new GuideModel(scenario, params);
  const y = Float64Array.from(state);
  const solver = new DormandPrince(y.length, (_t, s, d) => model.field(s, d), { rtol: 1e-10, atol: 1e-12 });
  const last = readObservables(y, nodes, 1).phaseDifferences;
  const offsets = new Array<number>(nodes).fill(0);
  for (let t = 0; t < slowTime; t += 0.01) {
    solver.integrate(t, t + 0.01, y);
    if (accumulateExcursion(last, offsets, readObservables(y, nodes, 1).phaseDifferences) >= SLIP_EXCURSION) return true;
  }
  return false;
}

let locked: SessionCheckpoint;
let guideState: Float64Array;

beforeAll(() => {
  const session = new CoSimulation(scenario, { integrator: 'micro' });
  let frame = session.step()!;
  while (!(frame.full.pattern.locked && frame.guide.pattern.locked) && frame.slowTime < 40) frame = session.step()!;
  expect(frame.full.pattern.locked).toBe(true);
  locked = JSON.parse(JSON.stringify(session.checkpoint()));
  guideState = Float64Array.from(session.guide.state);
});

function stepFull(delta: number, slowTime: number): { verdict: string | undefined; message: string | undefined; slipped: boolean } {
  const session = CoSimulation.fromCheckpoint(scenario, locked, { integrator: 'micro' });
  session.submit({ action: 'set-detuning', node: 0, delta }, 'test');
  let frame = session.step()!;
  const prediction = frame.prediction;
  const last = frame.full.phaseDifferences.slice();
  const offsets = new Array<number>(nodes).fill(0);
  let slipped = false;
  const end = frame.slowTime + slowTime;
  while (frame.slowTime < end && !slipped) {
    frame = session.step()!;
    slipped = accumulateExcursion(last, offsets, frame.full.phaseDifferences) >= SLIP_EXCURSION;
  }
  return { verdict: prediction?.verdict, message: prediction?.message, slipped };
}

describe('live prediction of a jump that leaves the basin of a locked state that still exists', () => {
  test('continuing the in-phase state to a 5 kappa step finds it stable: the existence test alone would say "persists"', () => {
    const predictor = new LivePredictor(scenario, new ModelParameters(scenario));
    const params = new ModelParameters(scenario);
    params.detuning[0] = 5 * strength;
    const p = predictor.predict(params, guideState, guideState, { kind: 'in-phase', q: 0, mode: 0, locked: true }, 0);
    expect(p.verdict).toBe('lost');
    expect(p.message).toMatch(/still exists and is stable/);
    expect(p.lookAhead?.slipped).toBe(true);
  });

  test('a 5 kappa step: predicted lost, and both the accurate guide and the full system slip a cycle', () => {
    expect(guideSlips(guideState, 5 * strength, 300)).toBe(true);
    const full = stepFull(5 * strength, 300);
    expect(full.verdict).toBe('lost');
    expect(full.slipped).toBe(true);
  });

  test('a 4 kappa step: predicted to persist, and neither the guide nor the full system slips', () => {
    expect(guideSlips(guideState, 4 * strength, 300)).toBe(false);
    const full = stepFull(4 * strength, 120);
    expect(full.verdict).toBe('persists');
    expect(full.slipped).toBe(false);
  });
});
