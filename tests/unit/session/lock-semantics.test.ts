import { describe, expect, test } from 'vitest';
import { CampaignRun, parseCampaign, tickViewOf, type FaultVerdict } from '../../../src/campaign/index.js';
import type { Scenario } from '../../../src/scenario/types.js';
import { CoSimulation, type Frame, type SessionEvent } from '../../../src/session/session.js';
import { wrapAngle } from '../../../src/util/angles.js';
import { makeScenario, ringLinks } from '../../support/scenarios.js';
import { adlerPairScenario } from '../../support/adler-pair.js';
import { parseScenario } from '../../../src/scenario/parse.js';

/**
 * What lock, loss of lock and a pattern change mean, on real runs of the full system: the live
 * timeline (session events) and the soak verdicts (CampaignRun) must say the same thing, with
 * the live prediction's continued state as the reference where one exists.
 *
 * Outside references: Adler, "A Study of Locking Phenomena in Oscillators", Proc. IRE 34 (1946):
 * a pair with detuning dw and coupling K locks at sin psi = dw / K when |dw| <= K and slips
 * otherwise; for two nodes of the reference model with two-way dissipative coupling,
 * dw = eps omega (Delta_0 - Delta_1) and K = eps kappa sigma (valid for kappa sigma << g). The
 * continued locked state is checked against the closed-form guiding system of the one-mode
 * model (README, "Model"): a'_k = (eps/2)[g(1 - |a_k|^2/4) a_k - d a_k + 2 i omega Delta_k a_k
 * + kappa sum_l A_kl (sigma - i rho/omega)(a_l - a_k)].
 */

interface Run {
  session: CoSimulation;
  frames: Frame[];
  events: SessionEvent[];
  verdicts: FaultVerdict[];
}

/** Runs `scenario` with a campaign (times in slow units) to `untilSlow`, keeping every frame. */
function run(scenario: Scenario, faults: unknown[], untilSlow: number, criteria: Record<string, unknown> = {}): Run {
  const session = new CoSimulation(scenario, { integrator: 'micro' });
  const campaign = parseCampaign({ timeUnit: 'slow', criteria, faults }, scenario);
  const until = untilSlow / scenario.epsilon;
  const faultsRun = new CampaignRun(campaign, session.params, until, session.lock, { epsilon: scenario.epsilon, secondsPerTau: 1e-7 });
  const frames: Frame[] = [];
  const events: SessionEvent[] = [];
  const verdicts: FaultVerdict[] = [];
  while (session.tau < until * (1 - 1e-12)) {
    for (const q of faultsRun.beforeTick(session.tau)) session.enqueue(q.perturbation, q.by);
    const frame = session.step(until)!;
    frames.push(frame);
    events.push(...frame.events);
    verdicts.push(...faultsRun.afterTick(tickViewOf(frame, session.pairs)));
  }
  verdicts.push(...faultsRun.finishAll());
  return { session, frames, events, verdicts };
}

const kinds = (events: SessionEvent[], after: number) =>
  events.filter((e) => e.tau > after && e.kind !== 'perturbation').map((e) => e.kind);

