import { wrapAngle } from '../util/angles.js';

/**
 * Unwraps phase differences sample by sample from where they started: `offsets[k]` is how far
 * difference k has moved in total (not wrapped), `last` the previous sample. Works on plain
 * arrays so trackers holding it stay JSON for checkpoints. Returns the largest |offset| after
 * this sample. A move of pi or more is a cycle slip: the difference went past the unstable
 * equilibrium of sine-like coupling. The samples must be close enough that no difference moves
 * by pi between two of them. Where `coupled[k]` is 0 the pair is not coupled for now: its
 * difference may wind freely, so its offset is held at 0 and it cannot slip.
 */
export function accumulateExcursion(
  last: number[] | Float64Array,
  offsets: number[] | Float64Array,
  differences: ArrayLike<number>,
  coupled?: ArrayLike<number>,
): number {
  let largest = 0;
  for (let k = 0; k < differences.length; k++) {
    offsets[k] = coupled && coupled[k] === 0 ? 0 : offsets[k] + wrapAngle(differences[k] - last[k]);
    last[k] = differences[k];
    largest = Math.max(largest, Math.abs(offsets[k]));
  }
  return largest;
}

/** A slip is a move of a neighbour phase difference by pi or more (the soak verdicts' definition). */
export const SLIP_EXCURSION = Math.PI;
