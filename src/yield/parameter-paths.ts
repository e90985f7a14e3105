/**
 * Model parameters by path, as a study's tolerances and sweep name them: what a path means, which
 * units it takes, which values it may have, and how one drawn value is written into a copy of the
 * scenario. One table, `PARAMETER_TARGETS`; a path resolves to one component per node or link it
 * covers (`detuning` with `nodes: [0, 3]` gives `detuning[0]` and `detuning[3]`).
 *
 * Boards described by their parts are meant to join here as one more target per part value (a
 * path `parts.NAME.FIELD` whose `write` maps the part's value onto the model parameters it sets),
 * so studies, sweeps and the sensitivity view take them with no other change (README, 'Yield
 * studies').
 */
import type { Scenario } from '../scenario/types.js';
import { deltaToPpm, ppmToDelta } from '../scenario/units.js';
import { failInput as fail } from '../util/input-error.js';

export type ParameterUnit = 'model' | 'ppm';
/** Values a parameter may take: any finite number, >= 0, or > 0. */
export type ParameterDomain = 'any' | 'non-negative' | 'positive';

/** One scalar a tolerance draws: its name in records (`detuning[3]`), nominal value and writer, in the tolerance's unit. */
export interface ParameterComponent {
  label: string;
  /** The value in the scenario the study names. */
  nominal: number;
  /** The value in `scenario` now (a sweep may have moved it). */
  read(scenario: Scenario): number;
  write(scenario: Scenario, value: number): void;
}

export interface ResolvedParameter {
  path: string;
  unit: ParameterUnit;
  domain: ParameterDomain;
  components: ParameterComponent[];
}

/** Which elements a per-node or per-link path covers: every one, or the listed indices. */
export type Selection = 'all' | number[];

interface Target {
  /** How the path is written, for error messages. */
  syntax: string;
  match: RegExp;
  units: readonly ParameterUnit[];
  domain: ParameterDomain;
  /** Per node (`nodes`), per link (`links`), or one scalar. */
  over: 'node' | 'link' | 'none';
  /** Value of element `index` (node, link or the mode of the path) in model units. */
  read(scenario: Scenario, index: number, match: RegExpExecArray): number;
  write(scenario: Scenario, index: number, value: number, match: RegExpExecArray): void;
  /** Extra check of the path's own indices (a mode that exists). */
  check?(scenario: Scenario, match: RegExpExecArray, path: string): void;
}

const modeIndex = (m: RegExpExecArray): number => Number(m[1]);

const coupling = (key: 'strength' | 'reactive' | 'dissipative'): Target => ({
  syntax: `coupling.${key}`,
  match: new RegExp(`^coupling\\.${key}$`),
  units: ['model'],
  domain: 'any',
  over: 'none',
  read: (s) => s.coupling[key],
  write: (s, _i, v) => {
    s.coupling[key] = v;
  },
});

const modeField = (key: 'gain' | 'loss' | 'omega', domain: ParameterDomain): Target => ({
  syntax: `modes[J].${key}`,
  match: new RegExp(`^modes\\[(\\d+)\\]\\.${key}$`),
  units: ['model'],
  domain,
  over: 'none',
  read: (s, _i, m) => s.modes[modeIndex(m)][key],
  write: (s, _i, v, m) => {
    s.modes[modeIndex(m)][key] = v;
  },
  check: (s, m, path) => {
    if (modeIndex(m) >= s.modes.length) fail(path, `mode ${modeIndex(m)} does not exist (modes are 0..${s.modes.length - 1})`);
  },
});

export const PARAMETER_TARGETS: readonly Target[] = [
  {
    syntax: 'detuning',
    match: /^detuning$/,
    units: ['model', 'ppm'],
    domain: 'any',
    over: 'node',
    read: (s, k) => s.detuning[k],
    write: (s, k, v) => {
      s.detuning[k] = v;
    },
  },
  coupling('strength'),
  coupling('reactive'),
  coupling('dissipative'),
  modeField('gain', 'non-negative'),
  modeField('loss', 'non-negative'),
  modeField('omega', 'positive'),
  {
    syntax: 'links.weight',
    match: /^links\.weight$/,
    units: ['model'],
    domain: 'non-negative',
    over: 'link',
    read: (s, e) => s.links[e].weight,
    write: (s, e, v) => {
      s.links[e].weight = v;
      // the written scenario must say the new weight: a named ring becomes its edge list
      s.topology = { edges: s.links.map((l) => ({ ...l })) };
    },
  },
  {
    syntax: 'noise.intensity',
    match: /^noise\.intensity$/,
    units: ['model'],
    domain: 'non-negative',
    over: 'none',
    read: (s) => s.noise.intensity,
    write: (s, _i, v) => {
      s.noise.intensity = v;
    },
  },
];

