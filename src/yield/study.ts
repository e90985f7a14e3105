/**
 * A yield study: a scenario, the tolerances of its parameters, how each board starts, what counts
 * as a good board, and optionally a full-system confirmation and a sweep of one design parameter
 * (README, 'Yield studies'). `parseStudy` validates the JSON against the scenario it names
 * (already loaded by the caller: a file, a built-in or the inline object) and throws an InputError
 * naming the first bad field, as the scenario parser does. `studyToJSON` gives the normalised form,
 * with the scenario inline, that workers and a resumed coordinator parse again.
 */
import type { Scenario } from '../scenario/types.js';
import { scenarioToJSON, type ScenarioJSON } from '../scenario/parse.js';
import type { PatternKind } from '../pattern/classify.js';
import { child, fieldChecks, has, item, type JsonObject } from '../util/json-fields.js';
import { InputError, failInput as fail } from '../util/input-error.js';
import { Random } from '../util/random.js';
import { domainProblem, resolveParameter, type ParameterUnit, type ResolvedParameter, type Selection } from './parameter-paths.js';
import { MIN_TRUNCATE, support, type Distribution } from './distributions.js';

export const MAX_SAMPLES = 10_000_000;
export const MAX_SWEEP_VALUES = 200;
/** The default confidence of the yield interval: the level most sign-offs quote (common practice). */
export const DEFAULT_CONFIDENCE = 0.95;
/** The default target of a sweep: the "which coupling do I need for 99 %" question. */
export const DEFAULT_SWEEP_TARGET = 0.99;
/** Salt of the generator that picks the samples re-run with the full system (any fixed value; it only keeps that pick apart from the samples' own draws). */
const CONFIRM_SALT = 0x5eed_c0f1;

const PATTERN_KINDS: readonly PatternKind[] = ['in-phase', 'anti-phase', 'rotating-wave', 'standing-wave', 'cluster'];
const DISTRIBUTIONS = ['normal', 'truncated-normal', 'uniform'] as const;
const TOP_FIELDS = ['name', 'scenario', 'samples', 'seed', 'tolerances', 'start', 'criteria', 'confirm', 'sweep', 'confidence'] as const;
const TOLERANCE_FIELDS = ['parameter', 'nodes', 'links', 'distribution', 'mean', 'sigma', 'truncate', 'range', 'unit'] as const;
const CRITERIA_FIELDS = ['pattern', 'q', 'mode', 'within', 'minMargin'] as const;
const SWEEP_FIELDS = ['parameter', 'nodes', 'links', 'unit', 'values', 'target'] as const;

export interface Tolerance {
  parameter: ResolvedParameter;
  /** One distribution per component (a normal's mean defaults to each component's nominal value). */
  distributions: Distribution[];
  /** The tolerance as given (normalised), for the study's JSON. */
  spec: ToleranceJSON;
}

export interface ToleranceJSON {
  parameter: string;
  nodes?: Selection;
  links?: Selection;
  distribution: (typeof DISTRIBUTIONS)[number];
  mean?: number;
  sigma?: number;
  truncate?: number;
  range?: [number, number];
  unit: ParameterUnit;
}

export interface Criteria {
  /** The wanted pattern's kind; null accepts any locked pattern (the lock alone is judged). */
  pattern: PatternKind | null;
  /** Its wave number, when the kind alone does not fix it (a rotating wave); null: any. */
  q: number | null;
  mode: number;
  /** Slow time units (eps tau) within which the board must have locked. */
  within: number;
  /** Smallest accepted decay rate -margin of the locked state (per slow time unit); null: stable is enough. */
  minMargin: number | null;
}

export interface Sweep {
  parameter: ResolvedParameter;
  values: number[];
  target: number;
  spec: { parameter: string; nodes?: Selection; links?: Selection; unit: ParameterUnit; values: number[]; target: number };
}

export interface Study {
  name: string;
  scenario: Scenario;
  samples: number;
  seed: number;
  tolerances: Tolerance[];
  start: 'random' | 'scenario';
  criteria: Criteria;
  confirm: { fullSystem: number };
  sweep: Sweep | null;
  confidence: number;
  /** Sample indices (within a sweep point) re-run with the full system, ascending. */
  confirmIndices: number[];
}

