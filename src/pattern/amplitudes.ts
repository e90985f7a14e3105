/** Checks shared by everything that reads a snapshot of complex amplitudes a_k = re[k] + i im[k]. */

/**
 * Returns N after checking that `re` and `im` have the same length N >= 1, hold only finite
 * numbers and are not all zero (the shape of the zero state is undefined). Errors name `where`.
 */
export function checkAmplitudes(re: ArrayLike<number>, im: ArrayLike<number>, where: string): number {
  if (re == null || typeof re.length !== 'number') throw new TypeError(`${where}: re must be an array of numbers`);
  if (im == null || typeof im.length !== 'number') throw new TypeError(`${where}: im must be an array of numbers`);
  const n = re.length;
  if (n < 1) throw new RangeError(`${where}: the snapshot has no nodes (re has length 0)`);
  if (im.length !== n) throw new RangeError(`${where}: re has ${n} entries but im has ${im.length}; they must match`);
  let nonZero = false;
  for (let k = 0; k < n; k++) {
    if (typeof re[k] !== 'number' || !Number.isFinite(re[k])) throw new RangeError(`${where}: re[${k}] = ${re[k]} is not a finite number`);
    if (typeof im[k] !== 'number' || !Number.isFinite(im[k])) throw new RangeError(`${where}: im[${k}] = ${im[k]} is not a finite number`);
    if (re[k] !== 0 || im[k] !== 0) nonZero = true;
  }
  if (!nonZero) throw new RangeError(`${where}: every amplitude is zero, so the snapshot has no pattern to examine`);
  return n;
}
