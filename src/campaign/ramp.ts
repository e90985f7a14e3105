import type { ModelParameters } from '../model/parameters.js';
import { PERTURBATION_ACTIONS, type Perturbation } from '../session/perturbation.js';

/**
 * A fault that ramps (README in this folder, 'Ramps'): its parameters move in a straight line from
 * the values they replace to the fault's own over `ramp`, in RAMP_STEPS equal steps at the tick
 * boundaries. It is carried on even when a later fault cuts the ramping fault's judging short,
 * like a restore.
 */

/**
 * Steps of a ramp. Every step is a perturbation batch (an event in the log, a live prediction),
 * so a ramp is a fine staircase rather than a new value at every tick: 2 % of the change per
 * step, well inside the range a locked ring follows without being kicked out.
 */
export const RAMP_STEPS = 50;
export interface ActiveRamp {
  id: string;
  start: number;
  end: number;
  /** The values replaced, and the values reached, both as explicit perturbations of the same action. */
  from: Perturbation;
  to: Perturbation;
  /** Steps taken so far. */
  taken: number;
}

/** How many of the ramp's steps are due by the tick starting at tau (RAMP_STEPS at the end). */
export function rampStepsDue(ramp: ActiveRamp, tau: number): number {
  const f = (tau - ramp.start) / (ramp.end - ramp.start);
  return f >= 1 - 1e-12 ? RAMP_STEPS : Math.max(0, Math.floor(f * RAMP_STEPS + 1e-9));
}

/** Actions a ramp can carry: every one that sets a number (link actions as their weight). */
export const RAMPED_ACTIONS: readonly Perturbation['action'][] = PERTURBATION_ACTIONS.filter((a) => a !== 'kick-mode');

/** The fault's target written with explicit values (breaking a link is its weight going to 0). */
export function rampTarget(p: Perturbation, model: ModelParameters): Perturbation {
  switch (p.action) {
    case 'break-link':
      return { action: 'set-link-weight', from: p.from, to: p.to, weight: 0 };
    case 'restore-link':
      return { action: 'set-link-weight', from: p.from, to: p.to, weight: model.linkNominal[model.findLink(p.from, p.to)] };
    default:
      return p;
  }
}

const between = (a: number | undefined, b: number | undefined, f: number): number | undefined =>
  a === undefined || b === undefined ? b : a + (b - a) * f;

/** The perturbation a fraction f (0 to 1) of the way from `from` to `to` (same action; f = 1 gives `to` exactly). */
export function rampValue(from: Perturbation, to: Perturbation, f: number): Perturbation {
  if (f >= 1) return to;
  if (from.action === 'set-detuning' && to.action === 'set-detuning') return { ...to, delta: between(from.delta, to.delta, f)! };
  if (from.action === 'set-link-weight' && to.action === 'set-link-weight') return { ...to, weight: between(from.weight, to.weight, f)! };
  if (from.action === 'set-coupling' && to.action === 'set-coupling')
    return {
      action: 'set-coupling',
      strength: between(from.strength, to.strength, f),
      reactive: between(from.reactive, to.reactive, f),
      dissipative: between(from.dissipative, to.dissipative, f),
    };
  if (from.action === 'set-noise' && to.action === 'set-noise')
    return {
      action: 'set-noise',
      intensity: between(from.intensity, to.intensity, f),
      detuningWalk: between(from.detuningWalk, to.detuningWalk, f),
    };
  throw new RangeError(`a ramp needs one action at both ends (got ${from.action} and ${to.action})`);
}
