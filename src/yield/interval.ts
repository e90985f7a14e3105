/**
 * The Wilson score interval for a binomial proportion (Wilson 1927): the set of p whose score
 * test |x - n p| / sqrt(n p (1 - p)) <= z does not reject x passes out of n, z the two-sided
 * normal quantile of the confidence level. It stays inside [0, 1], is never empty at x = 0 or
 * x = n, and its coverage stays near the nominal level at the sample counts a yield study uses
 * (Newcombe 1998 compares it with six other methods).
 */
import { normalQuantile } from '../util/normal.js';

export const INTERVAL_METHOD = 'wilson' as const;

export interface ProportionInterval {
  estimate: number;
  low: number;
  high: number;
  confidence: number;
  method: typeof INTERVAL_METHOD;
}

export function wilsonInterval(passed: number, samples: number, confidence: number): ProportionInterval {
  if (!(Number.isInteger(samples) && samples >= 0 && Number.isInteger(passed) && passed >= 0 && passed <= samples)) {
    throw new RangeError(`wilsonInterval: need integers 0 <= passed <= samples (got ${passed} of ${samples})`);
  }
  if (!(confidence > 0 && confidence < 1)) throw new RangeError(`wilsonInterval: confidence must lie in (0, 1) (got ${confidence})`);
  if (samples === 0) return { estimate: Number.NaN, low: 0, high: 1, confidence, method: INTERVAL_METHOD };
  const z = normalQuantile(0.5 + confidence / 2);
  const n = samples;
  const p = passed / n;
  const z2 = z * z;
  const centre = (p + z2 / (2 * n)) / (1 + z2 / n);
  const half = (z / (1 + z2 / n)) * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n));
  // at x = 0 and x = n the exact bound is 0 or 1; rounding would leave a speck beside it
  const low = passed === 0 ? 0 : Math.max(0, centre - half);
  const high = passed === samples ? 1 : Math.min(1, centre + half);
  return { estimate: p, low, high, confidence, method: INTERVAL_METHOD };
}
