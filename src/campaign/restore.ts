import type { ModelParameters, MutableParameterValues } from '../model/parameters.js';
import type { Perturbation } from '../session/perturbation.js';

/**
 * "restore": "previous" puts back the values a fault replaced. They are read when the fault is
 * queued; faults queued in the same tick see each other's changes through a view, a copy of the
 * mutable parameters (ModelParameters.mutableValues) that the queued perturbations are applied
 * to in order.
 */
type ParameterView = MutableParameterValues;

/** The perturbation that undoes `p` given the values before it (null for a kick: nothing to undo). */
export function previousValuesOf(p: Perturbation, view: ParameterView, model: ModelParameters): Perturbation | null {
  switch (p.action) {
    case 'set-detuning':
      return { action: 'set-detuning', node: p.node, delta: view.detuning[p.node] };
    case 'set-link-weight':
    case 'break-link':
    case 'restore-link':
      return { action: 'set-link-weight', from: p.from, to: p.to, weight: view.linkWeight[model.findLink(p.from, p.to)] };
    case 'set-coupling': {
      const undo: Perturbation = { action: 'set-coupling' };
      if (p.strength !== undefined) undo.strength = view.strength;
      if (p.reactive !== undefined) undo.reactive = view.reactive;
      if (p.dissipative !== undefined) undo.dissipative = view.dissipative;
      return undo;
    }
    case 'set-noise': {
      const undo: Perturbation = { action: 'set-noise' };
      if (p.intensity !== undefined) undo.intensity = view.noiseIntensity;
      if (p.detuningWalk !== undefined) undo.detuningWalk = view.detuningWalk;
      return undo;
    }
    case 'kick-mode':
      return null;
  }
}

/** What `p` does to the parameters (the session applies the same at the tick boundary). */
export function applyToView(p: Perturbation, view: ParameterView, model: ModelParameters): void {
  switch (p.action) {
    case 'set-detuning':
      view.detuning[p.node] = p.delta;
      return;
    case 'set-link-weight':
      view.linkWeight[model.findLink(p.from, p.to)] = p.weight;
      return;
    case 'break-link':
      view.linkWeight[model.findLink(p.from, p.to)] = 0;
      return;
    case 'restore-link': {
      const e = model.findLink(p.from, p.to);
      view.linkWeight[e] = model.linkNominal[e];
      return;
    }
    case 'set-coupling':
      if (p.strength !== undefined) view.strength = p.strength;
      if (p.reactive !== undefined) view.reactive = p.reactive;
      if (p.dissipative !== undefined) view.dissipative = p.dissipative;
      return;
    case 'set-noise':
      if (p.intensity !== undefined) view.noiseIntensity = p.intensity;
      if (p.detuningWalk !== undefined) view.detuningWalk = p.detuningWalk;
      return;
    case 'kick-mode':
      return;
  }
}

/** Actions that mean something to an uncoupled reference ring (same parts, no coupling). */
export function appliesToUncoupled(p: Perturbation): boolean {
  return p.action === 'set-detuning' || p.action === 'set-noise' || p.action === 'kick-mode';
}
