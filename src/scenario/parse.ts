/**
 * Scenario JSON -> validated, dimensionless `Scenario` (and back).
 *
 * `parseScenario` is pure and throws an `InputError` naming the first bad field. Rules and
 * defaults beyond the plain ranges:
 * - `name` defaults to "Untitled scenario".
 * - `topology`: rings need nodes >= 2, edge lists nodes >= 1; at most 4096 nodes.
 *   Ring links are listed node by node: one-way k-1 -> k; two-way k-1 -> k then k+1 -> k
 *   (a directed pair is listed once, which matters for N = 2). Edge lists keep their order.
 * - `coupling.strength` is required; `reactive` (rho) and `dissipative` (sigma) default to 0, so a
 *   coupling that names neither does nothing: state the kind of coupling you mean.
 * - `detuning` (Delta_k) or `detuningPpm` (never both) default to zeros.
 * - `noise` defaults to {intensity 0, seed 1, detuningWalk 0}; when given, intensity and seed
 *   are required (intensity defaults to 0 when the parts' `powerLaw` or `phaseNoise` is given,
 *   read in noise-spec.ts).
 * - `environment` (temperature, aging, supply) is read in environment.ts.
 * - `initial` defaults to {random: {seed 1, amplitude 0.1}}; `pattern.mode` defaults to 0.
 * - `integrator` defaults: stepsPerPeriod from defaultStepsPerPeriod (src/integrate/default-steps.ts: 5 with
 *   the fitted Adams method at eps <= 1e-4 where it applies, else RK4's rule, 56 at eps = 1e-3), averagingGrid 8, and macroPeriods
 *   max(1, round(1 / (2 pi 100 eps))) (1 when eps = 0), so one macro tick is about 1/100 of
 *   a slow time unit 1/eps.
 * - Engineering units (mapped in units.ts only): `nominalFrequencyHz` (default 10e6, marked
 *   `units.nominalFrequencyAssumed` when it was left out), `detuningPpm`, per-mode `offsetPpm`
 *   instead of `omega` and `quality` instead of `loss`.
 * - `parts` (src/scenario/parts/, docs/parts.md) derives epsilon (unless given), nominalFrequencyHz
 *   (unless given), modes, coupling and detuning from the board's crystal, sustaining circuit,
 *   unwanted mode and coupling; those model fields may then not be given. The Scenario keeps the
 *   derivation in `parts`; scenarioToJSON writes the derived model only.
 */
import type { CouplingSpec, InitialSpec, IntegratorSpec, Link, ModeSpec, ModeState, NoiseSpec, Scenario, Topology } from './types.js';
import { DEFAULT_NOMINAL_FREQUENCY_HZ, offsetPpmToOmega, ppmToDelta, qualityToLoss } from './units.js';
import { defaultStepsPerPeriod } from '../integrate/default-steps.js';
import { child, describeValue, fieldChecks, has, item, type Check, type JsonObject } from '../util/json-fields.js';
import { InputError, failInput as fail } from '../util/input-error.js';
import { PART_NOISE_FIELDS, parsePartNoise, partNoiseToJSON } from './noise-spec.js';
import { environmentToJSON, parseEnvironment } from './environment.js';
import { modelFromParts } from './parts/scenario-parts.js';

export const MAX_NODES = 4096;
export const DEFAULT_NAME = 'Untitled scenario';
export const DEFAULT_AVERAGING_GRID = 8;
const DEFAULT_NOISE: NoiseSpec = { intensity: 0, seed: 1, detuningWalk: 0 };
const DEFAULT_INITIAL_RANDOM = { seed: 1, amplitude: 0.1 };

/** Carrier periods per macro tick so that a tick lasts about 1/(100 eps) in tau. */
export function defaultMacroPeriods(epsilon: number): number {
  if (epsilon === 0) return 1;
  return Math.max(1, Math.round(1 / (2 * Math.PI * 100 * epsilon)));
}

// ---------------------------------------------------------------------------------------------
// Field checks (shared with every other JSON input). Each throws InputError(path, reason);
// parseScenario adds the source.

const describe = describeValue;
const {
  expectObject,
  expectArray,
  expectLength,
  required,
  finiteNumber,
  integer,
  inRange,
  atLeast,
  positive,
  uint32,
  anyFinite,
  nonNegative,
  numberField,
} = fieldChecks();

/** A unit conversion can overflow even from finite input; say so at the input's path. */
function finiteResult(value: number, path: string, what: string): number {
  if (!Number.isFinite(value)) fail(path, `gives a non-finite ${what} (${value}); the value is too extreme`);
  return value;
}

