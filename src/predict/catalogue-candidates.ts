/**
 * How each catalogue entry was found, and its name in the caller's numbering.
 *
 * The search runs in the renumbered copy (renumbering.ts) and records a recipe per entry: the
 * isotropy class it was solved in, the structural shape it grew from, a random start or an extra
 * seed. Names are given in the caller's numbering, because that is where "rotating wave q" means
 * something: a wave advancing by 2 pi q / N along k -> k + 1. A class is named by how the caller's
 * rotation k -> k + 1 (when it is a symmetry) and the caller's Fourier shapes sit in it; a shape
 * along a cycle that is the caller's ring in order is named as that ring's wave, any other as a
 * cycle wave. The mirror image of a recipe is the recipe moved by the reversing symmetry.
 */
import type { CandidateInfo, CandidateType } from './catalogue.js';
import {
  conjugateClass,
  fixedPointBasisWithin,
  fourierVector,
  isotropyOf,
  movedVector,
  subgroupKey,
  type ComplexVector,
  type GroupTable,
  type IsotropyClass,
} from './isotropy.js';
import type { Renumbering } from './renumbering.js';

export type Origin =
  | { kind: 'class'; cls: IsotropyClass }
  | { kind: 'shape'; cycle: Int32Array | null; q: number }
  | { kind: 'random-start' }
  | { kind: 'seed' };

export interface Recipe {
  origin: Origin;
  mode: number;
  /** Complex dimension of the subspace Newton worked in (N for the full space). */
  fixDimension: number;
  /** Order of the isotropy subgroup the solve kept (1 in the full space). */
  symmetryOrder: number;
  exact: boolean;
  mirrored: boolean;
}

/** The caller's ring numbering seen from the renumbered copy. */
export interface CallerRing {
  /** Index in the copy's group table of the caller's rotation k -> k + 1, or -1 when it is not a symmetry. */
  rotation: number;
  /** The caller's Fourier shape e^{2 pi i q k / N}, moved into the copy's numbering. */
  fourier(q: number): ComplexVector;
}

export function callerRing(renumbering: Renumbering, table: GroupTable | null): CallerRing {
  const { order, rank } = renumbering;
  const nodes = order.length;
  // caller's k -> k + 1 written in the copy's labels: position c -> rank[order[c] + 1]
  const rotation = Array.from(order, (k) => rank[(k + 1) % nodes]).join(',');
  return {
    rotation: table ? table.elements.findIndex((g) => g.join(',') === rotation) : -1,
    fourier: (q) => movedVector(fourierVector(nodes, q), rank),
  };
}

const waveType = (q: number, nodes: number): CandidateType => (q === 0 ? 'in-phase' : 2 * q === nodes ? 'anti-phase' : 'rotating-wave');

/** Candidate type of an isotropy class, named in the caller's numbering. */
export function classifyClass(table: GroupTable, cls: IsotropyClass, nodes: number, ring: CallerRing): { type: CandidateType; q?: number } {
  const sub = cls.subgroup;
  const at = ring.rotation >= 0 ? sub.elements.indexOf(ring.rotation) : -1;
  if (at >= 0) {
    const q = ((Math.round((-sub.phases[at] * nodes) / (2 * Math.PI)) % nodes) + nodes) % nodes;
    return { type: waveType(q, nodes), q };
  }
  if (ring.rotation >= 0) {
    const own = subgroupKey(sub);
    for (let q = 1; 2 * q < nodes; q++) {
      const line = fixedPointBasisWithin(table, sub, [ring.fourier(q), ring.fourier(nodes - q)]);
      if (line.length === 1 && subgroupKey(isotropyOf(table, line[0])) === own) return { type: 'standing-wave', q };
    }
  }
  if (cls.fixDimension === 1 && sub.elements.length === table.elements.length && sub.phases.every((p) => p === 0))
    return { type: 'in-phase', q: 0 };
  return { type: 'cluster' };
}

/** The recipe's type, wave number and cycle in the caller's numbering (the rest of CandidateInfo comes from the recipe). */
export function candidateName(
  recipe: Recipe,
  table: GroupTable | null,
  renumbering: Renumbering,
  ring: CallerRing,
): { type: CandidateType; q?: number; cycle?: number[] } {
  const origin = recipe.origin;
  const nodes = renumbering.order.length;
  switch (origin.kind) {
    case 'class':
      return table ? classifyClass(table, origin.cls, nodes, ring) : { type: 'cluster' };
    case 'shape': {
      if (!origin.cycle) return origin.q === 0 ? { type: 'in-phase', q: 0 } : { type: 'anti-phase', ...(nodes === 2 ? { q: 1 } : {}) };
      const cycle = fromSmallest(Array.from(origin.cycle, (c) => renumbering.order[c]));
      const step = ringStep(cycle, nodes);
      if (step === 0) return { type: 'cycle-wave', q: origin.q, cycle };
      // along the caller's ring: the wave number counted along k -> k + 1
      const q = step > 0 ? origin.q : (nodes - origin.q) % nodes;
      return { type: waveType(q, nodes), q, cycle: step > 0 ? cycle : [cycle[0], ...cycle.slice(1).reverse()] };
    }
    case 'random-start':
      return { type: 'random-start' };
    case 'seed':
      return { type: 'seed' };
  }
}

/** The cycle listed from its smallest node on, in the same direction (only the phase reference moves). */
function fromSmallest(cycle: number[]): number[] {
  const at = cycle.indexOf(Math.min(...cycle));
  return [...cycle.slice(at), ...cycle.slice(0, at)];
}

/** +1 when the cycle runs k -> k + 1 through every node, -1 when it runs k -> k - 1, 0 otherwise. */
function ringStep(cycle: readonly number[], nodes: number): number {
  if (cycle.length !== nodes) return 0;
  for (const step of [1, -1]) if (cycle.every((k, i) => cycle[(i + 1) % nodes] === (k + step + nodes) % nodes)) return step;
  return 0;
}

/** The recipe of the mirror image: the same seed moved by the reversing symmetry (index in the table and permutation). */
export function mirroredRecipe(recipe: Recipe, table: GroupTable | null, reversing: Int32Array): Recipe {
  const origin = recipe.origin;
  const mirrored = { ...recipe, mirrored: true };
  if (origin.kind === 'class' && table) {
    const index = table.elements.indexOf(reversing);
    return { ...mirrored, origin: { kind: 'class', cls: index >= 0 ? conjugateClass(table, origin.cls, index) : origin.cls } };
  }
  if (origin.kind === 'shape' && origin.cycle)
    return { ...mirrored, origin: { kind: 'shape', cycle: Int32Array.from(origin.cycle, (c) => reversing[c]), q: origin.q } };
  return mirrored;
}

/** The full CandidateInfo of a recipe. */
export function candidateInfo(
  recipe: Recipe,
  name: { type: CandidateType; q?: number; cycle?: number[] },
  conjugates: number,
): CandidateInfo {
  const info: CandidateInfo = {
    type: name.type,
    mode: recipe.mode,
    fixDimension: recipe.fixDimension,
    symmetryOrder: recipe.symmetryOrder,
    conjugates,
    exact: recipe.exact,
  };
  if (name.q !== undefined) info.q = name.q;
  if (name.cycle) info.cycle = name.cycle;
  if (recipe.mirrored) info.mirrored = true;
  return info;
}
