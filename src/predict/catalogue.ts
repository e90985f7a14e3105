/**
 * The catalogue of locked patterns of the guiding system.
 *
 * Independent of the numbering. All the work is done on a copy renumbered in the network's own
 * order (renumbering.ts), so the order in which a scenario numbers its nodes cannot change what
 * is found, and the copy carries a fixed placeholder initial state, so the scenario's own start
 * is never read; only the descriptions are made in the caller's numbering. Extra seeds
 * (options.seeds) are solved last and can only add entries.
 *
 * Seeds, in this order, each solved by Newton (locked-state.ts) inside the fixed-point subspace
 * of its own isotropy subgroup when it has one (the averaged flow leaves that subspace
 * invariant), then refined in the full space:
 * 1. the isotropy classes of the symmetry group (graph automorphisms at the current link
 *    weights that keep the detuning) in group x circle (isotropy.ts): in each fixed-point
 *    subspace its basis vector when it is a line, the projections of the structural shapes and
 *    a few generic points when it is larger;
 * 2. the structural shapes (structural-shapes.ts): in-phase, and the twisted waves along every
 *    cycle of the coupling graph (coupling-cycles.ts, bounded in number and length);
 * 3. seeded random starts of the guiding system followed until they settle on a stable state
 *    (random-starts.ts), keeping each new one;
 * 4. the extra seeds.
 * Each non-zero modulus of a seed is set to the lone oscillator's amplitude (the stiff-amplitude
 * guess); a seed that equals one already solved up to a symmetry and a phase is skipped.
 *
 * Copies and mirror images. Rotations and phase shifts make copies of a pattern, which are one
 * entry; a reflection turns the direction of the ring round and makes the mirror image, which is
 * a pattern of its own (a ring running the wave q shows no match with N - q): mirror images are
 * two entries, linked (mirror-symmetry.ts defines the split for any graph; catalogue-entries.ts
 * keeps the list). The same rule covers every kind: a standing wave or a cluster that a reflection
 * maps onto a copy of itself is one entry marked as its own mirror image, and a chiral cluster is
 * listed twice like a rotating wave. Stability is that of the relative equilibrium with the
 * symmetry directions removed by construction (locked-state.ts), with a marginal band.
 */
import { Matrix } from 'ml-matrix';
import { graphAutomorphisms } from '../pattern/automorphisms.js';
import { describeElement } from '../pattern/permutation.js';
import type { CycleSearchStop } from '../pattern/cycles.js';
import { Random } from '../util/random.js';
import { squaredNorm } from '../util/linear-algebra.js';
import { carryingMode } from '../observe/amplitudes.js';
import type { GuideModel } from './guide-model.js';
import {
  combine,
  complexInner,
  complexSquaredNorm,
  fixedPointBasis,
  groupTable,
  isotropyClasses,
  isotropyOf,
  projectOnto,
  subgroupKey,
  type ComplexVector,
  type GroupTable,
  type IsotropyClass,
} from './isotropy.js';
import { lockedStateStability, solveLockedState, type LockedStability, type LockedState } from './locked-state.js';
import { describeLockedState, type LockedPatternDescription } from './describe.js';
import { canonicalRenumbering, movedLockedState, movedState, relabelledPermutation, type Renumbering } from './renumbering.js';
import { couplingCycles, type CouplingCycles } from './coupling-cycles.js';
import { mirrorRelation, type MirrorRelation } from './mirror-symmetry.js';
import { structuralShapes, type StructuralShape } from './structural-shapes.js';
import { RANDOM_STARTS, RANDOM_STARTS_LARGE, runRandomStarts } from './random-starts.js';
import { EntryList, sameUpToSymmetry, type Entry } from './catalogue-entries.js';
import { callerRing, candidateInfo, candidateName, mirroredRecipe, type CallerRing, type Recipe } from './catalogue-candidates.js';

export { sameUpToSymmetry } from './catalogue-entries.js';

export type CandidateType =
  'in-phase' | 'anti-phase' | 'rotating-wave' | 'standing-wave' | 'cluster' | 'cycle-wave' | 'random-start' | 'seed';

