/**
 * The twisted state a deformed snapshot of a ring belongs to. Detuning strains a locked pattern:
 * an in-phase lock of detuned parts has its neighbour phase differences spread out, and past the
 * classifier's tolerance (classify.ts) the snapshot reads as a cluster although it is the same
 * lock continued. On a ring the winding number w = (sum of the wrapped neighbour differences
 * arg a_{k+1} - arg a_k) / 2 pi names the twisted state it came from (the q = w wave) and does not
 * change under strain as long as no difference reaches the unstable equilibrium; and on the
 * stable branch of sine-like coupling each coupled pair stays within a quarter turn of the
 * unstrained difference, the bound the lock detector acquires a lock within (ACQUIRE_SPREAD).
 */
import { ACQUIRE_SPREAD } from '../observe/lock-detector.js';
import { wrapAngle } from '../util/angles.js';

export interface Twist {
  /** Wave number of the twisted state, 0..N-1 (the winding number mod N). */
  q: number;
  /** Largest distance (rad) of a neighbour difference from the unstrained 2 pi q / N. */
  strain: number;
  /** The strain stays within a quarter turn: the snapshot is that twisted state, strained. */
  belongs: boolean;
}

/** The twist of a snapshot (node order k -> k + 1, cyclic); null when a node does not oscillate. */
export function twistOf(re: ArrayLike<number>, im: ArrayLike<number>): Twist | null {
  const n = re.length;
  const phase = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    if (!(Math.hypot(re[k], im[k]) > 0)) return null;
    phase[k] = Math.atan2(im[k], re[k]);
  }
  const differences = Array.from({ length: n }, (_, k) => wrapAngle(phase[(k + 1) % n] - phase[k]));
  const winding = Math.round(differences.reduce((s, d) => s + d, 0) / (2 * Math.PI));
  const q = ((winding % n) + n) % n;
  const ideal = (2 * Math.PI * q) / n;
  const strain = Math.max(...differences.map((d) => Math.abs(wrapAngle(d - ideal))));
  return { q, strain, belongs: strain < ACQUIRE_SPREAD };
}
