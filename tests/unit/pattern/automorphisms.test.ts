import { describe, expect, test } from 'vitest';
import { cycleNotation, describeElement, graphAutomorphisms } from '../../../src/pattern/automorphisms.js';
import { ringLinks } from '../../../src/scenario/index.js';
import type { Link } from '../../../src/scenario/types.js';
import { Random } from '../../../src/util/random.js';

/** Independent oracle: A[p(i)][p(j)] === A[i][j] for all i, j on the dense matrix. */
function isAutomorphism(perm: ArrayLike<number>, nodes: number, links: Link[]): boolean {
  const a = new Float64Array(nodes * nodes);
  for (const { from, to, weight } of links) a[to * nodes + from] = weight;
  for (let i = 0; i < nodes; i++) {
    for (let j = 0; j < nodes; j++) {
      if (a[perm[i] * nodes + perm[j]] !== a[i * nodes + j]) return false;
    }
  }
  return true;
}

function factorial(n: number): number {
  return n <= 1 ? 1 : n * factorial(n - 1);
}

/** All permutations of 0..n-1 (n small). */
function allPermutations(n: number): number[][] {
  if (n === 0) return [[]];
  const result: number[][] = [];
  for (const rest of allPermutations(n - 1)) {
    for (let at = 0; at <= rest.length; at++) result.push([...rest.slice(0, at), n - 1, ...rest.slice(at)]);
  }
  return result;
}

const key = (perm: ArrayLike<number>): string => Array.from(perm).join(',');

const twoWay = (n: number): Link[] => ringLinks('ring-two-way', n);

function undirected(edges: [number, number][], weight = 1): Link[] {
  return edges.flatMap(([u, v]) => [
    { from: u, to: v, weight },
    { from: v, to: u, weight },
  ]);
}

function completeGraph(n: number): Link[] {
  const links: Link[] = [];
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (i !== j) links.push({ from: i, to: j, weight: 1 });
  return links;
}

describe('graphAutomorphisms on rings', () => {
  // The one-way ring carries the cyclic group Z_N of order N, the two-way ring the dihedral
  // group D_N of order 2N (Golubitsky & Stewart, The Symmetry Perspective, 2002; docs/model.md,
  // 'Reference model').
  for (let n = 3; n <= 12; n++) {
    test(`one-way ring of ${n}: Z_${n}, order ${n}, all rotations`, () => {
      const links = ringLinks('ring-one-way', n);
      const { elements, truncated } = graphAutomorphisms(n, links);
      expect(truncated).toBe(false);
      expect(elements.length).toBe(n);
      const shifts = elements.map((p) => describeElement(p));
      expect(shifts[0].kind).toBe('identity');
      expect(shifts.slice(1).every((d) => d.kind === 'rotation')).toBe(true);
      expect(new Set(shifts.slice(1).map((d) => d.shift)).size).toBe(n - 1);
      for (const p of elements) expect(isAutomorphism(p, n, links)).toBe(true);
    });

    test(`two-way ring of ${n}: D_${n}, order ${2 * n}, ${n} rotations and ${n} reflections`, () => {
      const links = twoWay(n);
      const { elements, truncated } = graphAutomorphisms(n, links);
      expect(truncated).toBe(false);
      expect(elements.length).toBe(2 * n);
      const kinds = elements.map((p) => describeElement(p).kind);
      expect(kinds[0]).toBe('identity');
      expect(kinds.filter((k) => k === 'rotation').length).toBe(n - 1);
      expect(kinds.filter((k) => k === 'reflection').length).toBe(n);
      expect(new Set(elements.map(key)).size).toBe(2 * n);
      for (const p of elements) expect(isAutomorphism(p, n, links)).toBe(true);
    });
  }

  test('two-way ring with the single link 0 -> 1 broken has only the identity', () => {
    // By hand: the arc 1 -> 0 is now the only arc without a partner in the other direction, so
    // every automorphism maps it to itself and fixes nodes 0 and 1. The only reflection that
    // maps the edge {0, 1} onto itself is k -> 1 - k, which swaps 0 and 1 and sends 1 -> 0 to
    // the missing 0 -> 1. A permutation of the underlying cycle that fixes two neighbours is the
    // identity, so the group has order 1 (elementary group theory).
    for (let n = 3; n <= 10; n++) {
      const links = twoWay(n).filter((l) => !(l.from === 0 && l.to === 1));
      const { elements } = graphAutomorphisms(n, links);
      expect(elements.map(key)).toEqual([key(Int32Array.from({ length: n }, (_, k) => k))]);
    }
  });

  test('two-way ring with both directions of one link broken is a path: order 2', () => {
    // Removing the edge {0, 1} leaves the path 1 - 2 - ... - (N-1) - 0, whose only non-trivial
    // automorphism is the reversal, the reflection k -> 1 - k (elementary).
    for (let n = 3; n <= 10; n++) {
      const links = twoWay(n).filter((l) => !((l.from === 0 && l.to === 1) || (l.from === 1 && l.to === 0)));
      const { elements } = graphAutomorphisms(n, links);
      expect(elements.length).toBe(2);
      expect(describeElement(elements[0]).kind).toBe('identity');
      expect(describeElement(elements[1])).toEqual({ kind: 'reflection', axis: 1, text: 'reflection k -> 1 - k' });
    }
  });

  test('a 256-node two-way ring gives 512 elements well under a second', () => {
    // |D_256| = 512 (Golubitsky & Stewart 2002).
    const links = twoWay(256);
    const started = performance.now();
    const { elements, truncated } = graphAutomorphisms(256, links);
    const elapsed = performance.now() - started;
    expect(truncated).toBe(false);
    expect(elements.length).toBe(512);
    expect(elapsed).toBeLessThan(500);
    expect(elements.every((p) => ['identity', 'rotation', 'reflection'].includes(describeElement(p).kind))).toBe(true);
  });
});