export interface CandidateInfo {
  /**
   * What the pattern was seeded from: a symmetry type, a twisted wave along a cycle that is not the
   * ring in node order ('cycle-wave'), a random start of the guiding system, or an extra seed.
   */
  type: CandidateType;
  /** Wave number: along k -> k + 1 for the ring types, along `cycle` for a cycle wave. */
  q?: number;
  /** Mode the seed excited. */
  mode: number;
  /** Complex dimension of the fixed-point subspace Newton worked in (N for a full-space seed). */
  fixDimension: number;
  /** Order of the isotropy subgroup of group x circle kept by the solve (1 for a full-space seed). */
  symmetryOrder: number;
  /**
   * How many distinct states (up to phase) this entry stands for: its copies under the
   * orientation-keeping symmetries (rotations). Its mirror image is a separate entry.
   */
  conjugates: number;
  /**
   * True when solved inside the seed's fixed-point subspace (the symmetry is exact); false for a
   * full-space solve, as when detuning or a broken link has removed the symmetry.
   */
  exact: boolean;
  /** For a wave seeded along a cycle: the cycle's nodes in the order the seed's phase advances by 2 pi q / L. */
  cycle?: number[];
  /** Present (true) when the entry is the mirror image of its partner's solution; the seed described is then the mirror image of the partner's. */
  mirrored?: boolean;
}

/** How an entry relates to its mirror image (its image under a symmetry that reverses the ring's direction). */
export interface MirrorLink {
  /**
   * 'pair': the mirror image is the entry `partner`, another pattern (for a rotating wave, q and
   * N - q); 'self': the mirror image is a copy of this entry; 'none': no symmetry of the network
   * reverses its direction (see PatternCatalogue.mirrors.reason).
   */
  relation: 'pair' | 'self' | 'none';
  /** Index in `patterns` of the mirror image for 'pair', null otherwise. */
  partner: number | null;
}

export interface CataloguePattern extends LockedPatternDescription {
  candidate: CandidateInfo;
  mirror: MirrorLink;
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
  /** Which symmetries make mirror images: one reversing element (null when none) and why. */
  mirrors: { reversing: string | null; keepingOrder: number; reason: string };
  /** Whether any numbering of the same network gives this catalogue (up to the relabelling), and why. */
  numbering: { independent: boolean; reason: string };
  /** What the seeding covered. */
  search: {
    cycles: number;
    longestCycle: number;
    cyclesStoppedBy: CycleSearchStop;
    shapes: number;
    randomStarts: number;
    randomStartsSettled: number;
    foundByRandomStarts: number;
  };
  /** Per extra seed (options.seeds), the index in `patterns` of the entry it was solved into, or null. */
  seedPatterns: (number | null)[];
  patterns: CataloguePattern[];
}

export interface CatalogueOptions {
  /** Skip classes whose fixed-point subspace has a larger complex dimension; default MAX_FIX_DIMENSION (4; 1 above LARGE_NETWORK nodes). */
  maxFixDimension?: number;
  /** Only seed these candidate types. */
  types?: readonly CandidateType[];
  /** Extra full-space seeds (rotating-frame states in the caller's numbering), such as the current state. */
  seeds?: readonly Float64Array[];
  /** Generic seeds per class with a fixed-point subspace of dimension > 1; default GENERIC_SEEDS (2; 0 above LARGE_NETWORK nodes). */
  randomSeeds?: number;
  /** Most random starts of the guiding system; default RANDOM_STARTS (RANDOM_STARTS_LARGE above 16 nodes); fewer when they stop bringing news. */
  randomStarts?: number;
  /** Largest group listed (graphAutomorphisms limit); default GROUP_LIMIT (512). */
  groupLimit?: number;
  /** Modes to seed; default every mode whose gain exceeds its loss. */
  modes?: readonly number[];
}

/** Above this many slow variables the dense Jacobians make a catalogue too slow to be useful. */
export const CATALOGUE_SIZE_LIMIT = 256;

/** Above this many nodes the defaults seed less (one-dimensional classes, no generic points, fewer random starts). */
const LARGE_NETWORK = 16;

/**
 * Largest symmetry group listed: graphAutomorphisms stops there and says so, and a truncated
 * listing seeds the full space only. Every ring the catalogue accepts (at most 128 nodes, by
 * CATALOGUE_SIZE_LIMIT) has a dihedral group of at most 256 elements, well inside; graphs with
 * far more symmetry (a complete graph has N! automorphisms) are cut here instead of enumerated.
 */
