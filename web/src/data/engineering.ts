import { ASSUMED_FREQUENCY_TAG, deltaToPpm, ppmToDelta, tauToSeconds } from '../../../src/scenario/units.js';
import type { SessionInfo } from '../../../src/protocol/messages.js';

/**
 * Engineering readings of dimensionless quantities for display. The mapping itself lives in
 * src/scenario/units.ts; this file only chains and formats it.
 */

export interface RunScales {
  epsilon: number;
  nominalFrequencyHz: number;
  /** The scenario gave no nominal frequency: seconds rest on the default and say so. */
  nominalFrequencyAssumed: boolean;
  /** omega_0 */
  omega0: number;
}

/** What converting a dimensionless time to seconds needs. */
type TimeScales = Omit<RunScales, 'nominalFrequencyAssumed'>;

/** The scales of a session (a server older than nominalFrequencyAssumed sends none: read as given). */
export function runScalesOf(session: SessionInfo): RunScales {
  return {
    epsilon: session.epsilon,
    nominalFrequencyHz: session.nominalFrequencyHz,
    nominalFrequencyAssumed: session.nominalFrequencyAssumed === true,
    omega0: session.omega[0],
  };
}

/** What the seconds of a run rest on, e.g. "at 10 MHz" or "at an assumed 10 MHz". */
export function frequencyBasis(scales: Pick<RunScales, 'nominalFrequencyHz' | 'nominalFrequencyAssumed'>): string {
  return scales.nominalFrequencyAssumed ? ASSUMED_FREQUENCY_TAG : `at ${formatHz(scales.nominalFrequencyHz)}`;
}

/**
 * Simulated (board) seconds, with the assumption beside them when the scenario gave no nominal
 * frequency; wall-clock durations use formatSeconds alone.
 */
export function formatSimulatedSeconds(seconds: number, scales: Pick<RunScales, 'nominalFrequencyAssumed'>): string {
  return scales.nominalFrequencyAssumed ? `${formatSeconds(seconds)} ${ASSUMED_FREQUENCY_TAG}` : formatSeconds(seconds);
}

/**
 * A stability margin (slow-time units^-1) as a time constant in slow units, carrier periods and
 * seconds: the formula of timeConstantOf in src/predict/describe.ts, which needs a whole guide
 * model; the dashboard only has the session's scales.
 */
export function marginTimeConstant(
  margin: number,
  scales: TimeScales,
): { slow: number; tau: number; periods: number; seconds: number } | null {
  if (!(Math.abs(margin) > 0) || !(scales.epsilon > 0)) return null;
  const slow = 1 / Math.abs(margin);
  const tau = slow / scales.epsilon;
  return {
    slow,
    tau,
    periods: (tau * scales.omega0) / (2 * Math.PI),
    seconds: tauToSeconds(tau, scales.nominalFrequencyHz, scales.omega0),
  };
}

/** Delta_k -> ppm, or null when eps = 0 has no ppm reading. */
export function ppmOf(delta: number, epsilon: number): number | null {
  return epsilon > 0 && Number.isFinite(delta) ? deltaToPpm(delta, epsilon) : null;
}

/** ppm -> Delta_k, or null when eps = 0. */
export function deltaOf(ppm: number, epsilon: number): number | null {
  return epsilon > 0 && Number.isFinite(ppm) ? ppmToDelta(ppm, epsilon) : null;
}

/** A dimensionless rate r (per slow unit, like eps*kappa) as a relative frequency in ppm: eps * r. */
export function rateAsPpm(rate: number, epsilon: number): number {
  return rate * epsilon * 1e6;
}

/** Simulated seconds per wall second at a pace given in slow-time units per second. */
export function simulatedSecondsPerSecond(slowPerSecond: number, scales: TimeScales): number | null {
  if (!(scales.epsilon > 0) || !Number.isFinite(slowPerSecond)) return null;
  return tauToSeconds(slowPerSecond / scales.epsilon, scales.nominalFrequencyHz, scales.omega0);
}

/** Seconds with a unit that keeps 3 significant digits readable: ns .. h. */
export function formatSeconds(seconds: number): string {
  if (!Number.isFinite(seconds)) return '—';
  const a = Math.abs(seconds);
  if (a === 0) return '0 s';
  if (a < 1e-6) return `${(seconds * 1e9).toPrecision(3)} ns`;
  if (a < 1e-3) return `${(seconds * 1e6).toPrecision(3)} µs`;
  if (a < 1) return `${(seconds * 1e3).toPrecision(3)} ms`;
  if (a < 120) return `${seconds.toPrecision(3)} s`;
  if (a < 7200) return `${(seconds / 60).toPrecision(3)} min`;
  return `${(seconds / 3600).toPrecision(3)} h`;
}

/** A number with a sensible number of significant digits, in plain or exponent form. */
export function formatNumber(value: number | null | undefined, digits = 3): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  if (value === 0) return '0';
  const a = Math.abs(value);
  if (a >= 1e5 || a < 1e-3) return value.toExponential(digits - 1).replace('e+', 'e');
  return Number(value.toPrecision(digits)).toString();
}

/** A signed value, e.g. "+0.120". */
export function formatSigned(value: number | null | undefined, digits = 3): string {
  const text = formatNumber(value, digits);
  return value !== null && value !== undefined && value > 0 ? `+${text}` : text;
}

/** Frequency in Hz with an SI prefix. */
export function formatHz(hz: number): string {
  if (hz >= 1e9) return `${formatNumber(hz / 1e9)} GHz`;
  if (hz >= 1e6) return `${formatNumber(hz / 1e6)} MHz`;
  if (hz >= 1e3) return `${formatNumber(hz / 1e3)} kHz`;
  return `${formatNumber(hz)} Hz`;
}

/** An angle in radians as a multiple of pi, e.g. "0.40π". */
export function formatPhase(radians: number): string {
  const turns = radians / Math.PI;
  return `${Math.abs(turns) < 0.005 ? '0' : turns.toFixed(2)}π`;
}
