/**
 * Automorphism group of a weighted directed coupling graph.
 *
 * The graph has A[to][from] = weight for every link (docs/model.md, 'Reference model'). A
 * permutation p (stored as perm[k] = p(k)) is an automorphism when A[p(i)][p(j)] = A[i][j] for all
 * i, j: every link i -> j of weight w is sent to a link p(i) -> p(j) of the same weight, and no
 * link appears from nowhere. For a one-way ring this is the cyclic group Z_N, for a two-way ring
 * the dihedral group D_N.
 *
 * Method. Node colours are refined until stable (an automorphism keeps every colour). Nodes are
 * placed in breadth-first order v_0, v_1, ..., so a node's image must be a neighbour of its
 * parent's image. With G_L the automorphisms fixing v_0..v_{L-1}, every G_L is the union of the
 * cosets t_c G_{L+1} over the orbit of v_L, one representative t_c per orbit point c. Working
 * from the deepest level up, each orbit is grown from the generators found so far; a
 * backtracking search is run only for a candidate image that no product of them reaches. The
 * elements are the products t_0 t_1 ... of one representative per level, listed with the
 * deepest level varying fastest, so the first |G_L| of them are G_L itself: the climb stops
 * once |G_L| (the product of the orbit sizes so far) exceeds `limit`, which keeps groups such as
 * S_n cheap. A ring of N nodes costs two short searches and O(N) per element. The backtracking
 * is exponential in the worst case (graphs whose colours do not separate orbits), as simple
 * searches are.
 */
import type { Link } from '../scenario/types.js';
import { buildArcGraph, type ArcGraph } from './arc-graph.js';
import { refineColours } from './colour-refinement.js';

export { describeElement, cycleNotation } from './permutation.js';
export type { ElementDescription, ElementKind } from './permutation.js';

export const DEFAULT_AUTOMORPHISM_LIMIT = 10_000;
export const DEFAULT_WEIGHT_TOLERANCE = 1e-9;

export interface AutomorphismOptions {
  /** List at most this many elements (default 10000). */
  limit?: number;
  /**
   * Weight tolerance relative to the largest |weight| (default 1e-9). Links with
   * |weight| <= tolerance * max|weight| count as absent (so zero-weight links always do).
   * Sorted weights fall into one class until a gap between neighbours exceeds that amount.
   */
  tolerance?: number;
}

export interface AutomorphismGroup {
  /** The identity first, then the other elements; perm[k] = p(k). At most `limit` of them. */
  elements: Int32Array[];
  /** True when the group has more than `limit` elements, so only the first `limit` are listed. */
  truncated: boolean;
}

/**
 * Every automorphism of the graph with `nodes` nodes and the given links, up to `limit` of them.
 * Throws a RangeError or TypeError naming the bad argument or link.
 */
export function graphAutomorphisms(nodes: number, links: readonly Link[], options: AutomorphismOptions = {}): AutomorphismGroup {
  const limit = options.limit ?? DEFAULT_AUTOMORPHISM_LIMIT;
  const tolerance = options.tolerance ?? DEFAULT_WEIGHT_TOLERANCE;
  if (!Number.isInteger(limit) || limit < 1) {
    throw new RangeError(`graphAutomorphisms: options.limit must be a positive integer (got ${limit})`);
  }
  if (!Number.isFinite(tolerance) || tolerance < 0) {
    throw new RangeError(`graphAutomorphisms: options.tolerance must be a finite number >= 0 (got ${tolerance})`);
  }
  const graph = buildArcGraph(nodes, links, tolerance, 'graphAutomorphisms');
  const colour = refineColours(graph);
  const plan = planSearch(graph, colour);
  const transversals = cosetRepresentatives(graph, colour, plan, limit);
  const listed = transversals.reduce((product, reps) => product * reps.length, 1);
  return { elements: products(transversals, nodes, limit), truncated: listed > limit };
}

/**
 * Order in which the search places nodes: breadth first over arcs of either direction, each
 * component started at a node of the rarest colour. For every non-start node it records the
 * parent placed before it and the arc joining them, which restricts where the node can go.
 */
interface SearchPlan {
  order: Int32Array;
  /** Parent of each node in the search tree, -1 for the first node of a component. */
  parent: Int32Array;
  /** True when the joining arc runs parent -> node, false when node -> parent. */
  parentArcOut: Uint8Array;
  /** Weight class of the joining arc. */
  parentArcClass: Int32Array;
}

