import { describe, expect, test } from 'vitest';
import { parseCampaign } from '../../../src/campaign/index.js';
import { InputError } from '../../../src/util/input-error.js';
import { builtInCampaignRaw, loadBuiltInScenario } from '../../../src/scenarios/index.js';
import { makeScenario } from '../../support/scenarios.js';

const ring = makeScenario({
  nodes: 4,
  twoWay: true,
  epsilon: 0.01,
  modes: [{ omega: 1, gain: 1, loss: 0 }],
  coupling: { strength: 0.1, reactive: 0, dissipative: 1 },
});

function errorOf(raw: unknown, scenario = ring): InputError {
  try {
    parseCampaign(raw, scenario, 'c.json');
  } catch (error) {
    if (error instanceof InputError) return error;
    throw error;
  }
  throw new Error('expected the campaign to be refused');
}

const fault = (extra: Record<string, unknown>) => ({
  faults: [{ start: 10, action: 'set-detuning', params: { node: 1, delta: 0.1 }, duration: 5, ...extra }],
});

describe('campaign format', () => {
  test('the shipped demo campaign validates against the demo scenario, times converted from slow time', () => {
    const board = loadBuiltInScenario('timing-board-8');
    const c = parseCampaign(builtInCampaignRaw('timing-board-8-campaign'), board);
    expect(c.timeUnit).toBe('slow');
    expect(c.tauPerUnit).toBeCloseTo(1e5, 6); // 1 / eps, eps = 1e-5 (slow time is eps tau: README, 'Units')
    expect(c.faults[0].start).toBeCloseTo(60e5, 3);
    expect(c.faults.map((f) => f.perturbation.action)).toContain('kick-mode');
    // ppm maps to Delta = ppm 1e-6 / eps (README, 'Units'): 0.6 ppm -> 0.06
    expect(c.faults[0].perturbation).toEqual({ action: 'set-detuning', node: 3, delta: expect.closeTo(0.06, 12) });
    expect(c.random?.actions.length).toBe(4);
    // a per-fault override keeps the campaign's other criteria
    const gross = c.faults.find((f) => f.id === 'gross-mistuning-0')!;
    expect(gross.criteria.mustPersist).toBe(false);
    expect(gross.criteria.maxDivergence).toBeNull();
    expect(gross.criteria.relockWithin).toBeCloseTo(25e5, 3);
  });

  test('defaults: tau units, restore previous, persist and re-lock within three lock windows', () => {
    const c = parseCampaign(fault({}), ring);
    expect(c.timeUnit).toBe('tau');
    const f = c.faults[0];
    expect(f.restore).toBe('previous');
    expect(f.duration).toBe(5);
    expect(f.criteria.mustPersist).toBe(true);
    expect(f.criteria.mustRelock).toBe(true);
    // session default lock window: 2 / (kappa |sigma|) = 20 slow units, so 3 windows = 60 slow = 6000 tau
    expect(f.criteria.relockWithin).toBeCloseTo(6000, 9);
  });

  test('faults are ordered by start, ties keep the file order', () => {
    const c = parseCampaign(
      {
        faults: [
          { id: 'b', start: 20, action: 'break-link', params: { from: 0, to: 1 }, duration: 1 },
          { id: 'a', start: 10, action: 'kick-mode', params: { node: 0, mode: 0, amount: 0.1 } },
          { id: 'c', start: 20, action: 'set-noise', params: { intensity: 1e-6 }, duration: 1 },
        ],
      },
      ring,
    );
    expect(c.faults.map((f) => f.id)).toEqual(['a', 'b', 'c']);
    expect(c.faults[0].restore).toBe('none');
    expect(c.faults[0].duration).toBeNull();
  });

  test.each([
    [{ faults: [], extra: 1 }, 'extra', /unknown field/],
    [{ faults: [] }, '', /needs faults, a random generator/],
    [fault({ params: { node: 9, delta: 0.1 } }), 'faults[0].params.node', /between 0 and 3/],
    [fault({ action: 'melt' }), 'faults[0].action', /must be one of set-detuning/],
    [fault({ duration: undefined }), 'faults[0].duration', /is required/],
    [fault({ duration: -1 }), 'faults[0].duration', /must be > 0/],
    [fault({ restore: 'later' }), 'faults[0].restore', /"previous", "none" or a perturbation/],
    [fault({ restore: 'none' }), 'faults[0].duration', /permanent/],
    [fault({ restore: { action: 'restore-link', from: 0, to: 2 } }), 'faults[0].restore', /no link from node 0 to node 2/],
    [fault({ params: { node: 1, delta: 0.1, action: 'x' } }), 'faults[0].params.action', /beside params/],
    [fault({ criteria: { mustPersist: 'yes' } }), 'faults[0].criteria.mustPersist', /true or false/],
    [fault({ criteria: { relockWithin: 0 } }), 'faults[0].criteria.relockWithin', /> 0/],
    [
      { faults: [{ start: 1, action: 'kick-mode', params: { node: 0, mode: 0, amount: 1 }, duration: 3 }] },
      'faults[0].duration',
      /instantaneous/,
    ],
    [{ timeUnit: 'hours', ...fault({}) }, 'timeUnit', /tau, slow, seconds/],
    [
      {
        faults: [
          { ...fault({}).faults[0], id: 'x' },
          { ...fault({}).faults[0], id: 'x' },
        ],
      },
      'faults[1].id',
      /duplicates/,
    ],
    [
      { random: { seed: 1, actions: [{ action: 'set-detuning', rate: 1, duration: [1, 2], params: { node: [0, 4], delta: [0, 1] } }] } },
      'random.actions[0].params.node',
      /between 0 and 3/,
    ],
    [
      { random: { seed: 1, actions: [{ action: 'set-detuning', rate: 1, duration: [2, 1], params: { node: 'any', delta: 0 } }] } },
      'random.actions[0].duration',
      /below min/,
    ],
    [
      { random: { seed: 1, actions: [{ action: 'break-link', rate: 1, duration: 1, params: { link: [[0, 2]] } }] } },
      'random.actions[0].params',
      /no link from node 0 to node 2/,
    ],
    [
      { random: { seed: 1, actions: [{ action: 'set-detuning', rate: 1, duration: 1, params: { node: 'any' } }] } },
      'random.actions[0].params',
      /exactly one of delta or ppm/,
    ],
    [{ random: { seed: -1, actions: [] } }, 'random.seed', /unsigned 32-bit/],
    [{ random: { seed: 1, actions: [] } }, 'random.actions', /at least one/],
  ])('refuses %j at %s', (raw, path, reason) => {
    const error = errorOf(raw);
    expect(error.path).toBe(path);
    expect(error.reason).toMatch(reason);
    expect(error.message.startsWith('c.json: ')).toBe(true);
  });

  test('a scenario without epsilon cannot carry a campaign', () => {
    const flat = makeScenario({ nodes: 2, epsilon: 0, modes: [{ omega: 1, gain: 1, loss: 0 }] });
    expect(errorOf(fault({}), flat).reason).toMatch(/epsilon > 0/);
  });

  test('seconds are mapped at the nominal frequency (tau = 2 pi f0 t / omega0)', () => {
    const c = parseCampaign({ timeUnit: 'seconds', ...fault({ start: 1e-6 }) }, ring);
    // units.ts mapping, hand arithmetic: 1 us at 10 MHz = 10 periods = 20 pi tau
    expect(c.faults[0].start).toBeCloseTo(20 * Math.PI, 9);
  });
});

