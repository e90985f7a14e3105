import type { ModelParameters } from '../model/parameters.js';
import { ppmToDelta } from '../scenario/units.js';
import { child, fieldChecks, has, type JsonObject } from '../util/json-fields.js';
import { InputError } from '../util/input-error.js';

/**
 * Perturbations an operator, a fault schedule or a test applies to a running co-simulation.
 * They are validated against the model (node and mode indices, existing links) before they are
 * queued, and applied at the next tick boundary to the full and the guiding system alike.
 */
export type Perturbation =
  | { action: 'set-detuning'; node: number; delta: number }
  | { action: 'set-link-weight'; from: number; to: number; weight: number }
  | { action: 'break-link'; from: number; to: number }
  | { action: 'restore-link'; from: number; to: number }
  | { action: 'set-coupling'; strength?: number; reactive?: number; dissipative?: number }
  | { action: 'set-noise'; intensity?: number; detuningWalk?: number }
  | { action: 'kick-mode'; node: number; mode: number; amount: number; phase: number };

export type PerturbationAction = Perturbation['action'];

export const PERTURBATION_ACTIONS: readonly PerturbationAction[] = [
  'set-detuning',
  'set-link-weight',
  'break-link',
  'restore-link',
  'set-coupling',
  'set-noise',
  'kick-mode',
];

const { expectObject, required, finiteNumber, integer, inRange, atLeast, numberField } = fieldChecks();

/**
 * Validate a raw perturbation (JSON) against the model. `extraFields` are tolerated at the top
 * level (a wire command carries `type` and an id beside the perturbation's own fields).
 * Detuning may be given as `delta` (Delta_k) or `ppm` (mapped with the scenario's eps).
 */
export function parsePerturbation(raw: unknown, params: ModelParameters, path = '', extraFields: readonly string[] = []): Perturbation {
  const allowedFor: Record<PerturbationAction, string[]> = {
    'set-detuning': ['node', 'delta', 'ppm'],
    'set-link-weight': ['from', 'to', 'weight'],
    'break-link': ['from', 'to'],
    'restore-link': ['from', 'to'],
    'set-coupling': ['strength', 'reactive', 'dissipative'],
    'set-noise': ['intensity', 'detuningWalk'],
    'kick-mode': ['node', 'mode', 'amount', 'phase'],
  };
  const head = expectObject(raw, path, ['action', ...PERTURBATION_ACTIONS.flatMap((a) => allowedFor[a]), ...extraFields]);
  const action = required(head, 'action', path);
  if (typeof action !== 'string' || !(PERTURBATION_ACTIONS as readonly string[]).includes(action)) {
    throw new InputError(child(path, 'action'), `must be one of ${PERTURBATION_ACTIONS.join(', ')} (got ${JSON.stringify(action)})`);
  }
  const obj = expectObject(raw, path, ['action', ...allowedFor[action as PerturbationAction], ...extraFields]);
  const node = (key = 'node'): number =>
    inRange(integer(required(obj, key, path), child(path, key)), child(path, key), 0, params.nodes - 1);
  const link = (): { from: number; to: number } => {
    const from = node('from');
    const to = node('to');
    if (params.findLink(from, to) < 0) {
      throw new InputError(path, `there is no link from node ${from} to node ${to} in this network`);
    }
    return { from, to };
  };
  const optional = (key: string, min?: number): number | undefined => {
    if (!has(obj, key)) return undefined;
    const value = finiteNumber(obj[key], child(path, key));
    return min === undefined ? value : atLeast(value, child(path, key), min);
  };
  switch (action as PerturbationAction) {
    case 'set-detuning': {
      const k = node();
      if (has(obj, 'delta') === has(obj, 'ppm')) throw new InputError(path, 'give exactly one of delta or ppm');
      if (has(obj, 'delta')) return { action: 'set-detuning', node: k, delta: finiteNumber(obj.delta, child(path, 'delta')) };
      if (!(params.epsilon > 0)) throw new InputError(child(path, 'ppm'), 'needs epsilon > 0 to map ppm to Delta');
      return { action: 'set-detuning', node: k, delta: ppmToDelta(finiteNumber(obj.ppm, child(path, 'ppm')), params.epsilon) };
    }
    case 'set-link-weight': {
      const ends = link();
      return {
        action: 'set-link-weight',
        ...ends,
        weight: atLeast(finiteNumber(required(obj, 'weight', path), child(path, 'weight')), child(path, 'weight'), 0),
      };
    }
    case 'break-link':
      return { action: 'break-link', ...link() };
    case 'restore-link':
      return { action: 'restore-link', ...link() };
    case 'set-coupling': {
      const p: Perturbation = {
        action: 'set-coupling',
        strength: optional('strength'),
        reactive: optional('reactive'),
        dissipative: optional('dissipative'),
      };
      if (p.strength === undefined && p.reactive === undefined && p.dissipative === undefined) {
        throw new InputError(path, 'give at least one of strength, reactive, dissipative');
      }
      return p;
    }
    case 'set-noise': {
      const p: Perturbation = { action: 'set-noise', intensity: optional('intensity', 0), detuningWalk: optional('detuningWalk', 0) };
      if (p.intensity === undefined && p.detuningWalk === undefined) throw new InputError(path, 'give intensity or detuningWalk');
      return p;
    }
    case 'kick-mode': {
      const k = node();
      const mode = inRange(integer(required(obj, 'mode', path), child(path, 'mode')), child(path, 'mode'), 0, params.modes - 1);
      const amount = numberField(obj as JsonObject, path, 'amount', (n) => n);
      return { action: 'kick-mode', node: k, mode, amount, phase: optional('phase') ?? 0 };
    }
  }
}