export const GROUP_LIMIT = 512;
/**
 * Largest complex dimension of a fixed-point subspace that is seeded (1 above LARGE_NETWORK
 * nodes): classes with larger subspaces keep less symmetry and come in larger numbers, and the
 * full-space seeds (structural shapes, random starts) cover them; it bounds the work.
 */
const MAX_FIX_DIMENSION = 4;
const MAX_FIX_DIMENSION_LARGE = 1;
/** Generic seeds per class of dimension above 1 (none above LARGE_NETWORK nodes): points of the subspace that the structural shapes miss. */
const GENERIC_SEEDS = 2;
const GENERIC_SEEDS_LARGE = 0;
/** Seed of the generic points' draws: fixed, so the catalogue is reproducible; the value itself is arbitrary. */
const GENERIC_SEED_RANDOM = 4242;
/** Pairs of generators are tried for twisted subgroups only up to this group order: the pairs grow as its square (about 8,000 at 128); single generators are always tried. */
const PAIR_LIMIT = 128;
/** Detunings within this relative difference are equal when deciding which graph symmetries keep the detuning: rounding, not a real difference. */
const SAME_DETUNING = 1e-12;
/** Moduli of a seed shape below this share of its largest are zeros of the shape (left by rounding in a projection), not nodes to excite. */
const SHAPE_ZERO = 1e-6;
/**
 * A structural shape seeds a class only when its projection onto the class's subspace keeps this
 * share of the shape's squared norm: it guards against seeding from shapes nearly orthogonal to
 * the subspace, whose normalised projection has little to do with the shape.
 */
const SHAPE_PROJECTION = 0.05;
/** Two seeds whose link correlations (linkCorrelation) differ by more than this, relative, cannot be equal: equal seeds agree to rounding. */
const SAME_SIGNATURE = 1e-9;
/** Two unit seeds with |<a, b>| above 1 minus this point the same way (to rounding): the second is skipped. */
const SAME_DIRECTION = 1e-9;
/** Mean squared amplitude per (node, mode) below which a locked state is the trivial rest state, not a pattern (rms 1e-3; hasEnergy). */
const ENERGY_FLOOR = 1e-6;
/**
 * Phase turns of one node tried when Newton stalls on a seed solved in the full space. A seed
 * exactly at a symmetric shape (anti-phase, a twisted wave) on a detuned network can sit where
 * the bordered Jacobian is singular at the lone-part amplitude; a turn of a twelfth of a cycle
 * either way starts Newton inside the basin of the shifted state (the saddle of a detuned pair
 * lies at 180 degrees minus the locked phase lag).
 */
const STALLED_SEED_TURNS = [Math.PI / 6, -Math.PI / 6];

const TYPE_ORDER: CandidateType[] = [
  'in-phase',
  'anti-phase',
  'rotating-wave',
  'standing-wave',
  'cluster',
  'cycle-wave',
  'random-start',
  'seed',
];

/**
 * The symmetry group of the guiding system: automorphisms of the coupling graph (current link
 * weights) that also keep every node's detuning (the other parameters are the same at every
 * node). A detuned node breaks the symmetries that move it.
 */
export function dynamicalSymmetries(
  model: GuideModel,
  limit = GROUP_LIMIT,
): { elements: Int32Array[]; truncated: boolean; graphOrder: number } {
  const { nodes, detuning } = model.params;
  const graph = graphAutomorphisms(nodes, model.params.currentLinks(), { limit });
  const same = (a: number, b: number): boolean => Math.abs(a - b) <= SAME_DETUNING * Math.max(1, Math.abs(a), Math.abs(b));
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
    if (!(m > SHAPE_ZERO * largest)) continue;
    const i = 2 * (k * modes + mode);
    y[i] = (r0 * v.re[k]) / m;
    y[i + 1] = (-r0 * v.im[k]) / m;
  }
  return y;
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

