import { describe, expect, test } from 'vitest';
import { FaultEvaluation, type FaultPlan, type FaultVerdict, type SystemView, type TickView } from '../../../src/campaign/index.js';
import type { LockStatus } from '../../../src/observe/lock-detector.js';
import { Random } from '../../../src/util/random.js';

/**
 * Verdict logic on hand-made tick sequences (no simulation): two nodes: one coupled pair with
 * difference psi, neighbour differences [psi, -psi]. What the lock detector would say (committed label, status, slip
 * count) is written by hand per tick; the definitions are the README's in src/campaign.
 * Times are in tau; one tick = 1; the fault is applied at 10 and restored at 20.
 */
const LOCKED = 'in-phase q=0 on mode 0';
const base = { epsilon: 0.01, secondsPerTau: 1e-7 };
/** The detector's tolerance (rad) and window (tau, five ticks). */
const LOCK = { tolerance: 0.05, window: 5 };

const criteria = {
  mustPersist: true,
  mustRelock: true,
  relockWithin: 30,
  maxPhaseExcursion: null,
  maxDivergence: null,
  predictionMustAgree: false,
};
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

interface Detector {
  label?: string;
  status?: LockStatus;
  slips?: number;
  mode?: number;
}

function view(tau: number, psi: number, d: Detector = {}, extra: Partial<TickView> = {}): TickView {
  const label = d.label ?? LOCKED;
  const system: SystemView = {
    label,
    status: d.status ?? (label === 'unlocked' ? 'unlocked' : 'locked'),
    mode: d.mode ?? 0,
    phaseDifferences: [psi, -psi],
    pairDifferences: [psi],
    watched: [1],
    slips: d.slips ?? 0,
  };
  return { tick: tau, tau, full: system, guide: { ...system }, divergence: 0.01, prediction: null, ...extra };
}

const wrap = (x: number) => Math.atan2(Math.sin(x), Math.cos(x));

/** Ticks tau = 11..end; restore at 20 as the runner does; finish at the window end (50) or at `end`. */
function evaluate(
  p: FaultPlan,
  psi: (t: number) => number,
  detector: (t: number) => Detector = () => ({}),
  end = 50,
  extra: (t: number) => Partial<TickView> = () => ({}),
  before: Detector = {},
): FaultVerdict {
  const e = FaultEvaluation.begin(p, 10, { action: 'set-detuning', node: 0, delta: 0 }, view(9, psi(9), before), LOCK);
  for (let t = 11; t <= end; t++) {
    if (e.restoreDue(t - 1)) e.markRestored(t - 1);
    e.observe(view(t, wrap(psi(t)), detector(t), extra(t)));
    if (e.windowClosed(t)) return e.finish(true, base);
  }
  return e.finish(false, base);
}

/** A permanent fault (no restore) whose window is 30 tau. */
const permanent = plan({ duration: null, restore: 'none' });

describe('a smooth move is not a loss', () => {
  test('moving 0.4 rad to the predicted continued state without a slip persists; the shift and settling time are reported', () => {
    // psi relaxes from 0 to 0.4 with time constant 3 (it is within 0.05 of 0.4 from t = 10 + 3 ln 8 = 16.2 on)
    const psi = (t: number) => (t < 10 ? 0 : 0.4 * (1 - Math.exp(-(t - 10) / 3)));
    const continued = { mode: 0, phaseDifferences: [0.4, -0.4] };
    const v = evaluate(
      permanent,
      psi,
      (t) => ({ status: t < 20 ? 'settling' : 'locked' }),
      50,
      () => ({ prediction: { persists: true, tau: 10, message: null, continued } }),
    );
    expect(v.persisted).toBe(true);
    expect(v.slipped).toBe(false);
    expect(v.became).toEqual([]);
    expect(v.lostAt).toBeNull();
    expect(v.settled).toBe(true);
    expect(v.shift).toBeCloseTo(0.4, 4);
    expect(v.fromContinued).toBeLessThan(1e-3);
    expect(v.settledAfter?.tau).toBe(7); // first tick from which |psi - 0.4| <= 0.05 stays: t = 17
    expect(v.notes).toEqual(['moved 0.40 rad to the continued state, settled in 0.07 slow units']);
    expect(v.recovered).toBe(true);
    expect(v.timeToRelock).toBeNull(); // never lost
    expect(v.outcome).toBe('pass');
    expect(v.pass).toBe(true);
  });

  test('a settled state far from the predicted continued state is said so', () => {
    const continued = { mode: 0, phaseDifferences: [1.2, -1.2] };
    const v = evaluate(
      permanent,
      (t) => (t < 12 ? 0 : 0.4),
      () => ({}),
      50,
      () => ({ prediction: { persists: true, tau: 10, message: null, continued } }),
    );
    expect(v.fromContinued).toBeCloseTo(0.8, 12);
    expect(v.notes).toContain('settled 0.80 rad from the predicted continued state');
    expect(v.notes[0]).toBe('moved 0.40 rad, settled in 0.02 slow units');
  });
});

