/**
 * Shape of one snapshot of complex amplitudes a_k, k = 0..N-1 (whether the ring is locked is
 * decided over time elsewhere).
 *
 * Fourier coefficients  A_q = mean_k a_k e^{-2 pi i q k / N},  q = 0..N-1, so a rotating wave
 * a_{k+1} = e^{2 pi i q / N} a_k has all its weight in A_q.
 * Order parameters      R_q = |A_q| / mean_k |a_k|   (0 <= R_q <= 1).
 * Energy fractions      E_q = |A_q|^2 / mean_k |a_k|^2   (sum_q E_q = 1 by Parseval).
 *
 * Rules, tried in this order, with tolerance t (0 <= t < 0.5):
 * 1. Rotating wave q: R_q >= 1 - t for the q of largest R_q, and every modulus |a_k| lies within
 *    t * mean|a| of the mean. The modulus test matters: a snapshot with one nonzero node has
 *    R_q = 1 for every q. Kind 'in-phase' for q = 0, 'anti-phase' for q = N/2 (even N), else
 *    'rotating-wave'.
 * 2. Standing wave q (1 <= q < N/2): E_q + E_{N-q} >= 1 - t and
 *    |R_q - R_{N-q}| <= t (R_q + R_{N-q}). Equal weights on q and N-q are exactly the shapes
 *    a_k = c cos(2 pi q k / N + phi) with complex c.
 * 3. Cluster: anything else. Two nodes are in one cluster when |a_j - a_k| <= t * mean|a|,
 *    closed transitively (single linkage), so every node is in exactly one cluster. Clusters are
 *    listed by their smallest node, each in increasing node order.
 */
import { checkAmplitudes } from './amplitudes.js';

export type PatternKind = 'in-phase' | 'anti-phase' | 'rotating-wave' | 'standing-wave' | 'cluster';

export interface SnapshotClass {
  kind: PatternKind;
  /** Wave number: for in-phase (0), anti-phase (N/2), rotating-wave and standing-wave (1 <= q < N/2). */
  q?: number;
  /** Only for 'cluster': groups of nodes with equal amplitudes. */
  clusters?: number[][];
  /** R_q for q = 0..N-1. */
  orderParameters: Float64Array;
}

export const DEFAULT_CLASSIFY_TOLERANCE = 0.05;

/** R_q = |mean_k a_k e^{-2 pi i q k / N}| / mean_k |a_k| for q = 0..N-1, written into `out` if given. */
export function orderParameters(re: ArrayLike<number>, im: ArrayLike<number>, out?: Float64Array): Float64Array {
  const n = checkAmplitudes(re, im, 'orderParameters');
  if (out !== undefined && (!(out instanceof Float64Array) || out.length !== n)) {
    throw new RangeError(`orderParameters: out must be a Float64Array of length ${n} (got length ${out?.length})`);
  }
  return fillOrderParameters(re, im, out ?? new Float64Array(n));
}

function fillOrderParameters(re: ArrayLike<number>, im: ArrayLike<number>, out: Float64Array): Float64Array {
  const n = re.length;
  const cos = new Float64Array(n);
  const sin = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    cos[j] = Math.cos((2 * Math.PI * j) / n);
    sin[j] = Math.sin((2 * Math.PI * j) / n);
  }
  let modulusSum = 0;
  for (let k = 0; k < n; k++) modulusSum += Math.hypot(re[k], im[k]);
  for (let q = 0; q < n; q++) {
    let sumRe = 0;
    let sumIm = 0;
    for (let k = 0, j = 0; k < n; k++, j = (j + q) % n) {
      // a_k e^{-i 2 pi j / n} with j = q k mod n
      sumRe += re[k] * cos[j] + im[k] * sin[j];
      sumIm += im[k] * cos[j] - re[k] * sin[j];
    }
    out[q] = Math.hypot(sumRe, sumIm) / modulusSum;
  }
  return out;
}

/** Classifies one snapshot by the rules in this module's header. */
export function classifySnapshot(re: ArrayLike<number>, im: ArrayLike<number>, tolerance = DEFAULT_CLASSIFY_TOLERANCE): SnapshotClass {
  const n = checkAmplitudes(re, im, 'classifySnapshot');
  if (!Number.isFinite(tolerance) || tolerance < 0 || tolerance >= 0.5) {
    throw new RangeError(`classifySnapshot: tolerance must lie in [0, 0.5) (got ${tolerance})`);
  }
  const r = fillOrderParameters(re, im, new Float64Array(n));

  let meanModulus = 0;
  let meanSquare = 0;
  for (let k = 0; k < n; k++) {
    const m2 = re[k] * re[k] + im[k] * im[k];
    meanModulus += Math.sqrt(m2) / n;
    meanSquare += m2 / n;
  }

  let best = 0;
  for (let q = 1; q < n; q++) if (r[q] > r[best]) best = q;
  let equalModuli = true;
  for (let k = 0; k < n; k++) {
    if (Math.abs(Math.hypot(re[k], im[k]) - meanModulus) > tolerance * meanModulus) equalModuli = false;
  }
  if (equalModuli && r[best] >= 1 - tolerance) {
    const kind = best === 0 ? 'in-phase' : 2 * best === n ? 'anti-phase' : 'rotating-wave';
    return { kind, q: best, orderParameters: r };
  }

  // E_q = R_q^2 (mean|a|)^2 / mean|a|^2
  const energyScale = (meanModulus * meanModulus) / meanSquare;
  for (let q = 1; 2 * q < n; q++) {
    const pairEnergy = (r[q] * r[q] + r[n - q] * r[n - q]) * energyScale;
    if (pairEnergy >= 1 - tolerance && Math.abs(r[q] - r[n - q]) <= tolerance * (r[q] + r[n - q])) {
      return { kind: 'standing-wave', q, orderParameters: r };
    }
  }

  return { kind: 'cluster', clusters: amplitudeClusters(re, im, tolerance * meanModulus), orderParameters: r };
}

/**
 * Groups nodes whose amplitudes differ by at most `distance` (single linkage: the groups are the
 * connected components of that relation). Groups are ordered by their smallest node.
 */
function amplitudeClusters(re: ArrayLike<number>, im: ArrayLike<number>, distance: number): number[][] {
  const n = re.length;
  const root = Int32Array.from({ length: n }, (_, k) => k);
  const find = (k: number): number => {
    while (root[k] !== k) k = root[k] = root[root[k]];
    return k;
  };
  for (let j = 0; j < n; j++) {
    for (let k = j + 1; k < n; k++) {
      if (Math.hypot(re[j] - re[k], im[j] - im[k]) <= distance) {
        const a = find(j);
        const b = find(k);
        if (a !== b) root[Math.max(a, b)] = Math.min(a, b);
      }
    }
  }
  const groups = new Map<number, number[]>();
  for (let k = 0; k < n; k++) {
    const g = find(k);
    const members = groups.get(g);
    if (members) members.push(k);
    else groups.set(g, [k]);
  }
  return [...groups.values()];
}
