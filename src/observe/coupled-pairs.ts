import type { ModelParameters } from '../model/parameters.js';
import { wrapAngle } from '../util/angles.js';

/**
 * The pairs of nodes the scenario's links join (either direction, each pair once, in order of
 * first appearance). A cycle slip is a coupled pair's phase difference moving past the unstable
 * equilibrium of its coupling, so slips are watched on these pairs, not on index neighbours
 * k, k+1 (which need not be coupled at all on a graph numbered out of cycle order).
 *
 * `watched[p]` says whether pair p's difference can slip under the current weights:
 * - 1 when the pair is coupled now (a link of non-zero weight and a non-zero strength);
 * - 1 when its two nodes lie in different connected parts of the coupled graph: the parts are
 *   free to drift apart, and a turn between them means the array as a whole is not locked;
 * - 0 when its links are broken but the two nodes are still joined through other links: their
 *   difference is then a sum along that path, and may unwind by a turn (a ring opened into a
 *   chain untwists) without any coupled pair slipping.
 */
export class CoupledPairs {
  /** Node a and node b of pair p at [2p] and [2p + 1]; the difference is arg a_b - arg a_a. */
  readonly ends: Int32Array;
  /** 1 where the pair's difference can slip (see the class comment), 0 where it may wind freely. */
  readonly watched: Uint8Array;
  private readonly linksOf: number[][];
  private readonly nodes: number;

  constructor(params: ModelParameters) {
    const index = new Map<string, number>();
    const ends: number[] = [];
    this.linksOf = [];
    for (let e = 0; e < params.linkFrom.length; e++) {
      const a = Math.min(params.linkFrom[e], params.linkTo[e]);
      const b = Math.max(params.linkFrom[e], params.linkTo[e]);
      if (a === b) continue;
      const key = `${a},${b}`;
      let p = index.get(key);
      if (p === undefined) {
        p = ends.length / 2;
        index.set(key, p);
        ends.push(a, b);
        this.linksOf.push([]);
      }
      this.linksOf[p].push(e);
    }
    this.ends = Int32Array.from(ends);
    this.watched = new Uint8Array(this.linksOf.length);
    this.nodes = params.nodes;
    this.update(params);
  }

  get size(): number {
    return this.linksOf.length;
  }

  /** Re-reads which pairs are coupled and which parts are joined (after a link or coupling fault). */
  update(params: ModelParameters): void {
    const root = Int32Array.from({ length: this.nodes }, (_, k) => k);
    const find = (k: number): number => {
      while (root[k] !== k) k = root[k] = root[root[k]];
      return k;
    };
    const coupled = this.linksOf.map((links) => params.strength !== 0 && links.some((e) => params.linkWeight[e] !== 0));
    coupled.forEach((c, p) => {
      if (c) root[find(this.ends[2 * p])] = find(this.ends[2 * p + 1]);
    });
    coupled.forEach((c, p) => (this.watched[p] = c || find(this.ends[2 * p]) !== find(this.ends[2 * p + 1]) ? 1 : 0));
  }

  /** arg a_b - arg a_a of each pair for one mode, wrapped, from per-node, per-mode phases. */
  differences(phase: readonly (readonly number[])[], mode: number, out: Float64Array = new Float64Array(this.size)): Float64Array {
    for (let p = 0; p < this.size; p++) out[p] = wrapAngle(phase[this.ends[2 * p + 1]][mode] - phase[this.ends[2 * p]][mode]);
    return out;
  }

  /** The same read off a rotating-frame state (a = u - i v, node-major, mode-minor). */
  stateDifferences(y: ArrayLike<number>, modes: number, mode: number, out: Float64Array = new Float64Array(this.size)): Float64Array {
    const phase = (k: number): number => Math.atan2(-y[2 * (k * modes + mode) + 1], y[2 * (k * modes + mode)]);
    for (let p = 0; p < this.size; p++) out[p] = wrapAngle(phase(this.ends[2 * p + 1]) - phase(this.ends[2 * p]));
    return out;
  }
}