export interface StudyJSON {
  name: string;
  scenario: ScenarioJSON;
  samples: number;
  seed: number;
  tolerances: ToleranceJSON[];
  start: 'random' | 'scenario';
  criteria: Criteria;
  confirm: { fullSystem: number };
  sweep: Sweep['spec'] | null;
  confidence: number;
}

const { expectObject, expectArray, finiteNumber, integer, inRange, positive, uint32, numberField, nonNegative } = fieldChecks();

function parseUnit(obj: JsonObject, at: string): ParameterUnit {
  if (!has(obj, 'unit')) return 'model';
  if (obj.unit !== 'model' && obj.unit !== 'ppm') fail(child(at, 'unit'), `must be "ppm" or "model" (got ${JSON.stringify(obj.unit)})`);
  return obj.unit;
}

function parseRange(value: unknown, at: string): [number, number] {
  const arr = expectArray(value, at);
  if (arr.length !== 2) fail(at, `must be [low, high] (got ${arr.length} entries)`);
  const low = finiteNumber(arr[0], item(at, 0));
  const high = finiteNumber(arr[1], item(at, 1));
  if (!(low < high)) fail(at, `low must be below high (got [${low}, ${high}])`);
  return [low, high];
}

function selectionOf(obj: JsonObject, key: 'nodes' | 'links'): Selection | undefined {
  return has(obj, key) ? (obj[key] as Selection) : undefined;
}

function parseTolerance(raw: unknown, at: string, scenario: Scenario): Tolerance {
  const obj = expectObject(raw, at, TOLERANCE_FIELDS);
  const unit = parseUnit(obj, at);
  const nodes = selectionOf(obj, 'nodes');
  const links = selectionOf(obj, 'links');
  const parameter = resolveParameter(scenario, at, obj.parameter, unit, { nodes, links });
  const kind = obj.distribution;
  if (!DISTRIBUTIONS.includes(kind as never))
    fail(child(at, 'distribution'), `must be one of ${DISTRIBUTIONS.join(', ')} (got ${JSON.stringify(kind)})`);
  const allowed: Record<(typeof DISTRIBUTIONS)[number], readonly string[]> = {
    normal: ['mean', 'sigma'],
    'truncated-normal': ['mean', 'sigma', 'truncate'],
    uniform: ['range'],
  };
  for (const key of ['mean', 'sigma', 'truncate', 'range']) {
    if (has(obj, key) && !allowed[kind as (typeof DISTRIBUTIONS)[number]].includes(key))
      fail(child(at, key), `is not a field of a ${kind} distribution`);
  }
  const spec: ToleranceJSON = { parameter: parameter.path, distribution: kind as ToleranceJSON['distribution'], unit };
  if (nodes !== undefined) spec.nodes = nodes;
  if (links !== undefined) spec.links = links;
  let distributions: Distribution[];
  if (kind === 'uniform') {
    if (!has(obj, 'range')) fail(child(at, 'range'), 'is required for a uniform distribution ([low, high])');
    const [low, high] = parseRange(obj.range, child(at, 'range'));
    spec.range = [low, high];
    distributions = parameter.components.map(() => ({ kind: 'uniform', low, high }));
  } else {
    const sigma = numberField(obj, at, 'sigma', nonNegative);
    spec.sigma = sigma;
    const mean = has(obj, 'mean') ? finiteNumber(obj.mean, child(at, 'mean')) : null;
    if (mean !== null) spec.mean = mean;
    const truncate = kind === 'truncated-normal' ? numberField(obj, at, 'truncate', (n, p) => inRange(n, p, MIN_TRUNCATE, 1e3)) : 0;
    if (kind === 'truncated-normal') spec.truncate = truncate;
    distributions = parameter.components.map((c) =>
      kind === 'normal'
        ? { kind: 'normal', mean: mean ?? c.nominal, sigma }
        : { kind: 'truncated-normal', mean: mean ?? c.nominal, sigma, truncate },
    );
  }
  distributions.forEach((d, i) => {
    const { low, high } = support(d);
    const problem = domainProblem(parameter.domain, low) ?? domainProblem(parameter.domain, high);
    if (problem) {
      const hint = d.kind === 'normal' ? '; use a truncated-normal or uniform distribution that stays inside' : '';
      fail(at, `${parameter.components[i].label} ${problem}, but this distribution reaches ${low}${hint}`);
    }
  });
  return { parameter, distributions, spec };
}

