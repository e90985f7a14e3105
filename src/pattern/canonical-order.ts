/**
 * A numbering of the nodes fixed by the graph itself, up to its symmetries: work done in that
 * numbering cannot depend on how a scenario happened to number its nodes.
 *
 * Colour refinement with colours named canonically, by the rank of their description (never by
 * first appearance, as the automorphism search's pruning colours are): a node's description is
 * its colour, the sorted (arc class, colour) pairs of its outgoing arcs and those of its
 * incoming arcs; refinement repeats until no colour splits. While a colour is still shared, the
 * lowest-numbered node of the first shared colour gets a colour of its own (it is
 * individualised) and the refinement runs again, until every node has its own colour; the
 * colours, in rank order, are the numbering.
 *
 * Which node of a shared colour is individualised changes nothing when the nodes of that colour
 * form one orbit of the symmetries fixing every node individualised before: then two numberings
 * of the same network give numberings that differ by a symmetry, and hence identical renumbered
 * networks. That is checked against the listed symmetry group when one is given; the answer says
 * whether it held.
 */

export interface ClassedArc {
  from: number;
  to: number;
  /** Class of the arc's weight (ids that do not depend on the numbering, such as weightClasses ranks). */
  cls: number;
}

export interface NodeOrder {
  /** order[position] = node: the nodes in canonical order. */
  order: Int32Array;
  /** rank[node] = its position in `order`. */
  rank: Int32Array;
  /** True when the order is fixed by the network up to its symmetries (see the module header). */
  unique: boolean;
  reason: string;
}

/**
 * The canonical order of the nodes of a graph with classed arcs and classed nodes (node classes
 * such as detuning ranks). `symmetries` (every automorphism keeping arcs, arc classes and node
 * classes, or null when they are not all listed) is only used to check the ties broken.
 */
export function canonicalNodeOrder(
  nodes: number,
  arcs: readonly ClassedArc[],
  nodeClass: ArrayLike<number>,
  symmetries: readonly Int32Array[] | null,
): NodeOrder {
  const adjacency = new ClassedAdjacency(nodes, arcs);
  let colour = refine(adjacency, ranksOf(Array.from(nodeClass, (c) => [c])));
  const individualised: number[] = [];
  let unique = true;
  let reason = 'every node is told apart by its links and node classes';
  for (;;) {
    const shared = firstSharedColour(colour);
    if (shared < 0) break;
    const members: number[] = [];
    colour.forEach((c, k) => c === shared && members.push(k));
    const chosen = members[0];
    if (unique) {
      const verdict = tieIsSymmetric(members, chosen, individualised, symmetries);
      if (verdict !== null) {
        unique = false;
        reason = verdict;
      } else reason = 'ties were broken only between nodes that a symmetry exchanges';
    }
    individualised.push(chosen);
    colour = refine(adjacency, ranksOf(Array.from(colour, (c, k) => [c, k === chosen ? 0 : 1])));
  }
  const order = new Int32Array(nodes);
  colour.forEach((c, k) => (order[c] = k));
  return { order, rank: colour, unique, reason };
}

/** Arcs by node, both ways, with their classes. */
class ClassedAdjacency {
  readonly outgoing: { node: number; cls: number }[][];
  readonly incoming: { node: number; cls: number }[][];

  constructor(
    readonly nodes: number,
    arcs: readonly ClassedArc[],
  ) {
    this.outgoing = Array.from({ length: nodes }, () => []);
    this.incoming = Array.from({ length: nodes }, () => []);
    for (const a of arcs) {
      this.outgoing[a.from].push({ node: a.to, cls: a.cls });
      this.incoming[a.to].push({ node: a.from, cls: a.cls });
    }
  }
}

/** Refines colours (ranks 0..c-1) until stable; every round's colours are ranks of the descriptions. */
function refine(adjacency: ClassedAdjacency, colour: Int32Array): Int32Array {
  let count = distinct(colour);
  for (;;) {
    const describe = (list: { node: number; cls: number }[]): number[] =>
      list.map((a) => a.cls * adjacency.nodes + colour[a.node]).sort((x, y) => x - y);
    const descriptions = Array.from(colour, (c, k) => [c, ...describe(adjacency.outgoing[k]), -1, ...describe(adjacency.incoming[k])]);
    const next = ranksOf(descriptions);
    const nextCount = distinct(next);
    if (nextCount === count) return next;
    colour = next;
    count = nextCount;
  }
}

/** Rank of each description in lexicographic order (equal descriptions share a rank). */
function ranksOf(descriptions: readonly number[][]): Int32Array {
  const compare = (a: readonly number[], b: readonly number[]): number => {
    for (let i = 0; i < Math.min(a.length, b.length); i++) if (a[i] !== b[i]) return a[i] - b[i];
    return a.length - b.length;
  };
  const sorted = descriptions.map((_, k) => k).sort((a, b) => compare(descriptions[a], descriptions[b]));
  const rank = new Int32Array(descriptions.length);
  sorted.forEach(
    (k, i) => (rank[k] = i === 0 ? 0 : rank[sorted[i - 1]] + (compare(descriptions[sorted[i - 1]], descriptions[k]) === 0 ? 0 : 1)),
  );
  return rank;
}

function distinct(colour: Int32Array): number {
  return new Set(colour).size;
}

/** The smallest colour held by more than one node, or -1. */
function firstSharedColour(colour: Int32Array): number {
  const size = new Int32Array(colour.length);
  colour.forEach((c) => size[c]++);
  return size.findIndex((s) => s > 1);
}

/**
 * null when `members` is exactly the orbit of `chosen` under the listed symmetries that fix every
 * node of `fixed`; otherwise why the tie may follow the numbering.
 */
function tieIsSymmetric(
  members: readonly number[],
  chosen: number,
  fixed: readonly number[],
  symmetries: readonly Int32Array[] | null,
): string | null {
  if (!symmetries)
    return 'a tie between nodes was broken without the full symmetry group to confirm it, so the order may follow the numbering';
  const orbit = new Set<number>();
  for (const g of symmetries) if (fixed.every((k) => g[k] === k)) orbit.add(g[chosen]);
  if (orbit.size === members.length && members.every((k) => orbit.has(k))) return null;
  return 'colour refinement left nodes together that no symmetry exchanges, so the order may follow the numbering';
}
