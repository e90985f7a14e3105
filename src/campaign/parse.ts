/**
 * Campaign JSON -> validated `Campaign` (times in tau). The campaign is checked against the
 * scenario it will run on: every fault's parameters go through the engine's own perturbation
 * validator, so a node, mode or link that does not exist is refused before the soak starts.
 *
 * Defaults: timeUnit "tau"; restore "previous" (kick-mode: none); criteria mustPersist true,
 * mustRelock true, relockWithin three lock windows, no excursion or divergence limit,
 * predictionMustAgree false; no ramp (a step); stability from the first lock, with the uncoupled twin, at most
 * 20000 samples.
 */
import { child, has, item, type JsonObject } from '../util/json-fields.js';
import { ModelParameters } from '../model/parameters.js';
import type { Scenario } from '../scenario/types.js';
import { secondsToTau } from '../scenario/units.js';
import { defaultLockWindow } from '../session/session.js';
import { InputError } from '../util/input-error.js';
import {
  actionField,
  anyObject,
  booleanField,
  checks,
  fail,
  perturbationAt,
  perturbationObject,
  stringField,
  timeField,
  type TimeScale,
} from './fields.js';
import { parseCriteria } from './criteria.js';
import { parseRandomSpec } from './parse-random.js';
import { parseMask, type StabilityMask } from '../stability/mask.js';
import { builtInMaskNames, builtInMaskRaw } from '../scenarios/masks.js';
import { RAMPED_ACTIONS } from './ramp.js';
import type { Campaign, Criteria, DetectorSpec, FaultPlan, RestoreSpec, StabilitySpec, TimeUnit } from './types.js';

const { expectObject, expectArray, numberField, integer, inRange } = checks;

const TOP_FIELDS = ['name', 'description', 'timeUnit', 'criteria', 'detector', 'stability', 'faults', 'random'];
const FAULT_FIELDS = ['id', 'start', 'action', 'params', 'ramp', 'duration', 'restore', 'criteria'];
const TIME_UNITS: readonly TimeUnit[] = ['tau', 'slow', 'seconds'];

export const DEFAULT_MAX_SAMPLES = 20000;

/**
 * Validate a raw campaign for `scenario`.
 * @param source where the JSON came from; prefixed to error messages.
 * @throws InputError naming the first offending field.
 */
export function parseCampaign(raw: unknown, scenario: Scenario, source?: string): Campaign {
  try {
    return parseUnsourced(raw, scenario);
  } catch (error) {
    if (error instanceof InputError && source !== undefined) throw error.from(source);
    throw error;
  }
}

function parseUnsourced(raw: unknown, scenario: Scenario): Campaign {
  const top = expectObject(raw, '', TOP_FIELDS);
  if (!(scenario.epsilon > 0))
    fail(
      '',
      `a campaign needs a scenario with epsilon > 0 (got ${scenario.epsilon}): lock windows and re-lock times are slow-time quantities`,
    );
  const model = new ModelParameters(scenario);
  const name = stringField(top, '', 'name', 'Untitled campaign');
  if (has(top, 'description')) stringField(top, '', 'description', '');
  const timeUnit = parseTimeUnit(top);
  const scale: TimeScale = { tauPerUnit: tauPerUnit(timeUnit, scenario), unit: timeUnit };
  const detector = parseDetector(top.detector, scale, scenario.epsilon);
  const lockWindowSlow = detector.lockWindow ?? defaultLockWindow(model);
  const defaults: Criteria = {
    mustPersist: true,
    mustRelock: true,
    relockWithin: (3 * lockWindowSlow) / scenario.epsilon,
    maxPhaseExcursion: null,
    maxDivergence: null,
    predictionMustAgree: false,
  };
  const criteria = has(top, 'criteria') ? parseCriteria(top.criteria, 'criteria', defaults, scale) : defaults;
  const stability = parseStability(top.stability, scale);
  const faults = has(top, 'faults') ? parseFaults(top.faults, model, scale, criteria) : [];
  const random = has(top, 'random') ? parseRandomSpec(top.random, 'random', model, scale, criteria) : null;
  if (faults.length === 0 && random === null) fail('', 'a campaign needs faults, a random generator, or both');
  return { name, timeUnit, tauPerUnit: scale.tauPerUnit, criteria, detector, stability, faults, random };
}

function parseTimeUnit(top: JsonObject): TimeUnit {
  if (!has(top, 'timeUnit')) return 'tau';
  const unit = top.timeUnit;
  if (typeof unit !== 'string' || !(TIME_UNITS as readonly string[]).includes(unit)) {
    fail('timeUnit', `must be one of ${TIME_UNITS.join(', ')} (got ${JSON.stringify(unit)})`);
  }
  return unit as TimeUnit;
}

/** tau per campaign time unit: 1, 1/eps, or the tau of one second at the nominal frequency. */
export function tauPerUnit(unit: TimeUnit, scenario: Scenario): number {
  switch (unit) {
    case 'tau':
      return 1;
    case 'slow':
      return 1 / scenario.epsilon;
    case 'seconds':
      return secondsToTau(1, scenario.units.nominalFrequencyHz, scenario.modes[0].omega);
  }
}

function parseDetector(raw: unknown, scale: TimeScale, eps: number): DetectorSpec {
  if (raw === undefined) return { lockWindow: null, lockTolerance: null };
  const obj = expectObject(raw, 'detector', ['lockWindow', 'lockTolerance']);
  return {
    lockWindow: has(obj, 'lockWindow') ? timeField(obj, 'detector', 'lockWindow', scale, true) * eps : null,
    lockTolerance: has(obj, 'lockTolerance') ? numberField(obj, 'detector', 'lockTolerance', (n, p) => inRange(n, p, 1e-6, Math.PI)) : null,
  };
}

