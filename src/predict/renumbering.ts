/**
 * The guiding system renumbered in the network's own node order (pattern/canonical-order.ts),
 * and the moves that carry states, locked states and group elements between the caller's
 * numbering and that one. The catalogue does all its work on the renumbered copy, so that neither
 * the order in which the scenario numbers its nodes nor anything else about the caller's copy
 * (its initial state in particular) can change what is found; only the final descriptions are
 * made in the caller's numbering.
 *
 * The order sees every listed link with its current and nominal weight (a broken link, weight 0,
 * still tells where the ring was), the detuning, and nothing else: the other parameters are the
 * same at every node.
 */
import { weightClasses } from '../pattern/arc-graph.js';
import { canonicalNodeOrder, type ClassedArc } from '../pattern/canonical-order.js';
import type { Link, Scenario } from '../scenario/types.js';
import { absentLinkThreshold } from './coupling-cycles.js';
import { GuideModel } from './guide-model.js';
import type { LockedState } from './locked-state.js';

export interface Renumbering {
  /** The copy in the canonical numbering. */
  model: GuideModel;
  /** order[c] = the caller's node at canonical position c. */
  order: Int32Array;
  /** rank[k] = canonical position of the caller's node k. */
  rank: Int32Array;
  /** True when any numbering of the same network gives this same copy (see canonical-order.ts). */
  unique: boolean;
  reason: string;
}

/** The renumbered copy never starts from anything of the caller's: its initial state is this placeholder. */
const PLACEHOLDER_INITIAL: Scenario['initial'] = { random: { seed: 0, amplitude: 1 } };

/**
 * The model renumbered canonically. `symmetries` are the caller's symmetries of the guiding
 * system (dynamicalSymmetries), used to confirm that ties were broken between equivalent nodes.
 */
export function canonicalRenumbering(model: GuideModel, symmetries: { elements: readonly Int32Array[]; truncated: boolean }): Renumbering {
  const params = model.params;
  const arcs = classedLinks(model);
  const arcClass = new Map(arcs.map((a) => [a.from * params.nodes + a.to, a.cls]));
  const keepsArcs = (g: Int32Array): boolean => arcs.every((a) => arcClass.get(g[a.from] * params.nodes + g[a.to]) === a.cls);
  const confirming = symmetries.truncated ? null : symmetries.elements.filter(keepsArcs);
  const detuningScale = Math.max(1, ...Array.from(params.detuning, Math.abs));
  const nodeClass = weightClasses(Array.from(params.detuning), 1e-12 * detuningScale);
  const { order, rank, unique, reason } = canonicalNodeOrder(params.nodes, arcs, nodeClass, confirming);

  const links: Link[] = [];
  const current: number[] = [];
  const byPosition = Array.from(params.linkFrom, (from, e) => ({ e, from: rank[from], to: rank[params.linkTo[e]] })).sort(
    (a, b) => a.to - b.to || a.from - b.from,
  );
  for (const { e, from, to } of byPosition) {
    links.push({ from, to, weight: params.linkNominal[e] });
    current.push(params.linkWeight[e]);
  }
  const scenario: Scenario = {
    ...model.scenario,
    topology: { edges: links },
    links,
    detuning: Array.from(order, (k) => params.detuning[k]),
    coupling: { strength: params.strength, reactive: params.reactive, dissipative: params.dissipative },
    noise: { ...model.scenario.noise, intensity: params.noiseIntensity, detuningWalk: params.detuningWalk },
    initial: PLACEHOLDER_INITIAL,
  };
  const renumbered = new GuideModel(scenario);
  renumbered.params.setLinkWeights(current);
  return { model: renumbered, order, rank, unique, reason };
}

/**
 * Every listed link with one class for its (current, nominal) weight pair; weights closer than
 * the absent-link threshold count as equal, as for the automorphisms.
 */
function classedLinks(model: GuideModel): ClassedArc[] {
  const { linkFrom, linkTo, linkWeight, linkNominal } = model.params;
  const threshold = absentLinkThreshold(model.params);
  const currentClass = weightClasses(Array.from(linkWeight), threshold);
  const nominalClass = weightClasses(Array.from(linkNominal), threshold);
  const width = Math.max(0, ...currentClass) + 1;
  return Array.from(linkFrom, (from, e) => ({ from, to: linkTo[e], cls: nominalClass[e] * width + currentClass[e] }));
}

/** The state with node k's amplitudes (every mode) moved to node perm[k]. */
export function movedState(y: ArrayLike<number>, perm: ArrayLike<number>, modes: number): Float64Array {
  const out = new Float64Array(y.length);
  const width = 2 * modes;
  for (let k = 0; k < perm.length; k++) for (let i = 0; i < width; i++) out[perm[k] * width + i] = y[k * width + i];
  return out;
}

/** The locked state moved by perm: its state, and each phase generator's nodes with it (ordered as activePhaseGenerators orders them). */
export function movedLockedState(locked: LockedState, perm: ArrayLike<number>, modes: number): LockedState {
  const moved = locked.generators.map((g, c) => ({
    generator: { mode: g.mode, nodes: Int32Array.from(g.nodes, (k) => perm[k]).sort() },
    rate: locked.rates[c],
  }));
  moved.sort((a, b) => a.generator.mode - b.generator.mode || a.generator.nodes[0] - b.generator.nodes[0]);
  return {
    ...locked,
    state: movedState(locked.state, perm, modes),
    generators: moved.map((m) => m.generator),
    rates: moved.map((m) => m.rate),
  };
}

/** The permutation g written in other labels: label a becomes map[a], so the result sends map[a] to map[g[a]]. */
export function relabelledPermutation(g: ArrayLike<number>, map: ArrayLike<number>): Int32Array {
  const out = new Int32Array(g.length);
  for (let a = 0; a < g.length; a++) out[map[a]] = map[g[a]];
  return out;
}