describe('a smooth move to the continued state is not a loss of lock', () => {
  // a detuned six-node two-way ring with some reactive coupling; one direction of one link breaks
  const n = 6;
  const scenario = makeScenario({
    nodes: n,
    twoWay: true,
    epsilon: 0.01,
    modes: [{ omega: 1, gain: 1, loss: 0 }],
    coupling: { strength: 0.1, reactive: 0.3, dissipative: 1 },
    detuning: [0.02, -0.03, 0.01, 0.04, -0.02, 0.0],
    initial: { pattern: { q: 0, amplitude: 2, mode: 0 } },
    stepsPerPeriod: 16,
    macroPeriods: 2,
  });
  const breakAt = 150;
  const result = run(
    scenario,
    [{ id: 'half-open-2-3', start: breakAt, action: 'break-link', params: { from: 2, to: 3 }, restore: 'none' }],
    500,
    { relockWithin: 300 },
  );
  const applied = breakAt / scenario.epsilon;

  test('the timeline logs no unlock and no pattern change, though the phases move well beyond the lock tolerance', () => {
    expect(kinds(result.events, 0)).toEqual(['lock']);
    expect(kinds(result.events, applied)).toEqual([]);
    const v = result.verdicts[0];
    expect(v.shift).toBeGreaterThan(0.2); // four times the old 0.05 rad window rule, twice its unlock band
    const last = result.frames[result.frames.length - 1].full.pattern;
    expect(last.status).toBe('locked');
    expect(last.kind).toBe('in-phase');
    expect(last.slips).toBe(0);
  });

  test('the ring settles on the predicted continued state, which is a locked state of the closed-form guiding system', () => {
    const p = result.frames.find((f) => f.prediction)!.prediction!;
    expect(p.verdict).toBe('persists');
    const predicted = p.pattern!.phaseDifferences;
    const last = result.frames[result.frames.length - 1];
    const distance = Math.max(...last.full.phaseDifferences.map((d, k) => Math.abs(wrapAngle(d - predicted[k]))));
    expect(distance).toBeLessThan(0.05);
    // closed form: at a relative equilibrium a'_k = i W a_k for one W; check it at the guide's final state
    const a = last.guide.amplitude.map((m, k) => ({
      re: m[0] * Math.cos(last.guide.phase[k][0]),
      im: m[0] * Math.sin(last.guide.phase[k][0]),
    }));
    const links = ringLinks(n, true).filter((l) => !(l.from === 2 && l.to === 3));
    const { strength: kappa, reactive: rho, dissipative: sigma } = scenario.coupling;
    const rates = a.map((ak, k) => {
      let re = (1 - (ak.re ** 2 + ak.im ** 2) / 4) * ak.re - 2 * scenario.detuning[k] * ak.im;
      let im = (1 - (ak.re ** 2 + ak.im ** 2) / 4) * ak.im + 2 * scenario.detuning[k] * ak.re;
      for (const l of links.filter((x) => x.to === k)) {
        const dr = a[l.from].re - ak.re;
        const di = a[l.from].im - ak.im;
        re += kappa * (sigma * dr + rho * di);
        im += kappa * (sigma * di - rho * dr);
      }
      // a' / (i a) must be real and the same for every node
      const r2 = ak.re ** 2 + ak.im ** 2;
      return { w: (im * ak.re - re * ak.im) / r2, radial: (re * ak.re + im * ak.im) / r2 };
    });
    for (const r of rates) {
      expect(Math.abs(r.radial)).toBeLessThan(1e-4);
      expect(Math.abs(r.w - rates[0].w)).toBeLessThan(1e-4);
    }
  });

  test('the soak verdict: persisted, with the shift and the settling time, no contradiction in the row', () => {
    const v = result.verdicts[0];
    expect(v.persisted).toBe(true);
    expect(v.slipped).toBe(false);
    expect(v.became).toEqual([]);
    expect(v.settled).toBe(true);
    expect(v.fromContinued).toBeLessThan(0.05);
    expect(v.outcome).toBe('pass');
    expect(v.notes[0]).toMatch(/^moved 0\.\d\d rad to the continued state, settled in \d+(\.\d+)? slow units$/);
    expect(v.settledAfter!.slow).toBeGreaterThan(5);
    expect(v.settledAfter!.slow).toBeLessThan(300);
  });
});

describe('real losses are still caught, live and in the verdict alike (Adler pair)', () => {
  const eps = 0.01;
  const kappaSigma = 0.05;
  const pair = () => parseScenario(adlerPairScenario(eps, kappaSigma), 'adler pair');
  // Delta_0 = ratio * kappa sigma (omega = 1): dw = ratio * K
  const step = (ratio: number) => ({
    id: `step-${ratio}`,
    start: 100,
    action: 'set-detuning',
    params: { node: 0, delta: ratio * kappaSigma },
    restore: 'none',
  });

  test('a step to 0.8 K moves psi by asin(0.8) = 0.93 rad and persists: no unlock', () => {
    const r = run(pair(), [step(0.8)], 400, { relockWithin: 250 });
    expect(kinds(r.events, 100 / eps)).toEqual([]);
    const v = r.verdicts[0];
    expect(v.persisted).toBe(true);
    expect(Math.abs(v.shift - Math.asin(0.8)) / Math.asin(0.8)).toBeLessThan(0.03);
  });

  test('a step to 1.5 K slips: unlock (cycle slip) on the timeline, FAIL in the verdict, no re-lock', () => {
    const r = run(pair(), [step(1.5)], 400, { relockWithin: 250 });
    const after = r.events.filter((e) => e.tau > 100 / eps && e.kind === 'unlock');
    expect(after).toHaveLength(1);
    expect(after[0].message).toMatch(/cycle slip: the phase difference of nodes 0 and 1 moved/);
    const v = r.verdicts[0];
    expect(v.slipped).toBe(true);
    expect(v.persisted).toBe(false);
    expect(v.recovered).toBe(false);
    expect(v.outcome).toBe('fail');
    // a drifting ring stays unlocked: it never re-locks
    expect(r.frames[r.frames.length - 1].full.pattern.status).toBe('unlocked');
    expect(kinds(r.events, 100 / eps)).toEqual(['unlock']);
  });

  test('overlapping windows: a slip caused by the later fault does not fail the earlier, settled one', () => {
    const r = run(pair(), [step(0.5), { ...step(1.5), id: 'later', start: 250 }], 400, { relockWithin: 250 });
    const [first, later] = [r.verdicts.find((v) => v.id === 'step-0.5')!, r.verdicts.find((v) => v.id === 'later')!];
    expect(first.cutShort).toEqual({ at: expect.closeTo(250 / eps, -2), by: 'later' });
    expect(first.outcome).toBe('pass');
    expect(first.persisted).toBe(true);
    expect(first.notes[0]).toMatch(/^judged until the next fault \(later\) at tau .*, settled: yes$/);
    expect(later.outcome).toBe('fail');
    expect(later.slipped).toBe(true);
  });

  test('a soak that ends while the ring is still settling gives INCOMPLETE, not FAIL', () => {
    const r = run(pair(), [step(0.8)], 103, { relockWithin: 250 });
    const v = r.verdicts[0];
    expect(v.complete).toBe(false);
    expect(v.reasons).toEqual([]);
    expect(v.outcome).toBe('incomplete');
  });
});

