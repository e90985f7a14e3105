import { describe, expect, test } from 'vitest';
import { simpleCycles, undirectedGraph } from '../../../src/pattern/cycles.js';
import { cycleKey } from '../../../src/predict/mirror-symmetry.js';

/** C(n, k) */
function choose(n: number, k: number): number {
  let c = 1;
  for (let i = 0; i < k; i++) c = (c * (n - i)) / (i + 1);
  return c;
}

const complete = (n: number): [number, number][] =>
  Array.from({ length: n }, (_, a) => Array.from({ length: n - a - 1 }, (_, i): [number, number] => [a, a + i + 1])).flat();

/**
 * Independent count of the simple cycles of each length: every closed walk that repeats no node,
 * from every start in both directions, found by plain depth-first search and divided by 2L.
 */
function cycleCounts(nodes: number, edges: [number, number][]): Map<number, number> {
  const adjacent = Array.from({ length: nodes }, () => new Set<number>());
  for (const [a, b] of edges) {
    if (a === b) continue;
    adjacent[a].add(b);
    adjacent[b].add(a);
  }
  const walks = new Map<number, number>();
  const path: number[] = [];
  const walk = (k: number): void => {
    for (const l of adjacent[k]) {
      if (l === path[0] && path.length >= 3) walks.set(path.length, (walks.get(path.length) ?? 0) + 1);
      if (path.includes(l)) continue;
      path.push(l);
      walk(l);
      path.pop();
    }
  };
  for (let s = 0; s < nodes; s++) {
    path.push(s);
    walk(s);
    path.pop();
  }
  return new Map([...walks].map(([length, n]) => [length, n / (2 * length)]));
}

describe('simple cycles of an undirected graph', () => {
  test('complete graphs K_4..K_6: C(n, L) (L - 1)! / 2 cycles of each length L (elementary), each listed once', () => {
    for (let n = 4; n <= 6; n++) {
      const listing = simpleCycles(undirectedGraph(n, complete(n)), { maxCycles: 1000 });
      expect(listing.stoppedBy).toBe('all found');
      for (let length = 3; length <= n; length++) {
        let expected = choose(n, length);
        for (let f = 2; f < length; f++) expected *= f;
        expected /= 2;
        expect(
          listing.cycles.filter((c) => c.length === length),
          `K_${n}, L = ${length}`,
        ).toHaveLength(expected);
      }
      expect(new Set(listing.cycles.map((c) => cycleKey(c).key)).size).toBe(listing.cycles.length);
    }
  });

  test('the listing is cut at whole lengths: K_5 with room for 32 holds its 10 triangles and 15 squares, not the 12 pentagons', () => {
    const listing = simpleCycles(undirectedGraph(5, complete(5)), { maxCycles: 32 });
    expect(listing.stoppedBy).toBe('cycle limit');
    expect(listing.completeUpTo).toBe(4);
    expect(listing.cycles.map((c) => c.length).sort()).toEqual([...new Array(10).fill(3), ...new Array(15).fill(4)]);
  });

  test('a ring has one cycle, listed from node 0 towards node 1; a tree has none', () => {
    const ring = simpleCycles(
      undirectedGraph(
        9,
        Array.from({ length: 9 }, (_, k): [number, number] => [k, (k + 1) % 9]),
      ),
    );
    expect(ring.cycles.map((c) => Array.from(c))).toEqual([[0, 1, 2, 3, 4, 5, 6, 7, 8]]);
    const tree = simpleCycles(
      undirectedGraph(6, [
        [0, 1],
        [1, 2],
        [1, 3],
        [3, 4],
        [3, 5],
      ]),
    );
    expect(tree.cycles).toHaveLength(0);
    expect(tree.stoppedBy).toBe('all found');
  });

  test('seeded random graphs: the counts per length match an independent depth-first count, and every listed sequence is a cycle', () => {
    let seed = 7;
    const uniform = (): number => (seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648;
    for (let trial = 0; trial < 6; trial++) {
      const nodes = 6 + trial;
      const edges: [number, number][] = [];
      for (let a = 0; a < nodes; a++) for (let b = a + 1; b < nodes; b++) if (uniform() < 0.4) edges.push([a, b]);
      const listing = simpleCycles(undirectedGraph(nodes, edges), { maxCycles: 100_000 });
      expect(listing.stoppedBy).toBe('all found');
      const counts = new Map<number, number>();
      for (const c of listing.cycles) counts.set(c.length, (counts.get(c.length) ?? 0) + 1);
      expect(counts).toEqual(cycleCounts(nodes, edges));
      const edgeSet = new Set(edges.flatMap(([a, b]) => [`${a}-${b}`, `${b}-${a}`]));
      for (const c of listing.cycles) c.forEach((k, i) => expect(edgeSet.has(`${k}-${c[(i + 1) % c.length]}`)).toBe(true));
    }
  });
});