describe('real losses are caught', () => {
  test('a cycle slip fails mustPersist; the re-lock after the restore is timed from the restore', () => {
    // psi runs through one full turn during the fault: the detector counts a slip at 15, is unlocked until it re-locks at 26
    const psi = (t: number) => (t < 10 ? 0 : t < 20 ? ((t - 10) / 10) * 2 * Math.PI : 2 * Math.PI);
    const v = evaluate(plan(), psi, (t) => (t < 15 ? {} : t < 26 ? { label: 'unlocked', slips: 1 } : { slips: 1 }));
    expect(v.slipped).toBe(true);
    expect(v.slips).toBe(1);
    expect(v.maxPhaseExcursion).toBeGreaterThan(6);
    expect(v.persisted).toBe(false);
    expect(v.became).toEqual(['unlocked']);
    expect(v.lostAt).toBe(15);
    expect(v.recovered).toBe(true);
    expect(v.relockedAt).toBe(26);
    expect(v.timeToRelock).toEqual({ tau: 6, slow: 0.06, seconds: expect.closeTo(6e-7, 18) });
    expect(v.outcome).toBe('fail');
    expect(v.reasons).toEqual(['the locked pattern did not persist: a cycle slip (a phase difference moved 6.28 rad)']);
  });

  test('a drifting (unlocked) ring fails and does not re-lock', () => {
    const v = evaluate(
      plan(),
      (t) => (t < 10 ? 0 : 0.5 * (t - 10)),
      (t) => (t < 16 ? { status: 'settling' } : { label: 'unlocked', slips: Math.floor((t - 10) / 12) + 1 }),
    );
    expect(v.persisted).toBe(false);
    expect(v.recovered).toBe(false);
    expect(v.slips).toBeGreaterThanOrEqual(2);
    expect(v.reasons).toEqual([
      expect.stringMatching(/did not persist: 4 cycle slips/),
      expect.stringMatching(/^did not re-lock into in-phase q=0 on mode 0 within 0.300 slow time units/),
    ]);
  });

  test('a move into another pattern without a slip is a loss, named', () => {
    const v = evaluate(
      permanent,
      (t) => (t < 12 ? 0 : Math.PI / 2),
      (t) => (t < 18 ? { status: 'settling' } : { label: 'rotating-wave q=1 on mode 0' }),
    );
    expect(v.slipped).toBe(false);
    expect(v.persisted).toBe(false);
    expect(v.became).toEqual(['rotating-wave q=1 on mode 0']);
    expect(v.final).toBe('rotating-wave q=1 on mode 0');
    expect(v.reasons[0]).toBe('the locked pattern did not persist: moved without a cycle slip into rotating-wave q=1 on mode 0');
  });

  test('a change of carrying mode is a loss', () => {
    const v = evaluate(
      permanent,
      () => 0,
      (t) => (t < 14 ? {} : t < 20 ? { label: 'unlocked', mode: 1 } : { label: 'in-phase q=0 on mode 1', mode: 1 }),
    );
    expect(v.persisted).toBe(false);
    expect(v.reasons[0]).toMatch(/carrying mode changed/);
  });

  test('still settling when the window closes fails: persistence needs the state to settle', () => {
    const v = evaluate(
      permanent,
      (t) => 0.02 * (t - 9),
      () => ({ status: 'settling' }),
    );
    expect(v.complete).toBe(true);
    expect(v.settled).toBe(false);
    expect(v.persisted).toBe(false);
    expect(v.outcome).toBe('fail');
    expect(v.reasons).toEqual([
      expect.stringMatching(
        /^the ring did not settle within the window \(still settling at the end; largest move 0.620 rad, no cycle slip\)/,
      ),
    ]);
  });
});

