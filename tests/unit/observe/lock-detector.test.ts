import { describe, expect, test } from 'vitest';
import { LockDetector, type LockTransition } from '../../../src/observe/lock-detector.js';
import { Random } from '../../../src/util/random.js';
import { wrapAngle } from '../../../src/util/angles.js';

// The detector's own definitions (module header): frequency lock = bounded phase differences
// with no cycle slip; a slip is an unwrapped move of pi (past the unstable equilibrium of
// sine-like coupling, common practice for phase-locked loops and coupled oscillators).

const WINDOW = 5;
const TOL = 0.05;

/** Pushes `values` (one difference per tick, a second one fixed at -0.1) and returns the transitions. */
function feed(detector: LockDetector, from: number, values: number[], identity = 'in-phase', amplitude = 1): (LockTransition | null)[] {
  return values.map((v, i) => detector.push(from + i, [v, -0.1], amplitude, identity));
}

function lockedDetector(at = 0.3): LockDetector {
  const detector = new LockDetector(2, WINDOW, TOL);
  feed(detector, 0, new Array(WINDOW).fill(at));
  expect(detector.status).toBe('locked');
  return detector;
}

describe('acquiring a lock', () => {
  test('locks once the window is full, converged and of one identity; lockedSince is that tick', () => {
    const detector = new LockDetector(2, WINDOW, TOL);
    const transitions = feed(detector, 0, [0.3, 0.3, 0.3, 0.3]);
    expect(transitions.every((t) => t === null)).toBe(true);
    expect(detector.status).toBe('unlocked');
    expect(detector.push(4, [0.3, -0.1], 1, 'in-phase')).toEqual({ kind: 'lock', label: 'in-phase' });
    expect(detector.lockedSince).toBe(4);
    expect(detector.label).toBe('in-phase');
  });

  test('does not lock while the snapshot identity changes inside the window', () => {
    const detector = new LockDetector(2, WINDOW, TOL);
    feed(detector, 0, [0.3, 0.3, 0.3], 'cluster');
    feed(detector, 3, [0.3, 0.3], 'in-phase');
    expect(detector.status).toBe('unlocked');
    feed(detector, 5, [0.3, 0.3, 0.3], 'in-phase');
    expect(detector.status).toBe('locked');
  });

  test('a quiet (non-oscillating) system is never locked', () => {
    const detector = new LockDetector(1, 2, TOL);
    detector.push(0, [0], 1e-6, 'x');
    detector.push(1, [0], 1e-6, 'x');
    expect(detector.locked).toBe(false);
  });

  test('a phase difference that wraps across pi is not mistaken for a jump', () => {
    const detector = new LockDetector(1, 3, TOL);
    detector.push(0, [Math.PI - 0.01], 1, 'x');
    detector.push(1, [-Math.PI + 0.01], 1, 'x');
    detector.push(2, [Math.PI - 0.005], 1, 'x');
    expect(detector.status).toBe('locked');
  });
});

describe('a locked ring that moves', () => {
  test('holds "locked" through excursions inside the hysteresis band (twice the tolerance)', () => {
    const detector = lockedDetector();
    feed(detector, 5, [0.3 + 0.08]);
    expect(detector.status).toBe('locked');
  });

  test('a smooth move of 1.5 rad to a new state is settling, then settles again: no unlock', () => {
    const detector = lockedDetector();
    const path = Array.from({ length: 30 }, (_, i) => 0.3 + 1.5 * Math.min(1, (i + 1) / 15));
    const transitions = feed(detector, 5, path).filter((t) => t !== null);
    expect(transitions.map((t) => t!.kind)).toEqual(['settled']);
    expect(detector.status).toBe('locked');
    expect(detector.label).toBe('in-phase');
    expect(detector.slips).toBe(0);
  });

  test('while moving it reports settling and the size of the move', () => {
    const detector = lockedDetector();
    feed(detector, 5, [0.5, 0.7, 0.9]);
    expect(detector.status).toBe('settling');
    expect(detector.settlingSince).not.toBeNull();
    expect(detector.largestMove).toBeCloseTo(0.6, 12);
  });

  test('a move of pi from where it last settled is a cycle slip: unlocked, counted, the difference named', () => {
    const detector = lockedDetector(0);
    const path = Array.from({ length: 12 }, (_, i) => 0.3 * (i + 1)); // 0.3 .. 3.6 rad, wrapped by the push
    const transitions = feed(
      detector,
      5,
      path.map((v) => Math.atan2(Math.sin(v), Math.cos(v))),
    ).filter((t) => t !== null);
    expect(transitions).toHaveLength(1);
    const t = transitions[0]!;
    expect(t.kind).toBe('unlock');
    if (t.kind !== 'unlock') return;
    expect(t.cause).toBe('slip');
    expect(t.pair).toBe(0);
    expect(t.move).toBeGreaterThanOrEqual(Math.PI);
    expect(detector.slips).toBe(1);
    expect(detector.status).toBe('unlocked');
  });

  test('a steady beat (unlocked pair drifting 0.2 rad a tick) is caught as a slip within one turn', () => {
    const detector = lockedDetector(0);
    let unlockedAt: number | null = null;
    for (let i = 1; i <= 40 && unlockedAt === null; i++) {
      const v = 0.2 * i;
      const t = detector.push(4 + i, [Math.atan2(Math.sin(v), Math.cos(v)), -0.1], 1, 'in-phase');
      if (t?.kind === 'unlock') unlockedAt = i;
    }
    // pi / 0.2 = 15.7 ticks
    expect(unlockedAt).toBe(16);
  });

  test('a transient shape change (an amplitude kick) is settling, not a pattern change', () => {
    const detector = lockedDetector();
    const transitions = [...feed(detector, 5, [0.3, 0.3], 'cluster'), ...feed(detector, 7, [0.3, 0.3, 0.3], 'in-phase')];
    expect(transitions.filter((t) => t !== null).map((t) => t!.kind)).toEqual(['settled']);
    expect(detector.label).toBe('in-phase');
  });

  test('another identity that holds over the whole window, with no slip, is a pattern change', () => {
    const detector = lockedDetector();
    const transitions = feed(detector, 5, new Array(WINDOW + 1).fill(0.9), 'cluster').filter((t) => t !== null);
    expect(transitions).toEqual([{ kind: 'pattern-change', from: 'in-phase', to: 'cluster', move: expect.closeTo(0.6, 12) }]);
    expect(detector.label).toBe('cluster');
  });

  test('an amplitude collapse unlocks', () => {
    const detector = lockedDetector();
    expect(detector.push(5, [0.3, -0.1], 1e-6, 'in-phase')).toEqual({ kind: 'unlock', was: 'in-phase', cause: 'amplitude' });
  });
});