function finiteArray(value: unknown, path: string, length: number, what: string): number[] {
  const arr = expectArray(value, path);
  expectLength(arr, path, length, what);
  return arr.map((v, k) => finiteNumber(v, item(path, k)));
}

/** Exactly one of two alternative fields (e.g. loss / quality); returns which one is given. */
function oneOf(obj: JsonObject, path: string, a: string, b: string): 'a' | 'b' {
  const hasA = has(obj, a);
  const hasB = has(obj, b);
  if (hasA && hasB) fail(path, `give either ${a} or ${b}, not both`);
  if (!hasA && !hasB) fail(child(path, a), `is required (or give ${b})`);
  return hasA ? 'a' : 'b';
}

// ---------------------------------------------------------------------------------------------
// Sections of the scenario, in dependency order.

const TOP_FIELDS = [
  'name',
  'nodes',
  'topology',
  'epsilon',
  'nominalFrequencyHz',
  'modes',
  'coupling',
  'detuning',
  'detuningPpm',
  'noise',
  'initial',
  'integrator',
  'environment',
  'parts',
] as const;
const MODE_FIELDS = ['omega', 'offsetPpm', 'gain', 'loss', 'quality'] as const;
const COUPLING_FIELDS = ['strength', 'reactive', 'dissipative'] as const;
const NOISE_FIELDS = ['intensity', 'seed', 'detuningWalk', ...PART_NOISE_FIELDS] as const;
const INITIAL_KINDS = ['state', 'random', 'pattern'] as const;
const INTEGRATOR_FIELDS = ['stepsPerPeriod', 'macroPeriods', 'averagingGrid'] as const;

function parseName(top: JsonObject): string {
  if (!has(top, 'name')) return DEFAULT_NAME;
  const name = top.name;
  if (typeof name !== 'string') fail('name', `must be a string (got ${describe(name)})`);
  if (name.trim() === '') fail('name', 'must not be empty');
  return name;
}

function parseTopology(value: unknown, nodes: number): { topology: Topology; links: Link[] } {
  if (value === 'ring-one-way' || value === 'ring-two-way') {
    if (nodes < 2) fail('nodes', `must be >= 2 for topology "${value}" (got ${nodes})`);
    return { topology: value, links: ringLinks(value, nodes) };
  }
  if (value === null || typeof value !== 'object' || Array.isArray(value)) {
    fail('topology', `must be "ring-one-way", "ring-two-way" or {"edges": [[from, to, weight], ...]} (got ${describe(value)})`);
  }
  const obj = expectObject(value, 'topology', ['edges']);
  const edgesPath = 'topology.edges';
  const rawEdges = expectArray(required(obj, 'edges', 'topology'), edgesPath);
  const links: Link[] = [];
  const firstIndexOfPair = new Map<number, number>();
  rawEdges.forEach((rawEdge, e) => {
    const edgePath = item(edgesPath, e);
    const triple = expectArray(rawEdge, edgePath);
    if (triple.length !== 3) {
      fail(edgePath, `must be [from, to, weight] with 3 entries (got ${triple.length})`);
    }
    const from = nodeIndex(triple[0], item(edgePath, 0), nodes);
    const to = nodeIndex(triple[1], item(edgePath, 1), nodes);
    const weightPath = item(edgePath, 2);
    const weight = finiteNumber(triple[2], weightPath);
    if (weight < 0) fail(weightPath, `weight must be >= 0 (got ${weight}); use 0 for a broken link`);
    if (from === to) fail(edgePath, `is a self-loop on node ${from}; an edge must join two different nodes`);
    const pair = from * nodes + to;
    const earlier = firstIndexOfPair.get(pair);
    if (earlier !== undefined) {
      fail(edgePath, `duplicates ${item(edgesPath, earlier)} (both carry node ${from} into node ${to})`);
    }
    firstIndexOfPair.set(pair, e);
    links.push({ from, to, weight });
  });
  return { topology: { edges: links.map((l) => ({ ...l })) }, links };
}

function nodeIndex(value: unknown, path: string, nodes: number): number {
  const k = integer(value, path);
  if (k < 0 || k >= nodes) {
    fail(path, `node index ${k} is out of range (nodes = ${nodes}, so 0 to ${nodes - 1})`);
  }
  return k;
}