function planSearch(graph: ArcGraph, colour: Int32Array): SearchPlan {
  const { n, outStart, outNode, outClass, inStart, inNode, inClass } = graph;
  const colourSize = new Int32Array(n);
  for (let v = 0; v < n; v++) colourSize[colour[v]]++;
  const order = new Int32Array(n);
  const parent = new Int32Array(n).fill(-1);
  const parentArcOut = new Uint8Array(n);
  const parentArcClass = new Int32Array(n);
  const visited = new Uint8Array(n);
  let placed = 0;
  const visit = (u: number, start: Int32Array, node: Int32Array, cls: Int32Array, out: boolean): void => {
    for (let i = start[u]; i < start[u + 1]; i++) {
      const x = node[i];
      if (visited[x]) continue;
      visited[x] = 1;
      parent[x] = u;
      parentArcOut[x] = out ? 1 : 0;
      parentArcClass[x] = cls[i];
      order[placed++] = x;
    }
  };
  while (placed < n) {
    let first = -1;
    for (let v = 0; v < n; v++) {
      if (!visited[v] && (first < 0 || colourSize[colour[v]] < colourSize[colour[first]])) first = v;
    }
    visited[first] = 1;
    let head = placed;
    order[placed++] = first;
    while (head < placed) {
      const u = order[head++];
      visit(u, outStart, outNode, outClass, true);
      visit(u, inStart, inNode, inClass, false);
    }
  }
  return { order, parent, parentArcOut, parentArcClass };
}

/**
 * Nodes v_L may be sent to by some element of G_L (which fixes v_0..v_{L-1}): nodes of v_L's
 * colour, outside the prefix, joined to v_L's parent (fixed by G_L) by an arc like v_L's own.
 */
function levelCandidates(graph: ArcGraph, colour: Int32Array, plan: SearchPlan, position: Int32Array, level: number): number[] {
  const v = plan.order[level];
  const p = plan.parent[v];
  const list: number[] = [];
  const allowed = (c: number): boolean => position[c] >= level && colour[c] === colour[v];
  if (p < 0) {
    for (let c = 0; c < graph.n; c++) if (allowed(c)) list.push(c);
    return list;
  }
  const out = plan.parentArcOut[v] === 1;
  const start = out ? graph.outStart : graph.inStart;
  const node = out ? graph.outNode : graph.inNode;
  const cls = out ? graph.outClass : graph.inClass;
  for (let i = start[p]; i < start[p + 1]; i++) {
    if (cls[i] === plan.parentArcClass[v] && allowed(node[i])) list.push(node[i]);
  }
  return list;
}

/** g o t: x -> g(t(x)). */
function compose(g: Int32Array, t: Int32Array): Int32Array {
  const out = new Int32Array(t.length);
  for (let x = 0; x < t.length; x++) out[x] = g[t[x]];
  return out;
}

/**
 * For every level with a non-trivial orbit, deepest first: representatives t_c of the cosets
 * of G_{L+1} in G_L, the identity first. Their sizes multiply to |G_L| for the last level
 * reached: level 0 unless the product passed `limit` before.
 */
function cosetRepresentatives(graph: ArcGraph, colour: Int32Array, plan: SearchPlan, limit: number): Int32Array[][] {
  const n = graph.n;
  const position = new Int32Array(n);
  plan.order.forEach((v, i) => (position[v] = i));
  const identity = Int32Array.from({ length: n }, (_, k) => k);
  const search = new ExtensionSearch(graph, colour, plan);
  const generators: Int32Array[] = []; // found so far; all lie in G_L for the current level L
  const orbitTag = new Int32Array(n).fill(-1); // level whose orbit a node was last put in
  const transversals: Int32Array[][] = [];
  let groupOrder = 1; // |G_L|
  for (let level = n - 1; level >= 0 && groupOrder <= limit; level--) {
    const candidates = levelCandidates(graph, colour, plan, position, level);
    if (candidates.length < 2) continue; // only v_L itself: G_L = G_{L+1}
    const v = plan.order[level];
    const points = [v];
    const reps: Int32Array[] = [identity];
    orbitTag[v] = level;
    const close = (): void => {
      for (let i = 0; i < points.length; i++) {
        for (const g of generators) {
          const e = g[points[i]];
          if (orbitTag[e] === level) continue;
          orbitTag[e] = level;
          points.push(e);
          reps.push(compose(g, reps[i]));
        }
      }
    };
    close();
    for (const c of candidates) {
      if (orbitTag[c] === level) continue;
      const g = search.find(level, c);
      if (g === null) continue;
      generators.push(g);
      close();
    }
    if (reps.length > 1) transversals.push(reps);
    groupOrder *= reps.length;
  }
  return transversals;
}

/** The first `limit` products t_0 t_1 ... t_deepest, identity first, as the listed elements. */
function products(transversals: Int32Array[][], n: number, limit: number): Int32Array[] {
  let elements: Int32Array[] = [Int32Array.from({ length: n }, (_, k) => k)];
  for (const reps of transversals) {
    const next: Int32Array[] = [];
    for (const t of reps) {
      for (const h of elements) {
        if (next.length === limit) break;
        next.push(t === reps[0] ? h : compose(t, h));
      }
    }
    elements = next;
  }
  return elements;
}