test('a checkpoint continues the detector exactly (state, move, slips)', () => {
  const a = lockedDetector();
  feed(a, 5, [0.6, 0.9]);
  const b = new LockDetector(2, WINDOW, TOL);
  b.load(structuredClone(a.save()));
  const next = [1.2, 1.5, 1.5, 1.5, 1.5, 1.5, 1.5];
  expect(feed(b, 7, next)).toEqual(feed(a, 7, next));
  expect(b.save()).toEqual(a.save());
});

describe('a state the caller knows to be the committed pattern continued', () => {
  test('keeps the committed identity while its own shape differs: settling until that shape has held a window, then locked', () => {
    const detector = lockedDetector();
    const kept = (t: number) => detector.push(t, [0.3, -0.1], 1, 'in-phase', undefined, 'cluster');
    const transitions = [kept(5), kept(6), kept(7), kept(8)];
    expect(detector.status).toBe('settling');
    transitions.push(kept(9));
    expect(transitions.filter((t) => t !== null)).toEqual([{ kind: 'settled', label: 'in-phase', move: 0 }]);
    expect(detector.status).toBe('locked');
    expect(detector.label).toBe('in-phase');
  });

  test('a pair exempt from slipping (its links broken, its nodes still joined) may wind freely', () => {
    const detector = lockedDetector(0);
    for (let i = 1; i <= 20; i++) {
      const v = wrapTurn(0.3 * i);
      expect(detector.push(4 + i, [v, -0.1], 1, 'in-phase', [0, 1])).toBeNull();
    }
    expect(detector.slips).toBe(0);
    expect(detector.status).toBe('settling');
  });
});

function wrapTurn(v: number): number {
  return Math.atan2(Math.sin(v), Math.cos(v));
}

test('noise that spreads a locked ring beyond the tolerance, without drift, keeps it locked (not settling)', () => {
  const detector = new LockDetector(2, 20, TOL);
  feed(detector, 0, new Array(20).fill(0.3));
  expect(detector.status).toBe('locked');
  // +-0.1 rad of alternating noise: four times the tolerance in spread, no net motion
  const noisy = Array.from({ length: 200 }, (_, i) => 0.3 + (i % 2 === 0 ? 0.1 : -0.1) * (1 + 0.3 * Math.sin(i)));
  const transitions = feed(detector, 20, noisy).filter((t) => t !== null);
  expect(transitions).toEqual([]);
  expect(detector.status).toBe('locked');
  // the same spread with a steady drift of 0.01 rad a tick moves it: settling
  feed(
    detector,
    220,
    Array.from({ length: 10 }, (_, i) => 0.3 + 0.01 * (i + 1) + (i % 2 === 0 ? 0.1 : -0.1)),
  );
  expect(detector.status).toBe('settling');
});

describe('lock detector window measures', () => {
  test('drift and excursion equal their definitions computed directly, bit for bit, across wraps and a partly filled window', () => {
    // Definitions from the detector's documentation: drift = max_k |mean(newer half) - mean(older
    // half)| and excursion = max |wrap(h - newest)|, each over the ticks in the window, oldest
    // first; computed here the plain way (one pass per difference, wrapAngle on every term).
    const size = 3;
    const window = 7;
    const detector = new LockDetector(size, window);
    const random = new Random(17);
    const ticks: number[][] = [];
    let phase = [0.1, 3.0, -3.1];
    for (let t = 0; t < 40; t++) {
      // steps of up to 0.8 rad carry the differences across +-pi now and then
      phase = phase.map((p) => wrapAngle(p + 1.6 * (random.uniform() - 0.5)));
      ticks.push(phase);
      detector.push(t, phase, 1, 'a');
      const seen = ticks.slice(-window);
      const n = seen.length;
      const half = Math.floor(n / 2);
      let drift = 0;
      let excursion = 0;
      for (let k = 0; k < size; k++) {
        let older = 0;
        let newer = 0;
        for (let i = 0; i < n; i++) {
          const d = wrapAngle(seen[i][k] - phase[k]);
          if (i < half) older += d;
          else newer += d;
          excursion = Math.max(excursion, Math.abs(d));
        }
        if (n >= 2) drift = Math.max(drift, Math.abs(newer / (n - half) - older / half));
      }
      expect(detector.windowDrift).toBe(drift);
      expect(detector.windowExcursion).toBe(excursion);
    }
  });
});
