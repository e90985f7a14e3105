/**
 * Shapes the catalogue seeds from the graph itself rather than from any node numbering: the
 * in-phase shape; on a bipartite graph (a pair, a chain, a tree, an even ring) the alternating
 * shape, neighbours in anti-phase, which no cycle gives where the graph has none; and for every listed cycle of L nodes the twisted waves q = 1..L-1, whose phase
 * advances by 2 pi q / L from node to node along the cycle (on a ring numbered in order these are
 * the Fourier shapes; on any other cycle, or a ring numbered otherwise, they are the waves a
 * Fourier guess in node order misses).
 *
 * Nodes off the cycle take the phase of the sum of the phasors of their neighbours one step
 * nearer the cycle, layer by layer outwards: the smoothest continuation, and it needs no choice
 * that a numbering could make. A node where that sum cancels is left at zero amplitude (the
 * solver lets it find its own), and a node in another connected part, which keeps its own phase
 * anyway, starts in phase.
 */
import type { UndirectedGraph } from '../pattern/cycles.js';
import type { ComplexVector } from './isotropy.js';

export interface StructuralShape {
  /** The cycle the wave runs along, in the order its phase advances; null for the in-phase shape. */
  cycle: Int32Array | null;
  /** Phase step 2 pi q / L along the cycle (0 for in-phase, 1 for the alternating shape). */
  q: number;
  /** Unit moduli (zero where the continuation cancels). */
  shape: ComplexVector;
}

/** Below this modulus (relative to one neighbour's phasor) an off-cycle continuation has cancelled. */
const CANCELLED = 1e-9;

/** The in-phase shape, then every twisted wave of every cycle, cycles in the order given. */
export function structuralShapes(graph: UndirectedGraph, cycles: readonly Int32Array[]): StructuralShape[] {
  const nodes = graph.nodes;
  const inPhase: ComplexVector = { re: new Float64Array(nodes).fill(1), im: new Float64Array(nodes) };
  const shapes: StructuralShape[] = [{ cycle: null, q: 0, shape: inPhase }];
  const alternating = alternatingShape(graph);
  if (alternating) shapes.push({ cycle: null, q: 1, shape: alternating });
  for (const cycle of cycles) {
    const layers = layersAround(graph, cycle);
    for (let q = 1; q < cycle.length; q++) shapes.push({ cycle, q, shape: twistedWave(graph, cycle, q, layers) });
  }
  return shapes;
}

/**
 * +1 and -1 by the two colours of a bipartite graph, each connected part coloured from its
 * smallest node (the sign of a part is its own phase, so no numbering can change the state);
 * null when the graph has an odd cycle or no link at all.
 */
function alternatingShape(graph: UndirectedGraph): ComplexVector | null {
  const nodes = graph.nodes;
  if (graph.start[nodes] === 0) return null;
  const colour = new Int8Array(nodes);
  for (let root = 0; root < nodes; root++) {
    if (colour[root] !== 0) continue;
    colour[root] = 1;
    const queue = [root];
    for (let head = 0; head < queue.length; head++) {
      const k = queue[head];
      for (let i = graph.start[k]; i < graph.start[k + 1]; i++) {
        const l = graph.neighbour[i];
        if (colour[l] === 0) {
          colour[l] = -colour[k];
          queue.push(l);
        } else if (colour[l] === colour[k]) return null;
      }
    }
  }
  return { re: Float64Array.from(colour), im: new Float64Array(nodes) };
}

/** Distance of every node from the cycle (-1 when unreachable). */
function layersAround(graph: UndirectedGraph, cycle: Int32Array): Int32Array {
  const distance = new Int32Array(graph.nodes).fill(-1);
  const queue: number[] = [];
  for (const k of cycle) {
    distance[k] = 0;
    queue.push(k);
  }
  for (let head = 0; head < queue.length; head++) {
    const k = queue[head];
    for (let i = graph.start[k]; i < graph.start[k + 1]; i++) {
      const l = graph.neighbour[i];
      if (distance[l] < 0) {
        distance[l] = distance[k] + 1;
        queue.push(l);
      }
    }
  }
  return distance;
}

function twistedWave(graph: UndirectedGraph, cycle: Int32Array, q: number, distance: Int32Array): ComplexVector {
  const nodes = graph.nodes;
  const v: ComplexVector = { re: new Float64Array(nodes), im: new Float64Array(nodes) };
  cycle.forEach((k, j) => {
    const phase = (2 * Math.PI * q * j) / cycle.length;
    v.re[k] = Math.cos(phase);
    v.im[k] = Math.sin(phase);
  });
  const farthest = Math.max(0, ...distance);
  for (let layer = 1; layer <= farthest; layer++) {
    for (let k = 0; k < nodes; k++) {
      if (distance[k] !== layer) continue;
      let re = 0;
      let im = 0;
      for (let i = graph.start[k]; i < graph.start[k + 1]; i++) {
        const l = graph.neighbour[i];
        if (distance[l] !== layer - 1) continue;
        re += v.re[l];
        im += v.im[l];
      }
      const m = Math.hypot(re, im);
      if (m > CANCELLED) {
        v.re[k] = re / m;
        v.im[k] = im / m;
      }
    }
  }
  for (let k = 0; k < nodes; k++) if (distance[k] < 0) v.re[k] = 1;
  return v;
}
