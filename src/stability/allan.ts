/**
 * Allan deviation from phase data x (N points, interval tau0) at tau = m tau0
 * (NIST SP 1065 sections 5.2.2 and 5.2.4; IEEE Std 1139).
 */
import { publicMetric } from './metric.js';
import type { MetricKernel } from './types.js';

/**
 * Non-overlapping: phase decimated to x_0, x_m, x_2m, ... (M points),
 * sigma^2 = sum_j (x_{(j+2)m} - 2 x_{(j+1)m} + x_{jm})^2 / (2 tau^2 (M - 2)); n = M - 2.
 */
export const adevKernel: MetricKernel = {
  minPhasePoints: (m) => 2 * m + 1,
  offsetSensitive: false,
  evaluate(x, tau0, m) {
    const points = Math.floor((x.length - 1) / m) + 1;
    const terms = points - 2;
    let sum = 0;
    for (let i = 0; i < terms * m; i += m) {
      const d = x[i + 2 * m] - 2 * x[i + m] + x[i];
      sum += d * d;
    }
    const tau = m * tau0;
    return { m, tau, deviation: Math.sqrt(sum / (2 * tau * tau * terms)), n: terms };
  },
};

/**
 * Overlapping: every start i,
 * sigma^2 = sum_{i=0}^{N-2m-1} (x_{i+2m} - 2 x_{i+m} + x_i)^2 / (2 tau^2 (N - 2m)); n = N - 2m.
 */
export const oadevKernel: MetricKernel = {
  minPhasePoints: (m) => 2 * m + 1,
  offsetSensitive: false,
  evaluate(x, tau0, m) {
    const terms = x.length - 2 * m;
    let sum = 0;
    for (let i = 0; i < terms; i++) {
      const d = x[i + 2 * m] - 2 * x[i + m] + x[i];
      sum += d * d;
    }
    const tau = m * tau0;
    return { m, tau, deviation: Math.sqrt(sum / (2 * tau * tau * terms)), n: terms };
  },
};

/** Non-overlapping Allan deviation. */
export const adev = publicMetric('adev', adevKernel);
/** Overlapping Allan deviation. */
export const oadev = publicMetric('oadev', oadevKernel);
