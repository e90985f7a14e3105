/**
 * Frequency stability of the array from its recorded phases, with the metrics of src/stability.
 *
 * Definitions (phase phi in rad against the nominal carrier f0, samples every tau0 seconds):
 * - time error x_i = (phi_i - phi_0) / (2 pi f0), seconds (shown in ns);
 * - mean fractional frequency offset y = (x_last - x_0) / (T), T the record length; shown in
 *   ppb (1 ppb accumulates 86.4 us of time error per day);
 * - overlapping ADEV, ADEV, MDEV, TDEV and MTIE of x across octave-spaced tau = m tau0, each
 *   overlapping ADEV, MDEV and TDEV value with its equivalent degrees of freedom, the noise type
 *   they assume and its chi-squared interval (src/stability/tables.ts; README, "Stability statistics");
 * - optionally the margin of the array output's MTIE or TDEV to a mask.
 */
import {
  frequencyToPhase,
  maskMargin,
  stabilityTables,
  type DeviationInterval,
  type IntervalMetric,
  type MaskMargin,
  type NoiseEstimate,
  type SlopeFit,
  type StabilityMask,
  type SweepResult,
  type SweepSpacing,
} from '../stability/index.js';
import { MASK_CAUTION } from './cautions.js';
import { PHASE_SERIES, type PhaseSample, type PhaseSeriesName } from './phase-record.js';

export const SERIES_LABELS: Record<PhaseSeriesName, string> = {
  ensemble: 'array output (mean phase of the coupled nodes)',
  node: 'one node of the coupled array (node 0)',
  uncoupledEnsemble: 'uncoupled ensemble average (same parts, no coupling)',
  singlePart: 'single free-running part (node 0 uncoupled)',
};

export interface SeriesStability {
  name: PhaseSeriesName;
  label: string;
  points: number;
  /** Mean fractional frequency offset against the nominal frequency, ppb. */
  frequencyOffsetPpb: number;
  /** Time error at the end of the record, ns. */
  finalTimeErrorNs: number;
  /** Largest |time error| over the record, ns. */
  maxTimeErrorNs: number;
  /** Time error one day at this offset would accumulate, microseconds. */
  timeErrorPerDayUs: number;
  sweep: SweepResult;
  /**
   * Least-squares exponent of overlapping ADEV versus tau over the taus fit for it (reliable, with
   * edf >= FIT_MIN_EDF; `oadevFit` says which); null with fewer than two such taus.
   */
  oadevSlope: number | null;
  oadevFit: SlopeFit;
  /** Confidence level of the intervals (one sigma, 0.683). */
  confidence: number;
  /** Noise type per tau (the order of sweep.m), identified or assumed. */
  noise: NoiseEstimate[];
  /** Edf, interval, reliability and noise type of every overlapping ADEV, MDEV and TDEV value. */
  intervals: Partial<Record<IntervalMetric, DeviationInterval[]>>;
  /** Margin of this series' MTIE or TDEV to the campaign's mask, when there is one. */
  mask?: MaskMargin;
}

/** The campaign's mask with the array output's margin to it: the soak-level criterion. */
export interface MaskResult {
  mask: StabilityMask;
  /** The series the criterion judges: the array output. */
  judged: PhaseSeriesName;
  margin: MaskMargin;
  /** Whether the soak must meet it (campaign stability.mustMeetMask). */
  required: boolean;
  /** Met (margin >= 0 dB); false also when no tau of the record fell inside the mask's range. */
  pass: boolean;
  reason: string | null;
  /** What a met mask does not mean (MASK_CAUTION). */
  caution: string;
}