/** Backtracking search for one element of G_L that sends v_L to a given node. */
class ExtensionSearch {
  private readonly image: Int32Array; // p(v), -1 while v is unplaced
  private readonly preimage: Int32Array; // p^-1(c), -1 while c is nobody's image
  private readonly mark: Int32Array; // scratch: 1 + class of an arc of c, 0 for none
  private stack: Int32Array; // candidate lists of the open levels, one after another
  private readonly levelEnd: Int32Array;
  private readonly levelNext: Int32Array;

  constructor(
    private readonly graph: ArcGraph,
    private readonly colour: Int32Array,
    private readonly plan: SearchPlan,
  ) {
    const n = graph.n;
    this.image = new Int32Array(n);
    this.preimage = new Int32Array(n);
    this.mark = new Int32Array(n);
    this.stack = new Int32Array(Math.max(16, 2 * n));
    this.levelEnd = new Int32Array(n);
    this.levelNext = new Int32Array(n);
  }

  /** An automorphism fixing v_0..v_{level-1} with v_level -> target, or null if there is none. */
  find(level: number, target: number): Int32Array | null {
    const { image, preimage, levelEnd, levelNext } = this;
    const { order } = this.plan;
    const n = this.graph.n;
    image.fill(-1);
    preimage.fill(-1);
    for (let i = 0; i < level; i++) image[order[i]] = preimage[order[i]] = order[i];
    this.stack[0] = target;
    levelEnd[level] = 1;
    levelNext[level] = 0;
    const first = level;
    while (level >= first) {
      const v = order[level];
      if (image[v] >= 0) {
        preimage[image[v]] = -1;
        image[v] = -1;
      }
      let placed = false;
      while (!placed && levelNext[level] < levelEnd[level]) {
        const c = this.stack[levelNext[level]++];
        image[v] = c;
        preimage[c] = v;
        placed = this.arcsMatch(v, c);
        if (!placed) {
          image[v] = -1;
          preimage[c] = -1;
        }
      }
      if (!placed) level--;
      else if (level === n - 1) return image.slice();
      else this.openLevel(++level);
    }
    return null;
  }

  /** Stacks the candidate images of order[level] given the nodes placed so far. */
  private openLevel(level: number): void {
    const { graph, colour, image, preimage } = this;
    const { order, parent, parentArcOut, parentArcClass } = this.plan;
    const v = order[level];
    let top = this.levelEnd[level - 1];
    this.levelNext[level] = top;
    const p = parent[v];
    if (p < 0) {
      for (let c = 0; c < graph.n; c++) if (preimage[c] < 0 && colour[c] === colour[v]) top = this.push(top, c);
    } else {
      const out = parentArcOut[v] === 1;
      const start = out ? graph.outStart : graph.inStart;
      const node = out ? graph.outNode : graph.inNode;
      const cls = out ? graph.outClass : graph.inClass;
      const pc = image[p];
      for (let i = start[pc]; i < start[pc + 1]; i++) {
        const c = node[i];
        if (cls[i] === parentArcClass[v] && preimage[c] < 0 && colour[c] === colour[v]) top = this.push(top, c);
      }
    }
    this.levelEnd[level] = top;
  }

  private push(top: number, c: number): number {
    if (top === this.stack.length) {
      const grown = new Int32Array(2 * this.stack.length);
      grown.set(this.stack);
      this.stack = grown;
    }
    this.stack[top] = c;
    return top + 1;
  }

  /** With p(v) = c tentatively set: are v's arcs to placed nodes mapped exactly onto c's arcs to their images? */
  private arcsMatch(v: number, c: number): boolean {
    const g = this.graph;
    return this.sideMatches(g.outStart, g.outNode, g.outClass, v, c) && this.sideMatches(g.inStart, g.inNode, g.inClass, v, c);
  }

  /** One direction of arcsMatch: each of v's arcs to a placed x has a like arc from c to p(x), and c has no others to images. */
  private sideMatches(start: Int32Array, node: Int32Array, cls: Int32Array, v: number, c: number): boolean {
    const { image, preimage, mark } = this;
    let reached = 0;
    for (let i = start[c]; i < start[c + 1]; i++) {
      if (preimage[node[i]] >= 0) {
        mark[node[i]] = cls[i] + 1;
        reached++;
      }
    }
    let mapped = 0;
    let matches = true;
    for (let i = start[v]; i < start[v + 1] && matches; i++) {
      const y = image[node[i]];
      if (y < 0) continue;
      if (mark[y] !== cls[i] + 1) matches = false;
      mapped++;
    }
    for (let i = start[c]; i < start[c + 1]; i++) mark[node[i]] = 0;
    return matches && mapped === reached;
  }
}
