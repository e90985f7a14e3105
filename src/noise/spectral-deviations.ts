/**
 * Time-domain stability from a fractional-frequency spectrum S_y(f) (one-sided, 1/Hz), by the
 * integral relations of NIST SP 1065 (Riley, Handbook of Frequency Stability Analysis, 2008):
 *
 *   Allan variance      sigma_y^2(tau) = 2 int_0^fh S_y(f) sin^4(pi f tau) / (pi f tau)^2 df
 *   modified Allan      Mod sigma_y^2(tau) = 2 int_0^fh S_y(f) sin^6(pi f tau) / (pi f tau)^4 df
 *                       (the limit of SP 1065's sum over n samples of tau0 = tau / n for n large)
 *   time deviation      TDEV(tau) = (tau / sqrt 3) Mod sigma_y(tau)
 *
 * fh is the measurement bandwidth: white and flicker PM diverge without it, so it is stated.
 * The integrand is split where it changes character: below f = 1 / tau the kernel is smooth and a
 * log-spaced Simpson rule follows S_y; from 1/tau to OSCILLATIONS/tau a uniform rule resolves
 * every oscillation of the kernel; above that the kernel is replaced by its mean over a period
 * (3/8 for sin^4, 5/16 for sin^6), which is exact in the limit and leaves S_y on a log grid.
 * Below LOW_EDGE / tau the kernel vanishes like f^2 or f^4 and the rest is left out: for the
 * steepest noise the integral allows (random-walk FM, f^-2) that drops about 3e-5 relative.
 */

/** S_y at f (Hz); must accept any f > 0. */
export type FrequencySpectrum = (f: number) => number;

/** The integral is taken from LOW_EDGE / tau; see the module header for what that leaves out. */
const LOW_EDGE = 1e-5;
/** Kernel periods resolved point by point above 1 / tau before the mean of the kernel takes over. */
const OSCILLATIONS = 40;
/** Points per kernel period in the resolved band (Simpson on a kernel with a period of 1/tau). */
const POINTS_PER_PERIOD = 24;
/** Points per decade of the log-spaced parts. */
const POINTS_PER_DECADE = 60;

export type DeviationKind = 'adev' | 'mdev';

/** sigma_y(tau) or Mod sigma_y(tau) of the spectrum, up to the bandwidth fh (Hz). */
export function deviationFromSpectrum(spectrum: FrequencySpectrum, tau: number, bandwidthHz: number, kind: DeviationKind): number {
  if (!(tau > 0) || !(bandwidthHz > 0))
    throw new RangeError(`deviationFromSpectrum: tau and the bandwidth must be positive (got ${tau}, ${bandwidthHz})`);
  const power = kind === 'adev' ? 4 : 6;
  const meanOfKernel = kind === 'adev' ? 3 / 8 : 5 / 16;
  const denominator = kind === 'adev' ? 2 : 4;
  const kernel = (f: number): number => {
    const x = Math.PI * f * tau;
    return Math.sin(x) ** power / x ** denominator;
  };
  const smoothKernel = (f: number): number => meanOfKernel / (Math.PI * f * tau) ** denominator;
  const low = LOW_EDGE / tau;
  const resolvedFrom = Math.min(1 / tau, bandwidthHz);
  const resolvedTo = Math.min(OSCILLATIONS / tau, bandwidthHz);
  let total = logSimpson((f) => spectrum(f) * kernel(f), low, resolvedFrom);
  if (resolvedTo > resolvedFrom)
    total += uniformSimpson(
      (f) => spectrum(f) * kernel(f),
      resolvedFrom,
      resolvedTo,
      Math.ceil((resolvedTo - resolvedFrom) * tau * POINTS_PER_PERIOD),
    );
  if (bandwidthHz > resolvedTo) total += logSimpson((f) => spectrum(f) * smoothKernel(f), resolvedTo, bandwidthHz);
  return Math.sqrt(2 * total);
}

/** TDEV(tau) = (tau / sqrt 3) Mod sigma_y(tau), in seconds. */
export function timeDeviationFromSpectrum(spectrum: FrequencySpectrum, tau: number, bandwidthHz: number): number {
  return (tau / Math.sqrt(3)) * deviationFromSpectrum(spectrum, tau, bandwidthHz, 'mdev');
}

/** Simpson's rule in ln f on [a, b] (the integrand written as f g(f) d ln f). */
function logSimpson(g: (f: number) => number, a: number, b: number): number {
  if (!(b > a)) return 0;
  const decades = Math.log10(b / a);
  let steps = Math.max(2, Math.ceil(decades * POINTS_PER_DECADE));
  if (steps % 2) steps++;
  const h = Math.log(b / a) / steps;
  let sum = 0;
  for (let i = 0; i <= steps; i++) {
    const f = a * Math.exp(i * h);
    const weight = i === 0 || i === steps ? 1 : i % 2 ? 4 : 2;
    sum += weight * f * g(f);
  }
  return (sum * h) / 3;
}

function uniformSimpson(g: (f: number) => number, a: number, b: number, wanted: number): number {
  let steps = Math.max(2, wanted);
  if (steps % 2) steps++;
  const h = (b - a) / steps;
  let sum = 0;
  for (let i = 0; i <= steps; i++) {
    const weight = i === 0 || i === steps ? 1 : i % 2 ? 4 : 2;
    sum += weight * g(a + i * h);
  }
  return (sum * h) / 3;
}