export interface StabilityReport {
  /** Sample interval, seconds. */
  tau0: number;
  /** Seconds covered by the record. */
  span: number;
  startTau: number;
  nominalFrequencyHz: number;
  series: SeriesStability[];
  /**
   * Overlapping ADEV of each series divided by the single part's, per tau (the single part is
   * the reference a designer compares the array with); absent without an uncoupled twin.
   * `node` (a coupled node against an uncoupled part) is what the coupling itself does for one
   * part; `ensemble` is mostly plain averaging, as `uncoupledEnsemble` shows without coupling.
   * Both approach 1/sqrt(N) only when the parts' noise is independent.
   */
  ratioToSinglePart: {
    tau: number[];
    ensemble: number[];
    node: number[];
    uncoupledEnsemble: number[];
    /** Per tau: both the series' and the single part's values are fit for headlines (usedInFits), per series. */
    reliable?: { ensemble: boolean[]; node: boolean[]; uncoupledEnsemble: boolean[] };
  } | null;
  /** The mask criterion, when the campaign gives a mask. */
  mask?: MaskResult;
  note: string | null;
}

export interface StabilityAnalysisOptions {
  mask?: StabilityMask;
  /** Whether the mask must be met (default true when a mask is given). */
  mustMeetMask?: boolean;
}

const METRICS = ['adev', 'oadev', 'mdev', 'tdev', 'mtie'] as const;

/** Fewest samples for a meaningful sweep (m = 1 needs 4 phase points; a handful of m values needs more). */
export const MIN_STABILITY_SAMPLES = 16;

export function analyzeStability(
  samples: readonly PhaseSample[],
  tau0: number,
  nominalFrequencyHz: number,
  options: StabilityAnalysisOptions = {},
): StabilityReport | null {
  if (samples.length < MIN_STABILITY_SAMPLES) return null;
  const twinLength = samples.findIndex((s) => s.uncoupledEnsemble === null || s.singlePart === null);
  const withTwin = twinLength === -1 ? samples.length : twinLength;
  const series: SeriesStability[] = [];
  for (const name of PHASE_SERIES) {
    const count = name === 'ensemble' || name === 'node' ? samples.length : withTwin;
    if (count < MIN_STABILITY_SAMPLES) continue;
    const x = timeErrorOf(samples, name, count, nominalFrequencyHz);
    series.push(seriesStability(name, x, tau0, options.mask));
  }
  const single = series.find((s) => s.name === 'singlePart');
  let ratioToSinglePart: StabilityReport['ratioToSinglePart'] = null;
  if (single) {
    const ratio = (name: PhaseSeriesName): number[] => {
      const s = series.find((t) => t.name === name)!;
      return single.sweep.m.map((m, i) => {
        const j = s.sweep.m.indexOf(m);
        return j < 0 ? Number.NaN : s.sweep.series.oadev!.deviation[j] / single.sweep.series.oadev!.deviation[i];
      });
    };
    const fit = (name: PhaseSeriesName): boolean[] => {
      const s = series.find((t) => t.name === name)!;
      return single.sweep.m.map((m, i) => {
        const j = s.sweep.m.indexOf(m);
        return j >= 0 && s.intervals.oadev![j].usedInFits && single.intervals.oadev![i].usedInFits;
      });
    };
    ratioToSinglePart = {
      tau: single.sweep.tau,
      ensemble: ratio('ensemble'),
      node: ratio('node'),
      uncoupledEnsemble: ratio('uncoupledEnsemble'),
      reliable: { ensemble: fit('ensemble'), node: fit('node'), uncoupledEnsemble: fit('uncoupledEnsemble') },
    };
  }
  return {
    tau0,
    span: (samples.length - 1) * tau0,
    startTau: samples[0].tau,
    nominalFrequencyHz,
    series,
    ratioToSinglePart,
    ...(options.mask ? { mask: maskResult(options.mask, series, options.mustMeetMask ?? true) } : {}),
    note: withTwin < samples.length ? `the uncoupled twin stopped after ${withTwin} samples; its series are shorter` : null,
  };
}

/** x_i = (phi_i - phi_0) / (2 pi f0), seconds. */
export function timeErrorOf(
  samples: readonly PhaseSample[],
  name: PhaseSeriesName,
  count: number,
  nominalFrequencyHz: number,
): Float64Array {
  const x = new Float64Array(count);
  const phi0 = samples[0][name]!;
  const scale = 1 / (2 * Math.PI * nominalFrequencyHz);
  for (let i = 0; i < count; i++) x[i] = (samples[i][name]! - phi0) * scale;
  return x;
}

