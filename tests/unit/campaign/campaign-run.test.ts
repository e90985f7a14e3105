import { describe, expect, test } from 'vitest';
import { driveCampaign, driveCampaignResumed } from '../../support/campaign-ring.js';

/** A campaign driving a real (small) session: what gets queued when, and what "previous" restores. */
const drive = driveCampaign;

describe('a campaign run against a session', () => {
  test('faults start at the first tick boundary at or after their start; same-tick faults restore in a chain', () => {
    const { session, log, verdicts } = drive(
      {
        faults: [
          { id: 'long', start: 100, action: 'set-detuning', params: { node: 0, delta: 0.05 }, duration: 100 },
          { id: 'short', start: 100, action: 'set-detuning', params: { node: 0, delta: 0.08 }, duration: 30 },
        ],
      },
      400,
    );
    const tick = session.macroStep;
    expect(log.map((e) => e.by)).toEqual(['campaign:long', 'campaign:short', 'campaign:short (restore)', 'campaign:long (restore)']);
    const applied = Math.ceil(100 / tick) * tick;
    expect(log[0].tau).toBeCloseTo(applied, 9);
    // short restores to what long had set, long to the scenario's value
    const [long, short] = [verdicts.find((v) => v.id === 'long')!, verdicts.find((v) => v.id === 'short')!];
    expect(short.restore).toEqual({ action: 'set-detuning', node: 0, delta: 0.05 });
    expect(long.restore).toEqual({ action: 'set-detuning', node: 0, delta: 0.01 });
    expect(session.params.detuning[0]).toBe(0.01);
    expect(long.overlaps).toEqual(['short']);
    expect(short.overlaps).toEqual(['long']);
    expect(short.restoredAt! - short.appliedAt).toBeGreaterThanOrEqual(30);
    expect(short.restoredAt! - short.appliedAt).toBeLessThan(30 + tick);
  });

  test('links and coupling restore to their previous values; only detuning, noise and kicks reach the uncoupled twin', () => {
    const { session, log, verdicts } = drive(
      {
        faults: [
          { id: 'weak', start: 20, action: 'set-link-weight', params: { from: 0, to: 1, weight: 0.3 }, duration: 200 },
          { id: 'cut', start: 60, action: 'break-link', params: { from: 0, to: 1 }, duration: 20 },
          { id: 'k', start: 70, action: 'set-coupling', params: { strength: 0.05 }, duration: 10 },
          { id: 'n', start: 70, action: 'set-noise', params: { intensity: 1e-6 }, duration: 10 },
          { id: 'kick', start: 90, action: 'kick-mode', params: { node: 1, mode: 0, amount: 0.2 } },
        ],
      },
      400,
    );
    const cut = verdicts.find((v) => v.id === 'cut')!;
    expect(cut.restore).toEqual({ action: 'set-link-weight', from: 0, to: 1, weight: 0.3 });
    expect(verdicts.find((v) => v.id === 'kick')!.restore).toBeNull();
    expect(session.params.linkWeight[session.params.findLink(0, 1)]).toBe(1);
    expect(session.params.strength).toBe(0.1);
    expect(session.params.noiseIntensity).toBe(0);
    const twin = new Map(log.map((e) => [e.by, e.uncoupled]));
    expect(twin.get('campaign:weak')).toBe(false);
    expect(twin.get('campaign:k')).toBe(false);
    expect(twin.get('campaign:n')).toBe(true);
    expect(twin.get('campaign:kick')).toBe(true);
  });

  test('a run saved mid-campaign and loaded into a fresh one gives the same verdicts', () => {
    const raw = {
      criteria: { relockWithin: 60 },
      faults: [{ id: 'a', start: 150, action: 'set-detuning', params: { node: 1, delta: 0.03 }, duration: 50 }],
      random: { seed: 3, from: 300, actions: [{ action: 'kick-mode', rate: 0.01, params: { node: 'any', mode: 0, amount: [0.05, 0.2] } }] },
    };
    const straight = drive(raw, 1200).verdicts;

    const { verdicts } = driveCampaignResumed(raw, 1200, 60);
    expect(verdicts).toEqual(straight);
    expect(straight.length).toBeGreaterThan(2);
  });
});