/** Links of a ring, node by node; a directed pair appears once (N = 2 two-way has 2 links). */
export function ringLinks(kind: 'ring-one-way' | 'ring-two-way', nodes: number): Link[] {
  const links: Link[] = [];
  const seen = new Set<number>();
  const add = (from: number, to: number): void => {
    const pair = from * nodes + to;
    if (seen.has(pair)) return;
    seen.add(pair);
    links.push({ from, to, weight: 1 });
  };
  for (let k = 0; k < nodes; k++) {
    add((k - 1 + nodes) % nodes, k);
    if (kind === 'ring-two-way') add((k + 1) % nodes, k);
  }
  return links;
}

function parseModes(value: unknown, epsilon: number): ModeSpec[] {
  const arr = expectArray(value, 'modes');
  if (arr.length < 1 || arr.length > 2) fail('modes', `must have 1 or 2 entries (got ${arr.length})`);
  const modes: ModeSpec[] = [];
  arr.forEach((rawMode, j) => {
    const path = item('modes', j);
    const obj = expectObject(rawMode, path, MODE_FIELDS);

    let omega: number;
    if (oneOf(obj, path, 'omega', 'offsetPpm') === 'a') {
      omega = numberField(obj, path, 'omega', positive);
    } else {
      const ppmPath = child(path, 'offsetPpm');
      const ppm = finiteNumber(obj.offsetPpm, ppmPath);
      if (ppm <= -1e6) fail(ppmPath, `must be > -1000000 so that omega stays positive (got ${ppm})`);
      const omega0 = j === 0 ? 1 : modes[0]!.omega;
      omega = finiteResult(offsetPpmToOmega(ppm, omega0), ppmPath, 'omega');
    }

    const gain = numberField(obj, path, 'gain', nonNegative);

    let loss: number;
    if (oneOf(obj, path, 'loss', 'quality') === 'a') {
      loss = numberField(obj, path, 'loss', nonNegative);
    } else {
      const qPath = child(path, 'quality');
      const quality = numberField(obj, path, 'quality', positive);
      if (epsilon === 0) {
        fail(qPath, 'cannot be used when epsilon is 0 (loss = omega / (epsilon * quality)); give loss instead');
      }
      loss = finiteResult(qualityToLoss(quality, omega, epsilon), qPath, 'loss');
    }
    modes.push({ omega, gain, loss });
  });
  return modes;
}

function parseCoupling(value: unknown): CouplingSpec {
  const obj = expectObject(value, 'coupling', COUPLING_FIELDS);
  return {
    strength: numberField(obj, 'coupling', 'strength', anyFinite),
    reactive: numberField(obj, 'coupling', 'reactive', anyFinite, 0),
    dissipative: numberField(obj, 'coupling', 'dissipative', anyFinite, 0),
  };
}

function parseDetuning(top: JsonObject, nodes: number, epsilon: number): number[] {
  const perNode = `entries, one per node`;
  if (has(top, 'detuningPpm')) {
    if (has(top, 'detuning')) fail('detuningPpm', 'cannot be given together with detuning; give one of them');
    if (epsilon === 0) {
      fail('detuningPpm', 'cannot be used when epsilon is 0 (Delta = ppm * 1e-6 / epsilon); give detuning instead');
    }
    return finiteArray(top.detuningPpm, 'detuningPpm', nodes, perNode).map((ppm, k) =>
      finiteResult(ppmToDelta(ppm, epsilon), item('detuningPpm', k), 'Delta'),
    );
  }
  if (has(top, 'detuning')) return finiteArray(top.detuning, 'detuning', nodes, perNode);
  return new Array<number>(nodes).fill(0);
}

function parseNoise(value: unknown, nodes: number, nominalHz: number): NoiseSpec {
  const obj = expectObject(value, 'noise', NOISE_FIELDS);
  const parts = parsePartNoise(obj, nodes, nominalHz);
  return {
    // with the parts' own noise given, the model's white noise q is optional
    intensity: numberField(obj, 'noise', 'intensity', nonNegative, parts ? 0 : undefined),
    seed: numberField(obj, 'noise', 'seed', uint32),
    detuningWalk: numberField(obj, 'noise', 'detuningWalk', nonNegative, DEFAULT_NOISE.detuningWalk),
    ...(parts ? { parts } : {}),
  };
}

