/**
 * The `random` section of a campaign: a seeded generator of faults with a rate, a duration range
 * and parameter ranges per action. Every range is checked against the model at its ends, so a
 * generated fault can never be refused later.
 */
import { child, has, item, type JsonObject } from '../util/json-fields.js';
import type { ModelParameters } from '../model/parameters.js';
import type { PerturbationAction } from '../session/perturbation.js';
import { parseCriteria } from './criteria.js';
import { actionField, anyObject, checks, fail, perturbationAt, timeField, type TimeScale } from './fields.js';
import type { Criteria, RandomActionSpec, RandomSpec, RangeSpec } from './types.js';

const { expectObject, expectArray, numberField, finiteNumber, integer, positive, uint32, required } = checks;

const RANDOM_FIELDS = ['seed', 'from', 'until', 'gap', 'actions'];
const ACTION_FIELDS = ['action', 'rate', 'duration', 'restore', 'params', 'criteria'];
const INTEGER_PARAMS = new Set(['node', 'mode', 'from', 'to']);
const LINK_ACTIONS = new Set<PerturbationAction>(['set-link-weight', 'break-link', 'restore-link']);

export function parseRandomSpec(raw: unknown, path: string, model: ModelParameters, scale: TimeScale, base: Criteria): RandomSpec {
  const obj = expectObject(raw, path, RANDOM_FIELDS);
  const seed = uint32(required(obj, 'seed', path), child(path, 'seed'));
  const from = timeField(obj, path, 'from', scale, false, 0);
  const until = has(obj, 'until') && obj.until !== null ? timeField(obj, path, 'until', scale, true) : null;
  if (until !== null && until <= from) fail(child(path, 'until'), `must be after random.from`);
  const gap = timeField(obj, path, 'gap', scale, false, 0);
  const list = expectArray(required(obj, 'actions', path), child(path, 'actions'));
  if (list.length === 0) fail(child(path, 'actions'), 'must list at least one action');
  const actions = list.map((entry, i) => parseRandomAction(entry, item(child(path, 'actions'), i), model, scale, base));
  return { seed, from, until, gap, actions };
}

function parseRandomAction(raw: unknown, path: string, model: ModelParameters, scale: TimeScale, base: Criteria): RandomActionSpec {
  const obj = expectObject(raw, path, ACTION_FIELDS);
  const action = actionField(obj, path);
  const rate = numberField(obj, path, 'rate', positive) / scale.tauPerUnit;
  const restore = parseRandomRestore(obj, path, action);
  let duration: RandomActionSpec['duration'] = null;
  if (restore === 'none') {
    if (has(obj, 'duration'))
      fail(
        child(path, 'duration'),
        action === 'kick-mode' ? 'a kick is instantaneous: it has no duration' : 'a permanent fault (restore "none") has no duration',
      );
  } else {
    duration = parseDuration(required(obj, 'duration', path), child(path, 'duration'), scale);
  }
  const paramsPath = child(path, 'params');
  const rawParams = has(obj, 'params') ? anyObject(obj.params, paramsPath) : {};
  const params: Record<string, RangeSpec> = {};
  for (const key of Object.keys(rawParams).sort()) params[key] = parseRange(rawParams[key], child(paramsPath, key), key, action, model);
  if (has(params, 'link') && (has(params, 'from') || has(params, 'to'))) fail(paramsPath, 'give link or from/to, not both');
  checkCorners(action, params, model, paramsPath);
  const criteria = has(obj, 'criteria') ? parseCriteria(obj.criteria, child(path, 'criteria'), base, scale) : base;
  return { action, rate, duration, restore, params, criteria };
}

function parseRandomRestore(obj: JsonObject, path: string, action: PerturbationAction): 'previous' | 'none' {
  const at = child(path, 'restore');
  if (action === 'kick-mode') {
    if (has(obj, 'restore') && obj.restore !== 'none') fail(at, 'a kick cannot be restored (use "none" or leave it out)');
    return 'none';
  }
  if (!has(obj, 'restore')) return 'previous';
  if (obj.restore !== 'previous' && obj.restore !== 'none')
    fail(at, `must be "previous" or "none" for random faults (got ${JSON.stringify(obj.restore)})`);
  return obj.restore;
}

