/**
 * The catalogue of locked patterns of the guiding system (design section 4, issue 4):
 * 1. the coupling graph's automorphism group (computed from the current link weights, so a
 *    broken link lowers the symmetry) and the isotropy subgroups of group x circle on one mode's
 *    amplitudes, up to conjugacy (isotropy.ts);
 * 2. for each class, seeds inside its fixed-point subspace: the Fourier shapes e^{2 pi i q k / N}
 *    projected onto it and, for larger subspaces, generic points of it, each with every non-zero
 *    modulus set to the lone oscillator's amplitude (the stiff-amplitude guess);
 * 3. Newton inside the fixed-point subspace (parametrised by its real basis), then refinement in
 *    the full space with the common rotation factored out (locked-state.ts);
 * 4. stability with the symmetry directions removed by construction and a marginal band;
 * 5. duplicates (states related by a group element and phase shifts) are dropped.
 * Extra seeds (such as the current state) are solved in the full space. When the ring order is
 * broken (no rotation k -> k + 1 left), the intact ring's rotating waves are still tried as
 * full-space seeds, so the patterns that survive the break in deformed form are found.
 */
import { Matrix } from 'ml-matrix';
import { graphAutomorphisms } from '../pattern/automorphisms.js';
import { describeElement } from '../pattern/permutation.js';
import { Random } from '../util/random.js';
import { carryingMode } from '../observe/amplitudes.js';
import type { GuideModel } from './guide-model.js';
import {
  conjugateClass,
  fixedPointBasisWithin,
  fourierVector,
  groupTable,
  isotropyClasses,
  isotropyOf,
  projectOnto,
  subgroupKey,
  unitRotation,
  type ComplexVector,
  type GroupTable,
  type IsotropyClass,
} from './isotropy.js';
import { lockedStateStability, solveLockedState, type LockedState } from './locked-state.js';
import { describeLockedState, type LockedPatternDescription } from './describe.js';

export type CandidateType = 'in-phase' | 'anti-phase' | 'rotating-wave' | 'standing-wave' | 'cluster' | 'seed';

export interface CandidateInfo {
  /** The symmetry type the pattern was seeded from. */
  type: CandidateType;
  q?: number;
  /** Mode the seed excited. */
  mode: number;
  /** Complex dimension of the fixed-point subspace Newton worked in (N for a full-space seed). */
  fixDimension: number;
  /** Order of the isotropy subgroup of group x circle (1 for a full-space seed). */
  symmetryOrder: number;
  /** Number of conjugate copies (the same pattern moved by the group), 1 for a full-space seed. */
  conjugates: number;
  /**
   * True when solved inside the type's fixed-point subspace (the symmetry is exact); false for a
   * full-space solve from the shape, as when detuning or a broken link has removed the symmetry.
   */
  exact: boolean;
}

export interface CataloguePattern extends LockedPatternDescription {
  candidate: CandidateInfo;
}

export interface PatternCatalogue {
  nodes: number;
  modes: number;
  /** Symmetries of the guiding system (graph automorphisms keeping the detuning); graphOrder counts the graph's alone. */
  group: { order: number; graphOrder: number; truncated: boolean; elements: string[] };
  /** Connected parts of the coupling graph (each keeps its own phase and frequency). */
  parts: number[][];
  /** Isotropy classes examined and Newton solves run. */
  classesExamined: number;
  solves: number;
  patterns: CataloguePattern[];
}

export interface CatalogueOptions {
  /** Skip classes whose fixed-point subspace has a larger complex dimension; default 4 (1 above 16 nodes). */
  maxFixDimension?: number;
  /** Only seed these candidate types. */
  types?: readonly CandidateType[];
  /** Extra full-space seeds (rotating-frame states), such as the current state. */
  seeds?: readonly Float64Array[];
  /** Generic seeds per class with a fixed-point subspace of dimension > 1; default 2 (0 above 16 nodes). */
  randomSeeds?: number;
  /** Largest group listed (graphAutomorphisms limit); default 512. */
  groupLimit?: number;
  /** Modes to seed; default every mode whose gain exceeds its loss. */
  modes?: readonly number[];
}

