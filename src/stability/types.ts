/**
 * Shared shapes of the frequency-stability module.
 *
 * Units: phase data x is time error in seconds, frequency data y is fractional frequency
 * (dimensionless), tau0 is the sample interval in seconds and tau = m * tau0.
 */

/** What a sample series holds: time error x (seconds) or fractional frequency y. */
export type SeriesKind = 'phase' | 'frequency';

export interface SeriesOptions {
  /**
   * 'phase' (default): x_i, the time error at t = i tau0, N points.
   * 'frequency': y_i, the mean fractional frequency over [i tau0, (i+1) tau0], N samples; it is
   * integrated to N + 1 phase points first (x_0 = 0).
   */
  input?: SeriesKind;
}

/** One point of a stability curve. */
export interface StabilityPoint {
  /** Averaging factor. */
  m: number;
  /** Averaging (or observation) interval m * tau0, seconds. */
  tau: number;
  /** The statistic: dimensionless for adev/oadev/mdev/hdev, seconds for tdev and mtie. */
  deviation: number;
  /** Number of terms averaged (for mtie: number of windows examined). */
  n: number;
}

/** The statistics `stabilitySweep` can tabulate. */
export type StabilityMetric = 'adev' | 'oadev' | 'mdev' | 'tdev' | 'hdev' | 'hdevNonOverlapping' | 'mtie';

/** A statistic evaluated on phase data that has already been validated. */
export interface MetricKernel {
  /** Fewest phase points that give at least one term at averaging factor m. */
  minPhasePoints(m: number): number;
  /**
   * True when a constant frequency offset changes the result (MTIE). The deviations are built
   * from second or third differences of phase, which a constant offset cannot reach.
   */
  offsetSensitive: boolean;
  evaluate(x: ArrayLike<number>, tau0: number, m: number): StabilityPoint;
}
