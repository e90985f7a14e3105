/**
 * Frequency stability of the array from its recorded phases, with the metrics of src/stability.
 *
 * Definitions (phase phi in rad against the nominal carrier f0, samples every tau0 seconds):
 * - time error x_i = (phi_i - phi_0) / (2 pi f0), seconds (shown in ns);
 * - mean fractional frequency offset y = (x_last - x_0) / (T), T the record length; shown in
 *   ppb (1 ppb accumulates 86.4 us of time error per day);
 * - overlapping ADEV, ADEV, MDEV, TDEV and MTIE of x across octave-spaced tau = m tau0.
 */
import { powerLawFit, stabilitySweep, type SweepResult } from '../stability/index.js';
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
  /** Least-squares exponent of overlapping ADEV versus tau over the whole sweep. */
  oadevSlope: number | null;
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
  ratioToSinglePart: { tau: number[]; ensemble: number[]; node: number[]; uncoupledEnsemble: number[] } | null;
  note: string | null;
}

const METRICS = ['adev', 'oadev', 'mdev', 'tdev', 'mtie'] as const;

/** Fewest samples for a meaningful sweep (m = 1 needs 4 phase points; a handful of m values needs more). */
export const MIN_STABILITY_SAMPLES = 16;

export function analyzeStability(samples: readonly PhaseSample[], tau0: number, nominalFrequencyHz: number): StabilityReport | null {
  if (samples.length < MIN_STABILITY_SAMPLES) return null;
  const twinLength = samples.findIndex((s) => s.uncoupledEnsemble === null || s.singlePart === null);
  const withTwin = twinLength === -1 ? samples.length : twinLength;
  const series: SeriesStability[] = [];
  for (const name of PHASE_SERIES) {
    const count = name === 'ensemble' || name === 'node' ? samples.length : withTwin;
    if (count < MIN_STABILITY_SAMPLES) continue;
    const x = timeErrorOf(samples, name, count, nominalFrequencyHz);
    series.push(seriesStability(name, x, tau0));
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
    ratioToSinglePart = {
      tau: single.sweep.tau,
      ensemble: ratio('ensemble'),
      node: ratio('node'),
      uncoupledEnsemble: ratio('uncoupledEnsemble'),
    };
  }
  return {
    tau0,
    span: (samples.length - 1) * tau0,
    startTau: samples[0].tau,
    nominalFrequencyHz,
    series,
    ratioToSinglePart,
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

function seriesStability(name: PhaseSeriesName, x: Float64Array, tau0: number): SeriesStability {
  const sweep = stabilitySweep(x, tau0, { metrics: METRICS, spacing: 'octave' });
  const span = (x.length - 1) * tau0;
  const offset = (x[x.length - 1] - x[0]) / span;
  let maxAbs = 0;
  for (const v of x) maxAbs = Math.max(maxAbs, Math.abs(v));
  const oadev = sweep.series.oadev!.deviation;
  const usable = oadev.map((d, i) => ({ d, t: sweep.tau[i] })).filter((p) => p.d > 0 && Number.isFinite(p.d));
  return {
    name,
    label: SERIES_LABELS[name],
    points: x.length,
    frequencyOffsetPpb: offset * 1e9,
    finalTimeErrorNs: x[x.length - 1] * 1e9,
    maxTimeErrorNs: maxAbs * 1e9,
    timeErrorPerDayUs: offset * 86400 * 1e6,
    sweep,
    oadevSlope:
      usable.length >= 2
        ? powerLawFit(
            usable.map((p) => p.t),
            usable.map((p) => p.d),
          ).slope
        : null,
  };
}