/** Above this many slow variables the dense Jacobians make a catalogue too slow to be useful. */
export const CATALOGUE_SIZE_LIMIT = 256;

const TYPE_ORDER: CandidateType[] = ['in-phase', 'anti-phase', 'rotating-wave', 'standing-wave', 'cluster', 'seed'];

/**
 * The symmetry group of the guiding system: automorphisms of the coupling graph (current link
 * weights) that also keep every node's detuning (the other parameters are the same at every
 * node). A detuned node breaks the symmetries that move it.
 */
export function dynamicalSymmetries(model: GuideModel, limit = 512): { elements: Int32Array[]; truncated: boolean; graphOrder: number } {
  const { nodes, detuning } = model.params;
  const graph = graphAutomorphisms(nodes, model.params.currentLinks(), { limit });
  const same = (a: number, b: number): boolean => Math.abs(a - b) <= 1e-12 * Math.max(1, Math.abs(a), Math.abs(b));
  const elements = graph.elements.filter((g) => g.every((image, k) => same(detuning[image], detuning[k])));
  return { elements, truncated: graph.truncated, graphOrder: graph.elements.length };
}

/** Amplitude of a lone oscillating mode: g (1 - r^2/4) = d, so r = 2 sqrt(1 - d/g). */
export function loneAmplitude(gain: number, loss: number): number {
  return gain > loss && gain > 0 ? 2 * Math.sqrt(1 - loss / gain) : 0;
}

/** Real orthonormal basis (columns) of {y : mode j's amplitudes in span(basis), other modes 0}. */
export function realBasisForMode(basis: readonly ComplexVector[], nodes: number, modes: number, mode: number): Matrix {
  const b = new Matrix(2 * nodes * modes, 2 * basis.length);
  basis.forEach((v, c) => {
    for (let k = 0; k < nodes; k++) {
      const i = 2 * (k * modes + mode);
      // a = v: u = Re v, v-coordinate = -Im v.   a = i v: u = -Im v, v-coordinate = -Re v.
      b.set(i, 2 * c, v.re[k]);
      b.set(i + 1, 2 * c, -v.im[k]);
      b.set(i, 2 * c + 1, -v.im[k]);
      b.set(i + 1, 2 * c + 1, -v.re[k]);
    }
  });
  return b;
}

/** A rotating-frame state with mode j's amplitudes shaped like v, each non-zero modulus set to r0. */
export function stiffSeed(v: ComplexVector, nodes: number, modes: number, mode: number, r0: number): Float64Array {
  const y = new Float64Array(2 * nodes * modes);
  let largest = 0;
  for (let k = 0; k < nodes; k++) largest = Math.max(largest, Math.hypot(v.re[k], v.im[k]));
  for (let k = 0; k < nodes; k++) {
    const m = Math.hypot(v.re[k], v.im[k]);
    if (!(m > 1e-6 * largest)) continue;
    const i = 2 * (k * modes + mode);
    y[i] = (r0 * v.re[k]) / m;
    y[i + 1] = (-r0 * v.im[k]) / m;
  }
  return y;
}

/** Candidate type of an isotropy class on a ring numbered in order (unit rotation present). */
function classifyClass(table: GroupTable, cls: IsotropyClass, nodes: number, rotation: number): { type: CandidateType; q?: number } {
  const sub = cls.subgroup;
  const at = rotation >= 0 ? sub.elements.indexOf(rotation) : -1;
  if (at >= 0) {
    const q = (((Math.round((-sub.phases[at] * nodes) / (2 * Math.PI)) % nodes) + nodes) % nodes);
    return { type: q === 0 ? 'in-phase' : 2 * q === nodes ? 'anti-phase' : 'rotating-wave', q };
  }
  if (rotation >= 0) {
    const own = subgroupKey(sub);
    for (let q = 1; 2 * q < nodes; q++) {
      const line = fixedPointBasisWithin(table, sub, [fourierVector(nodes, q), fourierVector(nodes, nodes - q)]);
      if (line.length === 1 && subgroupKey(isotropyOf(table, line[0])) === own) return { type: 'standing-wave', q };
    }
  }
  if (cls.fixDimension === 1 && sub.elements.length === table.elements.length && sub.phases.every((p) => p === 0)) return { type: 'in-phase', q: 0 };
  return { type: 'cluster' };
}

