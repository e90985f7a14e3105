/** Colour refinement of an arc graph, the pruning step of the automorphism search. */
import type { ArcGraph } from './arc-graph.js';

/** 32-bit finaliser (MurmurHash3 fmix32): spreads nearby integers over all 32 bits. */
function mix32(h: number): number {
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  return (h ^ (h >>> 16)) >>> 0;
}

/**
 * Colour refinement: start from the self-loop class and repeatedly split every colour by the
 * multiset of (weight class, colour) over outgoing and over incoming arcs, until no colour splits.
 * The multiset enters as a sum of hashes, which costs O(arcs) per round; a hash collision can
 * only leave two colours merged, and any such colouring is still kept by every automorphism, so
 * the search stays exact. A node may only be mapped to a node of its own colour.
 */
export function refineColours(graph: ArcGraph): Int32Array {
  const { n, outStart, outNode, outClass, inStart, inNode, inClass, selfClass } = graph;
  let colour = Int32Array.from(selfClass, (c) => c + 1);
  let count = -1;
  for (;;) {
    const ids = new Map<number, number>();
    const next = new Int32Array(n);
    for (let v = 0; v < n; v++) {
      let h = 0;
      for (let i = outStart[v]; i < outStart[v + 1]; i++) {
        h = (h + mix32(Math.imul(outClass[i] + 1, 0x9e3779b1) ^ mix32(colour[outNode[i]]))) >>> 0;
      }
      for (let i = inStart[v]; i < inStart[v + 1]; i++) {
        h = (h + mix32(Math.imul(inClass[i] + 1, 0x7feb352d) ^ mix32(colour[inNode[i]] + 0x68e31da4))) >>> 0;
      }
      // Keyed by the old colour too, so every round refines the previous partition.
      const key = colour[v] * 4294967296 + h;
      let id = ids.get(key);
      if (id === undefined) ids.set(key, (id = ids.size));
      next[v] = id;
    }
    if (ids.size === count) return colour;
    count = ids.size;
    colour = next;
  }
}
