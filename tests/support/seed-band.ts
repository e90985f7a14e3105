/**
 * The confidence band of a statistic from its spread over independent seeds: the mean of the
 * per-seed values and its standard error s / sqrt(n). With n seeds the mean is close to normal
 * (each value is itself an average of many terms), so mean +- 3 standard errors misses the true
 * value about 3 times in 1000; the seeds are fixed, so a test built on it is deterministic.
 */
export function seedBand(values: readonly number[]): { mean: number; standardError: number } {
  const n = values.length;
  const mean = values.reduce((s, v) => s + v, 0) / n;
  const variance = values.reduce((s, v) => s + (v - mean) ** 2, 0) / (n - 1);
  return { mean, standardError: Math.sqrt(variance / n) };
}

/** Band width in standard errors (see seedBand). */
export const BAND_STANDARD_ERRORS = 3;