function parseCriteria(raw: unknown, scenario: Scenario): Criteria {
  const obj = expectObject(raw, 'criteria', CRITERIA_FIELDS);
  let pattern: PatternKind | null = null;
  if (has(obj, 'pattern') && obj.pattern !== null) {
    if (!PATTERN_KINDS.includes(obj.pattern as PatternKind)) {
      fail('criteria.pattern', `must be one of ${PATTERN_KINDS.join(', ')} or null for any lock (got ${JSON.stringify(obj.pattern)})`);
    }
    pattern = obj.pattern as PatternKind;
  }
  let q: number | null = null;
  if (has(obj, 'q') && obj.q !== null) {
    q = inRange(integer(obj.q, 'criteria.q'), 'criteria.q', 0, scenario.nodes - 1);
    if (pattern === null) fail('criteria.q', 'needs criteria.pattern');
  }
  const mode = numberField(obj, 'criteria', 'mode', (n, p) => inRange(integer(n, p), p, 0, scenario.modes.length - 1), 0);
  const within = numberField(obj, 'criteria', 'within', positive);
  const minMargin =
    has(obj, 'minMargin') && obj.minMargin !== null
      ? nonNegative(finiteNumber(obj.minMargin, 'criteria.minMargin'), 'criteria.minMargin')
      : null;
  return { pattern, q, mode, within, minMargin };
}

function parseSweep(raw: unknown, scenario: Scenario, tolerances: Tolerance[]): Sweep {
  const obj = expectObject(raw, 'sweep', SWEEP_FIELDS);
  const unit = parseUnit(obj, 'sweep');
  const nodes = selectionOf(obj, 'nodes');
  const links = selectionOf(obj, 'links');
  const parameter = resolveParameter(scenario, 'sweep', obj.parameter, unit, { nodes, links });
  if (!has(obj, 'values')) fail('sweep.values', 'is required (the design values to try)');
  const rawValues = expectArray(obj.values, 'sweep.values');
  if (rawValues.length < 1 || rawValues.length > MAX_SWEEP_VALUES)
    fail('sweep.values', `must have 1 to ${MAX_SWEEP_VALUES} values (got ${rawValues.length})`);
  const values = rawValues.map((v, i) => {
    const value = finiteNumber(v, item('sweep.values', i));
    const problem = domainProblem(parameter.domain, value);
    if (problem) fail(item('sweep.values', i), `${parameter.path} ${problem} (got ${value})`);
    return value;
  });
  if (new Set(values).size !== values.length) fail('sweep.values', 'lists a value twice');
  const target = numberField(obj, 'sweep', 'target', (n, p) => inRange(n, p, 0, 1), DEFAULT_SWEEP_TARGET);
  const clash = tolerances.findIndex(
    (t) => t.spec.distribution === 'uniform' && t.parameter.components.some((c) => parameter.components.some((s) => s.label === c.label)),
  );
  if (clash >= 0) {
    fail(
      'sweep.parameter',
      `tolerances[${clash}] draws ${parameter.path} from a fixed uniform range, which a sweep cannot move; ` +
        'give that tolerance as normal or truncated-normal around the nominal value',
    );
  }
  const spec: Sweep['spec'] = { parameter: parameter.path, unit, values, target };
  if (nodes !== undefined) spec.nodes = nodes;
  if (links !== undefined) spec.links = links;
  return { parameter, values, target, spec };
}

/** `count` distinct indices below `samples`, seeded by the study (Floyd's algorithm), ascending. */
function confirmIndicesOf(seed: number, samples: number, count: number): number[] {
  const random = new Random((seed ^ CONFIRM_SALT) >>> 0);
  const chosen = new Set<number>();
  for (let j = samples - count; j < samples; j++) {
    const t = Math.floor(random.uniform() * (j + 1));
    chosen.add(chosen.has(t) ? j : t);
  }
  return [...chosen].sort((a, b) => a - b);
}

