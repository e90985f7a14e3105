/**
 * Permutations of ring nodes: validation and a readable name for each group element.
 *
 * A permutation is stored as an array `perm` with `perm[k] = p(k)`, the node that node k is sent to.
 */

export type ElementKind = 'identity' | 'rotation' | 'reflection' | 'permutation';

export interface ElementDescription {
  kind: ElementKind;
  /** Rotation k -> k + shift (mod N), shift in 1..N-1. */
  shift?: number;
  /**
   * Reflection k -> axis - k (mod N), axis in 0..N-1. The mirror line passes through ring
   * position axis / 2 (and axis / 2 + N / 2); a half-integer position lies between two nodes.
   */
  axis?: number;
  /** For example "identity", "rotation by 3", "reflection k -> 5 - k", "(0 1)(2 3)". */
  text: string;
}

/** Throws a RangeError naming `where` unless `perm` is a permutation of 0..perm.length-1. */
export function checkPermutation(perm: ArrayLike<number>, where: string): void {
  const n = perm.length;
  if (n < 1) throw new RangeError(`${where}: a permutation needs at least one entry (got length 0)`);
  const seen = new Uint8Array(n);
  for (let k = 0; k < n; k++) {
    const image = perm[k];
    if (!Number.isInteger(image) || image < 0 || image >= n) {
      throw new RangeError(`${where}: entry ${k} is ${image}, not a node index in 0..${n - 1}`);
    }
    if (seen[image]) throw new RangeError(`${where}: node ${image} is the image of two nodes, so this is not a permutation`);
    seen[image] = 1;
  }
}

/**
 * Names a permutation of the N ring nodes: the identity, a rotation k -> k + m, a reflection
 * k -> m - k (all mod N), or otherwise its cycle notation with fixed points left out.
 * Rotations are recognised before reflections, so for N = 2 the swap is "rotation by 1".
 */
export function describeElement(perm: ArrayLike<number>): ElementDescription {
  checkPermutation(perm, 'describeElement');
  const n = perm.length;
  const m = perm[0];
  let rotation = true;
  let reflection = true;
  for (let k = 0; k < n; k++) {
    if (perm[k] !== (k + m) % n) rotation = false;
    if (perm[k] !== (((m - k) % n) + n) % n) reflection = false;
  }
  if (rotation) return m === 0 ? { kind: 'identity', text: 'identity' } : { kind: 'rotation', shift: m, text: `rotation by ${m}` };
  if (reflection) return { kind: 'reflection', axis: m, text: m === 0 ? 'reflection k -> -k' : `reflection k -> ${m} - k` };
  return { kind: 'permutation', text: cycleNotation(perm) };
}

/** Cycle notation such as "(0 1)(2 3 4)", each cycle starting at its smallest node; "()" for the identity. */
export function cycleNotation(perm: ArrayLike<number>): string {
  checkPermutation(perm, 'cycleNotation');
  const n = perm.length;
  const visited = new Uint8Array(n);
  let text = '';
  for (let start = 0; start < n; start++) {
    if (visited[start] || perm[start] === start) continue;
    const cycle: number[] = [];
    for (let k = start; !visited[k]; k = perm[k]) {
      visited[k] = 1;
      cycle.push(k);
    }
    text += `(${cycle.join(' ')})`;
  }
  return text === '' ? '()' : text;
}
