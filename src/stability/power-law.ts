/**
 * Least-squares straight line through (log10 tau, log10 deviation): the exponent mu of
 * deviation ~ tau^mu identifies the dominant noise (white PM -1, white FM -1/2, flicker FM 0,
 * random-walk FM +1/2; NIST SP 1065 section 5.2.10).
 */
import { describeValue } from './validate.js';

export interface PowerLawFit {
  /** Exponent mu. */
  slope: number;
  /** log10 of the fitted deviation at tau = 1. */
  intercept: number;
  /** Points used. */
  points: number;
}

export function powerLawFit(taus: ArrayLike<number>, devs: ArrayLike<number>): PowerLawFit {
  const where = 'powerLawFit';
  requirePositiveSeries(where, 'taus', taus);
  requirePositiveSeries(where, 'devs', devs);
  if (taus.length !== devs.length) {
    throw new RangeError(`${where}: taus has ${taus.length} values but devs has ${devs.length}`);
  }
  if (taus.length < 2) throw new RangeError(`${where}: needs at least 2 points, got ${taus.length}`);
  const count = taus.length;
  let meanLogTau = 0;
  let meanLogDev = 0;
  for (let i = 0; i < count; i++) {
    meanLogTau += Math.log10(taus[i]);
    meanLogDev += Math.log10(devs[i]);
  }
  meanLogTau /= count;
  meanLogDev /= count;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < count; i++) {
    const dx = Math.log10(taus[i]) - meanLogTau;
    sxx += dx * dx;
    sxy += dx * (Math.log10(devs[i]) - meanLogDev);
  }
  if (sxx === 0) throw new RangeError(`${where}: all taus are equal, so no slope is defined`);
  const slope = sxy / sxx;
  return { slope, intercept: meanLogDev - slope * meanLogTau, points: count };
}

/** The exponent alone. */
export function powerLawSlope(taus: ArrayLike<number>, devs: ArrayLike<number>): number {
  return powerLawFit(taus, devs).slope;
}

function requirePositiveSeries(where: string, name: string, values: ArrayLike<number>): void {
  if (values === null || typeof values !== 'object' || typeof values.length !== 'number') {
    throw new TypeError(`${where}: ${name} must be an array of numbers, got ${describeValue(values)}`);
  }
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0) {
      throw new RangeError(`${where}: ${name}[${i}] is ${describeValue(v)}; a log-log fit needs finite values > 0`);
    }
  }
}
