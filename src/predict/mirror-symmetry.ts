/**
 * Which symmetries of the network make a copy of a pattern, and which its mirror image.
 *
 * On a ring the rotations carry a pattern onto copies of itself (a rotating wave onto itself, up
 * to a phase), while a reflection turns the direction of the ring round and with it a wave q into
 * its mirror image N - q: two patterns a user tells apart (a ring running one shows no match with
 * the other), so the catalogue lists them apart and links them. For any graph the same split is
 * made by the orientation sign of a symmetry: it carries the graph's longest cycles onto each
 * other, each either along or against its direction, and the sign is the product of those +-1.
 * That product is a homomorphism (the sign of a signed permutation), so the elements of sign +1
 * form a subgroup of index 1 or 2, and it does not depend on the direction each cycle is listed
 * in. On a ring, rotations have sign +1 and reflections -1; on a ring with a chord through its
 * middle, the half turn keeps the outer cycle's direction and the two reflections reverse it.
 *
 * The cycles used are the longest of those the current links close; when they close none (a ring
 * with a broken link is a chain), the longest listed cycles through links broken now, provided
 * every symmetry maps them onto each other (a chain's reversal still reverses the intact ring).
 * With no such cycles, or a symmetry list too large to be complete, every symmetry identifies
 * copies and no mirror images are told apart.
 */
import type { CycleListing } from '../pattern/cycles.js';

export interface MirrorRelation {
  /** The symmetries that make copies of an entry (orientation sign +1), the identity included. */
  keeping: Int32Array[];
  /** One symmetry of sign -1 (each of them maps an entry to the same mirror image up to copies), or null. */
  reversing: Int32Array | null;
  reason: string;
}

/**
 * The mirror relation of a listed symmetry group. `currentCycle[i]` says whether every edge of
 * listing.cycles[i] carries a link now.
 */
export function mirrorRelation(
  group: readonly Int32Array[],
  truncated: boolean,
  listing: CycleListing,
  currentCycle: readonly boolean[],
): MirrorRelation {
  const noMirrors = (reason: string): MirrorRelation => ({ keeping: [...group], reversing: null, reason });
  if (truncated) return noMirrors('the symmetry group is too large to list, so copies and mirror images are not told apart');
  const current = listing.cycles.filter((_, i) => currentCycle[i]);
  const families: { cycles: Int32Array[]; what: string }[] = [
    { cycles: longest(current), what: 'the longest cycles of the current links' },
    { cycles: longest(listing.cycles), what: 'the longest cycles of the intact links' },
  ];
  for (const family of families) {
    if (family.cycles.length === 0) continue;
    const signs = group.map((g) => orientationSign(g, family.cycles));
    if (signs.some((s) => s === 0)) continue; // some symmetry does not map the family onto itself
    const keeping = group.filter((_, i) => signs[i] > 0);
    const at = signs.indexOf(-1);
    if (at < 0)
      return noMirrors(`no symmetry of the network reverses the direction of ${family.what}, so no entry is the mirror image of another`);
    return {
      keeping,
      reversing: group[at],
      reason: `a symmetry reverses the direction of ${family.what}: mirror images are listed as two entries`,
    };
  }
  return noMirrors(
    current.length + listing.cycles.length === 0
      ? 'the graph has no cycle, so there is no direction to reverse'
      : 'the symmetries do not map the cycles onto each other, so no direction is defined',
  );
}

function longest(cycles: readonly Int32Array[]): Int32Array[] {
  const length = Math.max(0, ...cycles.map((c) => c.length));
  return cycles.filter((c) => c.length === length);
}

/** The product of the directions (+-1) in which g carries each cycle onto one of `cycles`, or 0 if one lands elsewhere. */
export function orientationSign(g: ArrayLike<number>, cycles: readonly Int32Array[]): number {
  const listed = new Set(cycles.map((c) => cycleKey(c).key));
  let sign = 1;
  for (const cycle of cycles) {
    const image = cycleKey(Array.from(cycle, (k) => g[k]));
    if (!listed.has(image.key)) return 0;
    sign *= image.direction;
  }
  return sign;
}

/**
 * A cycle's key (its nodes from the smallest, towards the smaller of that node's neighbours on it)
 * and the direction of the given listing against the keyed one (+1 along, -1 against).
 */
export function cycleKey(cycle: ArrayLike<number>): { key: string; direction: number } {
  const n = cycle.length;
  let at = 0;
  for (let i = 1; i < n; i++) if (cycle[i] < cycle[at]) at = i;
  const direction = cycle[(at + 1) % n] < cycle[(at + n - 1) % n] ? 1 : -1;
  const nodes = Array.from({ length: n }, (_, i) => cycle[(at + direction * i + n * n) % n]);
  return { key: nodes.join(','), direction };
}
