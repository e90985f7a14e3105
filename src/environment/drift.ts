/**
 * Slow, deterministic frequency changes of each part over board time t (seconds from the start
 * of the run), as fractional frequency (README 'Temperature, aging and supply'):
 * - temperature: the part at T_k(t) = ambient(t) + offsetsC[k] follows its curve
 *   ppm = a1 d + a2 d^2 + a3 d^3, d = T_k - inflectionC (the usual cubic of AT-cut crystals about
 *   its inflection point); the node's scenario detuning is its offset at the inflection point;
 * - aging from the start of the run: A ln(1 + t / t1) ppm (the common logarithmic law) or a
 *   constant rate in ppm per day;
 * - supply pushing: pushingPpmPerV (V(t) - nominalV).
 */
import type { AgingSpec, EnvironmentSpec, ProfileSpec, TemperatureCurve } from '../scenario/types.js';
import { SECONDS_PER_DAY } from '../scenario/environment.js';

const PPM = 1e-6;

/** The profile's value at t: start, plus every step already taken and every ramp's share so far, plus the cycle. */
export function profileValue(p: ProfileSpec, t: number): number {
  let value = p.start;
  for (const c of p.changes) {
    if (t < c.at) continue;
    value += c.over > 0 ? c.by * Math.min(1, (t - c.at) / c.over) : c.by;
  }
  if (p.cycle) value += p.cycle.amplitude * Math.sin((2 * Math.PI * (t + p.cycle.phaseS)) / p.cycle.periodS);
  return value;
}

/** Frequency offset in ppm of a part at temperature celsius. */
export function curvePpm(curve: TemperatureCurve, celsius: number): number {
  const d = celsius - curve.inflectionC;
  return d * (curve.a1PpmPerC + d * (curve.a2PpmPerC2 + d * curve.a3PpmPerC3));
}

/** Aging in ppm after t seconds. */
export function agingPpm(aging: AgingSpec, t: number): number {
  return 'ppmPerDay' in aging ? (aging.ppmPerDay * t) / SECONDS_PER_DAY : aging.logPpm * Math.log1p(t / aging.timeConstantS);
}

/** Node k's fractional frequency offset from its environment at board time t. */
export function environmentFrequency(env: EnvironmentSpec, k: number, t: number): number {
  let ppm = 0;
  if (env.temperature) ppm += curvePpm(env.temperature.curves[k], profileValue(env.temperature.ambient, t) + env.temperature.offsetsC[k]);
  if (env.aging) ppm += agingPpm(env.aging[k], t);
  if (env.supply) ppm += env.supply.pushingPpmPerV[k] * (profileValue(env.supply.voltage, t) - env.supply.nominalV);
  return ppm * PPM;
}