describe('INCOMPLETE: judging stopped before the outcome was decided', () => {
  test('the soak ends while the ring is still settling: incomplete, not failed', () => {
    const v = evaluate(
      permanent,
      (t) => 0.02 * (t - 9),
      () => ({ status: 'settling' }),
      25,
    );
    expect(v.complete).toBe(false);
    expect(v.outcome).toBe('incomplete');
    expect(v.pass).toBe(false);
    expect(v.reasons).toEqual([]);
    expect(v.notes).toEqual(['undecided when judging stopped: the ring was still settling']);
  });

  test('the soak ends after a slip and before the re-lock was due: incomplete for the re-lock, but the slip already fails', () => {
    const v = evaluate(
      plan({ criteria: { ...criteria, mustPersist: false } }),
      (t) => (t < 12 ? 0 : 4),
      (t) => (t < 12 ? {} : { label: 'unlocked', slips: 1 }),
      25,
    );
    expect(v.outcome).toBe('incomplete');
    const strict = evaluate(
      plan(),
      (t) => (t < 12 ? 0 : 4),
      (t) => (t < 12 ? {} : { label: 'unlocked', slips: 1 }),
      25,
    );
    expect(strict.outcome).toBe('fail');
  });

  test('the soak ends after the ring settled but before the window closed: still incomplete (the fault may yet act)', () => {
    const v = evaluate(
      permanent,
      (t) => (t < 12 ? 0 : 0.3),
      () => ({}),
      30,
    );
    expect(v.complete).toBe(false);
    expect(v.settled).toBe(true);
    expect(v.outcome).toBe('incomplete');
    expect(v.notes).toContain('undecided when judging stopped: the window had not closed');
  });
});

test('less than a lock window after the fault nothing counts as settled yet, however still the ring looks', () => {
  // the detector says locked throughout and the phases never move; the fault was applied at 10
  const early = evaluate(
    permanent,
    () => 0,
    () => ({}),
    13,
  );
  expect(early.settled).toBe(false);
  expect(early.persisted).toBe(false);
  expect(early.outcome).toBe('incomplete');
  expect(early.notes).toEqual(['undecided when judging stopped: less than a lock window had passed since the fault']);
  const cut = FaultEvaluation.begin(permanent, 10, null, view(9, 0), LOCK);
  for (let t = 11; t <= 13; t++) cut.observe(view(t, 0));
  expect(cut.finish(false, base, undefined, { at: 14, by: 'next' }).outcome).toBe('incomplete');
  const later = FaultEvaluation.begin(permanent, 10, null, view(9, 0), LOCK);
  for (let t = 11; t <= 15; t++) later.observe(view(t, 0));
  expect(later.finish(false, base, undefined, { at: 16, by: 'next' }).outcome).toBe('pass');
});

describe('each fault judged on its own effect', () => {
  const cut = (settledByThen: boolean) => {
    const e = FaultEvaluation.begin(permanent, 10, null, view(9, 0), LOCK);
    for (let t = 11; t <= 30; t++)
      e.observe(view(t, t < 14 ? 0.1 * (t - 10) : 0.4, { status: settledByThen || t < 14 ? 'locked' : 'settling' }));
    return e.finish(false, base, undefined, { at: 31, by: 'later' });
  };

  test('cut short by the next fault after it settled: judged on what happened before, and said so', () => {
    const v = cut(true);
    expect(v.outcome).toBe('pass');
    expect(v.judgedUntil).toBe(30);
    expect(v.cutShort).toEqual({ at: 31, by: 'later' });
    expect(v.notes[0]).toBe('judged until the next fault (later) at tau 31.0000 (slow 0.3100), settled: yes');
  });

  test('cut short before it settled: incomplete, never failed for what the later fault did', () => {
    const v = cut(false);
    expect(v.outcome).toBe('incomplete');
    expect(v.notes[0]).toMatch(/settled: no$/);
  });
});

