/** Several statistics over a ladder of averaging factors, as plot-ready arrays. */
import { isStabilityMetric, METRIC_KERNELS, METRIC_NAMES } from './kernels.js';
import { checkSeries, seriesKind, toPhase } from './series.js';
import type { SeriesOptions, StabilityMetric } from './types.js';
import { describeValue, requireAveragingFactor, requirePhasePoints } from './validate.js';

/** 'octave': m = 1, 2, 4, 8, ...; 'decade': m = 1, 10, 100, ...; '1-2-5': m = 1, 2, 5, 10, 20, 50, ...; all stop at m_max. */
export type SweepSpacing = 'octave' | 'decade' | '1-2-5';

export interface SweepOptions extends SeriesOptions {
  metrics: readonly StabilityMetric[];
  /** Explicit averaging factors (each an integer >= 1 that every metric can use); overrides spacing. */
  mValues?: readonly number[];
  /** Ladder used when mValues is absent; default 'octave'. */
  spacing?: SweepSpacing;
}

export interface SweepSeries {
  /** One value per m, same units as the single-m function. */
  deviation: number[];
  /** Terms averaged per m (windows for mtie). */
  n: number[];
}

/**
 * Plain arrays (not typed arrays) so the result survives JSON and feeds a chart directly;
 * a sweep holds a few dozen points.
 */
export interface SweepResult {
  m: number[];
  /** m * tau0, seconds. */
  tau: number[];
  series: Partial<Record<StabilityMetric, SweepSeries>>;
}

/**
 * Largest m a sweep uses by default: floor((N - 1) / 3) for N phase points, i.e. a third of the
 * frequency samples; every metric has at least one term there.
 */
export function largestSweepFactor(phasePoints: number): number {
  return Math.floor((phasePoints - 1) / 3);
}

/** Averaging factors 1, r, r^2, ... not above mMax (r = 2 for octave, 10 for decade), or 1, 2, 5 times each power of ten. */
export function averagingFactors(mMax: number, spacing: SweepSpacing = 'octave'): number[] {
  if (spacing === '1-2-5') {
    const steps: number[] = [];
    for (let decade = 1; decade <= mMax; decade *= 10) for (const k of [1, 2, 5]) if (k * decade <= mMax) steps.push(k * decade);
    return steps;
  }
  const ratio = spacing === 'octave' ? 2 : 10;
  const factors: number[] = [];
  for (let m = 1; m <= mMax; m *= ratio) factors.push(m);
  return factors;
}

export function stabilitySweep(data: ArrayLike<number>, tau0: number, options: SweepOptions): SweepResult {
  const where = 'stabilitySweep';
  if (options === null || typeof options !== 'object') {
    throw new TypeError(`${where}: options must be an object with a metrics list, got ${describeValue(options)}`);
  }
  const kind = seriesKind(where, options);
  checkSeries(where, data, tau0, kind);
  const metrics = checkedMetrics(where, options.metrics);
  const phasePoints = kind === 'phase' ? data.length : data.length + 1;
  const m = options.mValues === undefined ? ladder(where, phasePoints, options.spacing) : [...checkedFactors(where, options.mValues)];
  for (const metric of metrics) {
    for (const factor of m) {
      requirePhasePoints(`${where} (${metric})`, factor, phasePoints, METRIC_KERNELS[metric].minPhasePoints(factor));
    }
  }

  // Integrate frequency data at most twice: offset removed (deviations) and kept (MTIE).
  let offsetBlind: ArrayLike<number> | undefined;
  let offsetKept: ArrayLike<number> | undefined;
  const series: Partial<Record<StabilityMetric, SweepSeries>> = {};
  for (const metric of metrics) {
    const kernel = METRIC_KERNELS[metric];
    const x = kernel.offsetSensitive
      ? (offsetKept ??= toPhase(data, tau0, kind, true))
      : (offsetBlind ??= toPhase(data, tau0, kind, false));
    const deviation: number[] = [];
    const n: number[] = [];
    for (const factor of m) {
      const point = kernel.evaluate(x, tau0, factor);
      deviation.push(point.deviation);
      n.push(point.n);
    }
    series[metric] = { deviation, n };
  }
  return { m, tau: m.map((factor) => factor * tau0), series };
}

function checkedMetrics(where: string, metrics: unknown): StabilityMetric[] {
  if (!Array.isArray(metrics) || metrics.length === 0) {
    throw new RangeError(`${where}: options.metrics must be a non-empty list of ${METRIC_NAMES.join(', ')}`);
  }
  metrics.forEach((name, i) => {
    if (!isStabilityMetric(name)) {
      throw new RangeError(`${where}: options.metrics[${i}] is ${describeValue(name)}; known metrics: ${METRIC_NAMES.join(', ')}`);
    }
  });
  return [...new Set(metrics as StabilityMetric[])];
}

function checkedFactors(where: string, mValues: unknown): number[] {
  if (!Array.isArray(mValues) || mValues.length === 0) {
    throw new RangeError(`${where}: options.mValues must be a non-empty list of integers >= 1`);
  }
  mValues.forEach((m, i) => requireAveragingFactor(`${where}: options.mValues[${i}]`, m));
  return mValues as number[];
}

function ladder(where: string, phasePoints: number, spacing: unknown = 'octave'): number[] {
  if (spacing !== 'octave' && spacing !== 'decade' && spacing !== '1-2-5') {
    throw new RangeError(`${where}: options.spacing must be "octave", "decade" or "1-2-5", got ${describeValue(spacing)}`);
  }
  const mMax = largestSweepFactor(phasePoints);
  if (mMax < 1) {
    throw new RangeError(`${where}: needs at least 4 phase points (3 frequency samples); the series gives ${phasePoints}`);
  }
  return averagingFactors(mMax, spacing);
}