/** The catalogue of locked patterns for the model's current parameters (see the module header). */
export function patternCatalogue(model: GuideModel, options: CatalogueOptions = {}): PatternCatalogue {
  if (model.size > CATALOGUE_SIZE_LIMIT) {
    throw new RangeError(
      `the catalogue needs dense Jacobians of ${model.size} slow variables; at most ${CATALOGUE_SIZE_LIMIT} (nodes x modes x 2) are supported`,
    );
  }
  const limit = options.groupLimit ?? GROUP_LIMIT;
  const callerGroup = dynamicalSymmetries(model, limit);
  const search = new CatalogueSearch(canonicalRenumbering(model, callerGroup), options, limit);
  search.seedClasses();
  search.seedShapes();
  search.seedRandomStarts();
  const seedEntries = search.seedExtra(options.seeds ?? []);
  return search.result(model, callerGroup, seedEntries);
}

/** One catalogue computation on the renumbered copy (see the module header for the steps). */
class CatalogueSearch {
  private readonly work: GuideModel;
  private readonly nodes: number;
  private readonly modes: number;
  private readonly group: Int32Array[];
  private readonly table: GroupTable | null;
  private readonly parts: Int32Array[];
  private readonly ring: CallerRing;
  private readonly mirrors: MirrorRelation;
  private readonly entries: EntryList<Recipe>;
  private readonly shapes: StructuralShape[];
  private readonly cycles: CouplingCycles;
  private readonly seedModes: number[];
  private readonly large: boolean;
  /** Stiff seeds already solved, per mode: a seed equal to one of them up to a symmetry and a phase is skipped. */
  private readonly solvedSeeds: { seed: Float64Array; signature: number }[][];
  private classes: IsotropyClass[] = [];
  private solves = 0;
  private randomStarts = { tried: 0, settled: 0, found: 0 };

  constructor(
    private readonly renumbering: Renumbering,
    private readonly options: CatalogueOptions,
    limit: number,
  ) {
    this.work = renumbering.model;
    const { nodes, modes, gain, loss } = this.work.params;
    this.nodes = nodes;
    this.modes = modes;
    this.large = nodes > LARGE_NETWORK;
    const listed = dynamicalSymmetries(this.work, limit);
    this.group = listed.elements;
    // A truncated listing is not closed under products, so it has no subgroups to speak of: then
    // only the full-space seeds are used (and symmetry is reported against the listed elements).
    this.table = listed.truncated ? null : groupTable(listed.elements);
    this.parts = this.work.parts();
    this.ring = callerRing(renumbering, this.table);
    this.cycles = couplingCycles(this.work.params);
    this.mirrors = mirrorRelation(this.group, listed.truncated, this.cycles.listing, this.cycles.current);
    const reversing = this.mirrors.reversing;
    this.entries = new EntryList<Recipe>(this.mirrors, nodes, modes, this.parts, (r) =>
      reversing ? mirroredRecipe(r, this.table, reversing) : r,
    );
    this.shapes = structuralShapes(this.cycles.graph, this.cycles.listing.cycles);
    this.seedModes = options.modes ? [...options.modes] : Array.from(gain, (g, j) => (g > loss[j] ? j : -1)).filter((j) => j >= 0);
    this.solvedSeeds = Array.from({ length: modes }, () => []);
  }

  private allowed(recipe: Recipe): boolean {
    const types = this.options.types;
    return !types || types.includes(candidateName(recipe, this.table, this.renumbering, this.ring).type);
  }

  private amplitude(mode: number): number {
    return loneAmplitude(this.work.params.gain[mode], this.work.params.loss[mode]);
  }

  /** Step 1: the isotropy classes, each seeded inside its fixed-point subspace. */
  seedClasses(): void {
    const table = this.table;
    if (!table) return;
    const maxFixDimension = this.options.maxFixDimension ?? (this.large ? MAX_FIX_DIMENSION_LARGE : MAX_FIX_DIMENSION);
    const randomSeeds = this.options.randomSeeds ?? (this.large ? GENERIC_SEEDS_LARGE : GENERIC_SEEDS);
    this.classes = isotropyClasses(table, this.nodes, { maxFixDimension, pairLimit: PAIR_LIMIT });
    const random = new Random(GENERIC_SEED_RANDOM);
    for (const cls of this.classes) {
      const seeds = classSeeds(table, cls, this.shapes, randomSeeds, random);
      for (const mode of this.seedModes) {
        const recipe: Recipe = {
          origin: { kind: 'class', cls },
          mode,
          fixDimension: cls.fixDimension,
          symmetryOrder: cls.subgroup.elements.length,
          exact: true,
          mirrored: false,
        };
        if (!this.allowed(recipe)) continue;
        for (const v of seeds)
          this.solveSeed(stiffSeed(v, this.nodes, this.modes, mode, this.amplitude(mode)), cls.subgroup.elements, cls.basis, recipe);
      }
    }
  }

