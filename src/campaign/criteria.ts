import { has } from '../util/json-fields.js';
import { booleanField, checks, timeField, type TimeScale } from './fields.js';
import type { Criteria } from './types.js';

const { expectObject, numberField, positive } = checks;

export const CRITERIA_FIELDS = ['mustPersist', 'mustRelock', 'relockWithin', 'maxPhaseExcursion', 'maxDivergence', 'predictionMustAgree'];

/** Criteria at `path`, each field overriding `base`. */
export function parseCriteria(raw: unknown, path: string, base: Criteria, scale: TimeScale): Criteria {
  const obj = expectObject(raw, path, CRITERIA_FIELDS);
  const limit = (key: 'maxPhaseExcursion' | 'maxDivergence'): number | null => {
    if (!has(obj, key)) return base[key];
    if (obj[key] === null) return null;
    return numberField(obj, path, key, positive);
  };
  return {
    mustPersist: booleanField(obj, path, 'mustPersist', base.mustPersist),
    mustRelock: booleanField(obj, path, 'mustRelock', base.mustRelock),
    relockWithin: timeField(obj, path, 'relockWithin', scale, true, base.relockWithin),
    maxPhaseExcursion: limit('maxPhaseExcursion'),
    maxDivergence: limit('maxDivergence'),
    predictionMustAgree: booleanField(obj, path, 'predictionMustAgree', base.predictionMustAgree),
  };
}