test('a move into another pattern without a slip is a pattern change, live and in the verdict', () => {
  // a five-node two-way ring in the twisted state q = 1; both directions of one link break, so the
  // ring becomes a chain, whose twist unwinds into in-phase: each coupled pair moves 2 pi / 5, none slips
  const scenario = makeScenario({
    nodes: 5,
    twoWay: true,
    epsilon: 0.01,
    modes: [{ omega: 1, gain: 1, loss: 0 }],
    coupling: { strength: 0.1, reactive: 0, dissipative: 1 },
    initial: { pattern: { q: 1, amplitude: 2, mode: 0 } },
    stepsPerPeriod: 16,
    macroPeriods: 2,
  });
  const faults = [
    { id: 'open-0-1', start: 60, action: 'break-link', params: { from: 0, to: 1 }, restore: 'none' },
    { id: 'open-1-0', start: 60, action: 'break-link', params: { from: 1, to: 0 }, restore: 'none' },
  ];
  const r = run(scenario, faults, 500, { relockWithin: 400 });
  expect(kinds(r.events, 0)).toEqual(['lock', 'pattern-change']);
  expect(r.events.find((e) => e.kind === 'pattern-change')!.message).toMatch(
    /from rotating-wave q=1 on mode 0 to in-phase q=0 on mode 0 without a cycle slip/,
  );
  const v = r.verdicts[0];
  expect(v.slipped).toBe(false);
  expect(v.persisted).toBe(false);
  expect(v.became).toEqual(['in-phase q=0 on mode 0']);
  expect(v.reasons[0]).toBe('the locked pattern did not persist: moved without a cycle slip into in-phase q=0 on mode 0');
  // the prediction said so too, with the same slip definition (no slip on the way)
  const p = r.frames.find((f) => f.prediction)!.prediction!;
  expect(p.verdict).toBe('lost');
  expect(p.lookAhead!.slipped).toBe(false);
  expect(p.pattern!.kind).toBe('in-phase');
});

test('an amplitude kick on a locked in-phase ring is a transient: settling, no pattern change, predicted to persist', () => {
  const scenario = makeScenario({
    nodes: 5,
    twoWay: true,
    epsilon: 0.01,
    modes: [{ omega: 1, gain: 1, loss: 0 }],
    coupling: { strength: 0.2, reactive: 0, dissipative: 1 },
    initial: { pattern: { q: 0, amplitude: 2, mode: 0 } },
    noise: { intensity: 1e-8 },
    stepsPerPeriod: 16,
    macroPeriods: 2,
  });
  const r = run(scenario, [{ id: 'kick-1', start: 50, action: 'kick-mode', params: { node: 1, mode: 0, amount: 0.3 } }], 120);
  const kickedAt = 50 / scenario.epsilon;
  expect(kinds(r.events, kickedAt)).toEqual([]);
  const after = r.frames.filter((f) => f.tau > kickedAt);
  expect(after.some((f) => f.full.pattern.status === 'settling' && f.full.pattern.shape !== 'in-phase')).toBe(true);
  expect(after.every((f) => f.full.pattern.kind === 'in-phase')).toBe(true);
  expect(after[after.length - 1].full.pattern.status).toBe('locked');
  expect(after.find((f) => f.prediction)!.prediction!.verdict).toBe('persists');
  expect(r.verdicts[0].outcome).toBe('pass');
});