/** The mask criterion on the array output (the board's output): met when its curve stays at or below the mask. */
function maskResult(mask: StabilityMask, series: readonly SeriesStability[], required: boolean): MaskResult {
  const judged = series.find((s) => s.name === 'ensemble')!;
  const margin = judged.mask!;
  const reason =
    margin.meets === null
      ? `no tau of the record (${judged.sweep.tau[0]} to ${judged.sweep.tau[judged.sweep.tau.length - 1]} s) falls inside the mask's range`
      : margin.meets
        ? null
        : `the array output's ${mask.metric.toUpperCase()} exceeds mask ${JSON.stringify(mask.name)} at tau ${margin.tau} s ` +
          `(${margin.value} s against a limit of ${margin.limit} s, margin ${margin.db!.toFixed(2)} dB)`;
  return { mask, judged: 'ensemble', margin, required, pass: margin.meets === true, reason, caution: MASK_CAUTION };
}

/** The tables of one soak series: its sweep with intervals and noise types, offsets and time errors. */
function seriesStability(name: PhaseSeriesName, x: Float64Array, tau0: number, mask?: StabilityMask): SeriesStability {
  return { name, label: SERIES_LABELS[name], ...measuredStability(x, tau0, { input: 'phase', spacing: 'octave', mask }) };
}

/** Everything a soak series carries except its name: what `syncring stability` prints for a measured file. */
export type MeasuredStability = Omit<SeriesStability, 'name' | 'label'>;

/**
 * The same tables for any phase (time error, s) or fractional-frequency series: a soak's series
 * and a measured file go through this one function.
 */
export function measuredStability(
  data: ArrayLike<number>,
  tau0: number,
  options: { input: 'phase' | 'frequency'; spacing?: SweepSpacing; mask?: StabilityMask; confidence?: number },
): MeasuredStability {
  const tables = stabilityTables(data, tau0, {
    metrics: METRICS,
    input: options.input,
    spacing: options.spacing,
    confidence: options.confidence,
  });
  const x = options.input === 'phase' ? data : frequencyToPhase(data, tau0);
  return { ...phaseSeriesFigures(x, tau0), ...tablesFields(tables, options.mask) };
}

/** Offset, final and largest time error and the per-day extrapolation of a phase record (seconds in, ns/ppb/us out). */
export function phaseSeriesFigures(
  x: ArrayLike<number>,
  tau0: number,
): Pick<SeriesStability, 'points' | 'frequencyOffsetPpb' | 'finalTimeErrorNs' | 'maxTimeErrorNs' | 'timeErrorPerDayUs'> {
  const span = (x.length - 1) * tau0;
  const offset = (x[x.length - 1] - x[0]) / span;
  let maxAbs = 0;
  for (let i = 0; i < x.length; i++) maxAbs = Math.max(maxAbs, Math.abs(x[i]));
  return {
    points: x.length,
    frequencyOffsetPpb: offset * 1e9,
    finalTimeErrorNs: x[x.length - 1] * 1e9,
    maxTimeErrorNs: maxAbs * 1e9,
    timeErrorPerDayUs: offset * 86400 * 1e6,
  };
}

/** The table fields every analysed series carries, with the mask margin of its MTIE or TDEV. */
export function tablesFields(
  tables: ReturnType<typeof stabilityTables>,
  mask?: StabilityMask,
): Pick<SeriesStability, 'sweep' | 'oadevSlope' | 'oadevFit' | 'confidence' | 'noise' | 'intervals' | 'mask'> {
  const { sweep } = tables;
  const margin = mask
    ? maskMargin(
        mask,
        sweep.tau,
        sweep.series[mask.metric]!.deviation,
        mask.metric === 'tdev' ? tables.intervals.tdev!.map((i) => i.high) : undefined,
      )
    : undefined;
  return {
    sweep,
    oadevSlope: tables.oadevFit.slope,
    oadevFit: tables.oadevFit,
    confidence: tables.confidence,
    noise: tables.noise,
    intervals: tables.intervals,
    ...(margin ? { mask: margin } : {}),
  };
}