/** Every path a study may name, as written in errors and the README. */
export const PARAMETER_SYNTAX = PARAMETER_TARGETS.map((t) => t.syntax).join(', ');

/**
 * The components `path` covers on `scenario`, in `unit`. `at` is the field path of the entry
 * naming it (`tolerances[1]`); errors name `at.parameter`, `at.nodes`, `at.links` or `at.unit`.
 */
export function resolveParameter(
  scenario: Scenario,
  at: string,
  path: unknown,
  unit: ParameterUnit,
  selection: { nodes?: Selection; links?: Selection },
): ResolvedParameter {
  const pathField = `${at}.parameter`;
  if (typeof path !== 'string') fail(pathField, `must be a parameter path (${PARAMETER_SYNTAX})`);
  let match: RegExpExecArray | null = null;
  const target = PARAMETER_TARGETS.find((t) => (match = t.match.exec(path)) !== null);
  if (!target || !match) fail(pathField, `unknown parameter ${JSON.stringify(path)} (known: ${PARAMETER_SYNTAX})`);
  const m: RegExpExecArray = match;
  target.check?.(scenario, m, pathField);
  if (!target.units.includes(unit)) fail(`${at}.unit`, `${path} takes ${target.units.map((u) => `"${u}"`).join(' or ')} (got "${unit}")`);
  if (unit === 'ppm' && !(scenario.epsilon > 0)) fail(`${at}.unit`, 'ppm needs epsilon > 0 (Delta = ppm * 1e-6 / epsilon)');
  if (target.over !== 'node' && selection.nodes !== undefined) fail(`${at}.nodes`, `${path} is not a per-node parameter`);
  if (target.over !== 'link' && selection.links !== undefined) fail(`${at}.links`, `${path} is not a per-link parameter`);
  const toUnit = (v: number): number => (unit === 'ppm' ? deltaToPpm(v, scenario.epsilon) : v);
  const fromUnit = (v: number): number => (unit === 'ppm' ? ppmToDelta(v, scenario.epsilon) : v);
  const component = (index: number, label: string): ParameterComponent => ({
    label,
    nominal: toUnit(target.read(scenario, index, m)),
    read: (s) => toUnit(target.read(s, index, m)),
    write: (s, value) => target.write(s, index, fromUnit(value), m),
  });
  let components: ParameterComponent[];
  if (target.over === 'none') components = [component(0, path)];
  else {
    const count = target.over === 'node' ? scenario.nodes : scenario.links.length;
    const field = target.over === 'node' ? 'nodes' : 'links';
    const indices = indicesOf(selection[field] ?? 'all', `${at}.${field}`, count, target.over);
    const name = target.over === 'node' ? path : 'links';
    components = indices.map((i) => component(i, target.over === 'node' ? `${name}[${i}]` : `links[${i}].weight`));
  }
  return { path, unit, domain: target.domain, components };
}

function indicesOf(selection: unknown, at: string, count: number, what: string): number[] {
  if (selection === 'all') return Array.from({ length: count }, (_, i) => i);
  if (!Array.isArray(selection) || selection.length === 0) fail(at, `must be "all" or a non-empty list of ${what} indices`);
  const seen = new Set<number>();
  return selection.map((raw, i) => {
    if (typeof raw !== 'number' || !Number.isInteger(raw) || raw < 0 || raw >= count) {
      fail(`${at}[${i}]`, `must be a ${what} index, 0 to ${count - 1} (got ${JSON.stringify(raw)})`);
    }
    if (seen.has(raw)) fail(`${at}[${i}]`, `${what} ${raw} is listed twice`);
    seen.add(raw);
    return raw;
  });
}

/** Whether `value` lies in the domain; the rule it breaks when it does not ("must be >= 0"). */
export function domainProblem(domain: ParameterDomain, value: number): string | null {
  if (domain === 'non-negative' && value < 0) return 'must be >= 0';
  if (domain === 'positive' && value <= 0) return 'must be > 0';
  return null;
}
