/**
 * The `parts` section of a scenario -> PartsSpec (SI units), or an InputError naming the field
 * and saying why the value cannot be a part. README.md, 'The parts section', lists the fields.
 * Which part values are physically impossible, and why:
 * - a motional resistance, capacitance, series frequency or shunt capacitance must be > 0: every
 *   real crystal has losses, a motional arm and electrode capacitance (C0 = 0 would make the load
 *   pulling C1 / (2 (C0 + C_L)) depend on the load alone, which no crystal does);
 * - the load capacitance as built (nominal + tolerance + trim) must stay > 0;
 * - the negative resistance must be < 0: a positive one is a loss, the circuit cannot sustain.
 */
import { child, fieldChecks, has, item, type Check, type JsonObject } from '../../util/json-fields.js';
import { failInput as fail } from '../../util/input-error.js';
import type { CouplingParts, CrystalParts, NodeParts, PartsSpec, SpuriousParts, SustainingParts } from './types.js';

const PPM = 1e-6;

const { expectObject, expectArray, expectLength, finiteNumber, numberField, required, anyFinite, positive } = fieldChecks();

export const PARTS_FIELDS = ['crystal', 'nodes', 'sustaining', 'spurious', 'coupling'] as const;
const CRYSTAL_FIELDS = [
  'seriesFrequencyHz',
  'motionalResistanceOhm',
  'motionalCapacitanceF',
  'shuntCapacitanceF',
  'loadCapacitanceF',
] as const;
const NODE_FIELDS = [...CRYSTAL_FIELDS, 'seriesTolerancePpm', 'loadToleranceF', 'loadTrimF'] as const;
const SUSTAINING_FIELDS = ['negativeResistanceOhm', 'driveLevelW', 'saturationCurrentA'] as const;
const SPURIOUS_FIELDS = ['offsetHz', 'offsetPpm', 'motionalResistanceOhm', 'motionalCapacitanceF'] as const;
const COUPLING_FIELDS = ['pullPpm', 'angleDeg', 'network'] as const;
const NETWORK_FIELDS = ['resistanceOhm', 'capacitanceF', 'inductanceH'] as const;

/** Why each crystal value must be positive, said in the error. */
const WHY_POSITIVE: Record<(typeof CRYSTAL_FIELDS)[number], string> = {
  seriesFrequencyHz: 'a series resonance frequency',
  motionalResistanceOhm: 'R1 is the loss of the motional arm; every crystal has one',
  motionalCapacitanceF: 'C1 of the motional arm; without it there is no resonance',
  shuntCapacitanceF: 'C0 is the capacitance between the electrodes, which every crystal has',
  loadCapacitanceF: 'the load capacitance the crystal works into',
};

function physical(why: string): Check {
  return (n, path) => {
    if (!(n > 0)) fail(path, `must be > 0 (got ${n}): ${why}`);
    return n;
  };
}

function parseCrystal(value: unknown, path: string): CrystalParts {
  const obj = expectObject(value, path, CRYSTAL_FIELDS);
  const field = (key: (typeof CRYSTAL_FIELDS)[number]): number => numberField(obj, path, key, physical(WHY_POSITIVE[key]));
  return {
    seriesFrequencyHz: field('seriesFrequencyHz'),
    motionalResistanceOhm: field('motionalResistanceOhm'),
    motionalCapacitanceF: field('motionalCapacitanceF'),
    shuntCapacitanceF: field('shuntCapacitanceF'),
    loadCapacitanceF: field('loadCapacitanceF'),
  };
}

function parseNode(value: unknown, path: string, shared: CrystalParts): NodeParts {
  const obj = expectObject(value, path, NODE_FIELDS);
  const own = (key: (typeof CRYSTAL_FIELDS)[number]): number => numberField(obj, path, key, physical(WHY_POSITIVE[key]), shared[key]);
  if (has(obj, 'seriesFrequencyHz') && has(obj, 'seriesTolerancePpm')) {
    fail(path, 'give either seriesFrequencyHz or seriesTolerancePpm, not both');
  }
  const tolerancePath = child(path, 'seriesTolerancePpm');
  const tolerancePpm = numberField(obj, path, 'seriesTolerancePpm', anyFinite, 0);
  if (tolerancePpm <= -1e6) fail(tolerancePath, `must be > -1000000 so that the frequency stays positive (got ${tolerancePpm})`);
  const seriesFrequencyHz = has(obj, 'seriesFrequencyHz') ? own('seriesFrequencyHz') : shared.seriesFrequencyHz * (1 + tolerancePpm * PPM);
  const loadCapacitanceF = own('loadCapacitanceF');
  const loadToleranceF = numberField(obj, path, 'loadToleranceF', anyFinite, 0);
  const loadTrimF = numberField(obj, path, 'loadTrimF', anyFinite, 0);
  const built = loadCapacitanceF + loadToleranceF + loadTrimF;
  if (!(built > 0)) {
    const at = has(obj, 'loadTrimF') ? child(path, 'loadTrimF') : child(path, 'loadToleranceF');
    fail(at, `leaves a load capacitance of ${built} F (nominal + tolerance + trim); it must stay > 0`);
  }
  return {
    seriesFrequencyHz,
    motionalResistanceOhm: own('motionalResistanceOhm'),
    motionalCapacitanceF: own('motionalCapacitanceF'),
    shuntCapacitanceF: own('shuntCapacitanceF'),
    loadCapacitanceF,
    loadToleranceF,
    loadTrimF,
  };
}

function parseNodes(value: unknown, nodes: number, shared: CrystalParts): NodeParts[] {
  if (value === undefined) return Array.from({ length: nodes }, () => ({ ...shared, loadToleranceF: 0, loadTrimF: 0 }));
  const arr = expectArray(value, 'parts.nodes');
  expectLength(arr, 'parts.nodes', nodes, 'entries, one per node');
  return arr.map((raw, k) => parseNode(raw, item('parts.nodes', k), shared));
}

