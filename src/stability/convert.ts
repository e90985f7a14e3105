/** Conversions between phase (time error) and fractional-frequency series. */
import { requireSampleInterval, requireSeries } from './validate.js';

/**
 * Integrates fractional frequency y (N samples, interval tau0) into time error x (N + 1 points,
 * seconds): x_0 = 0, x_{i+1} = x_i + y_i tau0.
 */
export function frequencyToPhase(y: ArrayLike<number>, tau0: number): Float64Array {
  requireSeries('frequencyToPhase', 'y', y, 0);
  requireSampleInterval('frequencyToPhase', tau0);
  return integrateFrequency(y, tau0, 0);
}

/** Differentiates time error x (N points) into fractional frequency, N - 1 samples. */
export function phaseToFrequency(x: ArrayLike<number>, tau0: number): Float64Array {
  requireSeries('phaseToFrequency', 'x', x, 1);
  requireSampleInterval('phaseToFrequency', tau0);
  const y = new Float64Array(x.length - 1);
  for (let i = 0; i < y.length; i++) y[i] = (x[i + 1] - x[i]) / tau0;
  return y;
}

/**
 * Cumulative sum of (y_i - offset) tau0 with x_0 = 0, on validated input. Neumaier-compensated,
 * because a long sum otherwise carries rounding of the size of the running total into every
 * later difference.
 */
export function integrateFrequency(y: ArrayLike<number>, tau0: number, offset: number): Float64Array {
  const x = new Float64Array(y.length + 1);
  let sum = 0;
  let carry = 0;
  for (let i = 0; i < y.length; i++) {
    const step = (y[i] - offset) * tau0;
    const next = sum + step;
    carry += Math.abs(sum) >= Math.abs(step) ? sum - next + step : step - next + sum;
    sum = next;
    x[i + 1] = sum + carry;
  }
  return x;
}
