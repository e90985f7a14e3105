/**
 * The stability tables of one series with their confidence intervals: the sweep, the noise type
 * per tau, the interval of every overlapping ADEV, MDEV and TDEV value and the ADEV slope over
 * the taus fit for it. The soak's analysis and `syncring stability` both build their tables here.
 */
import { deviationIntervals, ONE_SIGMA_CONFIDENCE, type DeviationInterval, type IntervalMetric } from './confidence.js';
import { identifyNoise, type NoiseEstimate } from './noise-id.js';
import { powerLawFit } from './power-law.js';
import { checkSeries, seriesKind, toPhase } from './series.js';
import { stabilitySweep, type SweepResult, type SweepSpacing } from './sweep.js';
import type { SeriesOptions, StabilityMetric } from './types.js';

export interface TableOptions extends SeriesOptions {
  metrics: readonly StabilityMetric[];
  mValues?: readonly number[];
  spacing?: SweepSpacing;
  /** Confidence level of the intervals, 0 < level < 1; default one sigma (0.683). */
  confidence?: number;
}

export interface SlopeFit {
  /** Least-squares exponent mu of deviation ~ tau^mu; null with fewer than two taus fit for it. */
  slope: number | null;
  /** Taus used (those with usedInFits) and their range, seconds. */
  points: number;
  fromTau: number | null;
  toTau: number | null;
}

export interface StabilityTables {
  sweep: SweepResult;
  /** Phase points the statistics were computed on (N + 1 for N frequency samples). */
  phasePoints: number;
  confidence: number;
  /** Noise type per tau (same order as sweep.m), identified or assumed. */
  noise: NoiseEstimate[];
  /** Interval of every value of the metrics that have one (same order as sweep.m). */
  intervals: Partial<Record<IntervalMetric, DeviationInterval[]>>;
  /** Overlapping ADEV slope over the taus fit for it (reliable, edf >= FIT_MIN_EDF). */
  oadevFit: SlopeFit;
}

const INTERVAL_METRICS: readonly IntervalMetric[] = ['oadev', 'mdev', 'tdev'];

export function stabilityTables(data: ArrayLike<number>, tau0: number, options: TableOptions): StabilityTables {
  const where = 'stabilityTables';
  const kind = seriesKind(where, options);
  checkSeries(where, data, tau0, kind);
  const level = options.confidence ?? ONE_SIGMA_CONFIDENCE;
  if (!(level > 0 && level < 1)) throw new RangeError(`${where}: confidence must be between 0 and 1, got ${level}`);
  const sweep = stabilitySweep(data, tau0, options);
  const x = toPhase(data, tau0, kind, false);
  const noise = identifyNoise(x, sweep.m);
  const intervals: StabilityTables['intervals'] = {};
  for (const metric of INTERVAL_METRICS) {
    const series = sweep.series[metric];
    if (series) intervals[metric] = deviationIntervals(metric, x.length, sweep.m, series.deviation, noise, level);
  }
  return { sweep, phasePoints: x.length, confidence: level, noise, intervals, oadevFit: slopeFit(sweep, 'oadev', intervals.oadev) };
}

/** Power-law slope of one metric over the taus whose intervals say they are fit for it. */
export function slopeFit(sweep: SweepResult, metric: StabilityMetric, intervals: readonly DeviationInterval[] | undefined): SlopeFit {
  const values = sweep.series[metric]?.deviation ?? [];
  const used = sweep.tau
    .map((tau, i) => ({ tau, value: values[i], ok: intervals?.[i]?.usedInFits ?? false }))
    .filter((p) => p.ok && p.value > 0 && Number.isFinite(p.value));
  if (used.length < 2) return { slope: null, points: used.length, fromTau: used[0]?.tau ?? null, toTau: used[0]?.tau ?? null };
  const fit = powerLawFit(
    used.map((p) => p.tau),
    used.map((p) => p.value),
  );
  return { slope: fit.slope, points: used.length, fromTau: used[0].tau, toTau: used[used.length - 1].tau };
}