/**
 * Validate a study against its (already loaded) scenario. `source` names what was read in errors.
 * The `scenario` field itself is the caller's to resolve; here it must be present.
 */
export function parseStudy(raw: unknown, scenario: Scenario, source?: string): Study {
  try {
    return parseUnsourced(raw, scenario);
  } catch (error) {
    if (error instanceof InputError && source !== undefined) throw error.from(source);
    throw error;
  }
}

function parseUnsourced(raw: unknown, scenario: Scenario): Study {
  const top = expectObject(raw, '', TOP_FIELDS);
  if (!has(top, 'scenario')) fail('scenario', 'is required (a scenario file, a built-in scenario name or an inline scenario object)');
  let name = 'Untitled study';
  if (has(top, 'name')) {
    if (typeof top.name !== 'string' || top.name.trim() === '') fail('name', 'must be a non-empty string');
    name = top.name;
  }
  const samples = numberField(top, '', 'samples', (n, p) => inRange(integer(n, p), p, 1, MAX_SAMPLES));
  const seed = numberField(top, '', 'seed', uint32);
  const tolerances = (has(top, 'tolerances') ? expectArray(top.tolerances, 'tolerances') : []).map((t, i) =>
    parseTolerance(t, item('tolerances', i), scenario),
  );
  const labels = new Map<string, number>();
  tolerances.forEach((t, i) =>
    t.parameter.components.forEach((c) => {
      const earlier = labels.get(c.label);
      if (earlier !== undefined) fail(item('tolerances', i), `${c.label} already has a tolerance in tolerances[${earlier}]`);
      labels.set(c.label, i);
    }),
  );
  let start: Study['start'] = 'random';
  if (has(top, 'start')) {
    if (top.start !== 'random' && top.start !== 'scenario')
      fail('start', `must be "random" or "scenario" (got ${JSON.stringify(top.start)})`);
    start = top.start;
  }
  if (!has(top, 'criteria')) fail('criteria', 'is required ({pattern, mode, within, minMargin})');
  const criteria = parseCriteria(top.criteria, scenario);
  let confirm = { fullSystem: 0 };
  if (has(top, 'confirm')) {
    const c = expectObject(top.confirm, 'confirm', ['fullSystem']);
    confirm = { fullSystem: numberField(c, 'confirm', 'fullSystem', (n, p) => inRange(integer(n, p), p, 0, samples), 0) };
  }
  const sweep = has(top, 'sweep') && top.sweep !== null ? parseSweep(top.sweep, scenario, tolerances) : null;
  if (sweep && sweep.values.length * samples > MAX_SAMPLES * 10)
    fail('sweep.values', `values x samples must stay below ${MAX_SAMPLES * 10}`);
  const confidence = numberField(
    top,
    '',
    'confidence',
    (n, p) => {
      if (!(n > 0 && n < 1)) fail(p, `must lie strictly between 0 and 1 (got ${n})`);
      return n;
    },
    DEFAULT_CONFIDENCE,
  );
  return {
    name,
    scenario,
    samples,
    seed,
    tolerances,
    start,
    criteria,
    confirm,
    sweep,
    confidence,
    confirmIndices: confirmIndicesOf(seed, samples, confirm.fullSystem),
  };
}

/** The normalised study with its scenario inline: parseStudy(json, parseScenario(json.scenario)) gives it back. */
export function studyToJSON(study: Study): StudyJSON {
  return {
    name: study.name,
    scenario: scenarioToJSON(study.scenario),
    samples: study.samples,
    seed: study.seed,
    tolerances: study.tolerances.map((t) => structuredClone(t.spec)),
    start: study.start,
    criteria: { ...study.criteria },
    confirm: { ...study.confirm },
    sweep: study.sweep ? structuredClone(study.sweep.spec) : null,
    confidence: study.confidence,
  };
}

/** Sweep points of a study (1 without a sweep): every sample index runs once per point. */
export function pointCount(study: Study): number {
  return study.sweep ? study.sweep.values.length : 1;
}

/** Samples of the whole study, all sweep points together. */
export function totalSamples(study: Study): number {
  return pointCount(study) * study.samples;
}
