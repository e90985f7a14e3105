/**
 * Power-law noise identification per averaging time by the lag-1 autocorrelation method
 * (W. J. Riley and C. A. Greenhall, "Power law noise identification using the lag 1
 * autocorrelation", 18th EFTF, 2004; from memory, cross-read with allantools'
 * autocorr_noise_id): phase x decimated by m, its quadratic trend removed (frequency offset and
 * drift); while rho = r1 / (1 + r1) >= 0.25 and fewer than 2 differences were taken, difference
 * once more; then the phase exponent p = -2 (rho + d) and alpha = p + 2 (S_x ~ f^(alpha - 2)),
 * rounded to the nearest power-law type. It needs about 30 points or more after decimation;
 * where there are fewer, the type is carried over from the longest tau that had enough and
 * marked as assumed.
 *
 * Flicker noise is where the method is weakest at the record lengths of a soak: on seeded flicker
 * PM of 65 and 257 points the estimate averaged 1.6 and 1.35, on flicker FM -1.4 (measured, 200
 * series each), so a third to most of them round to the neighbouring white or random-walk type.
 * An estimate that is not within CLEAR_MARGIN of a whole number therefore names both neighbours
 * (`candidates`), and the interval takes the one with fewer degrees of freedom: wider, never
 * narrower than the data support.
 */
import { NOISE_NAMES, type NoiseAlpha } from './edf.js';

/** Fewest decimated phase points the lag-1 method is trusted on (Riley and Greenhall: about 30). */
export const NOISE_ID_MIN_POINTS = 30;

/**
 * An estimate within this of a whole alpha names that type alone; farther off it names both
 * neighbours. 0.25 leaves the white types (estimates within 0.1-0.2 of 2, 0 and -2 in the
 * measurements above) one type and catches the flicker estimates that drift half-way.
 */
export const CLEAR_MARGIN = 0.25;

export interface NoiseEstimate {
  /** Exponent of S_y(f) ~ f^alpha, a whole number from -2 to 2. */
  alpha: NoiseAlpha;
  /** "white PM", "flicker PM", "white FM", "flicker FM" or "random-walk FM". */
  type: string;
  /** identified at this tau, or assumed (carried over, or a stated default). */
  basis: 'identified' | 'assumed';
  /** How: the method, or where the assumption comes from. */
  method: string;
  /** The unrounded estimate of alpha, when identified. */
  estimate?: number;
  /**
   * The types the estimate cannot tell apart (alpha and a neighbour), when it lies farther than
   * CLEAR_MARGIN from a whole number; intervals use the one with fewer degrees of freedom.
   */
  candidates?: NoiseAlpha[];
}

/** The lag-1 estimate of alpha from phase data at averaging factor m, or null below NOISE_ID_MIN_POINTS points. */
export function lag1NoiseAlpha(x: ArrayLike<number>, m: number): number | null {
  const count = Math.floor((x.length - 1) / m) + 1;
  if (count < NOISE_ID_MIN_POINTS) return null;
  let z: Float64Array = new Float64Array(count);
  for (let i = 0; i < count; i++) z[i] = x[i * m];
  z = removeQuadratic(z);
  for (let d = 0; ; d++) {
    const r1 = lag1Autocorrelation(z);
    const rho = r1 / (1 + r1);
    if (rho < 0.25 || d >= 2) return -2 * (rho + d) + 2;
    z = difference(z);
  }
}

/**
 * The noise type at each averaging factor: identified where the decimated record is long
 * enough, otherwise the type of the longest identified tau below it (or, with none, `fallback`),
 * marked assumed.
 */
export function identifyNoise(x: ArrayLike<number>, mValues: readonly number[], fallback: NoiseAlpha = 0): NoiseEstimate[] {
  const out: NoiseEstimate[] = [];
  let last: NoiseEstimate | null = null;
  let lastTauIndex = -1;
  for (const [i, m] of mValues.entries()) {
    const estimate = lag1NoiseAlpha(x, m);
    if (estimate !== null && Number.isFinite(estimate)) {
      const alpha = roundAlpha(estimate);
      const candidates = ambiguousTypes(estimate);
      last = {
        alpha,
        type: NOISE_NAMES[alpha],
        basis: 'identified',
        method:
          `lag-1 autocorrelation (alpha ${estimate.toFixed(2)})` +
          (candidates ? `, between ${candidates.map((a) => NOISE_NAMES[a]).join(' and ')}: the interval takes the wider` : ''),
        estimate,
        ...(candidates ? { candidates } : {}),
      };
      lastTauIndex = i;
      out.push(last);
    } else if (last) {
      out.push({
        alpha: last.alpha,
        type: last.type,
        ...(last.candidates ? { candidates: last.candidates } : {}),
        basis: 'assumed',
        method: `carried over from m = ${mValues[lastTauIndex]} (fewer than ${NOISE_ID_MIN_POINTS} points at this tau to identify it)`,
      });
    } else {
      out.push({
        alpha: fallback,
        type: NOISE_NAMES[fallback],
        basis: 'assumed',
        method: `default (the record is too short to identify the noise: fewer than ${NOISE_ID_MIN_POINTS} points)`,
      });
    }
  }
  return out;
}

/** Both neighbouring types of an estimate that is not clearly one of them, or null. */
function ambiguousTypes(estimate: number): NoiseAlpha[] | null {
  const clamped = Math.max(-2, Math.min(2, estimate));
  if (Math.abs(clamped - Math.round(clamped)) <= CLEAR_MARGIN) return null;
  return [Math.floor(clamped) as NoiseAlpha, Math.ceil(clamped) as NoiseAlpha];
}

function roundAlpha(estimate: number): NoiseAlpha {
  return Math.max(-2, Math.min(2, Math.round(estimate))) as NoiseAlpha;
}

export function lag1Autocorrelation(z: ArrayLike<number>): number {
  let mean = 0;
  for (let i = 0; i < z.length; i++) mean += z[i];
  mean /= z.length;
  let num = 0;
  let den = 0;
  for (let i = 0; i < z.length; i++) {
    const d = z[i] - mean;
    den += d * d;
    if (i + 1 < z.length) num += d * (z[i + 1] - mean);
  }
  return den > 0 ? num / den : 0;
}

function difference(z: Float64Array): Float64Array {
  const out = new Float64Array(z.length - 1);
  for (let i = 0; i < out.length; i++) out[i] = z[i + 1] - z[i];
  return out;
}

/** z minus its least-squares parabola in the index (Legendre-like orthogonal basis on the centred index). */
function removeQuadratic(z: Float64Array): Float64Array {
  const n = z.length;
  const c = (n - 1) / 2;
  // basis 1, u = i - c, v = u^2 - mean(u^2): mutually orthogonal over symmetric i
  let meanU2 = 0;
  for (let i = 0; i < n; i++) meanU2 += (i - c) ** 2;
  meanU2 /= n;
  let s0 = 0;
  let su = 0;
  let suu = 0;
  let sv = 0;
  let svv = 0;
  for (let i = 0; i < n; i++) {
    const u = i - c;
    const v = u * u - meanU2;
    s0 += z[i];
    su += z[i] * u;
    suu += u * u;
    sv += z[i] * v;
    svv += v * v;
  }
  const a0 = s0 / n;
  const a1 = suu > 0 ? su / suu : 0;
  const a2 = svv > 0 ? sv / svv : 0;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const u = i - c;
    out[i] = z[i] - a0 - a1 * u - a2 * (u * u - meanU2);
  }
  return out;
}