describe('other criteria', () => {
  test('a ring that was not locked when the fault began fails with that reason', () => {
    const e = FaultEvaluation.begin(plan(), 10, null, view(9, 0, { label: 'unlocked' }), LOCK);
    e.observe(view(11, 0));
    const v = e.finish(true, base);
    expect(v.before).toBe('unlocked');
    expect(v.outcome).toBe('fail');
    expect(v.reasons).toEqual(['the ring was not locked when the fault began; schedule faults after the first lock']);
  });

  test('a ring locked on an unwanted mode fails as a design defect even when the pattern persists', () => {
    const onMode1 = { label: 'in-phase q=0 on mode 1', mode: 1 };
    const v = evaluate(
      permanent,
      () => 0,
      () => onMode1,
      50,
      () => ({}),
      onMode1,
    );
    expect(v.persisted).toBe(true);
    expect(v.outcome).toBe('fail');
    expect(v.reasons).toEqual([expect.stringMatching(/^the ring was locked on unwanted mode 1 before the fault: a design defect/)]);
  });

  test('excursion and divergence limits', () => {
    const strict = plan({ criteria: { ...criteria, maxPhaseExcursion: 0.3, maxDivergence: 0.05 } });
    const v = evaluate(
      strict,
      (t) => (t < 10 ? 0 : t < 20 ? 0.4 : 0),
      () => ({}),
      50,
      (t) => ({ divergence: t === 15 ? 0.2 : 0.01 }),
    );
    expect(v.divergence.max).toBe(0.2);
    expect(v.reasons).toEqual([
      'phase excursion 0.400 rad exceeds 0.3 rad',
      'full-vs-guide divergence grew by 0.190 (from 0.0100 to 0.200), more than 0.05',
    ]);
  });

  test('the prediction: a frame prediction made after the fault wins over the guide, and must agree when asked', () => {
    const asked = plan({ criteria: { ...criteria, predictionMustAgree: true } });
    const first = evaluate(
      asked,
      () => 0.1,
      () => ({}),
      50,
      (t) => ({ prediction: { persists: t < 15, tau: 10, message: 'lost at 50%', continued: null } }),
    );
    expect(first.prediction).toEqual({ source: 'frame', persists: true, agreed: true, message: 'lost at 50%' });
    const stale = evaluate(
      asked,
      () => 0.1,
      () => ({}),
      50,
      () => ({ prediction: { persists: false, tau: 5, message: null, continued: null } }),
    );
    expect(stale.prediction.source).toBe('guide');
    expect(stale.prediction.agreed).toBe(true);
    const disagree = evaluate(
      asked,
      () => 0.1,
      () => ({}),
      50,
      () => ({ prediction: { persists: false, tau: 10, message: null, continued: null } }),
    );
    expect(disagree.prediction.agreed).toBe(false);
    expect(disagree.outcome).toBe('fail');
    expect(disagree.reasons).toEqual(['the prediction (frame) said the pattern would not persist']);
  });
});

test('an evaluation survives a JSON round trip mid-window (checkpoints)', () => {
  const run = (split: boolean) => {
    let e = FaultEvaluation.begin(plan(), 10, null, view(9, 0), LOCK);
    for (let t = 11; t <= 50; t++) {
      if (split && t === 23) e = new FaultEvaluation(JSON.parse(JSON.stringify(e.state)));
      if (e.restoreDue(t - 1)) e.markRestored(t - 1);
      e.observe(view(t, 0.3 * Math.sin(t), t % 7 === 0 ? { status: 'settling' } : {}));
    }
    return e.finish(true, base);
  };
  expect(run(true)).toEqual(run(false));
});

test('a verdict row never contradicts itself, over random detector histories', () => {
  // invariants of the definitions, not values: persisted means nothing else was committed and it
  // settled; pass means no reason; fail means at least one; incomplete only for an unfinished span
  const random = new Random(97);
  const labels = [LOCKED, 'unlocked', 'cluster on mode 0'];
  const statuses: LockStatus[] = ['locked', 'settling'];
  for (let trial = 0; trial < 400; trial++) {
    let slips = 0;
    const script = Array.from({ length: 45 }, () => {
      const label = random.uniform() < 0.8 ? LOCKED : labels[Math.floor(random.uniform() * labels.length)];
      if (label === 'unlocked' && random.uniform() < 0.5) slips++;
      return { label, slips, status: label === 'unlocked' ? ('unlocked' as const) : statuses[Math.floor(random.uniform() * 2)] };
    });
    const end = 20 + Math.floor(random.uniform() * 35);
    const v = evaluate(
      plan(),
      () => random.uniform() - 0.5,
      (t) => script[t - 10],
      end,
    );
    if (v.persisted) {
      expect(v.became).toEqual([]);
      expect(v.slipped).toBe(false);
      expect(v.settled).toBe(true);
    }
    if (v.became.length > 0 || v.slipped) expect(v.persisted).toBe(false);
    expect(v.outcome === 'fail').toBe(v.reasons.length > 0);
    expect(v.pass).toBe(v.outcome === 'pass');
    if (v.outcome === 'incomplete') expect(v.complete).toBe(false);
  }
});
