/**
 * Time-error statistics from phase data x (seconds) after ITU-T G.810: the time interval error
 * TIE_i(tau) = x_{i+m} - x_i and the maximum time interval error MTIE(tau), tau = m tau0.
 */
import { publicMetric } from './metric.js';
import { largestWindowRange } from './sliding-range.js';
import { checkSeries, seriesKind, toPhase } from './series.js';
import type { MetricKernel, SeriesOptions } from './types.js';
import { requireAveragingFactor, requirePhasePoints } from './validate.js';

/**
 * MTIE(m tau0) = max over k of (max - min of x_k .. x_{k+m}): a window spans m sample
 * intervals, i.e. m + 1 phase points, so a constant offset y0 gives y0 m tau0. n = N - m windows.
 */
export const mtieKernel: MetricKernel = {
  minPhasePoints: (m) => m + 1,
  offsetSensitive: true,
  evaluate(x, tau0, m) {
    return { m, tau: m * tau0, deviation: largestWindowRange(x, m + 1), n: x.length - m };
  },
};

/** Maximum time interval error, seconds (O(N) for any m). */
export const mtie = publicMetric('mtie', mtieKernel);

/**
 * TIE series for observation interval m tau0: element i is x_{i+m} - x_i (seconds),
 * N - m elements for N phase points.
 */
export function timeIntervalError(data: ArrayLike<number>, tau0: number, m: number, options?: SeriesOptions): Float64Array {
  const where = 'timeIntervalError';
  const kind = seriesKind(where, options);
  checkSeries(where, data, tau0, kind);
  requireAveragingFactor(where, m);
  requirePhasePoints(where, m, kind === 'phase' ? data.length : data.length + 1, m + 1);
  const x = toPhase(data, tau0, kind, true);
  const tie = new Float64Array(x.length - m);
  for (let i = 0; i < tie.length; i++) tie[i] = x[i + m] - x[i];
  return tie;
}