function parseDuration(raw: unknown, path: string, scale: TimeScale): { min: number; max: number } {
  if (typeof raw === 'number') {
    const d = positive(finiteNumber(raw, path), path) * scale.tauPerUnit;
    return { min: d, max: d };
  }
  const pair = expectArray(raw, path);
  if (pair.length !== 2) fail(path, `must be a duration or [min, max] (got ${pair.length} values)`);
  const min = positive(finiteNumber(pair[0], item(path, 0)), item(path, 0));
  const max = finiteNumber(pair[1], item(path, 1));
  if (max < min) fail(path, `max ${max} is below min ${min}`);
  return { min: min * scale.tauPerUnit, max: max * scale.tauPerUnit };
}

/** number: fixed; [a, b]: uniform (integers for node/mode/from/to); "any": every node, mode or link. */
function parseRange(raw: unknown, path: string, key: string, action: PerturbationAction, model: ModelParameters): RangeSpec {
  if (key === 'link') {
    if (!LINK_ACTIONS.has(action)) fail(path, `only ${[...LINK_ACTIONS].join(', ')} take a link`);
    if (raw === 'any') return { kind: 'choice', values: Array.from(model.linkFrom, (from, e) => [from, model.linkTo[e]]) };
    const list = expectArray(raw, path);
    if (list.length === 0) fail(path, 'must list at least one [from, to] pair (or be "any")');
    return {
      kind: 'choice',
      values: list.map((pair, i) => {
        const at = item(path, i);
        const ends = expectArray(pair, at);
        if (ends.length !== 2) fail(at, 'must be a [from, to] pair');
        return ends.map((v, j) => integer(v, item(at, j)));
      }),
    };
  }
  const isInteger = INTEGER_PARAMS.has(key);
  if (raw === 'any') {
    if (key === 'node' || key === 'from' || key === 'to') return { kind: 'integers', min: 0, max: model.nodes - 1 };
    if (key === 'mode') return { kind: 'integers', min: 0, max: model.modes - 1 };
    fail(path, `"any" applies to node, mode and link only`);
  }
  if (typeof raw === 'number') {
    const value = isInteger ? integer(raw, path) : finiteNumber(raw, path);
    return { kind: 'fixed', value };
  }
  const pair = expectArray(raw, path);
  if (pair.length !== 2)
    fail(path, `must be a number, [min, max]${isInteger || key === 'mode' ? ' or "any"' : ''} (got ${pair.length} values)`);
  const check = isInteger ? integer : finiteNumber;
  const min = check(pair[0], item(path, 0));
  const max = check(pair[1], item(path, 1));
  if (max < min) fail(path, `max ${max} is below min ${min}`);
  return isInteger ? { kind: 'integers', min, max } : { kind: 'uniform', min, max };
}

/** The range's ends as parameter values; a link choice gives every listed pair. */
function endsOf(key: string, range: RangeSpec): JsonObject[] {
  switch (range.kind) {
    case 'fixed':
      return [{ [key]: range.value }];
    case 'uniform':
    case 'integers':
      return [{ [key]: range.min }, { [key]: range.max }];
    case 'choice':
      return range.values.map(([from, to]) => ({ from, to }));
  }
}

/** Every range end with the other parameters at their first end must be a valid perturbation. */
function checkCorners(action: PerturbationAction, params: Record<string, RangeSpec>, model: ModelParameters, path: string): void {
  const keys = Object.keys(params);
  const first: JsonObject = {};
  for (const key of keys) Object.assign(first, endsOf(key, params[key])[0]);
  perturbationAt(action, first, model, path);
  for (const key of keys) {
    for (const end of endsOf(key, params[key]).slice(1)) perturbationAt(action, { ...first, ...end }, model, path);
  }
}
