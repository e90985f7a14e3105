import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../../src/scenario/parse.js';
import { GuideModel } from '../../../src/predict/guide-model.js';
import { catalogueWithBasins } from '../../../src/yield/basins.js';

/**
 * D. A. Wiley, S. H. Strogatz, M. Girvan, "The size of the sync basin", Chaos 16, 015103 (2006):
 * on a ring of identical phase oscillators with nearest-neighbour sine coupling, started at random,
 * the in-phase state has the largest basin and the twisted states' basins shrink as |q| grows
 * (roughly as a Gaussian in q); the q-twisted state is stable for |q| < N/4. Our guiding system
 * for one mode, two-way dissipative coupling and equal lone amplitudes is that ring with
 * amplitudes added, which relax fast (g = 1 against kappa sigma = 0.1).
 */
const N = 10;
const STARTS = 160;

const ring = parseScenario({
  name: 'identical ring',
  nodes: N,
  topology: 'ring-two-way',
  epsilon: 0.01,
  modes: [{ omega: 1, gain: 1, loss: 0 }],
  coupling: { strength: 0.1, reactive: 0, dissipative: 1 },
});

describe('start-up probabilities on a ring of identical oscillators', () => {
  it('put most starts in-phase, fewer in each twisted state as |q| grows, and none in unstable ones', () => {
    const model = new GuideModel(ring);
    const { catalogue, basins } = catalogueWithBasins(model, ring, STARTS);
    expect(basins.starts).toBe(STARTS);
    const byQ = new Map<number, number>();
    for (const share of basins.shares) {
      const p = catalogue.patterns[share.pattern];
      expect(p.stability).toBe('stable');
      // the twisted state's winding q and N - q are mirror images: count |q|
      const q = p.q ?? -1;
      const size = Math.min(q, N - q);
      expect(size).toBeLessThan(N / 4);
      byQ.set(size, (byQ.get(size) ?? 0) + share.count);
      expect(share.low).toBeLessThanOrEqual(share.estimate);
      expect(share.high).toBeGreaterThanOrEqual(share.estimate);
    }
    const counted = [...byQ.values()].reduce((s, c) => s + c, 0) + basins.unsettled.count;
    expect(counted).toBe(STARTS);
    const zero = byQ.get(0) ?? 0;
    const one = (byQ.get(1) ?? 0) / 2; // per direction: q = 1 and q = N - 1 are two states
    const two = (byQ.get(2) ?? 0) / 2;
    process.stderr.write(
      `basins N=${N}, ${STARTS} starts: q=0 ${zero}, |q|=1 ${byQ.get(1) ?? 0}, |q|=2 ${byQ.get(2) ?? 0}, unsettled ${basins.unsettled.count}\n`,
    );
    expect(zero).toBeGreaterThan(one);
    expect(one).toBeGreaterThan(two);
    expect(basins.unsettled.count).toBeLessThan(STARTS / 10);
  });
});
