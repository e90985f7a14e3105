import { describe, expect, test } from 'vitest';
import { FaultEvaluation, type FaultPlan, type TickView } from '../../../src/campaign/index.js';

/**
 * Verdict logic on hand-made tick sequences (no simulation): two nodes, so the neighbour phase
 * differences are [psi, -psi]. Times are in tau; one tick = 1, hold (lock window) = 5.
 */
const LOCKED = 'in-phase q=0 on mode 0';
const base = { epsilon: 0.01, secondsPerTau: 1e-7 };
const hold = 5;

const criteria = { mustPersist: true, mustRelock: true, relockWithin: 30, maxPhaseExcursion: null, maxDivergence: null, predictionMustAgree: false };
const plan = (extra: Partial<FaultPlan> = {}): FaultPlan => ({
  id: 'f',
  source: 'schedule',
  start: 10,
  duration: 10,
  perturbation: { action: 'set-detuning', node: 0, delta: 0.1 },
  restore: 'previous',
  criteria,
  ...extra,
});

function view(tau: number, psi: number, label = LOCKED, extra: Partial<TickView> = {}): TickView {
  const system = { label, mode: 0, phaseDifferences: [psi, -psi] };
  return { tick: tau, tau, full: system, guide: { ...system }, divergence: 0.01, prediction: null, ...extra };
}

/** Run ticks tau = 10..end with psi(t) and label(t); restore at 20 as the runner does. */
function evaluate(p: FaultPlan, psi: (t: number) => number, label: (t: number) => string, end = 50, extra: (t: number) => Partial<TickView> = () => ({})) {
  const e = FaultEvaluation.begin(p, 10, { action: 'set-detuning', node: 0, delta: 0 }, view(9, 0));
  for (let t = 11; t <= end; t++) {
    if (e.restoreDue(t - 1)) e.markRestored(t - 1);
    const wrapped = Math.atan2(Math.sin(psi(t)), Math.cos(psi(t)));
    e.observe(view(t, wrapped, label(t), extra(t)), hold);
    if (e.windowClosed(t)) return e.finish(true, base);
  }
  return e.finish(false, base);
}

