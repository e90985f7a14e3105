/**
 * A weighted digraph prepared for exact structural comparison: links are checked, weights equal
 * within tolerance are merged into classes, and arcs are stored in compressed rows both ways.
 */
import type { Link } from '../scenario/types.js';

/**
 * The graph in compressed rows: the arcs leaving node v are outNode[outStart[v] .. outStart[v+1]-1]
 * with their weight classes in outClass, and likewise for arriving arcs. Classes are ids of
 * equal-weight groups, so every later comparison is exact.
 */
export interface ArcGraph {
  n: number;
  outStart: Int32Array;
  outNode: Int32Array;
  outClass: Int32Array;
  inStart: Int32Array;
  inNode: Int32Array;
  inClass: Int32Array;
  /** Weight class of the self-loop v -> v, -1 when there is none. */
  selfClass: Int32Array;
}

/**
 * Checks `links` (node indices in range, finite weights, no pair given twice) and builds the arc
 * graph. Links with |weight| <= tolerance * max|weight| are dropped as absent. Errors name `where`.
 */
export function buildArcGraph(nodes: number, links: readonly Link[], tolerance: number, where: string): ArcGraph {
  if (!Number.isInteger(nodes) || nodes < 1) {
    throw new RangeError(`${where}: nodes must be a positive integer (got ${nodes})`);
  }
  if (!Array.isArray(links)) throw new TypeError(`${where}: links must be an array of {from, to, weight}`);
  const firstIndex = new Map<number, number>();
  let scale = 0;
  links.forEach((link: Link, i: number) => {
    const at = `${where}: links[${i}]`;
    if (link === null || typeof link !== 'object') throw new TypeError(`${at} must be an object {from, to, weight}`);
    for (const end of ['from', 'to'] as const) {
      const k = link[end];
      if (!Number.isInteger(k) || k < 0 || k >= nodes) {
        throw new RangeError(`${at}.${end} = ${k} is not a node index in 0..${nodes - 1}`);
      }
    }
    if (typeof link.weight !== 'number' || !Number.isFinite(link.weight)) {
      throw new RangeError(`${at}.weight = ${link.weight} is not a finite number`);
    }
    const key = link.from * nodes + link.to;
    const earlier = firstIndex.get(key);
    if (earlier !== undefined) {
      throw new RangeError(`${at} repeats links[${earlier}] (both carry node ${link.from} into node ${link.to})`);
    }
    firstIndex.set(key, i);
    scale = Math.max(scale, Math.abs(link.weight));
  });

  const threshold = tolerance * scale;
  const present = links.filter((link) => Math.abs(link.weight) > threshold);
  const classes = weightClasses(
    present.map((link) => link.weight),
    threshold,
  );
  const out = compressedRows(
    nodes,
    present.map((link) => link.from),
    present.map((link) => link.to),
    classes,
  );
  const into = compressedRows(
    nodes,
    present.map((link) => link.to),
    present.map((link) => link.from),
    classes,
  );
  const selfClass = new Int32Array(nodes).fill(-1);
  present.forEach((link, i) => {
    if (link.from === link.to) selfClass[link.from] = classes[i];
  });
  return {
    n: nodes,
    outStart: out.start,
    outNode: out.node,
    outClass: out.cls,
    inStart: into.start,
    inNode: into.node,
    inClass: into.cls,
    selfClass,
  };
}

/** Rows of (node, class) pairs grouped by `row`. */
function compressedRows(
  n: number,
  row: number[],
  node: number[],
  classes: Int32Array,
): { start: Int32Array; node: Int32Array; cls: Int32Array } {
  const start = new Int32Array(n + 1);
  for (const r of row) start[r + 1]++;
  for (let v = 0; v < n; v++) start[v + 1] += start[v];
  const fill = start.slice(0, n);
  const nodeOut = new Int32Array(row.length);
  const clsOut = new Int32Array(row.length);
  row.forEach((r, i) => {
    nodeOut[fill[r]] = node[i];
    clsOut[fill[r]++] = classes[i];
  });
  return { start, node: nodeOut, cls: clsOut };
}

/**
 * Class id per value: sorted values share a class until the gap to the previous one exceeds
 * `threshold`. Ids are ranks in sorted order, so they do not depend on the order of the input.
 */
export function weightClasses(weights: readonly number[], threshold: number): Int32Array {
  const order = weights.map((_, i) => i).sort((a, b) => weights[a] - weights[b]);
  const classes = new Int32Array(weights.length);
  let id = -1;
  let previous = -Infinity;
  for (const i of order) {
    if (weights[i] - previous > threshold) id++;
    classes[i] = id;
    previous = weights[i];
  }
  return classes;
}
