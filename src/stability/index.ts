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
export { chiSquaredCdf, chiSquaredQuantile, inverseRegularizedGammaP, regularizedGammaP, regularizedGammaQ } from './chi-squared.js';
export { mdevEdf, oadevEdf, NOISE_NAMES } from './edf.js';
export type { NoiseAlpha } from './edf.js';
export { identifyNoise, lag1NoiseAlpha, NOISE_ID_MIN_POINTS } from './noise-id.js';
export type { NoiseEstimate } from './noise-id.js';
export {
  chiSquaredInterval,
  deviationConfidence,
  deviationIntervals,
  FIT_MIN_EDF,
  MIN_INDEPENDENT_TERMS,
  ONE_SIGMA_CONFIDENCE,
} from './confidence.js';
export type { DeviationConfidence, DeviationInterval, IntervalMetric } from './confidence.js';
export { slopeFit, stabilityTables } from './tables.js';
export type { SlopeFit, StabilityTables, TableOptions } from './tables.js';
export { maskLimit, maskMargin, parseMask, parseMaskCsv } from './mask.js';
export type { MaskMargin, MaskMetric, StabilityMask } from './mask.js';
export { formatDataText, parseDataText, TIME_STEP_TOLERANCE } from './data-file.js';
export type { DataFile } from './data-file.js';