function parseInitial(value: unknown, nodes: number, modeCount: number): InitialSpec {
  const obj = expectObject(value, 'initial', INITIAL_KINDS);
  const given = INITIAL_KINDS.filter((kind) => has(obj, kind));
  if (given.length !== 1) {
    const got = given.length === 0 ? 'none' : given.join(', ');
    fail('initial', `must have exactly one of ${INITIAL_KINDS.join(', ')} (got ${got})`);
  }
  const kind = given[0]!;
  const path = child('initial', kind);
  if (kind === 'state') return { state: parseInitialState(obj.state, path, nodes, modeCount) };
  if (kind === 'random') {
    const r = expectObject(obj.random, path, ['seed', 'amplitude']);
    const seed = numberField(r, path, 'seed', uint32);
    const amplitudePath = child(path, 'amplitude');
    if (Array.isArray(r.amplitude)) {
      // One amplitude per mode: a spurious mode can start far weaker than the wanted one.
      expectLength(r.amplitude, amplitudePath, modeCount, modeCount === 1 ? 'entry (one per mode)' : 'entries (one per mode)');
      const perMode = r.amplitude.map((a, j) => atLeast(finiteNumber(a, item(amplitudePath, j)), item(amplitudePath, j), 0));
      if (!perMode.some((a) => a > 0)) fail(amplitudePath, 'must have at least one amplitude > 0');
      return { random: { seed, amplitude: perMode } };
    }
    return { random: { seed, amplitude: numberField(r, path, 'amplitude', positive) } };
  }
  const p = expectObject(obj.pattern, path, ['q', 'amplitude', 'mode']);
  const waveNumber: Check = (n, at) => {
    const q = integer(n, at);
    if (q < 0 || q >= nodes) fail(at, `must be a wave number between 0 and ${nodes - 1} (got ${q})`);
    return q;
  };
  const modeIndex: Check = (n, at) => {
    const j = integer(n, at);
    if (j < 0 || j >= modeCount) fail(at, `must be a mode index, 0 to ${modeCount - 1} (got ${j})`);
    return j;
  };
  return {
    pattern: {
      q: numberField(p, path, 'q', waveNumber),
      amplitude: numberField(p, path, 'amplitude', positive),
      mode: numberField(p, path, 'mode', modeIndex, 0),
    },
  };
}

function parseInitialState(value: unknown, path: string, nodes: number, modeCount: number): ModeState[][] {
  const rows = expectArray(value, path);
  expectLength(rows, path, nodes, 'entries, one per node');
  return rows.map((row, k) => {
    const rowPath = item(path, k);
    const cells = expectArray(row, rowPath);
    expectLength(cells, rowPath, modeCount, 'entries, one per mode');
    return cells.map((cell, j) => {
      const cellPath = item(rowPath, j);
      const c = expectObject(cell, cellPath, ['x', 'xdot']);
      return { x: numberField(c, cellPath, 'x', anyFinite), xdot: numberField(c, cellPath, 'xdot', anyFinite) };
    });
  });
}

function parseIntegrator(value: unknown, epsilon: number): IntegratorSpec {
  const obj: JsonObject = value === undefined ? {} : expectObject(value, 'integrator', INTEGRATOR_FIELDS);
  const intIn =
    (min: number, max: number): Check =>
    (n, path) =>
      inRange(integer(n, path), path, min, max);
  const field = (key: string, check: Check, fallback: number): number => numberField(obj, 'integrator', key, check, fallback);
  return {
    // 0 stands for 'not given'; parseScenario fills in the default once the whole scenario is known
    stepsPerPeriod: field('stepsPerPeriod', intIn(4, 4096), 0),
    macroPeriods: field('macroPeriods', intIn(1, Number.MAX_SAFE_INTEGER), defaultMacroPeriods(epsilon)),
    averagingGrid: field('averagingGrid', intIn(5, 64), DEFAULT_AVERAGING_GRID),
  };
}

// ---------------------------------------------------------------------------------------------
// Public API

/**
 * Validate raw scenario JSON and normalize it to the dimensionless `Scenario`.
 * @param source where the JSON came from (e.g. a file name); prefixed to error messages.
 * @throws InputError naming the first offending field and what is wrong with it.
 */
export function parseScenario(raw: unknown, source?: string): Scenario {
  try {
    return parseUnsourced(raw);
  } catch (err) {
    if (err instanceof InputError && source !== undefined) throw err.from(source);
    throw err;
  }
}

