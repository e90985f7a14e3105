import { describe, expect, test } from 'vitest';
import { CoSimulation } from '../../../src/session/session.js';
import { wrapAngle } from '../../../src/util/angles.js';
import { deltaToPpm } from '../../../src/scenario/units.js';
import { patternCatalogue } from '../../../src/predict/catalogue.js';
import { continueBranch, type Branch } from '../../../src/predict/continuation.js';
import { parseContinuationParameter } from '../../../src/predict/continuation-parameter.js';
import { GuideModel } from '../../../src/predict/guide-model.js';
import { makeScenario } from '../../support/scenarios.js';

/**
 * Locking range of a detuned pair by continuation, against Adler ("A Study of Locking Phenomena
 * in Oscillators", Proc. IRE 34, 1946): psi' = dw - K sin psi locks for |dw| <= K, the edge being
 * the saddle-node at sin psi = 1. For two nodes of the reference model with two-way dissipative
 * coupling, dw = eps omega (Delta_0 - Delta_1) and K = eps kappa sigma (docs/model.md, 'Adler pair',
 * valid for kappa sigma << g), so the predicted limit in Delta_0 with Delta_1 = 0 is
 * kappa sigma / omega.
 */
const eps = 0.01;
const coupling = 0.05; // kappa sigma, small against g = 1
const K = eps * coupling;

const pairScenario = (detuning0: number) =>
  makeScenario({
    nodes: 2,
    twoWay: true,
    epsilon: eps,
    modes: [{ omega: 1, gain: 1, loss: 0 }],
    coupling: { strength: coupling, reactive: 0, dissipative: 1 },
    detuning: [detuning0, 0],
    initial: { pattern: { q: 0, amplitude: 2, mode: 0 } },
    stepsPerPeriod: 32,
    macroPeriods: 4,
  });

function pairBranch(): Branch {
  const model = new GuideModel(pairScenario(0));
  const inPhase = patternCatalogue(model).patterns.find((p) => p.kind === 'in-phase')!;
  expect(inPhase.stable).toBe(true);
  return continueBranch(model, Float64Array.from(inPhase.state), parseContinuationParameter('detuning:0', model.params));
}

describe('locking range of a detuned pair', () => {
  const branch = pairBranch();

  test('the continued limit in Delta_0 is a fold at |Delta_0 - Delta_1| = kappa sigma / omega within 2% (Adler 1946), at sin psi = 1', () => {
    for (const [limit, sign] of [
      [branch.limits.increasing!, 1],
      [branch.limits.decreasing!, -1],
    ] as const) {
      expect(limit.kind).toBe('fold');
      // Adler 1946: |dw| = K, i.e. |Delta_0 - 0| omega = kappa sigma
      expect(Math.abs(limit.parameter - sign * coupling)).toBeLessThan(0.02 * coupling);
      // Adler 1946: the edge is at psi = +-pi/2 (psi = arg a_0 - arg a_1 = -phaseDifferences[0])
      expect(Math.abs(Math.abs(limit.point.phaseDifferences[0]) - Math.PI / 2)).toBeLessThan(0.01);
      // engineering units: ppm = Delta eps / 1e-6 (README, 'Units')
      expect(limit.ppm).toBeCloseTo(deltaToPpm(limit.parameter, eps), 9);
    }
    // the kept branch is stable from fold to fold (marginal only next to the folds, where the
    // margin K cos psi -> 0) and its phase difference obeys sin psi = omega Delta_0 / K (Adler 1946)
    for (const point of branch.points.slice(1, -1)) {
      expect(point.stable === true || (point.stable === null && Math.abs(point.parameter) > 0.9 * coupling)).toBe(true);
      expect(Math.abs(Math.sin(-point.phaseDifferences[0]) - point.parameter / coupling)).toBeLessThan(0.02);
    }
  });

  /** psi = arg a_0 - arg a_1 unwrapped over a run, with the lock state at the end. */
  function follow(detuning0: number, span: number): { drift: number; finalLocked: boolean; finalPsi: number } {
    const session = new CoSimulation(pairScenario(detuning0));
    session.runUntil(2 / K);
    const first = session.step()!;
    let previous = wrapAngle(first.full.phase[0][0] - first.full.phase[1][0]);
    let drift = 0;
    let last = null;
    const start = session.tau;
    while (session.tau < start + span) {
      last = session.step()!;
      const psi = wrapAngle(last.full.phase[0][0] - last.full.phase[1][0]);
      drift += wrapAngle(psi - previous);
      previous = psi;
    }
    return { drift, finalLocked: last!.full.pattern.locked, finalPsi: previous };
  }

  test('predicted against observed: the full system stays locked 5% inside the predicted limit and slips 5% outside', () => {
    const limit = branch.limits.increasing!.parameter;
    const inside = follow(0.95 * limit, 8 / K);
    // Adler 1946: locked, psi settles at asin(0.95) (still approaching it when the count starts,
    // hence some drift, but a slip would add a full turn); no slip over eight coupling times
    expect(Math.abs(inside.drift)).toBeLessThan(Math.PI);
    expect(inside.finalLocked).toBe(true);
    expect(Math.abs(Math.sin(inside.finalPsi) - 0.95)).toBeLessThan(0.02);
    // outside: beats at sqrt(1.05^2 - 1) K = 0.32 K (Adler 1946), one slip per 19.6 / K, so
    // two beat periods surely hold more than one full turn of psi
    const outside = follow(1.05 * limit, 40 / K);
    expect(Math.abs(outside.drift)).toBeGreaterThan(2 * Math.PI);
  });
});
