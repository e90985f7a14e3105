/**
 * Simple cycles of an undirected graph (the coupling graph with link directions forgotten), each
 * listed once as a node sequence. The catalogue seeds twisted waves along them (a phase that
 * advances by a fixed step from node to node round the cycle) and reads from them which
 * symmetries reverse the direction of the ring (mirror-symmetry.ts).
 *
 * Method: breadth first over simple paths, one edge longer per level; a path starts at its
 * smallest node and visits only larger ones, so a cycle is only met from its smallest node, and
 * a path with m >= 3 nodes whose end is adjacent to its start closes a cycle of m nodes. Each
 * cycle is met once per direction; the direction whose second node is smaller than its last is
 * kept. Levels are finished one at a time, so the listing always holds every cycle up to some
 * length (`completeUpTo`): a listing cut short by a budget still holds whole lengths, which the
 * graph's symmetries map onto themselves.
 */

/** No cycle longer than this is looked for: the catalogue's largest ring (256 slow variables, one mode). */
export const MAX_CYCLE_LENGTH = 128;
/** At most this many cycles are listed (shortest first, whole lengths only). */
export const MAX_CYCLES = 32;
/** The search stops before a level would hold more open paths than this (bounds time and memory). */
export const MAX_OPEN_PATHS = 20_000;

export interface CycleLimits {
  maxLength?: number;
  maxCycles?: number;
  maxOpenPaths?: number;
}

export type CycleSearchStop = 'all found' | 'length limit' | 'cycle limit' | 'path limit';

export interface CycleListing {
  /** Each cycle starts at its smallest node, then goes to the smaller of that node's two cycle neighbours. */
  cycles: Int32Array[];
  /** Every cycle with at most this many nodes is listed. */
  completeUpTo: number;
  /** Why the search ended: 'all found' means every simple cycle of the graph is listed. */
  stoppedBy: CycleSearchStop;
}

/** Neighbour lists of an undirected simple graph in compressed rows (sorted, no self-loops, no repeats). */
export interface UndirectedGraph {
  nodes: number;
  start: Int32Array;
  neighbour: Int32Array;
}

/** The undirected simple graph of the given node pairs (either order; repeats and self-loops dropped). */
export function undirectedGraph(nodes: number, pairs: readonly (readonly [number, number])[]): UndirectedGraph {
  const lists = Array.from({ length: nodes }, () => new Set<number>());
  for (const [a, b] of pairs) {
    if (a === b) continue;
    lists[a].add(b);
    lists[b].add(a);
  }
  const start = new Int32Array(nodes + 1);
  lists.forEach((s, k) => (start[k + 1] = start[k] + s.size));
  const neighbour = new Int32Array(start[nodes]);
  lists.forEach((s, k) =>
    neighbour.set(
      [...s].sort((x, y) => x - y),
      start[k],
    ),
  );
  return { nodes, start, neighbour };
}

/** Every simple cycle of `graph` within the limits (see the module header). */
export function simpleCycles(graph: UndirectedGraph, limits: CycleLimits = {}): CycleListing {
  const maxLength = Math.min(limits.maxLength ?? MAX_CYCLE_LENGTH, graph.nodes);
  const maxCycles = limits.maxCycles ?? MAX_CYCLES;
  const maxOpenPaths = limits.maxOpenPaths ?? MAX_OPEN_PATHS;
  const { nodes, start, neighbour } = graph;
  const adjacent = new Uint8Array(nodes * nodes);
  for (let a = 0; a < nodes; a++) for (let i = start[a]; i < start[a + 1]; i++) adjacent[a * nodes + neighbour[i]] = 1;

  const cycles: Int32Array[] = [];
  // Open paths of `width` nodes, one after another.
  let width = 1;
  let paths: Int32Array = Int32Array.from({ length: nodes }, (_, k) => k);
  let count = nodes;
  let completeUpTo = Math.min(2, nodes);
  for (;;) {
    if (width >= 3) {
      const closed: Int32Array[] = [];
      for (let p = 0; p < count; p++) {
        const at = p * width;
        const first = paths[at];
        const last = paths[at + width - 1];
        if (adjacent[last * nodes + first] && paths[at + 1] < last) closed.push(paths.slice(at, at + width));
      }
      if (cycles.length + closed.length > maxCycles) return { cycles, completeUpTo, stoppedBy: 'cycle limit' };
      cycles.push(...closed);
      completeUpTo = width;
    }
    if (count === 0) return { cycles, completeUpTo: nodes, stoppedBy: 'all found' };
    if (width === maxLength) return { cycles, completeUpTo, stoppedBy: maxLength === nodes ? 'all found' : 'length limit' };
    const next = extendPaths(graph, paths, count, width, maxOpenPaths);
    if (next === null) return { cycles, completeUpTo, stoppedBy: 'path limit' };
    paths = next.paths;
    count = next.count;
    width++;
  }
}

/** Every open path one edge longer (to a node larger than its start, not on it), or null past `limit`. */
function extendPaths(
  graph: UndirectedGraph,
  paths: Int32Array,
  count: number,
  width: number,
  limit: number,
): { paths: Int32Array; count: number } | null {
  const { start, neighbour } = graph;
  const onPath = (at: number, node: number): boolean => {
    for (let i = at; i < at + width; i++) if (paths[i] === node) return true;
    return false;
  };
  /** Calls `visit(path offset, node)` for every extension, in order. */
  const forEachExtension = (visit: (at: number, node: number) => void): void => {
    for (let p = 0; p < count; p++) {
      const at = p * width;
      const first = paths[at];
      const last = paths[at + width - 1];
      for (let i = start[last]; i < start[last + 1]; i++) {
        const node = neighbour[i];
        if (node > first && !onPath(at, node)) visit(at, node);
      }
    }
  };
  let total = 0;
  forEachExtension(() => total++);
  if (total > limit) return null;
  const out = new Int32Array(total * (width + 1));
  let written = 0;
  forEachExtension((at, node) => {
    out.set(paths.subarray(at, at + width), written * (width + 1));
    out[written * (width + 1) + width] = node;
    written++;
  });
  return { paths: out, count: total };
}
