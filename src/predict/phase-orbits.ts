/**
 * The continuous symmetries of the guiding system: a common phase shift of one mode's amplitudes on
 * one weakly connected part of the coupling graph (docs/model.md, 'Relative equilibria and the
 * phase-symmetry zero eigenvalues'). On a connected graph this is one circle per mode; when broken
 * links split the graph, each part keeps its own phase freedom (and its own locked frequency), and
 * each of those directions must be removed from the stability problem too, or a spurious zero
 * eigenvalue remains.
 *
 * The generator of a shift on mode j and node set C maps (u, v) -> (v, -u) on those entries
 * (a -> i a with a = u - i v) and is zero elsewhere.
 */
import type { ModelParameters } from '../model/parameters.js';
import { squaredNorm } from '../util/linear-algebra.js';

export interface PhaseGenerator {
  mode: number;
  /** Nodes whose amplitudes the shift turns (one weakly connected part of the graph). */
  nodes: Int32Array;
}

/** Weakly connected parts of the graph of links with non-zero weight, each sorted, by smallest node. */
export function couplingComponents(params: ModelParameters): Int32Array[] {
  const n = params.nodes;
  const root = Int32Array.from({ length: n }, (_, k) => k);
  const find = (k: number): number => {
    while (root[k] !== k) k = root[k] = root[root[k]];
    return k;
  };
  for (let e = 0; e < params.linkWeight.length; e++) {
    if (params.linkWeight[e] === 0) continue;
    const a = find(params.linkFrom[e]);
    const b = find(params.linkTo[e]);
    if (a !== b) root[Math.max(a, b)] = Math.min(a, b);
  }
  const parts = new Map<number, number[]>();
  for (let k = 0; k < n; k++) {
    const r = find(k);
    const list = parts.get(r);
    if (list) list.push(k);
    else parts.set(r, [k]);
  }
  return [...parts.values()].map((list) => Int32Array.from(list));
}

/**
 * The phase generators that act on `y`: one per (mode, part) whose energy is more than
 * `threshold` times the total energy of the state. Generators with less carry no symmetry
 * direction worth removing (their tangent is numerically zero).
 */
export function activePhaseGenerators(y: Float64Array, modes: number, parts: readonly Int32Array[], threshold = 1e-8): PhaseGenerator[] {
  const total = squaredNorm(y);
  const found: PhaseGenerator[] = [];
  for (let j = 0; j < modes; j++) {
    for (const nodes of parts) {
      let energy = 0;
      for (const k of nodes) {
        const i = 2 * (k * modes + j);
        energy += y[i] * y[i] + y[i + 1] * y[i + 1];
      }
      if (total > 0 && energy > threshold * total) found.push({ mode: j, nodes });
    }
  }
  return found;
}

/** out = G y for one generator (out is overwritten). */
export function applyPhaseGenerator(generator: PhaseGenerator, modes: number, y: Float64Array, out: Float64Array): Float64Array {
  out.fill(0);
  for (const k of generator.nodes) {
    const i = 2 * (k * modes + generator.mode);
    out[i] = y[i + 1];
    out[i + 1] = -y[i];
  }
  return out;
}

/** Subtracts sum_c rate_c G_c from a dense Jacobian (row-major rows of length n), in place. */
export function subtractRotation(
  jacobian: { get(r: number, c: number): number; set(r: number, c: number, v: number): unknown },
  generators: readonly PhaseGenerator[],
  rates: ArrayLike<number>,
  modes: number,
): void {
  generators.forEach((g, c) => {
    const rate = rates[c];
    if (rate === 0) return;
    for (const k of g.nodes) {
      const i = 2 * (k * modes + g.mode);
      jacobian.set(i, i + 1, jacobian.get(i, i + 1) - rate);
      jacobian.set(i + 1, i, jacobian.get(i + 1, i) + rate);
    }
  });
}