  /** Step 2: in-phase and the twisted waves along the cycles, in their own fixed-point subspace when they have symmetry. */
  seedShapes(): void {
    for (const shape of this.shapes) {
      const isotropy = this.table ? isotropyOf(this.table, shape.shape) : null;
      const symmetric =
        this.table && isotropy && isotropy.elements.length > 1
          ? { elements: isotropy.elements, basis: fixedPointBasis(this.table, isotropy, this.nodes) }
          : null;
      for (const mode of this.seedModes) {
        const recipe: Recipe = {
          origin: { kind: 'shape', cycle: shape.cycle, q: shape.q },
          mode,
          fixDimension: symmetric ? symmetric.basis.length : this.nodes,
          symmetryOrder: symmetric ? symmetric.elements.length : 1,
          exact: symmetric !== null,
          mirrored: false,
        };
        if (!this.allowed(recipe)) continue;
        this.solveSeed(
          stiffSeed(shape.shape, this.nodes, this.modes, mode, this.amplitude(mode)),
          symmetric?.elements ?? null,
          symmetric?.basis ?? null,
          recipe,
        );
      }
    }
  }

  /** Step 3: seeded random starts followed to the stable state they settle on. */
  seedRandomStarts(): void {
    const recipeFor = (mode: number): Recipe => ({
      origin: { kind: 'random-start' },
      mode,
      fixDimension: this.nodes,
      symmetryOrder: 1,
      exact: false,
      mirrored: false,
    });
    if (!this.allowed(recipeFor(0))) return;
    const count = this.options.randomStarts ?? (this.large ? RANDOM_STARTS_LARGE : RANDOM_STARTS);
    const run = runRandomStarts(
      this.work,
      this.seedModes,
      count,
      (mode) => this.amplitude(mode),
      (s) => {
        const added = hasEnergy(s.locked) && this.record(s.locked, recipeFor(s.mode), s.stability).added;
        if (added) this.randomStarts.found++;
        return added;
      },
    );
    this.randomStarts.tried = run.tried;
    this.randomStarts.settled = run.settled;
  }

  /** Step 4: the caller's extra seeds, solved in the full space; the entry each one lands in. */
  seedExtra(seeds: readonly Float64Array[]): (Entry<Recipe> | null)[] {
    const recipe = (mode: number): Recipe => ({
      origin: { kind: 'seed' },
      mode,
      fixDimension: this.nodes,
      symmetryOrder: 1,
      exact: false,
      mirrored: false,
    });
    if (!this.allowed(recipe(0))) return seeds.map(() => null);
    return seeds.map((y) => {
      const moved = movedState(y, this.renumbering.rank, this.modes);
      const locked = this.solve(moved, null, null);
      return locked ? this.record(locked, recipe(carryingMode(moved, this.nodes, this.modes))).entry : null;
    });
  }

  /**
   * Solves one stiff seed unless an equal one (up to a symmetry and a phase) was solved before:
   * inside the fixed-point subspace `basis` when given (keeping the symmetry `elements`), then refined in full.
   */
  private solveSeed(seed: Float64Array, elements: readonly number[] | null, basis: readonly ComplexVector[] | null, recipe: Recipe): void {
    const solved = this.solvedSeeds[recipe.mode];
    const signature = linkCorrelation(this.work, seed);
    const near = (a: number): boolean => Math.abs(a - signature) <= SAME_SIGNATURE * Math.max(1, Math.abs(signature));
    if (solved.some((s) => near(s.signature) && sameUpToSymmetry(s.seed, seed, this.group, this.nodes, this.modes, this.parts))) return;
    solved.push({ seed, signature });
    const locked = this.solve(seed, elements, basis ? realBasisForMode(basis, this.nodes, this.modes, recipe.mode) : null);
    if (locked) this.record(locked, recipe);
  }

