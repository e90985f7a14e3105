import { describe, expect, test } from 'vitest';
import { parseScenario, type Link } from '../../../src/scenario/index.js';

function parseRing(topology: 'ring-one-way' | 'ring-two-way', nodes: number) {
  return parseScenario({
    nodes,
    topology,
    epsilon: 1e-3,
    modes: [{ omega: 1, gain: 1, loss: 0 }],
    coupling: { strength: 0.1, dissipative: 1 },
  });
}

const pairs = (links: Link[]) => links.map((l) => `${l.from}->${l.to}`);

/** Directed pairs straight from docs/model.md, 'Reference model': A_{k,k-1} = 1 (A_{k,k+1} = 1 two-way). */
function pairsFromDefinition(two: boolean, n: number): Set<string> {
  const set = new Set<string>();
  for (let k = 0; k < n; k++) {
    set.add(`${(k - 1 + n) % n}->${k}`);
    if (two) set.add(`${(k + 1) % n}->${k}`);
  }
  return set;
}

describe('ring expansion into links', () => {
  // Hand-written lists for the small rings (docs/model.md, 'Reference model': a link carries
  // `from` into `to`).
  test('one-way, N = 2', () => {
    const s = parseRing('ring-one-way', 2);
    expect(pairs(s.links)).toEqual(['1->0', '0->1']);
    expect(s.topology).toBe('ring-one-way');
  });

  test('two-way, N = 2 lists each directed pair once', () => {
    const s = parseRing('ring-two-way', 2);
    expect(pairs(s.links)).toEqual(['1->0', '0->1']);
  });

  test('one-way, N = 3', () => {
    expect(pairs(parseRing('ring-one-way', 3).links)).toEqual(['2->0', '0->1', '1->2']);
  });

  test('two-way, N = 3', () => {
    expect(pairs(parseRing('ring-two-way', 3).links)).toEqual(['2->0', '1->0', '0->1', '2->1', '1->2', '0->2']);
  });

  test.each([
    ['ring-one-way', false, 8],
    ['ring-two-way', true, 8],
  ] as const)('%s, N = 8 matches the adjacency definition', (kind, two, n) => {
    const s = parseRing(kind, n);
    expect(s.links).toHaveLength(two ? 16 : 8);
    expect(new Set(pairs(s.links))).toEqual(pairsFromDefinition(two, n));
    expect(s.links.every((l) => l.weight === 1)).toBe(true);
    // every node receives exactly one (one-way) or two (two-way) signals
    for (let k = 0; k < n; k++) {
      expect(s.links.filter((l) => l.to === k)).toHaveLength(two ? 2 : 1);
    }
  });

  test('edge lists keep their order and [from, to, weight] meaning', () => {
    const s = parseScenario({
      nodes: 3,
      topology: {
        edges: [
          [2, 0, 0.5],
          [0, 1, 0],
          [1, 2, 2],
        ],
      },
      epsilon: 0,
      modes: [{ omega: 1, gain: 1, loss: 0 }],
      coupling: { strength: 0.1 },
    });
    const expected = [
      { from: 2, to: 0, weight: 0.5 },
      { from: 0, to: 1, weight: 0 },
      { from: 1, to: 2, weight: 2 },
    ];
    expect(s.links).toEqual(expected);
    expect(s.topology).toEqual({ edges: expected });
    // the normalized topology and the links do not share objects
    s.links[0]!.weight = 0;
    expect(typeof s.topology === 'object' && s.topology.edges[0]!.weight).toBe(0.5);
  });

  test('an edge list may be empty, and one node is allowed with an edge list', () => {
    const s = parseScenario({
      nodes: 1,
      topology: { edges: [] },
      epsilon: 1e-3,
      modes: [{ omega: 1, gain: 1, loss: 0 }],
      coupling: { strength: 0 },
    });
    expect(s.links).toEqual([]);
    expect(s.nodes).toBe(1);
  });
});
