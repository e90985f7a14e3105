import { describe, expect, test } from 'vitest';
import { graphAutomorphisms } from '../../../src/pattern/automorphisms.js';
import { canonicalNodeOrder, type ClassedArc } from '../../../src/pattern/canonical-order.js';
import { ringLinks } from '../../../src/scenario/index.js';
import type { Link } from '../../../src/scenario/types.js';

/**
 * The canonical order must give the same renumbered network however the nodes were numbered:
 * checked by renumbering invented networks at random and comparing the renumbered arc lists and
 * node classes, which must be identical (the definition of a canonical form).
 */

interface Network {
  nodes: number;
  links: Link[];
  nodeClass: number[];
}

const undirected = (pairs: [number, number][], weight = 1): Link[] =>
  pairs.flatMap(([a, b]) => [
    { from: a, to: b, weight },
    { from: b, to: a, weight },
  ]);

/** The arcs with classes: here simply the weight times 10, rounded (the test weights are multiples of 0.1). */
const arcsOf = (links: Link[]): ClassedArc[] => links.map((l) => ({ from: l.from, to: l.to, cls: Math.round(l.weight * 10) }));

function renumber(net: Network, perm: number[]): Network {
  const nodeClass = new Array<number>(net.nodes);
  net.nodeClass.forEach((c, k) => (nodeClass[perm[k]] = c));
  return { nodes: net.nodes, links: net.links.map((l) => ({ from: perm[l.from], to: perm[l.to], weight: l.weight })).reverse(), nodeClass };
}

/** The network written in its canonical order, as text. */
function canonicalForm(net: Network): { text: string; unique: boolean } {
  const symmetries = graphAutomorphisms(net.nodes, net.links).elements.filter((g) =>
    g.every((image, k) => net.nodeClass[image] === net.nodeClass[k]),
  );
  const { rank, order, unique } = canonicalNodeOrder(net.nodes, arcsOf(net.links), net.nodeClass, symmetries);
  expect(Array.from(order, (k) => rank[k])).toEqual(Array.from({ length: net.nodes }, (_, i) => i));
  const arcs = arcsOf(net.links)
    .map((a) => `${rank[a.from]}>${rank[a.to]}:${a.cls}`)
    .sort();
  return { text: `${Array.from(order, (k) => net.nodeClass[k]).join(',')}|${arcs.join(' ')}`, unique };
}

let seed = 11;
const uniform = (): number => (seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648;
const shuffled = (n: number): number[] => {
  const p = Array.from({ length: n }, (_, k) => k);
  for (let i = n - 1; i > 0; i--) {
    const j = Math.floor(uniform() * (i + 1));
    [p[i], p[j]] = [p[j], p[i]];
  }
  return p;
};

const NETWORKS: [string, Network][] = [
  ['two-way 8-ring', { nodes: 8, links: ringLinks('ring-two-way', 8), nodeClass: new Array(8).fill(0) }],
  ['one-way 7-ring', { nodes: 7, links: ringLinks('ring-one-way', 7), nodeClass: new Array(7).fill(0) }],
  [
    '6-ring with a chord',
    { nodes: 6, links: [...ringLinks('ring-two-way', 6), ...undirected([[0, 3]], 0.4)], nodeClass: new Array(6).fill(0) },
  ],
  [
    '5-cycle with a pendant, detuned',
    { nodes: 6, links: [...ringLinks('ring-two-way', 5), ...undirected([[0, 5]])], nodeClass: [0, 0, 0, 0, 0, 1] },
  ],
  [
    'Petersen graph (distance-transitive, from memory)',
    {
      nodes: 10,
      links: undirected([
        [0, 1],
        [1, 2],
        [2, 3],
        [3, 4],
        [4, 0],
        [0, 5],
        [1, 6],
        [2, 7],
        [3, 8],
        [4, 9],
        [5, 7],
        [7, 9],
        [9, 6],
        [6, 8],
        [8, 5],
      ]),
      nodeClass: new Array(10).fill(0),
    },
  ],
  [
    'ring with unequal weights',
    {
      nodes: 7,
      links: [1, 1.3, 0.8, 1.1, 0.9, 1.2, 0.7].flatMap((w, k) => undirected([[k, (k + 1) % 7]], w)),
      nodeClass: new Array(7).fill(0),
    },
  ],
];

describe('canonical node order', () => {
  for (const [name, net] of NETWORKS) {
    test(`${name}: every numbering gives the same renumbered network, and the order says it is unique`, () => {
      const reference = canonicalForm(net);
      expect(reference.unique).toBe(true);
      for (let trial = 0; trial < 12; trial++) expect(canonicalForm(renumber(net, shuffled(net.nodes))).text).toBe(reference.text);
    });
  }

  test('a network colour refinement cannot sort out (a triangle beside a hexagon: every node has two neighbours) says its order may follow the numbering', () => {
    // elementary: no automorphism maps a triangle node to a hexagon node, yet all have the same colour
    const net: Network = {
      nodes: 9,
      links: undirected([
        [0, 1],
        [1, 2],
        [2, 0],
        [3, 4],
        [4, 5],
        [5, 6],
        [6, 7],
        [7, 8],
        [8, 3],
      ]),
      nodeClass: new Array(9).fill(0),
    };
    const result = canonicalForm(net);
    expect(result.unique).toBe(false);
    const withoutGroup = canonicalNodeOrder(9, arcsOf(net.links), net.nodeClass, null);
    expect(withoutGroup.unique).toBe(false);
    expect(withoutGroup.reason).toMatch(/without the full symmetry group/);
  });
});
