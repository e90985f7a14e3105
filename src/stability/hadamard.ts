/**
 * Hadamard deviation from phase data (NIST SP 1065 section 5.2.8): third differences of phase,
 * so a linear frequency drift drops out.
 */
import { publicMetric } from './metric.js';
import type { MetricKernel } from './types.js';

/**
 * Overlapping: H sigma^2 = sum_{i=0}^{N-3m-1} (x_{i+3m} - 3 x_{i+2m} + 3 x_{i+m} - x_i)^2
 * / (6 tau^2 (N - 3m)); n = N - 3m.
 */
export const hdevKernel: MetricKernel = {
  minPhasePoints: (m) => 3 * m + 1,
  offsetSensitive: false,
  evaluate(x, tau0, m) {
    const terms = x.length - 3 * m;
    let sum = 0;
    for (let i = 0; i < terms; i++) {
      const d = x[i + 3 * m] - 3 * x[i + 2 * m] + 3 * x[i + m] - x[i];
      sum += d * d;
    }
    const tau = m * tau0;
    return { m, tau, deviation: Math.sqrt(sum / (6 * tau * tau * terms)), n: terms };
  },
};

/** Non-overlapping: the same on phase decimated by m (M points); n = M - 3. */
export const hdevNonOverlappingKernel: MetricKernel = {
  minPhasePoints: (m) => 3 * m + 1,
  offsetSensitive: false,
  evaluate(x, tau0, m) {
    const terms = Math.floor((x.length - 1) / m) + 1 - 3;
    let sum = 0;
    for (let i = 0; i < terms * m; i += m) {
      const d = x[i + 3 * m] - 3 * x[i + 2 * m] + 3 * x[i + m] - x[i];
      sum += d * d;
    }
    const tau = m * tau0;
    return { m, tau, deviation: Math.sqrt(sum / (6 * tau * tau * terms)), n: terms };
  },
};

/** Overlapping Hadamard deviation. */
export const hdev = publicMetric('hdev', hdevKernel);
/** Non-overlapping Hadamard deviation. */
export const hdevNonOverlapping = publicMetric('hdevNonOverlapping', hdevNonOverlappingKernel);
