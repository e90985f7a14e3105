import { describe, expect, test } from 'vitest';
import { graphAutomorphisms } from '../../../src/pattern/automorphisms.js';
import { describeElement } from '../../../src/pattern/permutation.js';
import { simpleCycles, undirectedGraph } from '../../../src/pattern/cycles.js';
import { mirrorRelation, orientationSign } from '../../../src/predict/mirror-symmetry.js';
import { ringLinks } from '../../../src/scenario/index.js';
import type { Link } from '../../../src/scenario/types.js';

/**
 * The orientation sign against elementary geometry: on a ring, rotations keep the direction and
 * reflections reverse it; on a ring with a chord through its middle, the half turn keeps the outer
 * cycle's direction and the two reflections reverse it.
 */

const cyclesOf = (nodes: number, links: Link[]) =>
  simpleCycles(
    undirectedGraph(
      nodes,
      links.map((l): [number, number] => [l.from, l.to]),
    ),
  );

describe('orientation sign and mirror relation', () => {
  test('two-way rings N = 3..9: rotations +1, reflections -1, so half the group makes copies', () => {
    for (let n = 3; n <= 9; n++) {
      const links = ringLinks('ring-two-way', n);
      const group = graphAutomorphisms(n, links).elements;
      const listing = cyclesOf(n, links);
      for (const g of group) {
        const kind = describeElement(g).kind;
        expect(orientationSign(g, listing.cycles), `N = ${n}, ${describeElement(g).text}`).toBe(kind === 'reflection' ? -1 : 1);
      }
      const relation = mirrorRelation(
        group,
        false,
        listing,
        listing.cycles.map(() => true),
      );
      expect(relation.keeping).toHaveLength(n);
      expect(describeElement(relation.reversing!).kind).toBe('reflection');
    }
  });

  test('6-ring with the chord 0-3: the half turn keeps the outer direction, the reflections reverse it', () => {
    const links = [...ringLinks('ring-two-way', 6), { from: 0, to: 3, weight: 1 }, { from: 3, to: 0, weight: 1 }];
    const group = graphAutomorphisms(6, links).elements;
    expect(group).toHaveLength(4);
    const listing = cyclesOf(6, links);
    expect(listing.cycles.map((c) => c.length).sort()).toEqual([4, 4, 6]);
    const signs = new Map(
      group.map((g) => [
        describeElement(g).text,
        orientationSign(
          g,
          listing.cycles.filter((c) => c.length === 6),
        ),
      ]),
    );
    expect(signs).toEqual(
      new Map([
        ['identity', 1],
        ['rotation by 3', 1],
        ['reflection k -> -k', -1],
        ['reflection k -> 3 - k', -1],
      ]),
    );
  });

  test('a one-way ring has no reflection; a chain without the intact ring has no direction at all', () => {
    const oneWay = ringLinks('ring-one-way', 5);
    const listing = cyclesOf(5, oneWay);
    expect(mirrorRelation(graphAutomorphisms(5, oneWay).elements, false, listing, [true]).reversing).toBeNull();
    const chain = ringLinks('ring-two-way', 5).filter((l) => !((l.from === 4 && l.to === 0) || (l.from === 0 && l.to === 4)));
    const chainGroup = graphAutomorphisms(5, chain).elements;
    expect(chainGroup).toHaveLength(2); // the identity and the chain's reversal (elementary)
    const none = mirrorRelation(chainGroup, false, cyclesOf(5, chain), []);
    expect(none.reversing).toBeNull();
    expect(none.reason).toMatch(/no cycle/);
    // with the broken link's ring still listed (it is nominally there), the reversal reverses it
    const intact = cyclesOf(5, ringLinks('ring-two-way', 5));
    const broken = mirrorRelation(chainGroup, false, intact, [false]);
    expect(broken.reversing).not.toBeNull();
    expect(broken.keeping).toHaveLength(1);
  });
});