function parseStability(raw: unknown, scale: TimeScale): StabilitySpec {
  const defaults: StabilitySpec = {
    from: 'first-lock',
    uncoupledReference: true,
    maxSamples: DEFAULT_MAX_SAMPLES,
    mask: null,
    mustMeetMask: false,
  };
  if (raw === undefined) return defaults;
  const path = 'stability';
  const obj = expectObject(raw, path, ['from', 'uncoupledReference', 'maxSamples', 'mask', 'mustMeetMask']);
  const mask = has(obj, 'mask') ? parseCampaignMask(obj.mask, child(path, 'mask')) : null;
  if (has(obj, 'mustMeetMask') && mask === null) fail(child(path, 'mustMeetMask'), 'needs a mask (stability.mask)');
  let from: StabilitySpec['from'] = 'first-lock';
  if (has(obj, 'from') && obj.from !== 'first-lock') {
    if (typeof obj.from !== 'number') fail(child(path, 'from'), `must be a time or "first-lock" (got ${JSON.stringify(obj.from)})`);
    from = timeField(obj, path, 'from', scale, false);
  }
  return {
    from,
    uncoupledReference: booleanField(obj, path, 'uncoupledReference', true),
    maxSamples: numberField(obj, path, 'maxSamples', (n, p) => inRange(integer(n, p), p, 16, 1_000_000), DEFAULT_MAX_SAMPLES),
    mask,
    mustMeetMask: mask !== null && booleanField(obj, path, 'mustMeetMask', true),
  };
}

/**
 * stability.mask: a mask object, or the name of a built-in mask. `syncring soak` reads a mask
 * file named there (relative to the campaign file) and puts its content in place of the name
 * before the campaign gets here, so the log header keeps the mask itself.
 */
function parseCampaignMask(raw: unknown, path: string): StabilityMask {
  if (typeof raw === 'string') {
    if (!builtInMaskNames.includes(raw))
      fail(
        path,
        `no built-in mask ${JSON.stringify(raw)} (built-in masks: ${builtInMaskNames.join(', ')}; syncring soak reads a file of that name)`,
      );
    return parseMask(builtInMaskRaw(raw), `built-in mask ${raw}`);
  }
  try {
    return parseMask(raw);
  } catch (error) {
    if (error instanceof InputError) throw error.under(path);
    throw error;
  }
}

function parseFaults(raw: unknown, model: ModelParameters, scale: TimeScale, criteria: Criteria): FaultPlan[] {
  const list = expectArray(raw, 'faults');
  const ids = new Set<string>();
  const faults = list.map((entry, index) => {
    const path = item('faults', index);
    const fault = parseFault(entry, path, index, model, scale, criteria);
    if (ids.has(fault.id)) fail(child(path, 'id'), `duplicates the id of an earlier fault (${JSON.stringify(fault.id)})`);
    ids.add(fault.id);
    return fault;
  });
  // stable sort by start: equal starts keep the file's order
  return faults
    .map((f, i) => ({ f, i }))
    .sort((a, b) => a.f.start - b.f.start || a.i - b.i)
    .map(({ f }) => f);
}

function parseFault(raw: unknown, path: string, index: number, model: ModelParameters, scale: TimeScale, base: Criteria): FaultPlan {
  const obj = expectObject(raw, path, FAULT_FIELDS);
  const id = stringField(obj, path, 'id', `fault-${index + 1}`);
  if (id.startsWith('random-')) fail(child(path, 'id'), 'ids starting with "random-" are kept for generated faults');
  const start = timeField(obj, path, 'start', scale, false);
  const action = actionField(obj, path);
  const params = has(obj, 'params') ? anyObject(obj.params, child(path, 'params')) : {};
  const perturbation = perturbationAt(action, params, model, child(path, 'params'));
  const restore = parseRestore(obj, path, action, model);
  let duration: number | null = null;
  if (restore === 'none') {
    if (has(obj, 'duration'))
      fail(
        child(path, 'duration'),
        action === 'kick-mode'
          ? 'a kick is instantaneous: it has no duration'
          : 'a fault with restore "none" is permanent: it has no duration',
      );
  } else {
    duration = timeField(obj, path, 'duration', scale, true);
  }
  const criteria = has(obj, 'criteria') ? parseCriteria(obj.criteria, child(path, 'criteria'), base, scale) : base;
  const plan: FaultPlan = { id, source: 'schedule', start, duration, perturbation, restore, criteria };
  if (has(obj, 'ramp')) {
    if (!RAMPED_ACTIONS.includes(action)) fail(child(path, 'ramp'), `${action} is instantaneous: it cannot ramp`);
    plan.ramp = timeField(obj, path, 'ramp', scale, true);
  }
  return plan;
}

function parseRestore(obj: JsonObject, path: string, action: FaultPlan['perturbation']['action'], model: ModelParameters): RestoreSpec {
  const at = child(path, 'restore');
  if (action === 'kick-mode') {
    if (has(obj, 'restore') && obj.restore !== 'none') fail(at, 'a kick cannot be restored (use "none" or leave it out)');
    return 'none';
  }
  if (!has(obj, 'restore')) return 'previous';
  if (obj.restore === 'previous' || obj.restore === 'none') return obj.restore;
  if (typeof obj.restore === 'string') fail(at, `must be "previous", "none" or a perturbation object (got ${JSON.stringify(obj.restore)})`);
  return perturbationObject(obj.restore, model, at);
}
