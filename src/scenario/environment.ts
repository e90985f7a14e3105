/**
 * The scenario's `environment` section (README 'Temperature, aging and supply'): an ambient
 * temperature profile with per-node offsets and a frequency-temperature curve per node, aging per
 * node, and a supply-voltage profile with a pushing coefficient per node. Times are seconds of
 * board time from the start of the run. Every error names its field.
 */
import type { AgingSpec, EnvironmentSpec, ProfileSpec, TemperatureCurve } from './types.js';
import { child, fieldChecks, has, item, type JsonObject } from '../util/json-fields.js';
import { failInput as fail } from '../util/input-error.js';

/** One day in seconds: the default period of a cycle ("daily") and the unit of ppmPerDay. */
export const SECONDS_PER_DAY = 86400;

const { expectObject, expectArray, expectLength, finiteNumber, anyFinite, nonNegative, positive, numberField } = fieldChecks();

const ENVIRONMENT_FIELDS = ['temperature', 'aging', 'supply'] as const;
const PROFILE_FIELDS = ['start', 'changes', 'cycle'] as const;
const CHANGE_FIELDS = ['at', 'by', 'over'] as const;
const CYCLE_FIELDS = ['amplitude', 'periodS', 'phaseS'] as const;
const TEMPERATURE_FIELDS = ['ambient', 'offsetsC', 'curve'] as const;
const CURVE_FIELDS = ['inflectionC', 'a1PpmPerC', 'a2PpmPerC2', 'a3PpmPerC3'] as const;
const SUPPLY_FIELDS = ['voltage', 'nominalV', 'pushingPpmPerV'] as const;

/** A start value, steps and ramps (`over` seconds, 0 or absent for a step) and an optional cycle. */
export function parseProfile(value: unknown, path: string): ProfileSpec {
  const obj = expectObject(value, path, PROFILE_FIELDS);
  const start = numberField(obj, path, 'start', anyFinite);
  const changesPath = child(path, 'changes');
  const changes = has(obj, 'changes')
    ? expectArray(obj.changes, changesPath).map((raw, i) => {
        const at = item(changesPath, i);
        const c = expectObject(raw, at, CHANGE_FIELDS);
        return {
          at: numberField(c, at, 'at', nonNegative),
          by: numberField(c, at, 'by', anyFinite),
          over: numberField(c, at, 'over', nonNegative, 0),
        };
      })
    : [];
  changes.forEach((c, i) => {
    if (i > 0 && c.at < changes[i - 1].at)
      fail(child(item(changesPath, i), 'at'), `changes must be in time order (${c.at} s comes after ${changes[i - 1].at} s)`);
  });
  let cycle: ProfileSpec['cycle'] = null;
  if (has(obj, 'cycle')) {
    const at = child(path, 'cycle');
    const c = expectObject(obj.cycle, at, CYCLE_FIELDS);
    cycle = {
      amplitude: numberField(c, at, 'amplitude', nonNegative),
      periodS: numberField(c, at, 'periodS', positive, SECONDS_PER_DAY),
      phaseS: numberField(c, at, 'phaseS', anyFinite, 0),
    };
  }
  return { start, changes, cycle };
}

/** One object for every node, or an array with one per node. */
function perNode<T>(value: unknown, path: string, nodes: number, one: (raw: unknown, at: string) => T): T[] {
  if (!Array.isArray(value)) {
    const shared = one(value, path);
    return Array.from({ length: nodes }, () => structuredClone(shared));
  }
  expectLength(value, path, nodes, 'entries, one per node (or give one value for every node)');
  return value.map((raw, k) => one(raw, item(path, k)));
}

function parseCurve(raw: unknown, at: string): TemperatureCurve {
  const c = expectObject(raw, at, CURVE_FIELDS);
  return {
    inflectionC: numberField(c, at, 'inflectionC', anyFinite),
    a1PpmPerC: numberField(c, at, 'a1PpmPerC', anyFinite),
    a2PpmPerC2: numberField(c, at, 'a2PpmPerC2', anyFinite, 0),
    a3PpmPerC3: numberField(c, at, 'a3PpmPerC3', anyFinite),
  };
}

