import { child, describeValue, fieldChecks, has, type JsonObject } from '../util/json-fields.js';
import { failInput as fail } from '../util/input-error.js';
import { ModelParameters } from '../model/parameters.js';
import { parsePerturbation, PERTURBATION_ACTIONS, type Perturbation, type PerturbationAction } from '../session/perturbation.js';

/**
 * The shared JSON field checks (failing with an InputError), plus the few campaign-specific
 * pieces (booleans, time values in the campaign's unit, perturbations validated against the model).
 */
export { fail };

export const checks = fieldChecks();

export function booleanField(obj: JsonObject, path: string, key: string, fallback: boolean): boolean {
  if (!has(obj, key)) return fallback;
  const value = obj[key];
  if (typeof value !== 'boolean') fail(child(path, key), `must be true or false (got ${describeValue(value)})`);
  return value;
}

export function stringField(obj: JsonObject, path: string, key: string, fallback: string): string {
  if (!has(obj, key)) return fallback;
  const value = obj[key];
  if (typeof value !== 'string' || value.trim() === '') fail(child(path, key), `must be a non-empty string (got ${describeValue(value)})`);
  return value;
}

/**
 * An object whose fields are checked later (by the engine's perturbation validator, which knows
 * which fields each action takes).
 */
export function anyObject(value: unknown, path: string): JsonObject {
  const keys = value !== null && typeof value === 'object' && !Array.isArray(value) ? Object.keys(value) : [];
  return checks.expectObject(value, path, keys);
}

/** Campaign-time values: `toTau` multiplies by the tau per campaign unit. */
export interface TimeScale {
  tauPerUnit: number;
  unit: string;
}

/** A time value >= 0 (or > 0 when `strict`) in campaign units, returned in tau. */
export function timeField(obj: JsonObject, path: string, key: string, scale: TimeScale, strict: boolean, fallbackTau?: number): number {
  const check = strict ? checks.positive : checks.nonNegative;
  if (!has(obj, key)) {
    if (fallbackTau === undefined) fail(child(path, key), 'is required');
    return fallbackTau;
  }
  return checks.numberField(obj, path, key, check) * scale.tauPerUnit;
}

export function actionField(obj: JsonObject, path: string): PerturbationAction {
  const action = checks.required(obj, 'action', path);
  if (typeof action !== 'string' || !(PERTURBATION_ACTIONS as readonly string[]).includes(action)) {
    fail(child(path, 'action'), `must be one of ${PERTURBATION_ACTIONS.join(', ')} (got ${describeValue(action)})`);
  }
  return action as PerturbationAction;
}

/** Validate `{action, ...params}` against the model, reporting errors at `path` in campaign terms. */
export function perturbationAt(action: PerturbationAction, params: JsonObject, model: ModelParameters, path: string): Perturbation {
  if (has(params, 'action')) fail(child(path, 'action'), 'the action goes beside params, not inside it');
  return parsePerturbation({ action, ...params }, model, path);
}

/** A full perturbation object ({action, ...fields}) at `path`, as an explicit restore gives it. */
export function perturbationObject(raw: unknown, model: ModelParameters, path: string): Perturbation {
  return parsePerturbation(raw, model, path);
}