function parseSustaining(value: unknown): SustainingParts {
  const path = 'parts.sustaining';
  const obj = expectObject(value, path, SUSTAINING_FIELDS);
  const negativeResistanceOhm = numberField(obj, path, 'negativeResistanceOhm', (n, at) => {
    if (!(n < 0))
      fail(at, `must be < 0 (got ${n}): the sustaining circuit must present a negative resistance to make up the crystal's loss`);
    return n;
  });
  const hasDrive = has(obj, 'driveLevelW');
  const hasSaturation = has(obj, 'saturationCurrentA');
  if (hasDrive && hasSaturation) fail(path, 'give either driveLevelW or saturationCurrentA, not both: one sets the other');
  if (!hasDrive && !hasSaturation)
    fail(child(path, 'driveLevelW'), 'is required (or give saturationCurrentA): something must set the amplitude');
  return {
    negativeResistanceOhm,
    driveLevelW: hasDrive
      ? numberField(obj, path, 'driveLevelW', physical('the power the crystal dissipates at its steady amplitude'))
      : null,
    saturationCurrentA: hasSaturation
      ? numberField(obj, path, 'saturationCurrentA', physical('the current amplitude at which the gain has fallen to nothing'))
      : null,
  };
}

function parseSpurious(value: unknown, crystal: CrystalParts): SpuriousParts | null {
  if (value === undefined) return null;
  const arr = expectArray(value, 'parts.spurious');
  if (arr.length > 1)
    fail('parts.spurious', `must have at most 1 entry: the model carries a wanted and one unwanted mode (got ${arr.length})`);
  if (arr.length === 0) return null;
  const path = item('parts.spurious', 0);
  const obj = expectObject(arr[0], path, SPURIOUS_FIELDS);
  if (has(obj, 'offsetHz') === has(obj, 'offsetPpm'))
    fail(path, 'give exactly one of offsetHz or offsetPpm (its series frequency above the wanted mode)');
  const offsetHz = has(obj, 'offsetHz')
    ? finiteNumber(obj.offsetHz, child(path, 'offsetHz'))
    : finiteNumber(obj.offsetPpm, child(path, 'offsetPpm')) * PPM * crystal.seriesFrequencyHz;
  const offsetPath = child(path, has(obj, 'offsetHz') ? 'offsetHz' : 'offsetPpm');
  if (offsetHz === 0) fail(offsetPath, 'must not be 0: a mode at the wanted frequency is the wanted mode');
  if (!(crystal.seriesFrequencyHz + offsetHz > 0))
    fail(offsetPath, `puts the mode at ${crystal.seriesFrequencyHz + offsetHz} Hz; it must stay > 0`);
  const assumed = !has(obj, 'motionalCapacitanceF');
  return {
    offsetHz,
    motionalResistanceOhm: numberField(
      obj,
      path,
      'motionalResistanceOhm',
      physical('R1 of the unwanted mode; its loss sets whether it can start'),
    ),
    motionalCapacitanceF: assumed
      ? crystal.motionalCapacitanceF
      : numberField(obj, path, 'motionalCapacitanceF', physical(WHY_POSITIVE.motionalCapacitanceF)),
    motionalCapacitanceAssumed: assumed,
  };
}

function parseCoupling(value: unknown): CouplingParts {
  const path = 'parts.coupling';
  const obj = expectObject(value, path, COUPLING_FIELDS);
  if (has(obj, 'network')) {
    if (has(obj, 'pullPpm') || has(obj, 'angleDeg')) fail(path, 'give either network or pullPpm with angleDeg, not both');
    const at = child(path, 'network');
    const net = expectObject(obj.network, at, NETWORK_FIELDS);
    const resistanceOhm = numberField(net, at, 'resistanceOhm', (n, p) => {
      if (n < 0) fail(p, `must be >= 0 (got ${n}): a passive branch cannot add energy`);
      return n;
    });
    const capacitanceF = has(net, 'capacitanceF') ? numberField(net, at, 'capacitanceF', positive) : null;
    const inductanceH = has(net, 'inductanceH') ? numberField(net, at, 'inductanceH', positive) : null;
    if (resistanceOhm === 0 && capacitanceF === null && inductanceH === null) {
      fail(at, 'is a short (no resistance, capacitance or inductance): it couples nothing');
    }
    return { kind: 'network', resistanceOhm, capacitanceF, inductanceH };
  }
  const pullPpm = numberField(obj, path, 'pullPpm', (n, p) => {
    if (n < 0) fail(p, `must be >= 0 (got ${n}): it is the size of the pull; the angle gives its kind`);
    return n;
  });
  const angleDeg = numberField(obj, path, 'angleDeg', (n, p) => {
    if (n < -180 || n > 180) fail(p, `must be between -180 and 180 degrees (got ${n})`);
    return n;
  });
  return { kind: 'pull', pullPpm, angleDeg };
}

/** Read the `parts` section for a scenario of `nodes` nodes. */
export function parseParts(value: unknown, nodes: number): PartsSpec {
  const obj: JsonObject = expectObject(value, 'parts', PARTS_FIELDS);
  const crystal = parseCrystal(required(obj, 'crystal', 'parts'), 'parts.crystal');
  return {
    crystal,
    nodes: parseNodes(obj.nodes, nodes, crystal),
    sustaining: parseSustaining(required(obj, 'sustaining', 'parts')),
    spurious: parseSpurious(obj.spurious, crystal),
    coupling: parseCoupling(required(obj, 'coupling', 'parts')),
  };
}
