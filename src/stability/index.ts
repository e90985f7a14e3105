/** Frequency-stability statistics: pure functions over phase or fractional-frequency series. */
export { frequencyToPhase, phaseToFrequency } from './convert.js';
export { adev, oadev } from './allan.js';
export { mdev, tdev } from './modified-allan.js';
export { hdev, hdevNonOverlapping } from './hadamard.js';
export { mtie, timeIntervalError } from './time-error.js';
export { stabilitySweep, averagingFactors, largestSweepFactor } from './sweep.js';
export type { SweepOptions, SweepResult, SweepSeries, SweepSpacing } from './sweep.js';
export { powerLawFit, powerLawSlope } from './power-law.js';
export type { PowerLawFit } from './power-law.js';
export { summarize } from './summary.js';
export type { SeriesSummary } from './summary.js';
export { METRIC_NAMES, isStabilityMetric } from './kernels.js';
export type { MetricFunction } from './metric.js';
export type { SeriesKind, SeriesOptions, StabilityMetric, StabilityPoint } from './types.js';
