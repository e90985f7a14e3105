/**
 * The scenario's view of the parts section: which top-level fields it replaces, and the model
 * pieces it yields. parse.ts calls `modelFromParts` when a scenario has `parts`.
 */
import { fieldChecks, has, type JsonObject } from '../../util/json-fields.js';
import { failInput as fail } from '../../util/input-error.js';
import { deriveModel, type DerivedModel } from './derive.js';
import { parseParts } from './parse-parts.js';

/** Top-level fields the parts derive; giving them beside `parts` would say the same thing twice. */
export const DERIVED_FIELDS = ['modes', 'coupling', 'detuning', 'detuningPpm'] as const;

const { numberField, inRange, positive } = fieldChecks();

export function modelFromParts(top: JsonObject, nodes: number): DerivedModel {
  for (const key of DERIVED_FIELDS) {
    if (has(top, key)) fail(key, 'cannot be given together with parts: the parts derive it (syncring explain shows how)');
  }
  const spec = parseParts(top.parts, nodes);
  return deriveModel(spec, {
    epsilon: has(top, 'epsilon') ? numberField(top, '', 'epsilon', (n, path) => inRange(positive(n, path), path, 0, 0.5)) : null,
    nominalFrequencyHz: has(top, 'nominalFrequencyHz') ? numberField(top, '', 'nominalFrequencyHz', positive) : null,
  });
}
