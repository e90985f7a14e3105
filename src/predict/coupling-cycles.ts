/**
 * The cycles of the coupling graph as the catalogue uses them: the graph of every listed link,
 * whatever its weight (a broken link is a listed link of weight 0, now or already in the
 * scenario, so the intact ring still seeds the waves that survive the break in deformed form),
 * directions forgotten, and for each cycle whether the current links close it.
 */
import { DEFAULT_WEIGHT_TOLERANCE } from '../pattern/automorphisms.js';
import { simpleCycles, undirectedGraph, type CycleListing, type UndirectedGraph } from '../pattern/cycles.js';
import type { ModelParameters } from '../model/parameters.js';

export interface CouplingCycles {
  /** Every listed link, directions forgotten. */
  graph: UndirectedGraph;
  listing: CycleListing;
  /** Per listed cycle: every one of its edges carries a link now. */
  current: boolean[];
}

/** |weight| at or below this counts as no link: DEFAULT_WEIGHT_TOLERANCE of the largest weight, as for the automorphisms. */
export function absentLinkThreshold(params: ModelParameters): number {
  const scale = Math.max(0, ...Array.from(params.linkWeight, Math.abs), ...Array.from(params.linkNominal, Math.abs));
  return DEFAULT_WEIGHT_TOLERANCE * scale;
}

export function couplingCycles(params: ModelParameters): CouplingCycles {
  const threshold = absentLinkThreshold(params);
  const n = params.nodes;
  const pairs: [number, number][] = [];
  const now = new Uint8Array(n * n);
  params.linkFrom.forEach((from, e) => {
    const to = params.linkTo[e];
    if (Math.abs(params.linkWeight[e]) > threshold) now[from * n + to] = now[to * n + from] = 1;
    pairs.push([from, to]);
  });
  const graph = undirectedGraph(n, pairs);
  const listing = simpleCycles(graph);
  const current = listing.cycles.map((c) => c.every((k, i) => now[k * n + c[(i + 1) % c.length]] === 1));
  return { graph, listing, current };
}