/** Apply a validated perturbation to the shared parameters; state kicks go through `kick`. */
export function applyPerturbation(
  p: Perturbation,
  params: ModelParameters,
  kick: (node: number, mode: number, re: number, im: number) => void,
): void {
  switch (p.action) {
    case 'set-detuning':
      params.detuning[p.node] = p.delta;
      return;
    case 'set-link-weight':
      params.setLinkWeight(params.findLink(p.from, p.to), p.weight);
      return;
    case 'break-link':
      params.setLinkWeight(params.findLink(p.from, p.to), 0);
      return;
    case 'restore-link': {
      const e = params.findLink(p.from, p.to);
      params.setLinkWeight(e, params.linkNominal[e]);
      return;
    }
    case 'set-coupling':
      if (p.strength !== undefined) params.strength = p.strength;
      if (p.reactive !== undefined) params.reactive = p.reactive;
      if (p.dissipative !== undefined) params.dissipative = p.dissipative;
      return;
    case 'set-noise':
      if (p.intensity !== undefined) params.noiseIntensity = p.intensity;
      if (p.detuningWalk !== undefined) params.detuningWalk = p.detuningWalk;
      return;
    case 'kick-mode':
      kick(p.node, p.mode, p.amount * Math.cos(p.phase), p.amount * Math.sin(p.phase));
      return;
  }
}

/** A one-line human description, for event timelines and logs. */
export function describePerturbation(p: Perturbation): string {
  switch (p.action) {
    case 'set-detuning':
      return `detuning of node ${p.node} set to Delta = ${p.delta.toPrecision(4)}`;
    case 'set-link-weight':
      return `link ${p.from} -> ${p.to} weight set to ${p.weight}`;
    case 'break-link':
      return `link ${p.from} -> ${p.to} broken`;
    case 'restore-link':
      return `link ${p.from} -> ${p.to} restored`;
    case 'set-coupling':
      return `coupling set to ${Object.entries(p)
        .filter(([k, v]) => k !== 'action' && v !== undefined)
        .map(([k, v]) => `${k} ${v}`)
        .join(', ')}`;
    case 'set-noise':
      return `noise set to ${Object.entries(p)
        .filter(([k, v]) => k !== 'action' && v !== undefined)
        .map(([k, v]) => `${k} ${v}`)
        .join(', ')}`;
    case 'kick-mode':
      return `mode ${p.mode} of node ${p.node} kicked by ${p.amount}${p.phase ? ` at phase ${p.phase.toFixed(3)}` : ''}`;
  }
}
