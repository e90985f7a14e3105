/**
 * Modified Allan deviation and time deviation from phase data (NIST SP 1065 sections 5.2.5 and
 * 5.2.6; TDEV = tau / sqrt(3) * MDEV).
 */
import { publicMetric } from './metric.js';
import type { MetricKernel } from './types.js';

/**
 * Mod sigma^2 = sum_{j=0}^{N-3m} S_j^2 / (2 m^2 tau^2 (N - 3m + 1)),
 * S_j = sum_{i=j}^{j+m-1} (x_{i+2m} - 2 x_{i+m} + x_i); n = N - 3m + 1.
 * S_j is kept as a running sum, so the cost is O(N) for any m.
 */
export const mdevKernel: MetricKernel = {
  minPhasePoints: (m) => 3 * m,
  offsetSensitive: false,
  evaluate(x, tau0, m) {
    const terms = x.length - 3 * m + 1;
    let window = 0;
    for (let i = 0; i < m; i++) window += x[i + 2 * m] - 2 * x[i + m] + x[i];
    let sum = window * window;
    for (let j = 1; j < terms; j++) {
      const enter = j + m - 1;
      const leave = j - 1;
      window += x[enter + 2 * m] - 2 * x[enter + m] + x[enter] - (x[leave + 2 * m] - 2 * x[leave + m] + x[leave]);
      sum += window * window;
    }
    const tau = m * tau0;
    return { m, tau, deviation: Math.sqrt(sum / (2 * m * m * tau * tau * terms)), n: terms };
  },
};

/** TDEV in seconds: tau / sqrt(3) times MDEV, over the same terms. */
export const tdevKernel: MetricKernel = {
  minPhasePoints: mdevKernel.minPhasePoints,
  offsetSensitive: false,
  evaluate(x, tau0, m) {
    const modified = mdevKernel.evaluate(x, tau0, m);
    return { ...modified, deviation: (modified.tau / Math.sqrt(3)) * modified.deviation };
  },
};

/** Modified Allan deviation. */
export const mdev = publicMetric('mdev', mdevKernel);
/** Time deviation, seconds. */
export const tdev = publicMetric('tdev', tdevKernel);