function parseAging(raw: unknown, at: string): AgingSpec {
  const a = expectObject(raw, at, ['logPpm', 'timeConstantS', 'ppmPerDay']);
  if (has(a, 'ppmPerDay')) {
    if (has(a, 'logPpm') || has(a, 'timeConstantS')) fail(at, 'give either ppmPerDay or logPpm with timeConstantS, not both');
    return { ppmPerDay: numberField(a, at, 'ppmPerDay', anyFinite) };
  }
  if (!has(a, 'logPpm')) fail(child(at, 'logPpm'), 'is required (or give ppmPerDay)');
  return { logPpm: numberField(a, at, 'logPpm', anyFinite), timeConstantS: numberField(a, at, 'timeConstantS', positive) };
}

function numbersPerNode(value: unknown, path: string, nodes: number): number[] {
  return perNode(value, path, nodes, (raw, at) => finiteNumber(raw, at));
}

/** The `environment` section, or undefined when the scenario has none. */
export function parseEnvironment(top: JsonObject, nodes: number): EnvironmentSpec | undefined {
  if (!has(top, 'environment')) return undefined;
  const env = expectObject(top.environment, 'environment', ENVIRONMENT_FIELDS);
  let temperature: EnvironmentSpec['temperature'] = null;
  if (has(env, 'temperature')) {
    const path = 'environment.temperature';
    const t = expectObject(env.temperature, path, TEMPERATURE_FIELDS);
    if (!has(t, 'ambient')) fail(child(path, 'ambient'), 'is required');
    if (!has(t, 'curve')) fail(child(path, 'curve'), 'is required (the frequency-temperature curve of the parts)');
    temperature = {
      ambient: parseProfile(t.ambient, child(path, 'ambient')),
      offsetsC: has(t, 'offsetsC') ? numbersPerNode(t.offsetsC, child(path, 'offsetsC'), nodes) : new Array<number>(nodes).fill(0),
      curves: perNode(t.curve, child(path, 'curve'), nodes, parseCurve),
    };
  }
  const aging = has(env, 'aging') ? perNode(env.aging, 'environment.aging', nodes, parseAging) : null;
  let supply: EnvironmentSpec['supply'] = null;
  if (has(env, 'supply')) {
    const path = 'environment.supply';
    const s = expectObject(env.supply, path, SUPPLY_FIELDS);
    if (!has(s, 'voltage')) fail(child(path, 'voltage'), 'is required');
    if (!has(s, 'pushingPpmPerV')) fail(child(path, 'pushingPpmPerV'), 'is required');
    const voltage = parseProfile(s.voltage, child(path, 'voltage'));
    supply = {
      voltage,
      nominalV: numberField(s, path, 'nominalV', anyFinite, voltage.start),
      pushingPpmPerV: numbersPerNode(s.pushingPpmPerV, child(path, 'pushingPpmPerV'), nodes),
    };
  }
  return { temperature, aging, supply };
}

function profileToJSON(p: ProfileSpec): Record<string, unknown> {
  return { start: p.start, changes: p.changes.map((c) => ({ ...c })), ...(p.cycle ? { cycle: { ...p.cycle } } : {}) };
}

/** The JSON form (parseEnvironment reads it back to an equal spec). */
export function environmentToJSON(env: EnvironmentSpec): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  if (env.temperature) {
    const t = env.temperature;
    out.temperature = { ambient: profileToJSON(t.ambient), offsetsC: [...t.offsetsC], curve: t.curves.map((c) => ({ ...c })) };
  }
  if (env.aging) out.aging = env.aging.map((a) => ({ ...a }));
  if (env.supply) {
    const s = env.supply;
    out.supply = { voltage: profileToJSON(s.voltage), nominalV: s.nominalV, pushingPpmPerV: [...s.pushingPpmPerV] };
  }
  return out;
}