describe('graphAutomorphisms on other graphs', () => {
  test('undirected star with n leaves has order n! (n >= 2)', () => {
    // The centre is the only node of degree n; the leaves permute freely: S_n (elementary).
    for (let n = 2; n <= 6; n++) {
      const links = undirected(Array.from({ length: n }, (_, i) => [0, i + 1] as [number, number]));
      const { elements } = graphAutomorphisms(n + 1, links);
      expect(elements.length).toBe(factorial(n));
      expect(elements.every((p) => p[0] === 0)).toBe(true);
    }
  });

  test('complete graph K_n has order n!', () => {
    // Every permutation preserves K_n: S_n (elementary).
    for (let n = 1; n <= 7; n++) {
      const { elements, truncated } = graphAutomorphisms(n, completeGraph(n));
      expect(truncated).toBe(false);
      expect(elements.length).toBe(factorial(n));
      expect(new Set(elements.map(key)).size).toBe(factorial(n));
    }
  });

  test('the limit truncates K_8 (8! = 40320) and says so; a limit equal to the order does not', () => {
    const links = completeGraph(8);
    const capped = graphAutomorphisms(8, links);
    expect(capped.truncated).toBe(true);
    expect(capped.elements.length).toBe(10_000);
    expect(new Set(capped.elements.map(key)).size).toBe(10_000);
    expect(capped.elements.every((p) => isAutomorphism(p, 8, links))).toBe(true);
    const exact = graphAutomorphisms(8, links, { limit: 40_320 });
    expect(exact.truncated).toBe(false);
    expect(exact.elements.length).toBe(40_320);
  });

  test('a 2000-leaf star stops at the limit quickly instead of exploring 2000!', () => {
    const leaves = 2000;
    const links = undirected(Array.from({ length: leaves }, (_, i) => [0, i + 1] as [number, number]));
    const started = performance.now();
    const { elements, truncated } = graphAutomorphisms(leaves + 1, links, { limit: 500 });
    expect(performance.now() - started).toBeLessThan(2000);
    expect(truncated).toBe(true);
    expect(elements.length).toBe(500);
    expect(new Set(elements.map(key)).size).toBe(500);
    expect(elements.every((p) => p[0] === 0)).toBe(true);
  });

  test('two disjoint one-way triangles: Z_3 x Z_3 with the swap, order 18', () => {
    // Each triangle rotates independently (3 x 3) and the two may be exchanged (x 2): 18 (elementary).
    const links = [...ringLinks('ring-one-way', 3), ...ringLinks('ring-one-way', 3).map((l) => ({ ...l, from: l.from + 3, to: l.to + 3 }))];
    const { elements } = graphAutomorphisms(6, links);
    expect(elements.length).toBe(18);
    for (const p of elements) expect(isAutomorphism(p, 6, links)).toBe(true);
  });

  test('weights: a heavier edge keeps only the reflection through it; tolerance and zero weights', () => {
    const n = 6;
    // Edge {0, 1} with weight 2: only the automorphisms of D_6 mapping {0, 1} to itself survive,
    // the identity and k -> 1 - k (elementary).
    const heavy = twoWay(n).map((l) => (l.from + l.to === 1 ? { ...l, weight: 2 } : l));
    expect(graphAutomorphisms(n, heavy).elements.map((p) => describeElement(p).text)).toEqual(['identity', 'reflection k -> 1 - k']);
    // A difference of 1e-12 is inside the default relative tolerance 1e-9: full D_6 again.
    const nearlyEqual = twoWay(n).map((l) => (l.from + l.to === 1 ? { ...l, weight: 1 + 1e-12 } : l));
    expect(graphAutomorphisms(n, nearlyEqual).elements.length).toBe(12);
    expect(graphAutomorphisms(n, nearlyEqual, { tolerance: 0 }).elements.length).toBe(2);
    // A zero-weight chord is no link at all.
    const withZeroChord = [...twoWay(n), { from: 0, to: 3, weight: 0 }];
    expect(graphAutomorphisms(n, withZeroChord).elements.length).toBe(12);
  });

  test('matches brute force over all permutations on random graphs built around a symmetry', () => {
    // Oracle: every permutation of up to 6 nodes checked on the dense matrix. Each graph is made
    // invariant under a random permutation sigma (whole orbits of arcs added), so the groups are
    // not all trivial.
    const random = new Random(20240611);
    let nontrivial = 0;
    for (let trial = 0; trial < 60; trial++) {
      const n = 3 + (trial % 4);
      const sigma = allPermutations(n)[Math.floor(random.uniform() * factorial(n))];
      const weights = new Map<number, number>();
      for (let arcs = 0; arcs < n; arcs++) {
        let from = Math.floor(random.uniform() * n);
        let to = Math.floor(random.uniform() * n);
        const weight = random.uniform() < 0.5 ? 1 : 2.5;
        for (let step = 0; step < factorial(n); step++) {
          weights.set(from * n + to, weight);
          from = sigma[from];
          to = sigma[to];
        }
      }
      const links = [...weights].map(([k, weight]) => ({ from: Math.floor(k / n), to: k % n, weight }));
      const expected = allPermutations(n)
        .filter((p) => isAutomorphism(p, n, links))
        .map(key)
        .sort();
      const { elements } = graphAutomorphisms(n, links);
      expect(key(elements[0])).toBe(key(Array.from({ length: n }, (_, k) => k)));
      expect(elements.map(key).sort()).toEqual(expected);
      if (expected.length > 1) nontrivial++;
    }
    expect(nontrivial).toBeGreaterThan(20);
  });

  test('bad input is rejected with the place named', () => {
    const links = ringLinks('ring-two-way', 4);
    expect(() => graphAutomorphisms(0, [])).toThrow(/nodes must be a positive integer \(got 0\)/);
    expect(() => graphAutomorphisms(4, [{ from: 0, to: 4, weight: 1 }])).toThrow(/links\[0\]\.to = 4 is not a node index in 0\.\.3/);
    expect(() => graphAutomorphisms(4, [{ from: 0, to: 1, weight: NaN }])).toThrow(/links\[0\]\.weight = NaN/);
    expect(() => graphAutomorphisms(4, [...links, { from: 3, to: 0, weight: 1 }])).toThrow(
      /links\[8\] repeats links\[\d\] \(both carry node 3 into node 0\)/,
    );
    expect(() => graphAutomorphisms(4, links, { limit: 0 })).toThrow(/options\.limit/);
    expect(() => graphAutomorphisms(4, links, { tolerance: -1 })).toThrow(/options\.tolerance/);
  });
});

