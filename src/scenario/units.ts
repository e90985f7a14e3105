/**
 * Engineering units <-> the dimensionless reference model. This is the only place the mapping
 * is written down in code; the scenario parser and everything that displays or accepts physical
 * units use these functions.
 *
 * Reference model (per node k, mode j):  x'' + omega_j^2 x = eps * F,  with F containing
 *   -d_j x'                       the mode's extra loss, and
 *   -2 omega_j^2 Delta_k x        the node's detuning.
 *
 * | engineering quantity                        | dimensionless quantity                     |
 * |---------------------------------------------|--------------------------------------------|
 * | node frequency offset delta_k in ppm        | Delta_k = ppm * 1e-6 / eps                 |
 * | mode offset from mode 0 in ppm              | omega_j = omega_0 * (1 + ppm * 1e-6)       |
 * | mode quality factor Q_j                     | d_j = omega_j / (eps * Q_j)                |
 * | nominal frequency f0 (Hz) of mode 0         | one period 2 pi / omega_0 of tau = 1/f0 s  |
 *
 * Why these forms:
 * - Detuning: 2 eps omega^2 Delta x shifts the squared frequency by that amount, i.e. the
 *   frequency by the relative amount eps * Delta to first order, so delta = eps * Delta.
 * - Quality: a resonator x'' + (omega/Q) x' + omega^2 x = 0 has quality Q; in the model the
 *   mode's own damping coefficient in x'' is eps * d, so eps * d = omega / Q.
 *   (The net linear growth rate of a lone mode is eps * (g - d) / 2; the gain g is not a Q.)
 * - Time: tau is scaled so that mode 0 oscillates at omega_0 rad per unit tau, and mode 0 stands
 *   for f0 Hz, so seconds = tau * omega_0 / (2 pi f0).
 * All mappings are exact inverses of each other (up to rounding); eps = 0 has no ppm or Q
 * mapping because the perturbation vanishes.
 */

const PPM = 1e-6;
const TWO_PI = 2 * Math.PI;

/** The nominal frequency f0 that stands in when a scenario gives no `nominalFrequencyHz`. */
export const DEFAULT_NOMINAL_FREQUENCY_HZ = 10e6;

/**
 * Said beside a reading in seconds (or ns, ms, ...) when the scenario gave no nominal frequency:
 * every such reading scales with 1/f0, so it is only as good as the default. One wording for
 * the dashboard, the report and the command line.
 */
export const ASSUMED_FREQUENCY_TAG = `at an assumed ${DEFAULT_NOMINAL_FREQUENCY_HZ / 1e6} MHz`;

/** The same assumption as a sentence with its reason, for notes and headers. */
export const ASSUMED_FREQUENCY_NOTE = `The scenario gives no nominalFrequencyHz, so every time in seconds assumes f0 = ${DEFAULT_NOMINAL_FREQUENCY_HZ / 1e6} MHz.`;

function requirePositive(name: string, value: number): void {
  if (!(Number.isFinite(value) && value > 0)) {
    throw new RangeError(`${name} must be a finite number > 0 (got ${value})`);
  }
}

function requireFinite(name: string, value: number): void {
  if (!Number.isFinite(value)) throw new RangeError(`${name} must be a finite number (got ${value})`);
}

/** Node frequency offset in ppm -> Delta_k. */
export function ppmToDelta(ppm: number, eps: number): number {
  requireFinite('ppm', ppm);
  requirePositive('epsilon', eps);
  return (ppm * PPM) / eps;
}

/** Delta_k -> node frequency offset in ppm. */
export function deltaToPpm(delta: number, eps: number): number {
  requireFinite('delta', delta);
  requirePositive('epsilon', eps);
  return (delta * eps) / PPM;
}

/** Quality factor Q_j of a mode with frequency omega_j -> its extra loss d_j. */
export function qualityToLoss(quality: number, omega: number, eps: number): number {
  requirePositive('quality', quality);
  requirePositive('omega', omega);
  requirePositive('epsilon', eps);
  return omega / (eps * quality);
}

/** Extra loss d_j of a mode with frequency omega_j -> its quality factor (Infinity for d = 0). */
export function lossToQuality(loss: number, omega: number, eps: number): number {
  requireFinite('loss', loss);
  if (loss < 0) throw new RangeError(`loss must be >= 0 to have a quality factor (got ${loss})`);
  requirePositive('omega', omega);
  requirePositive('epsilon', eps);
  return loss === 0 ? Infinity : omega / (eps * loss);
}

/** Mode offset in ppm above mode 0 -> omega_j (use omega0 = 1 for mode 0 itself). */
export function offsetPpmToOmega(ppm: number, omega0: number): number {
  requireFinite('ppm', ppm);
  requirePositive('omega0', omega0);
  return omega0 * (1 + ppm * PPM);
}

/** omega_j -> its offset in ppm above mode 0 (inverse of offsetPpmToOmega). */
export function omegaToOffsetPpm(omega: number, omega0: number): number {
  requireFinite('omega', omega);
  requirePositive('omega0', omega0);
  return (omega / omega0 - 1) / PPM;
}

/** Dimensionless time -> seconds, given the frequency in Hz that mode 0 (at omega0) stands for. */
export function tauToSeconds(tau: number, nominalFrequencyHz: number, omega0: number): number {
  requireFinite('tau', tau);
  requirePositive('nominalFrequencyHz', nominalFrequencyHz);
  requirePositive('omega0', omega0);
  return (tau * omega0) / (TWO_PI * nominalFrequencyHz);
}

/** Seconds -> dimensionless time (inverse of tauToSeconds). */
export function secondsToTau(seconds: number, nominalFrequencyHz: number, omega0: number): number {
  requireFinite('seconds', seconds);
  requirePositive('nominalFrequencyHz', nominalFrequencyHz);
  requirePositive('omega0', omega0);
  return (seconds * TWO_PI * nominalFrequencyHz) / omega0;
}