/** For a rotating-wave class, the conjugate with the smallest wave number (q <= N/2 on a two-way ring). */
function preferredMember(table: GroupTable, cls: IsotropyClass, nodes: number, rotation: number): IsotropyClass {
  if (rotation < 0 || !cls.subgroup.elements.includes(rotation)) return cls;
  let best = cls;
  let bestQ = classifyClass(table, cls, nodes, rotation).q ?? 0;
  for (let h = 0; h < table.elements.length && bestQ > 0; h++) {
    const member = conjugateClass(table, cls, h);
    const q = classifyClass(table, member, nodes, rotation).q ?? 0;
    if (q < bestQ) [best, bestQ] = [member, q];
  }
  return best;
}

/** Parts of the graph merged into orbits of the given permutations (a generator must commute with them). */
function mergeParts(parts: readonly Int32Array[], permutations: readonly Int32Array[], nodes: number): Int32Array[] {
  const partOf = new Int32Array(nodes);
  parts.forEach((p, i) => p.forEach((k) => (partOf[k] = i)));
  const root = parts.map((_, i) => i);
  const find = (i: number): number => (root[i] === i ? i : (root[i] = find(root[i])));
  for (const g of permutations) {
    parts.forEach((p, i) => {
      const a = find(i);
      const b = find(partOf[g[p[0]]]);
      if (a !== b) root[Math.max(a, b)] = Math.min(a, b);
    });
  }
  const merged = new Map<number, number[]>();
  parts.forEach((p, i) => {
    const r = find(i);
    const list = merged.get(r) ?? [];
    list.push(...p);
    merged.set(r, list);
  });
  return [...merged.values()].map((list) => Int32Array.from(list.sort((a, b) => a - b)));
}

/**
 * True when b = (gamma.a) with one phase shift per (mode, part) for some listed gamma, within a
 * relative distance `tolerance`.
 */
export function sameUpToSymmetry(a: Float64Array, b: Float64Array, group: readonly Int32Array[], nodes: number, modes: number, parts: readonly Int32Array[], tolerance = 1e-5): boolean {
  let normB = 0;
  for (let i = 0; i < b.length; i++) normB += b[i] * b[i];
  for (const g of group) {
    const inverse = new Int32Array(nodes);
    for (let k = 0; k < nodes; k++) inverse[g[k]] = k;
    let misfit = 0;
    for (const part of parts) {
      for (let j = 0; j < modes; j++) {
        // best phase phi minimising sum |e^{i phi} a_{g^-1(k)} - b_k|^2 over the part
        let re = 0;
        let im = 0;
        let sa = 0;
        let sb = 0;
        for (const k of part) {
          const ia = 2 * (inverse[k] * modes + j);
          const ib = 2 * (k * modes + j);
          const ar = a[ia], ai = -a[ia + 1], br = b[ib], bi = -b[ib + 1];
          re += ar * br + ai * bi;
          im += ar * bi - ai * br;
          sa += ar * ar + ai * ai;
          sb += br * br + bi * bi;
        }
        misfit += Math.max(0, sa + sb - 2 * Math.hypot(re, im));
      }
    }
    if (misfit <= tolerance * tolerance * Math.max(normB, 1e-300)) return true;
  }
  return false;
}

