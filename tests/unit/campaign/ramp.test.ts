import { describe, expect, test } from 'vitest';
import { parseCampaign } from '../../../src/campaign/index.js';
import { RAMP_STEPS } from '../../../src/campaign/ramp.js';
import { InputError } from '../../../src/util/input-error.js';
import { campaignRing, driveCampaign, driveCampaignResumed } from '../../support/campaign-ring.js';
import { thrown } from '../../support/thrown.js';

/** Faults that ramp, on a real (small) session: the staircase, the timing of restore and verdict, overlaps, resume. */
const scenario = campaignRing;
const drive = driveCampaign;

describe('a ramping fault', () => {
  test('moves in equal steps from the value it replaces to its own, then holds it for the duration, then restores', () => {
    const seen: { tau: number; delta: number }[] = [];
    const { session, log, verdicts } = drive(
      {
        detector: { lockWindow: 2 },
        criteria: { relockWithin: 300 },
        faults: [{ id: 'warm', start: 400, action: 'set-detuning', params: { node: 0, delta: 0.03 }, ramp: 200, duration: 100 }],
      },
      1400,
      (s) => seen.push({ tau: s.tau, delta: s.params.detuning[0] }),
    );
    const v = verdicts[0];
    const tick = session.macroStep;
    // one batch per tick at most: a ramp of fewer ticks than RAMP_STEPS takes several steps at once
    const steps = log.filter((e) => e.by.startsWith('campaign:warm (ramp'));
    expect(steps.length).toBe(Math.min(RAMP_STEPS, Math.ceil(200 / tick)));
    expect(steps.at(-1)!.by).toBe(`campaign:warm (ramp ${RAMP_STEPS}/${RAMP_STEPS})`);
    expect(log.at(-1)!.by).toBe('campaign:warm (restore)');
    expect(v.rampedUntil).toBeCloseTo(v.appliedAt + 200, 9);
    expect(v.restoredAt! - v.rampedUntil!).toBeGreaterThanOrEqual(100);
    expect(v.restoredAt! - v.rampedUntil!).toBeLessThan(100 + tick);
    expect(v.windowEnd).toBeCloseTo(v.rampedUntil! + 100 + 300, 9);
    // the staircase: during the tick that ends at tau the value is the one due at its start (0.01 -> 0.03)
    for (const { tau, delta } of seen) {
      const start = tau - tick;
      if (start < v.appliedAt || start >= v.restoredAt!) continue;
      const due = Math.min(RAMP_STEPS, Math.floor(((start - v.appliedAt) / 200) * RAMP_STEPS + 1e-9));
      expect(delta).toBeCloseTo(0.01 + (0.02 * due) / RAMP_STEPS, 12);
    }
    expect(session.params.detuning[0]).toBe(0.01);
    expect(v.outcome).toBe('pass');
  });

  test('is judged after the ramp ends: a gross target fails, a mild one passes, on the same board', () => {
    const fault = (delta: number) => ({
      detector: { lockWindow: 2 },
      criteria: { relockWithin: 300 },
      faults: [{ id: 'f', start: 400, action: 'set-detuning', params: { node: 0, delta }, ramp: 300, restore: 'none' }],
    });
    const mild = drive(fault(0.02), 1100).verdicts[0];
    expect(mild.outcome).toBe('pass');
    expect(mild.windowEnd).toBeCloseTo(mild.appliedAt + 300 + 300, 9);
    const gross = drive(fault(0.6), 1100).verdicts[0];
    expect(gross.outcome).toBe('fail');
    expect(gross.persisted).toBe(false);
  });

  test('a link breaks by ramping its weight to 0 and comes back in one step', () => {
    const weights: number[] = [];
    const { session } = drive(
      { faults: [{ id: 'cut', start: 50, action: 'break-link', params: { from: 0, to: 1 }, ramp: 100, duration: 50 }] },
      400,
      (s) => weights.push(s.params.linkWeight[s.params.findLink(0, 1)]),
    );
    expect(Math.min(...weights)).toBe(0);
    // every tick of the ramp but the last holds a weight between the ends
    expect(weights.filter((w) => w > 0 && w < 1).length).toBeGreaterThanOrEqual(Math.floor(100 / session.macroStep) - 1);
    expect(session.params.linkWeight[session.params.findLink(0, 1)]).toBe(1);
  });

  test('a later fault cuts its judging short, but the ramp goes on to its end', () => {
    const { session, verdicts } = drive(
      {
        criteria: { relockWithin: 100 },
        faults: [
          { id: 'slow', start: 50, action: 'set-coupling', params: { strength: 0.2 }, ramp: 200, restore: 'none' },
          { id: 'kick', start: 120, action: 'kick-mode', params: { node: 1, mode: 0, amount: 0.05 } },
        ],
      },
      600,
    );
    const slow = verdicts.find((v) => v.id === 'slow')!;
    expect(slow.cutShort?.by).toBe('kick');
    expect(session.params.strength).toBe(0.2);
  });

  test('a checkpoint mid-ramp resumes to the same verdicts', () => {
    const raw = {
      criteria: { relockWithin: 80 },
      faults: [{ id: 'r', start: 60, action: 'set-detuning', params: { node: 2, delta: 0.02 }, ramp: 150, duration: 40 }],
    };
    const straight = drive(raw, 700).verdicts;
    const { verdicts, saved } = driveCampaignResumed(raw, 700, 30);
    expect(saved!.r.ramps).toHaveLength(1);
    expect(verdicts).toEqual(straight);
  });

  test.each([
    [
      { id: 'k', start: 1, action: 'kick-mode', params: { node: 0, mode: 0, amount: 0.1 }, ramp: 5 },
      'faults[0].ramp: kick-mode is instantaneous',
    ],
    [{ id: 'd', start: 1, action: 'set-detuning', params: { node: 0, delta: 0.1 }, ramp: 0, duration: 5 }, 'faults[0].ramp: must be > 0'],
    [
      { id: 'd', start: 1, action: 'set-detuning', params: { node: 0, delta: 0.1 }, ramp: 'slow', duration: 5 },
      'faults[0].ramp: must be a number',
    ],
  ])('bad ramps are refused with their field: %j', (fault, message) => {
    expect(thrown(() => parseCampaign({ faults: [fault] }, scenario), InputError).message).toContain(message);
  });
});