  private solve(seed: Float64Array, elements: readonly number[] | null, basis: Matrix | null): LockedState | null {
    const field = this.work.field;
    this.solves++;
    const generatorParts = elements
      ? mergeParts(
          this.parts,
          elements.map((e) => this.group[e]),
          this.nodes,
        )
      : this.parts;
    let locked = solveLockedState(field, seed, this.modes, { parts: generatorParts, basis: basis ?? undefined });
    for (const turn of basis ? [] : STALLED_SEED_TURNS) {
      if (locked.converged) break;
      this.solves++;
      locked = solveLockedState(field, turnedNode(seed, this.modes, 0, turn), this.modes, { parts: generatorParts });
    }
    if (!locked.converged) return null;
    if (basis) {
      this.solves++;
      locked = solveLockedState(field, locked.state, this.modes, { parts: this.parts });
    }
    return locked.converged && hasEnergy(locked) ? locked : null;
  }

  /** Adds a solved state unless it is held already (its stability is computed only when it is new). */
  private record(locked: LockedState, recipe: Recipe, stability?: LockedStability): { entry: Entry<Recipe>; added: boolean } {
    return this.entries.add(
      locked,
      () => stability ?? lockedStateStability(this.work.field, locked, this.modes, this.work.accuracy),
      recipe,
    );
  }

  /** The catalogue in the caller's numbering, sorted by type, wave number and margin. */
  result(model: GuideModel, callerGroup: ReturnType<typeof dynamicalSymmetries>, seedEntries: (Entry<Recipe> | null)[]): PatternCatalogue {
    const { order } = this.renumbering;
    const named = this.entries.entries.map((entry) => {
      const name = candidateName(entry.recipe, this.table, this.renumbering, this.ring);
      const locked = movedLockedState(entry.locked, order, this.modes);
      const description = describeLockedState(model, locked, entry.stability, callerGroup.elements);
      return {
        entry,
        pattern: {
          ...description,
          candidate: candidateInfo(entry.recipe, name, this.entries.copies(entry)),
          mirror: { relation: 'none', partner: null } as MirrorLink,
        },
      };
    });
    named.sort(
      (a, b) =>
        TYPE_ORDER.indexOf(a.pattern.candidate.type) - TYPE_ORDER.indexOf(b.pattern.candidate.type) ||
        (a.pattern.candidate.q ?? 0) - (b.pattern.candidate.q ?? 0) ||
        a.pattern.margin - b.pattern.margin,
    );
    const indexOf = new Map(named.map((n, i) => [n.entry, i]));
    for (const { entry, pattern } of named) {
      if (entry.mirror === 'self') pattern.mirror = { relation: 'self', partner: null };
      else if (entry.mirror) pattern.mirror = { relation: 'pair', partner: indexOf.get(entry.mirror) ?? null };
    }
    const cycles = this.cycles.listing.cycles;
    const reversing = this.mirrors.reversing;
    return {
      nodes: this.nodes,
      modes: this.modes,
      group: {
        order: callerGroup.elements.length,
        graphOrder: callerGroup.graphOrder,
        truncated: callerGroup.truncated,
        elements: callerGroup.elements.map((g) => describeElement(g).text),
      },
      parts: model.parts().map((p) => Array.from(p)),
      classesExamined: this.classes.length,
      solves: this.solves,
      mirrors: {
        reversing: reversing ? describeElement(relabelledPermutation(reversing, order)).text : null,
        keepingOrder: this.mirrors.keeping.length,
        reason: this.mirrors.reason,
      },
      numbering: { independent: this.renumbering.unique, reason: this.renumbering.reason },
      search: {
        cycles: cycles.length,
        longestCycle: Math.max(0, ...cycles.map((c) => c.length)),
        cyclesStoppedBy: this.cycles.listing.stoppedBy,
        shapes: this.shapes.length,
        randomStarts: this.randomStarts.tried,
        randomStartsSettled: this.randomStarts.settled,
        foundByRandomStarts: this.randomStarts.found,
      },
      seedPatterns: seedEntries.map((e) => (e ? (indexOf.get(e) ?? null) : null)),
      patterns: named.map((n) => n.pattern),
    };
  }
}

