/**
 * What summing the nodes' outputs gives, for one mode's amplitudes a_k:
 *
 * - combining ratio |mean a| / mean |a| (1 when every node is in phase with equal phases, 0 for a
 *   balanced rotating wave), in dB as 20 log10 of the ratio: the loss of the summed output
 *   against N parts adding in phase (an amplitude ratio, so 20 log10; common practice for
 *   combiners);
 * - phase spread: the largest |arg a_k - arg(mean a)| over the nodes, the figure that says how
 *   far an "in-phase" lock is from in phase at the edge of a locking range. Undefined (null)
 *   when the mean amplitude vanishes.
 */
export interface Combining {
  ratio: number;
  /** 20 log10(ratio), null when the sum vanishes (JSON has no infinity). */
  lossDb: number | null;
  /** Largest phase distance of a node from the mean phase (rad), null when the sum vanishes. */
  spread: number | null;
}

export function combining(re: ArrayLike<number>, im: ArrayLike<number>): Combining {
  const n = re.length;
  let sumRe = 0;
  let sumIm = 0;
  let modulus = 0;
  for (let k = 0; k < n; k++) {
    sumRe += re[k];
    sumIm += im[k];
    modulus += Math.hypot(re[k], im[k]);
  }
  const ratio = modulus > 0 ? Math.hypot(sumRe, sumIm) / modulus : 0;
  // below this the direction of the sum is rounding noise, not a phase to measure from
  const spreadDefined = ratio > 1e-9;
  let spread = 0;
  if (spreadDefined) {
    const mean = Math.atan2(sumIm, sumRe);
    for (let k = 0; k < n; k++) {
      if (re[k] === 0 && im[k] === 0) continue;
      const d = Math.atan2(im[k], re[k]) - mean;
      spread = Math.max(spread, Math.abs(Math.atan2(Math.sin(d), Math.cos(d))));
    }
  }
  return { ratio, lossDb: ratio > 0 ? 20 * Math.log10(ratio) : null, spread: spreadDefined ? spread : null };
}