describe('fault verdicts', () => {
  test('a phase shift inside the lock with a detector transient persists and re-locks after the restore', () => {
    const v = evaluate(plan(), (t) => (t < 20 ? 0.4 : 0.4 * Math.exp(-(t - 20) / 2)), (t) => ((t > 11 && t < 15) || (t > 20 && t < 26) ? 'unlocked' : LOCKED));
    expect(v.persisted).toBe(true);
    expect(v.slipped).toBe(false);
    expect(v.maxPhaseExcursion).toBeCloseTo(0.4, 12);
    expect(v.became).toEqual(['unlocked']);
    expect(v.lostAt).toBe(12);
    // restore at 20; the detector shows the pattern again from 26 on and holds it: 6 tau
    expect(v.restoredAt).toBe(20);
    expect(v.relockedAt).toBe(26);
    expect(v.timeToRelock).toEqual({ tau: 6, slow: 0.06, seconds: expect.closeTo(6e-7, 18) });
    expect(v.windowEnd).toBe(50);
    expect(v.pass).toBe(true);
    expect(v.reasons).toEqual([]);
  });

  test('a cycle slip is a loss: the unwrapped phase difference passes pi', () => {
    // psi runs through one full turn during the fault, then settles at 2 pi (same pattern, one slip)
    const v = evaluate(plan(), (t) => (t < 20 ? ((t - 10) / 10) * 2 * Math.PI : 2 * Math.PI), (t) => (t > 11 && t < 24 ? 'unlocked' : LOCKED));
    expect(v.slipped).toBe(true);
    expect(v.maxPhaseExcursion).toBeGreaterThan(6);
    expect(v.persisted).toBe(false);
    expect(v.recovered).toBe(true);
    expect(v.pass).toBe(false);
    expect(v.reasons[0]).toMatch(/did not persist.*cycle slip/);
  });

  test('settling into another pattern after the restore is a loss; a deformed pattern during the fault is not', () => {
    const deformed = evaluate(plan(), () => 0.2, (t) => (t > 12 && t < 20 ? 'cluster on mode 0' : LOCKED));
    expect(deformed.became).toEqual(['cluster on mode 0']);
    expect(deformed.persisted).toBe(true);
    const switched = evaluate(plan(), () => 0.2, (t) => (t > 22 ? 'rotating-wave q=1 on mode 0' : LOCKED));
    expect(switched.persisted).toBe(false);
    expect(switched.recovered).toBe(false);
    expect(switched.final).toBe('rotating-wave q=1 on mode 0');
    expect(switched.reasons.join(' ')).toMatch(/settled into rotating-wave q=1/);
    expect(switched.reasons.join(' ')).toMatch(/did not re-lock/);
  });

  test('a ring that was not locked when the fault began fails with that reason', () => {
    const e = FaultEvaluation.begin(plan(), 10, null, view(9, 0, 'unlocked'));
    e.observe(view(11, 0), hold);
    const v = e.finish(true, base);
    expect(v.before).toBe('unlocked');
    expect(v.pass).toBe(false);
    expect(v.reasons).toEqual(['the ring was not locked when the fault began; schedule faults after the first lock']);
  });

  test('excursion and divergence limits, and a window cut short does not judge the re-lock', () => {
    const strict = plan({ criteria: { ...criteria, maxPhaseExcursion: 0.3, maxDivergence: 0.05 } });
    const v = evaluate(strict, (t) => (t < 20 ? 0.4 : 0), (t) => (t > 20 && t < 40 ? 'unlocked' : LOCKED), 30, (t) => ({ divergence: t === 15 ? 0.2 : 0.01 }));
    expect(v.complete).toBe(false);
    expect(v.divergence.max).toBe(0.2);
    expect(v.reasons).toEqual(['phase excursion 0.400 rad exceeds 0.3 rad', 'full-vs-guide divergence grew by 0.190 (from 0.0100 to 0.200), more than 0.05']);
  });

  test('the prediction: a frame prediction made after the fault wins over the guide, and must agree when asked', () => {
    const asked = plan({ criteria: { ...criteria, predictionMustAgree: true } });
    const first = evaluate(asked, () => 0.1, () => LOCKED, 50, (t) => ({ prediction: { persists: t < 15 ? true : false, tau: 10, message: 'lost at 50%' } }));
    expect(first.prediction).toEqual({ source: 'frame', persists: true, agreed: true, message: 'lost at 50%' });
    const stale = evaluate(asked, () => 0.1, () => LOCKED, 50, () => ({ prediction: { persists: false, tau: 5, message: null } }));
    expect(stale.prediction.source).toBe('guide');
    expect(stale.prediction.agreed).toBe(true);
    const disagree = evaluate(asked, () => 0.1, () => LOCKED, 50, () => ({ prediction: { persists: false, tau: 10, message: null } }));
    expect(disagree.prediction.agreed).toBe(false);
    expect(disagree.pass).toBe(false);
    expect(disagree.reasons).toEqual(['the prediction (frame) said the pattern would not persist']);
  });

  test('an evaluation survives a JSON round trip mid-window (checkpoints)', () => {
    const run = (split: boolean) => {
      let e = FaultEvaluation.begin(plan(), 10, null, view(9, 0));
      for (let t = 11; t <= 50; t++) {
        if (split && t === 23) e = new FaultEvaluation(JSON.parse(JSON.stringify(e.state)));
        if (e.restoreDue(t - 1)) e.markRestored(t - 1);
        e.observe(view(t, 0.3 * Math.sin(t), t % 7 === 0 ? 'unlocked' : LOCKED), hold);
      }
      return e.finish(true, base);
    };
    expect(run(true)).toEqual(run(false));
  });
});
