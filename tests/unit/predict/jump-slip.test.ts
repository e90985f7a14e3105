import { beforeAll, describe, expect, test } from 'vitest';
import { CoSimulation, type SessionCheckpoint } from '../../../src/session/session.js';
import { loadBuiltInScenario } from '../../../src/scenarios/index.js';
import { wrapAngle } from '../../../src/util/angles.js';

/**
 * Predicted against observed for sudden detuning steps of node 0 on the freshly locked demo
 * board (a fault is a jump, not a ramp). The continuation puts the in-phase pattern's limit near
 * +3.1 ppm (a fold: `syncring predict timing-board-8 --continue detuning:0`; one node held by two
 * links of 1.5 ppm pull each, docs/parts.md); the live prediction must say "persists" where the full system keeps its lock
 * and "lost" where it slips a cycle (a neighbour phase difference moving by pi or more, the
 * definition the soak verdicts use). Just past a fold the slip is slow (the passage by the ghost
 * of the vanished state): at +4 ppm the look-ahead says lost, but the full system had not slipped
 * within 20 slow units when this was written, so the test steps well beyond the limit.
 */
const scenario = loadBuiltInScenario('timing-board-8');
let locked: SessionCheckpoint;

beforeAll(() => {
  const session = new CoSimulation(scenario, { integrator: 'micro' });
  let frame = session.step()!;
  // the prediction starts from the guide's lock: wait for both (under the parts' noise the full system can lock a tick or two first)
  while (!(frame.full.pattern.locked && frame.guide.pattern.locked) && frame.slowTime < 80) frame = session.step()!;
  expect(frame.full.pattern.locked).toBe(true);
  expect(frame.guide.pattern.locked).toBe(true);
  locked = JSON.parse(JSON.stringify(session.checkpoint()));
  // the engine project's test timeout: locking takes some 35 slow units of micro steps, slow on a shared machine
}, 120_000);

function stepAndWatch(ppm: number, slowTime: number): { verdict: string | undefined; slipped: boolean } {
  const session = CoSimulation.fromCheckpoint(scenario, locked, { integrator: 'micro' });
  session.submit({ action: 'set-detuning', node: 0, ppm }, 'test');
  let previous = session.step()!;
  const verdict = previous.prediction?.verdict;
  const drift = new Array<number>(8).fill(0);
  let slipped = false;
  const end = previous.slowTime + slowTime;
  while (previous.slowTime < end && !slipped) {
    const frame = session.step()!;
    frame.full.phaseDifferences.forEach((d, k) => {
      drift[k] += wrapAngle(d - previous.full.phaseDifferences[k]);
      if (Math.abs(drift[k]) >= Math.PI) slipped = true;
    });
    previous = frame;
  }
  return { verdict, slipped };
}

describe('live prediction of a sudden detuning step on the demo board', () => {
  test('+2.5 ppm (inside the limit) is predicted to persist, and the full system keeps its lock', () => {
    expect(stepAndWatch(2.5, 20)).toEqual({ verdict: 'persists', slipped: false });
  });

  test('+5 ppm (beyond it) is predicted lost, and the full system slips a cycle', () => {
    expect(stepAndWatch(5, 30)).toEqual({ verdict: 'lost', slipped: true });
  });
});
