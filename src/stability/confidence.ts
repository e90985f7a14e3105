/**
 * Confidence intervals of the overlapping Allan, modified Allan and time deviations from their
 * equivalent degrees of freedom: s^2 edf / chi2_{1-p/2}(edf) <= sigma^2 <= s^2 edf / chi2_{p/2}(edf)
 * (NIST SP 1065, section 5.3, "Confidence intervals"; README, "Stability statistics").
 */
import { chiSquaredQuantile } from './chi-squared.js';
import { mdevEdf, NOISE_NAMES, oadevEdf, type NoiseAlpha } from './edf.js';
import type { NoiseEstimate } from './noise-id.js';

/** One standard deviation of a normal distribution, erf(1 / sqrt 2): the level SP 1065's error bars use. */
export const ONE_SIGMA_CONFIDENCE = 0.6826894921370859;

/**
 * Values resting on fewer independent terms than this are marked unreliable: with 2 or 3 terms a
 * single disturbance decides the value, whatever the edf formula says.
 */
export const MIN_INDEPENDENT_TERMS = 4;

/**
 * Fits and headline ratios use a tau only with at least this edf. The relative standard error of a
 * deviation is about 1 / sqrt(2 edf) (the deviation is the square root of a chi2(edf) / edf
 * variance), 25 % at edf 8: below the 29 % step between neighbouring octaves of a tau^-1/2 curve,
 * so each point used still tells its neighbours apart.
 */
export const FIT_MIN_EDF = 8;

/** The deviations that get intervals. */
export type IntervalMetric = 'oadev' | 'mdev' | 'tdev';

export interface DeviationInterval {
  /** Equivalent degrees of freedom; null when the formula has no meaning here (too few points). */
  edf: number | null;
  /** Lower and upper ends of the interval on the deviation, in its unit; null without an edf. */
  low: number | null;
  high: number | null;
  /** Terms at stride m (the non-overlapping count); fewer than MIN_INDEPENDENT_TERMS marks the value unreliable. */
  independentTerms: number;
  reliable: boolean;
  /** Reliable and edf >= FIT_MIN_EDF: used by slope fits and headline ratios. */
  usedInFits: boolean;
  /** The noise type the edf assumes. */
  noise: NoiseEstimate;
}

/** sigma edf / chi2 bounds on a deviation (the square roots of the variance bounds). */
export function chiSquaredInterval(deviation: number, edf: number, level: number): { low: number; high: number } {
  const tail = (1 - level) / 2;
  const variance = deviation * deviation;
  return {
    low: Math.sqrt((variance * edf) / chiSquaredQuantile(1 - tail, edf)),
    high: Math.sqrt((variance * edf) / chiSquaredQuantile(tail, edf)),
  };
}

/**
 * Edf per the metric's formula: overlapping ADEV by SP 1065's simple (Howe-Allan-Barnes)
 * approximations, MDEV and TDEV by Greenhall's algorithm for m >= 2; at m = 1 the modified
 * estimator is the overlapping one term by term (the average over one sample is the sample), so
 * it takes the same edf.
 */
export function edfOf(metric: IntervalMetric, noise: NoiseEstimate, phasePoints: number, m: number): number {
  const edf = (alpha: NoiseAlpha): number =>
    metric === 'oadev' || m === 1 ? oadevEdf(alpha, phasePoints, m) : mdevEdf(alpha, phasePoints, m);
  // an estimate between two types: the one with fewer degrees of freedom, so the interval is not too narrow
  return Math.min(...(noise.candidates ?? [noise.alpha]).map(edf));
}

/** Terms at stride m: floor((N - 1) / m) - 1 second differences for ADEV, floor(N / m) - 2 modified terms. */
export function independentTerms(metric: IntervalMetric, phasePoints: number, m: number): number {
  return metric === 'oadev' ? Math.floor((phasePoints - 1) / m) - 1 : Math.floor(phasePoints / m) - 2;
}

export function deviationIntervals(
  metric: IntervalMetric,
  phasePoints: number,
  m: readonly number[],
  deviation: readonly number[],
  noise: readonly NoiseEstimate[],
  level: number = ONE_SIGMA_CONFIDENCE,
): DeviationInterval[] {
  return m.map((factor, i) => {
    const terms = independentTerms(metric, phasePoints, factor);
    const raw = edfOf(metric, noise[i], phasePoints, factor);
    const edf = Number.isFinite(raw) && raw > 0 ? raw : null;
    const value = deviation[i];
    const bounds = edf !== null && Number.isFinite(value) ? chiSquaredInterval(value, edf, level) : null;
    const reliable = edf !== null && terms >= MIN_INDEPENDENT_TERMS;
    return {
      edf,
      low: bounds?.low ?? null,
      high: bounds?.high ?? null,
      independentTerms: terms,
      reliable,
      usedInFits: reliable && edf !== null && edf >= FIT_MIN_EDF,
      noise: noise[i],
    };
  });
}

export interface DeviationConfidence extends DeviationInterval {
  /** Averaging factor tau / tau0 (the statistics are defined at whole m). */
  m: number;
}

/**
 * Edf and chi-squared interval of one overlapping ADEV, MDEV or TDEV value at tau, from a record of
 * `phasePoints` phase points spaced tau0 (for N fractional-frequency samples, N + 1), with the
 * noise type given (an alpha, or an estimate from identifyNoise). For comparisons made outside the
 * tables, e.g. a predicted deviation against a soak's value at the same tau.
 */
export function deviationConfidence(args: {
  metric: IntervalMetric;
  deviation: number;
  tau: number;
  tau0: number;
  phasePoints: number;
  noise: NoiseAlpha | NoiseEstimate;
  level?: number;
}): DeviationConfidence {
  const { metric, deviation, tau, tau0, phasePoints } = args;
  const where = 'deviationConfidence';
  if (metric !== 'oadev' && metric !== 'mdev' && metric !== 'tdev')
    throw new RangeError(`${where}: metric must be "oadev", "mdev" or "tdev", got ${JSON.stringify(metric)}`);
  if (!(tau0 > 0) || !Number.isFinite(tau0)) throw new RangeError(`${where}: tau0 must be a finite number > 0 (seconds), got ${tau0}`);
  const m = Math.round(tau / tau0);
  if (!(m >= 1) || Math.abs(tau / tau0 - m) > 1e-6 * m)
    throw new RangeError(`${where}: tau ${tau} s is not a whole multiple of tau0 ${tau0} s`);
  const need = metric === 'oadev' ? 2 * m + 1 : 3 * m;
  if (!Number.isSafeInteger(phasePoints) || phasePoints < need)
    throw new RangeError(`${where}: tau = ${m} tau0 needs at least ${need} phase points, got ${phasePoints}`);
  if (!(deviation >= 0) || !Number.isFinite(deviation))
    throw new RangeError(`${where}: deviation must be finite and >= 0, got ${deviation}`);
  const level = args.level ?? ONE_SIGMA_CONFIDENCE;
  if (!(level > 0 && level < 1)) throw new RangeError(`${where}: level must be between 0 and 1, got ${level}`);
  const noise: NoiseEstimate =
    typeof args.noise === 'number'
      ? { alpha: args.noise, type: NOISE_NAMES[args.noise], basis: 'assumed', method: 'given by the caller' }
      : args.noise;
  if (!(noise.alpha in NOISE_NAMES)) throw new RangeError(`${where}: noise alpha must be 2, 1, 0, -1 or -2, got ${String(noise.alpha)}`);
  const [interval] = deviationIntervals(metric, phasePoints, [m], [deviation], [noise], level);
  return { m, ...interval };
}