/** The catalogue of locked patterns for the model's current parameters (see the module header). */
export function patternCatalogue(model: GuideModel, options: CatalogueOptions = {}): PatternCatalogue {
  const { nodes, modes } = model.params;
  if (model.size > CATALOGUE_SIZE_LIMIT) {
    throw new RangeError(`the catalogue needs dense Jacobians of ${model.size} slow variables; at most ${CATALOGUE_SIZE_LIMIT} (nodes x modes x 2) are supported`);
  }
  const large = nodes > 16;
  const maxFixDimension = options.maxFixDimension ?? (large ? 1 : 4);
  const randomSeeds = options.randomSeeds ?? (large ? 0 : 2);
  const allowed = (type: CandidateType): boolean => !options.types || options.types.includes(type);
  const listed = dynamicalSymmetries(model, options.groupLimit ?? 512);
  // A truncated listing is not closed under products, so it has no subgroups to speak of: then
  // only the full-space seeds are used (and symmetry is reported against the listed elements).
  const table = listed.truncated ? null : groupTable(listed.elements);
  const group = listed.elements;
  const rotation = table ? unitRotation(table) : -1;
  const parts = model.parts();
  const seedModes = options.modes ?? Array.from(model.params.gain, (g, j) => (g > model.params.loss[j] ? j : -1)).filter((j) => j >= 0);
  const classes = table ? isotropyClasses(table, nodes, { maxFixDimension, pairLimit: 128 }) : [];
  const random = new Random(4242);
  const found: CataloguePattern[] = [];
  let solves = 0;

  const record = (locked: LockedState, candidate: CandidateInfo): void => {
    if (!locked.converged) return;
    for (const p of found) {
      if (sameUpToSymmetry(Float64Array.from(p.state), locked.state, group, nodes, modes, parts)) return;
    }
    const stability = lockedStateStability(model.field, locked, modes, model.accuracy);
    found.push({ ...describeLockedState(model, locked, stability, group), candidate });
  };

  const solveIn = (basis: Matrix | undefined, seed: Float64Array, generatorParts: readonly Int32Array[]): LockedState | null => {
    solves++;
    let locked = solveLockedState(model.field, seed, modes, { parts: generatorParts, basis });
    if (!locked.converged) return null;
    if (basis) {
      solves++;
      locked = solveLockedState(model.field, locked.state, modes, { parts });
    }
    return hasEnergy(locked) ? locked : null;
  };

  for (const found0 of classes) {
    if (!table) break; // (classes is empty without a table)
    const cls = preferredMember(table, found0, nodes, rotation);
    const { type, q } = classifyClass(table, cls, nodes, rotation);
    if (!allowed(type)) continue;
    const key = subgroupKey(cls.subgroup);
    const seeds: ComplexVector[] = [];
    const addSeed = (v: ComplexVector): void => {
      if (subgroupKey(isotropyOf(table, v)) !== key) return;
      if (seeds.some((s) => Math.abs(overlap(s, v)) > 1 - 1e-9)) return;
      seeds.push(v);
    };
    for (let k = 0; k < nodes; k++) {
      const p = projectOnto(cls.basis, fourierVector(nodes, k));
      if (squaredNorm(p) > 0.05) addSeed(normalised(p));
    }
    if (cls.fixDimension > 1) {
      for (let r = 0; r < randomSeeds; r++) {
        addSeed(normalised(combineBasis(cls.basis, random)));
      }
    }
    const symmetryParts = mergeParts(parts, cls.subgroup.elements.map((e) => group[e]), nodes);
    for (const j of seedModes) {
      const basis = realBasisForMode(cls.basis, nodes, modes, j);
      const r0 = loneAmplitude(model.params.gain[j], model.params.loss[j]);
      for (const v of seeds) {
        const locked = solveIn(basis, stiffSeed(v, nodes, modes, j, r0), symmetryParts);
        if (locked) {
          const candidate: CandidateInfo = { type, mode: j, fixDimension: cls.fixDimension, symmetryOrder: cls.subgroup.elements.length, conjugates: cls.conjugates, exact: true };
          if (q !== undefined) candidate.q = q;
          record(locked, candidate);
        }
      }
    }
  }

  const fullSeeds: { y: Float64Array; type: CandidateType; q?: number; mode: number }[] = [];
  if ((rotation < 0 || !table) && nodes > 1) {
    // The ring order is broken (a link, or detuning): the intact ring's waves, solved in full.
    for (const j of seedModes) {
      const r0 = loneAmplitude(model.params.gain[j], model.params.loss[j]);
      for (let q = 0; q < nodes; q++) {
        const type: CandidateType = q === 0 ? 'in-phase' : 2 * q === nodes ? 'anti-phase' : 'rotating-wave';
        if (allowed(type)) fullSeeds.push({ y: stiffSeed(fourierVector(nodes, q), nodes, modes, j, r0), type, q, mode: j });
      }
    }
  }
  if (allowed('seed')) for (const y of options.seeds ?? []) fullSeeds.push({ y: Float64Array.from(y), type: 'seed', mode: carryingMode(y, nodes, modes) });
  for (const seed of fullSeeds) {
    const locked = solveIn(undefined, seed.y, parts);
    if (locked) {
      const candidate: CandidateInfo = { type: seed.type, mode: seed.mode, fixDimension: nodes, symmetryOrder: 1, conjugates: 1, exact: false };
      if (seed.q !== undefined) candidate.q = seed.q;
      record(locked, candidate);
    }
  }

  found.sort((a, b) => TYPE_ORDER.indexOf(a.candidate.type) - TYPE_ORDER.indexOf(b.candidate.type) || (a.candidate.q ?? 0) - (b.candidate.q ?? 0) || a.margin - b.margin);
  return {
    nodes,
    modes,
    group: { order: group.length, graphOrder: listed.graphOrder, truncated: listed.truncated, elements: group.map((g) => describeElement(g).text) },
    parts: parts.map((p) => Array.from(p)),
    classesExamined: classes.length,
    solves,
    patterns: found,
  };
}