describe('describeElement', () => {
  test('names rotations, reflections and other permutations', () => {
    expect(describeElement(Int32Array.from([0, 1, 2, 3, 4, 5]))).toEqual({ kind: 'identity', text: 'identity' });
    // k -> k + 3 mod 8
    expect(describeElement(Int32Array.from([3, 4, 5, 6, 7, 0, 1, 2]))).toEqual({ kind: 'rotation', shift: 3, text: 'rotation by 3' });
    // k -> 5 - k mod 8
    expect(describeElement(Int32Array.from([5, 4, 3, 2, 1, 0, 7, 6]))).toEqual({
      kind: 'reflection',
      axis: 5,
      text: 'reflection k -> 5 - k',
    });
    // k -> -k mod 5
    expect(describeElement(Int32Array.from([0, 4, 3, 2, 1])).text).toBe('reflection k -> -k');
    // N = 2: the swap is k -> k + 1, named as a rotation first.
    expect(describeElement(Int32Array.from([1, 0])).kind).toBe('rotation');
    expect(describeElement(Int32Array.from([1, 0, 3, 2, 4]))).toEqual({ kind: 'permutation', text: '(0 1)(2 3)' });
    expect(cycleNotation([2, 0, 1, 3])).toBe('(0 2 1)');
  });

  test('rejects arrays that are not permutations', () => {
    expect(() => describeElement(Int32Array.from([0, 0, 1]))).toThrow(/node 0 is the image of two nodes/);
    expect(() => describeElement(Int32Array.from([0, 3, 1]))).toThrow(/entry 1 is 3/);
  });
});
