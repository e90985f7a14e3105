/**
 * The catalogue's entries while they are being found. A state already held up to copies (a
 * symmetry that keeps orientation, and one phase shift per mode and connected part) is not added
 * twice; each new entry brings its mirror image (its image under a reversing symmetry) as a second
 * entry linked to it, unless that image is a copy of the entry itself. Mirror images share the
 * stability of their partner: the field is equivariant, so the Jacobian at the image is the
 * permuted Jacobian and has the same eigenvalues.
 */
import type { LockedStability, LockedState } from './locked-state.js';
import type { MirrorRelation } from './mirror-symmetry.js';
import { movedLockedState } from './renumbering.js';
import { squaredNorm } from '../util/linear-algebra.js';

/**
 * Default relative distance within which two states are copies of one pattern: Newton solutions
 * of one state (residual 1e-10) agree far closer, and distinct patterns differ at order one.
 */
const COPY_TOLERANCE = 1e-5;

export interface Entry<Recipe> {
  locked: LockedState;
  stability: LockedStability;
  /** How the entry was found (for a mirror image: the mirror of its partner's recipe). */
  recipe: Recipe;
  /** The linked mirror image, 'self' when a reversing symmetry maps the entry onto a copy of itself, null without reversing symmetries. */
  mirror: Entry<Recipe> | 'self' | null;
}

export class EntryList<Recipe> {
  readonly entries: Entry<Recipe>[] = [];

  constructor(
    private readonly relation: MirrorRelation,
    private readonly nodes: number,
    private readonly modes: number,
    private readonly parts: readonly Int32Array[],
    private readonly mirrorRecipe: (recipe: Recipe) => Recipe,
  ) {}

  /** The entry holding `state` up to copies, or null. */
  holding(state: Float64Array): Entry<Recipe> | null {
    return this.entries.find((e) => this.isCopy(e.locked.state, state)) ?? null;
  }

  /**
   * Adds a solved state with its mirror image (see the module header) unless it is held already;
   * returns the entry that holds it. `stabilityOf` is only called for a new entry.
   */
  add(locked: LockedState, stabilityOf: () => LockedStability, recipe: Recipe): { entry: Entry<Recipe>; added: boolean } {
    const held = this.holding(locked.state);
    if (held) return { entry: held, added: false };
    const stability = stabilityOf();
    const entry: Entry<Recipe> = { locked, stability, recipe, mirror: null };
    this.entries.push(entry);
    const reversing = this.relation.reversing;
    if (reversing) {
      const image = movedLockedState(locked, reversing, this.modes);
      const imageHolder = this.isCopy(locked.state, image.state) ? entry : this.holding(image.state);
      if (imageHolder === entry) entry.mirror = 'self';
      else if (imageHolder) this.link(entry, imageHolder);
      else {
        const partner: Entry<Recipe> = { locked: image, stability, recipe: this.mirrorRecipe(recipe), mirror: null };
        this.entries.push(partner);
        this.link(entry, partner);
      }
    }
    return { entry, added: true };
  }

  /** How many distinct states (up to phase) the entry stands for: its orbit under the keeping symmetries. */
  copies(entry: Entry<Recipe>): number {
    const state = entry.locked.state;
    const fixing = this.relation.keeping.filter((g) => sameUpToSymmetry(state, state, [g], this.nodes, this.modes, this.parts)).length;
    return Math.max(1, Math.round(this.relation.keeping.length / Math.max(1, fixing)));
  }

  private link(a: Entry<Recipe>, b: Entry<Recipe>): void {
    a.mirror = b;
    b.mirror = a;
  }

  private isCopy(a: Float64Array, b: Float64Array): boolean {
    return sameUpToSymmetry(a, b, this.relation.keeping, this.nodes, this.modes, this.parts);
  }
}

/**
 * True when b = (gamma.a) with one phase shift per (mode, part) for some listed gamma, within a
 * relative distance `tolerance`.
 */
export function sameUpToSymmetry(
  a: Float64Array,
  b: Float64Array,
  group: readonly Int32Array[],
  nodes: number,
  modes: number,
  parts: readonly Int32Array[],
  tolerance = COPY_TOLERANCE,
): boolean {
  const normB = squaredNorm(b);
  const inverse = new Int32Array(nodes);
  for (const g of group) {
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
          const ar = a[ia],
            ai = -a[ia + 1],
            br = b[ib],
            bi = -b[ib + 1];
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