describe('campaign stability.mask', () => {
  const points = [
    [1e-6, 1e-9],
    [1e-3, 1e-8],
  ];
  test('an inline mask, required by default; a built-in name; reported only with mustMeetMask false', () => {
    const inline = parseCampaign({ ...fault({}), stability: { mask: { name: 'invented', metric: 'mtie', points } } }, ring);
    expect(inline.stability.mask?.metric).toBe('mtie');
    expect(inline.stability.mustMeetMask).toBe(true);
    const named = parseCampaign({ ...fault({}), stability: { mask: 'invented-demo-tdev-mask', mustMeetMask: false } }, ring);
    expect(named.stability.mask?.name).toMatch(/invented/);
    expect(named.stability.mustMeetMask).toBe(false);
    const none = parseCampaign(fault({}), ring);
    expect(none.stability.mask).toBeNull();
    expect(none.stability.mustMeetMask).toBe(false);
  });

  test('errors name the field under stability.mask', () => {
    expect(errorOf({ ...fault({}), stability: { mask: { name: 'x', metric: 'tdev', points: [[1, -2]] } } }).message).toMatch(
      /c\.json: stability\.mask\.points\[0\]\[1\]/,
    );
    expect(errorOf({ ...fault({}), stability: { mask: { name: 'x', metric: 'adev', points } } }).message).toMatch(
      /stability\.mask\.metric/,
    );
    expect(errorOf({ ...fault({}), stability: { mask: 'no-such-mask' } }).message).toMatch(
      /stability\.mask: no built-in mask "no-such-mask"/,
    );
    expect(errorOf({ ...fault({}), stability: { mustMeetMask: true } }).message).toMatch(/stability\.mustMeetMask: needs a mask/);
    expect(errorOf({ ...fault({}), stability: { mask: { name: 'x', metric: 'tdev', points }, mustMeetMask: 'yes' } }).message).toMatch(
      /stability\.mustMeetMask/,
    );
  });
});
