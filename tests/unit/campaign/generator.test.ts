import { describe, expect, test } from 'vitest';
import { FaultGenerator, parseCampaign, type FaultPlan } from '../../../src/campaign/index.js';
import { ModelParameters } from '../../../src/model/parameters.js';
import { makeScenario } from '../../support/scenarios.js';

const scenario = makeScenario({
  nodes: 5,
  twoWay: true,
  epsilon: 0.01,
  modes: [
    { omega: 1, gain: 1, loss: 0 },
    { omega: 1.3, gain: 1, loss: 0.5 },
  ],
  coupling: { strength: 0.1, reactive: 0, dissipative: 1 },
});
const params = new ModelParameters(scenario);

const campaign = parseCampaign(
  {
    criteria: { relockWithin: 2 },
    random: {
      seed: 4242,
      from: 100,
      gap: 1,
      actions: [
        { action: 'set-detuning', rate: 0.3, duration: [1, 3], params: { node: 'any', delta: [-0.2, 0.2] } },
        { action: 'kick-mode', rate: 0.1, params: { node: [1, 3], mode: 'any', amount: [0.1, 0.2] } },
      ],
    },
  },
  scenario,
);

function draw(generator: FaultGenerator, count: number): FaultPlan[] {
  const out: FaultPlan[] = [];
  for (let i = 0; i < count; i++) {
    const f = generator.next();
    if (!f) break;
    out.push(f);
  }
  return out;
}

describe('seeded fault generator', () => {
  test('the same seed gives the same faults, and a saved state continues exactly', () => {
    const a = draw(new FaultGenerator(campaign.random!, params, 1e9), 200);
    const b = new FaultGenerator(campaign.random!, params, 1e9);
    const first = draw(b, 80);
    const saved = JSON.parse(JSON.stringify(b.save()));
    const c = new FaultGenerator(campaign.random!, params, 1e9);
    c.load(saved);
    expect([...first, ...draw(c, 120)]).toEqual(a);
    expect(a).toHaveLength(200);
  });

  test('random faults never overlap: each starts after the previous window plus the gap', () => {
    const faults = draw(new FaultGenerator(campaign.random!, params, 1e9), 500);
    let cursor = 100;
    for (const f of faults) {
      expect(f.start).toBeGreaterThanOrEqual(cursor);
      cursor = f.start + (f.duration ?? 0) + f.criteria.relockWithin + 1;
    }
  });

  test('parameters stay inside their ranges; kicks have no duration', () => {
    for (const f of draw(new FaultGenerator(campaign.random!, params, 1e9), 500)) {
      const p = f.perturbation;
      if (p.action === 'set-detuning') {
        expect(p.node).toBeGreaterThanOrEqual(0);
        expect(p.node).toBeLessThanOrEqual(4);
        expect(Math.abs(p.delta)).toBeLessThanOrEqual(0.2);
        expect(f.duration).toBeGreaterThanOrEqual(1);
        expect(f.duration).toBeLessThanOrEqual(3);
      } else if (p.action === 'kick-mode') {
        expect([1, 2, 3]).toContain(p.node);
        expect([0, 1]).toContain(p.mode);
        expect(p.amount).toBeGreaterThanOrEqual(0.1);
        expect(f.duration).toBeNull();
      } else throw new Error(`unexpected action ${p.action}`);
    }
  });

  test('actions are drawn in proportion to their rates and arrivals are exponential with the total rate', () => {
    const faults = draw(new FaultGenerator(campaign.random!, params, 1e9), 4000);
    const kicks = faults.filter((f) => f.perturbation.action === 'kick-mode').length / faults.length;
    // binomial: p = 0.1 / 0.4 = 0.25, sd sqrt(p (1 - p) / 4000) = 0.0068; 4 sd allowed (common practice)
    expect(Math.abs(kicks - 0.25)).toBeLessThan(0.028);
    let cursor = 100;
    let waited = 0;
    for (const f of faults) {
      waited += f.start - cursor;
      cursor = f.start + (f.duration ?? 0) + f.criteria.relockWithin + 1;
    }
    // exponential waits, mean 1 / 0.4 = 2.5, sd of the mean 2.5 / sqrt(4000) = 0.04; 4 sd allowed
    expect(Math.abs(waited / faults.length - 2.5)).toBeLessThan(0.16);
  });

  test('no fault whose window would pass the end is drawn, and the generator then stays empty', () => {
    const generator = new FaultGenerator(campaign.random!, params, 150);
    const faults = draw(generator, 1000);
    expect(faults.length).toBeGreaterThan(0);
    for (const f of faults) expect(f.start + (f.duration ?? 0) + f.criteria.relockWithin).toBeLessThanOrEqual(150);
    expect(generator.next()).toBeNull();
  });
});