/**
 * A locked state whose amplitudes have all but vanished (rms below 1e-3, where Newton lands at the
 * edge of a branch that dies into the rest state) is the trivial state, not a pattern.
 */
function hasEnergy(locked: LockedState): boolean {
  let e = 0;
  for (let i = 0; i < locked.state.length; i++) e += locked.state[i] ** 2;
  return e > 1e-6 * (locked.state.length / 2) && locked.generators.length > 0;
}

function squaredNorm(v: ComplexVector): number {
  let s = 0;
  for (let k = 0; k < v.re.length; k++) s += v.re[k] ** 2 + v.im[k] ** 2;
  return s;
}

function normalised(v: ComplexVector): ComplexVector {
  const len = Math.sqrt(squaredNorm(v));
  return { re: v.re.map((x) => x / len), im: v.im.map((x) => x / len) };
}

/** |<a, b>| for unit vectors. */
function overlap(a: ComplexVector, b: ComplexVector): number {
  let re = 0;
  let im = 0;
  for (let k = 0; k < a.re.length; k++) {
    re += a.re[k] * b.re[k] + a.im[k] * b.im[k];
    im += a.re[k] * b.im[k] - a.im[k] * b.re[k];
  }
  return Math.hypot(re, im);
}

function combineBasis(basis: readonly ComplexVector[], random: Random): ComplexVector {
  const nodes = basis[0].re.length;
  const v: ComplexVector = { re: new Float64Array(nodes), im: new Float64Array(nodes) };
  for (const b of basis) {
    const cr = random.uniform() - 0.5;
    const ci = random.uniform() - 0.5;
    for (let k = 0; k < nodes; k++) {
      v.re[k] += cr * b.re[k] - ci * b.im[k];
      v.im[k] += cr * b.im[k] + ci * b.re[k];
    }
  }
  return v;
}