/**
 * Seeds inside a class's fixed-point subspace: its basis vector when it is a line; otherwise the
 * projections of the structural shapes that keep the class's own isotropy and `randomSeeds`
 * generic points, at most one per direction.
 */
function classSeeds(
  table: GroupTable,
  cls: IsotropyClass,
  shapes: readonly StructuralShape[],
  randomSeeds: number,
  random: Random,
): ComplexVector[] {
  const key = subgroupKey(cls.subgroup);
  const seeds: ComplexVector[] = [];
  const addSeed = (v: ComplexVector): void => {
    if (subgroupKey(isotropyOf(table, v)) !== key) return;
    if (seeds.some((s) => Math.abs(overlap(s, v)) > 1 - SAME_DIRECTION)) return;
    seeds.push(v);
  };
  if (cls.fixDimension === 1) addSeed(cls.basis[0]);
  for (const s of shapes) {
    const p = projectOnto(cls.basis, s.shape);
    // shapes have unit moduli: compare with the projection of a unit vector
    if (complexSquaredNorm(p) > SHAPE_PROJECTION * complexSquaredNorm(s.shape)) addSeed(normalised(p));
  }
  if (cls.fixDimension > 1) for (let r = 0; r < randomSeeds; r++) addSeed(normalised(combineBasis(cls.basis, random)));
  return seeds;
}

/**
 * sum over links of weight Re(conj(a_from) a_to), every mode, relative to sum |a|^2: unchanged by
 * the symmetries (they keep the weighted links) and by phase shifts, so two seeds that differ in
 * it cannot be equal up to either, which spares most of the full comparisons.
 */
function linkCorrelation(model: GuideModel, y: Float64Array): number {
  const { linkFrom, linkTo, linkWeight, modes } = model.params;
  let sum = 0;
  for (let e = 0; e < linkFrom.length; e++) {
    for (let j = 0; j < modes; j++) {
      const a = 2 * (linkFrom[e] * modes + j);
      const b = 2 * (linkTo[e] * modes + j);
      // a = u - i v: Re(conj(a_from) a_to) = u_f u_t + v_f v_t
      sum += linkWeight[e] * (y[a] * y[b] + y[a + 1] * y[b + 1]);
    }
  }
  return sum / Math.max(squaredNorm(y), 1e-300);
}

/**
 * A locked state whose amplitudes have all but vanished (rms below 1e-3, where Newton lands at the
 * edge of a branch that dies into the rest state) is the trivial state, not a pattern.
 */
function hasEnergy(locked: LockedState): boolean {
  let e = 0;
  for (let i = 0; i < locked.state.length; i++) e += locked.state[i] ** 2;
  return e > ENERGY_FLOOR * (locked.state.length / 2) && locked.generators.length > 0;
}

function normalised(v: ComplexVector): ComplexVector {
  const len = Math.sqrt(complexSquaredNorm(v));
  return { re: v.re.map((x) => x / len), im: v.im.map((x) => x / len) };
}

/** |<a, b>| for unit vectors. */
function overlap(a: ComplexVector, b: ComplexVector): number {
  const { re, im } = complexInner(a, b);
  return Math.hypot(re, im);
}

/** A generic point of span(basis): coefficients with real and imaginary parts uniform in [-0.5, 0.5). */
function combineBasis(basis: readonly ComplexVector[], random: Random): ComplexVector {
  const coefficients = basis.map(() => {
    const re = random.uniform() - 0.5;
    const im = random.uniform() - 0.5;
    return { re, im };
  });
  return combine(basis, coefficients, basis[0].re.length);
}

/** A copy of `y` with every mode of node `k` turned by `angle` (its complex amplitudes times e^(i angle)). */
function turnedNode(y: Float64Array, modes: number, k: number, angle: number): Float64Array {
  const turned = Float64Array.from(y);
  const c = Math.cos(angle);
  const s = Math.sin(angle);
  for (let j = 0; j < modes; j++) {
    const i = 2 * (k * modes + j);
    // a = u - i v: a e^(i angle) has u' = u c + v s, v' = v c - u s
    turned[i] = y[i] * c + y[i + 1] * s;
    turned[i + 1] = y[i + 1] * c - y[i] * s;
  }
  return turned;
}
