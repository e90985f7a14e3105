/** Plain descriptive statistics of a series (for instance the mean frequency offset). */
import { requireSeries } from './validate.js';

export interface SeriesSummary {
  count: number;
  mean: number;
  /** Sample standard deviation (divides by N - 1). */
  standardDeviation: number;
  min: number;
  max: number;
}

export function summarize(values: ArrayLike<number>): SeriesSummary {
  requireSeries('summarize', 'values', values, 2);
  const count = values.length;
  let total = 0;
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < count; i++) {
    const v = values[i];
    total += v;
    if (v < min) min = v;
    if (v > max) max = v;
  }
  const mean = total / count;
  // Second pass over deviations from the mean: the one-pass sum of squares cancels badly.
  let squares = 0;
  for (let i = 0; i < count; i++) {
    const d = values[i] - mean;
    squares += d * d;
  }
  return { count, mean, standardDeviation: Math.sqrt(squares / (count - 1)), min, max };
}

/** Arithmetic mean of validated, non-empty input. */
export function meanOf(values: ArrayLike<number>): number {
  let total = 0;
  for (let i = 0; i < values.length; i++) total += values[i];
  return total / values.length;
}