function parseUnsourced(raw: unknown): Scenario {
  const top = expectObject(raw, '', TOP_FIELDS);
  const name = parseName(top);
  const nodes = numberField(top, '', 'nodes', (n, path) => inRange(integer(n, path), path, 1, MAX_NODES));
  const { topology, links } = parseTopology(required(top, 'topology', ''), nodes);
  // A board described by its parts derives eps, f0, modes, coupling and detuning (docs/parts.md).
  const fromParts = has(top, 'parts') ? modelFromParts(top, nodes) : null;
  const epsilon = fromParts?.epsilon ?? numberField(top, '', 'epsilon', (n, path) => inRange(n, path, 0, 0.5));
  const nominalFrequencyHz =
    fromParts?.nominalFrequencyHz ?? numberField(top, '', 'nominalFrequencyHz', positive, DEFAULT_NOMINAL_FREQUENCY_HZ);
  const modes = fromParts?.modes ?? parseModes(required(top, 'modes', ''), epsilon);
  const coupling = fromParts?.coupling ?? parseCoupling(required(top, 'coupling', ''));
  const detuning = fromParts?.detuning ?? parseDetuning(top, nodes, epsilon);
  const noise = has(top, 'noise') ? parseNoise(top.noise, nodes, nominalFrequencyHz) : { ...DEFAULT_NOISE };
  const initial = has(top, 'initial') ? parseInitial(top.initial, nodes, modes.length) : { random: { ...DEFAULT_INITIAL_RANDOM } };
  const integrator = parseIntegrator(top.integrator, epsilon);
  const environment = parseEnvironment(top, nodes);
  // both move a node's frequency through its detuning, Delta = y / eps
  if (epsilon === 0 && (noise.parts || environment))
    fail(noise.parts ? 'noise' : 'environment', 'needs epsilon > 0: part noise and the environment act through the detuning');
  const scenario: Scenario = {
    name,
    nodes,
    topology,
    links,
    epsilon,
    modes,
    coupling,
    detuning,
    noise,
    initial,
    integrator,
    units: { nominalFrequencyHz, nominalFrequencyAssumed: fromParts === null && !has(top, 'nominalFrequencyHz') },
    ...(fromParts ? { parts: fromParts.derivation } : {}),
    ...(environment ? { environment } : {}),
  };
  if (integrator.stepsPerPeriod === 0) integrator.stepsPerPeriod = defaultStepsPerPeriod(scenario);
  return scenario;
}

/** The dimensionless JSON form written by `scenarioToJSON` (edges as [from, to, weight]). */
export interface ScenarioJSON {
  name: string;
  nodes: number;
  topology: 'ring-one-way' | 'ring-two-way' | { edges: [number, number, number][] };
  epsilon: number;
  /** Left out when the scenario did not give it (the default then stands in, as an assumption). */
  nominalFrequencyHz?: number;
  modes: ModeSpec[];
  coupling: CouplingSpec;
  detuning: number[];
  noise: Omit<NoiseSpec, 'parts'> & { powerLaw?: Record<string, number>[] };
  initial: InitialSpec;
  integrator: IntegratorSpec;
  environment?: Record<string, unknown>;
}

/**
 * The normalized, dimensionless JSON form of a scenario: every default written out except the
 * nominal frequency, no engineering-unit fields except nominalFrequencyHz. A nominal frequency
 * the scenario did not give stays out, so that whoever reads a log header or a session's scenario
 * can tell that its seconds rest on the default. `parseScenario` of it gives back an equal
 * Scenario. The result shares no arrays or objects with `s`.
 */
export function scenarioToJSON(s: Scenario): ScenarioJSON {
  const topology: ScenarioJSON['topology'] =
    typeof s.topology === 'string'
      ? s.topology
      : { edges: s.topology.edges.map((l): [number, number, number] => [l.from, l.to, l.weight]) };
  return {
    name: s.name,
    nodes: s.nodes,
    topology,
    epsilon: s.epsilon,
    ...(s.units.nominalFrequencyAssumed ? {} : { nominalFrequencyHz: s.units.nominalFrequencyHz }),
    modes: s.modes.map((m) => ({ omega: m.omega, gain: m.gain, loss: m.loss })),
    coupling: { ...s.coupling },
    detuning: [...s.detuning],
    noise: noiseToJSON(s.noise),
    initial: copyInitial(s.initial),
    integrator: { ...s.integrator },
    ...(s.environment ? { environment: environmentToJSON(s.environment) } : {}),
  };
}

function noiseToJSON(noise: NoiseSpec): ScenarioJSON['noise'] {
  const { parts, ...model } = noise;
  return parts ? { ...model, powerLaw: partNoiseToJSON(parts) } : model;
}

function copyInitial(initial: InitialSpec): InitialSpec {
  if ('state' in initial) return { state: initial.state.map((row) => row.map((c) => ({ x: c.x, xdot: c.xdot }))) };
  if ('random' in initial) {
    const { seed, amplitude } = initial.random;
    return { random: { seed, amplitude: Array.isArray(amplitude) ? [...amplitude] : amplitude } };
  }
  return { pattern: { ...initial.pattern } };
}
