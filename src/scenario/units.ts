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
 * | start-up margin m_j = |R_n| / R1_j of mode j | g_j = m_j d_j                              |
 * | coupling pull P (ppm) and angle alpha        | kappa = 2 P 1e-6 / eps, sigma = cos alpha, |
 * |                                             | rho = omega_0 sin alpha                    |
 * | drive level P_d (W) of a mode                | P_d = W_1 |a|^2 (W_1: watts at |a| = 1)    |
 *
 * Why these forms:
 * - Detuning: 2 eps omega^2 Delta x shifts the squared frequency by that amount, i.e. the
 *   frequency by the relative amount eps * Delta to first order, so delta = eps * Delta.
 * - Quality: a resonator x'' + (omega/Q) x' + omega^2 x = 0 has quality Q; in the model the
 *   mode's own damping coefficient in x'' is eps * d, so eps * d = omega / Q.
 *   (The net linear growth rate of a lone mode is eps * (g - d) / 2; the gain g is not a Q.)
 * - Start-up margin: the sustaining circuit's negative resistance and the mode's R1 act on the
 *   same motional current, so their rates stand in the ratio of the resistances: eps g_j is the
 *   small-signal growth that |R_n| gives, eps d_j the loss R1_j gives, and g_j / d_j = |R_n| / R1_j
 *   (docs/parts.md, 'Sustaining circuit').
 * - Coupling pull: one link of weight 1 shifts a node's phase at the rate
 *   (eps/2) kappa |sigma - i rho/omega| sin(psi - alpha) at equal amplitudes (docs/model.md, 'Phase
 *   equations'), so P = (eps/2) kappa |sigma - i rho/omega_0| is the largest frequency shift
 *   (relative) one link can impose, and alpha = atan(rho / (omega_0 sigma)) splits it into its
 *   reactive and dissipative parts. The pair locking range is 2 P cos alpha.
 * - Drive level: the model amplitude |a| is the motional charge in units of a fixed reference
 *   charge, so the power R1 I_rms^2 the crystal dissipates grows as |a|^2.
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

/** Start-up margin m_j = |R_n| / R1_j of a mode with extra loss d_j -> its gain g_j. */
export function startupMarginToGain(margin: number, loss: number): number {
  requirePositive('startup margin', margin);
  requirePositive('loss', loss);
  return margin * loss;
}

/** Gain g_j and extra loss d_j -> the start-up margin g_j / d_j (Infinity for d = 0). */
export function gainToStartupMargin(gain: number, loss: number): number {
  requireFinite('gain', gain);
  requireFinite('loss', loss);
  if (loss < 0) throw new RangeError(`loss must be >= 0 to have a start-up margin (got ${loss})`);
  return loss === 0 ? Infinity : gain / loss;
}

/** The coupling as an engineer states it: the largest pull one link exerts and the coupling angle. */
export interface CouplingPull {
  /** P: the largest relative frequency shift (ppm) one link of weight 1 imposes at equal amplitudes. */
  pullPpm: number;
  /** alpha in radians: 0 purely dissipative, pi/2 purely reactive (capacitive-like), negative inductive-like. */
  angle: number;
}

/** Pull P (ppm) and angle alpha -> kappa, rho, sigma with |sigma - i rho/omega_0| = 1. */
export function pullToCoupling(
  pull: CouplingPull,
  eps: number,
  omega0: number,
): { strength: number; reactive: number; dissipative: number } {
  requireFinite('pullPpm', pull.pullPpm);
  if (pull.pullPpm < 0) throw new RangeError(`pullPpm must be >= 0 (got ${pull.pullPpm})`);
  requireFinite('angle', pull.angle);
  requirePositive('epsilon', eps);
  requirePositive('omega0', omega0);
  return { strength: (2 * pull.pullPpm * PPM) / eps, reactive: omega0 * Math.sin(pull.angle), dissipative: Math.cos(pull.angle) };
}

/** kappa, rho, sigma -> pull P (ppm) and angle alpha (inverse of pullToCoupling up to the split of kappa). */
export function couplingToPull(
  coupling: { strength: number; reactive: number; dissipative: number },
  eps: number,
  omega0: number,
): CouplingPull {
  requireFinite('strength', coupling.strength);
  requireFinite('reactive', coupling.reactive);
  requireFinite('dissipative', coupling.dissipative);
  requireFinite('epsilon', eps);
  requirePositive('omega0', omega0);
  const r = coupling.reactive / omega0;
  const size = Math.hypot(coupling.dissipative, r);
  const signed = coupling.strength < 0 ? -1 : 1;
  return { pullPpm: ((eps / 2) * Math.abs(coupling.strength) * size) / PPM, angle: Math.atan2(signed * r, signed * coupling.dissipative) };
}

/** Model amplitude |a| -> drive level in W, given the drive level W_1 at |a| = 1. */
export function amplitudeToDriveLevel(amplitude: number, wattsAtUnitAmplitude: number): number {
  requireFinite('amplitude', amplitude);
  requirePositive('wattsAtUnitAmplitude', wattsAtUnitAmplitude);
  return wattsAtUnitAmplitude * amplitude * amplitude;
}

/** Drive level in W -> model amplitude |a| (inverse of amplitudeToDriveLevel). */
export function driveLevelToAmplitude(watts: number, wattsAtUnitAmplitude: number): number {
  requireFinite('watts', watts);
  if (watts < 0) throw new RangeError(`watts must be >= 0 (got ${watts})`);
  requirePositive('wattsAtUnitAmplitude', wattsAtUnitAmplitude);
  return Math.sqrt(watts / wattsAtUnitAmplitude);
}
