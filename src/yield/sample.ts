/**
 * One board of a yield study: its parameters drawn from the study's tolerances with the sample's
 * own seed, its start, and how it fares. The guiding system judges every sample: the look-ahead
 * (predict/look-ahead.ts) follows it from its start until it settles on a stable locked state, with
 * the lock detector's tolerance and slip rule; the locked state's pattern comes from the snapshot
 * classifier (pattern/classify.ts, strained twisted states named by pattern/twist.ts), its margin
 * and output frequency from the catalogue's description (predict/describe.ts). The samples picked
 * for confirmation run again with the full equations in a co-simulation, judged by its lock
 * detector. Everything is a pure function of the study and the sample's index.
 */
import type { Scenario } from '../scenario/types.js';
import { initialRotatingState } from '../model/initial.js';
import { GuideModel } from '../predict/guide-model.js';
import { lookAhead } from '../predict/look-ahead.js';
import { describeLockedState } from '../predict/describe.js';
import { loneAmplitude } from '../predict/catalogue.js';
import { classifySnapshot } from '../pattern/classify.js';
import { twistOf } from '../pattern/twist.js';
import { carryingMode, modeAmplitudes } from '../observe/amplitudes.js';
import { patternIdentity } from '../session/pattern-tracker.js';
import { CoSimulation } from '../session/session.js';
import { Random } from '../util/random.js';
import type { SampleOutcome, SamplePattern, YieldSampleRecord } from '../protocol/yield-files.js';
import { draw } from './distributions.js';
import { sampleSeed } from './seeds.js';
import type { Criteria, Study } from './study.js';

/**
 * Coupling times (1 / coupling rate) the look-ahead runs past `within`: it recognises a settled
 * state only at the end of a coupling time, so a board that arrived just before `within` must be
 * given that long to be seen arriving.
 */
const LOOK_AHEAD_SLACK = 4;
/** Field evaluations per coupling time of the look-ahead's budget: a generous multiple of what a settling board uses (a few hundred). */
const EVALUATIONS_PER_COUPLING_TIME = 2_000;
/** Slowest coupling rate assumed when sizing the budget (the look-ahead clamps to the same). */
const MIN_RATE = 1e-3;
/** Amplitude given to a mode that cannot oscillate alone (gain <= loss) in a random start: a little noise, not nothing. */
const QUIET_MODE_AMPLITUDE = 1e-3;

export interface SampleSetup {
  scenario: Scenario;
  seed: number;
  parameters: Record<string, number>;
  startSeed: number | null;
  sweepValue: number | null;
}

/**
 * The random start of a board, as at power-up: every node and mode gets a seeded random phase and
 * a modulus uniform in [A/2, A] (model/initial.ts), A per mode the scenario's own random amplitude
 * when it starts at random, else each mode's lone amplitude. Yield studies and basin counts start
 * from it alike.
 */
export function randomStart(scenario: Scenario, seed: number): Scenario['initial'] {
  return { random: { seed, amplitude: startAmplitude(scenario) } };
}

function startAmplitude(scenario: Scenario): number[] {
  const init = scenario.initial;
  if ('random' in init) {
    const a = init.random.amplitude;
    return Array.isArray(a) ? [...a] : scenario.modes.map(() => a);
  }
  return scenario.modes.map((m) => loneAmplitude(m.gain, m.loss) || QUIET_MODE_AMPLITUDE);
}

/** The board of sample `sample` at sweep point `point`: a fresh scenario with its drawn parameters and start. */
export function sampleSetup(study: Study, point: number, sample: number): SampleSetup {
  const seed = sampleSeed(study.seed, sample);
  const random = new Random(seed);
  const scenario = structuredClone(study.scenario);
  // the start and the noise first, so that adding a tolerance does not change the boards' starts
  const startSeed = random.nextUint32();
  const noiseSeed = random.nextUint32();
  scenario.noise.seed = noiseSeed;
  let sweepValue: number | null = null;
  if (study.sweep) {
    sweepValue = study.sweep.values[point];
    for (const c of study.sweep.parameter.components) c.write(scenario, sweepValue);
  }
  const parameters: Record<string, number> = {};
  for (const t of study.tolerances) {
    t.parameter.components.forEach((c, i) => {
      const d = t.distributions[i];
      // a normal without a mean of its own is centred on the value the board has now (a sweep moves it)
      const centred = d.kind !== 'uniform' && t.spec.mean === undefined ? { ...d, mean: c.read(scenario) } : d;
      const value = draw(centred, random);
      c.write(scenario, value);
      parameters[c.label] = value;
    });
  }
  if (study.start === 'random') scenario.initial = randomStart(study.scenario, startSeed);
  scenario.name = `${study.scenario.name}, sample ${point * study.samples + sample}`;
  return { scenario, seed, parameters, startSeed: study.start === 'random' ? startSeed : null, sweepValue };
}

/** The pattern of a locked state `y`: the classifier's kind, a cluster renamed by its twist when it is a strained twisted state. */
export function patternOfState(y: Float64Array, nodes: number, modes: number): SamplePattern {
  const mode = carryingMode(y, nodes, modes);
  const { re, im } = modeAmplitudes(y, nodes, modes, mode);
  const shape = classifySnapshot(re, im);
  let kind = shape.kind;
  let q = shape.q ?? null;
  let strained = false;
  if (kind === 'cluster') {
    const twist = twistOf(re, im);
    if (twist?.belongs) {
      q = twist.q;
      kind = q === 0 ? 'in-phase' : 2 * q === nodes ? 'anti-phase' : 'rotating-wave';
      strained = true;
    }
  }
  return { kind, q, mode, label: patternIdentity(kind, q ?? undefined, mode), strained };
}

/** Why a locked board fails the criteria (margin left to the caller): empty when it passes. */
function patternReasons(criteria: Criteria, pattern: SamplePattern, lockTime: number | null): string[] {
  const reasons: string[] = [];
  if (pattern.mode !== criteria.mode) reasons.push(`locked on mode ${pattern.mode}, wanted mode ${criteria.mode}`);
  if (criteria.pattern !== null && (pattern.kind !== criteria.pattern || (criteria.q !== null && pattern.q !== criteria.q))) {
    const wanted = criteria.q !== null ? `${criteria.pattern} q=${criteria.q}` : criteria.pattern;
    reasons.push(`locked into ${pattern.label}, wanted ${wanted}`);
  }
  if (lockTime !== null && lockTime > criteria.within)
    reasons.push(`locked after ${lockTime.toPrecision(4)} slow time units, later than ${criteria.within}`);
  return reasons;
}

function unlocked(reason: string): SampleOutcome {
  return {
    pass: false,
    reasons: [reason],
    locked: false,
    pattern: null,
    lockTime: null,
    margin: null,
    stability: null,
    outputOffsetPpm: null,
  };
}

/** The guiding system's verdict on one board (see the module header). */
export function judgeWithGuide(scenario: Scenario, criteria: Criteria): SampleOutcome {
  const model = new GuideModel(scenario);
  const start = initialRotatingState(scenario, model.params);
  const rate = Math.max(model.couplingRate(), MIN_RATE);
  const maxSlowTime = criteria.within + LOOK_AHEAD_SLACK / rate;
  const destination = lookAhead(model, start, {
    maxSlowTime,
    maxEvaluations: Math.ceil(EVALUATIONS_PER_COUPLING_TIME * maxSlowTime * rate),
  });
  if (!destination.settled || !destination.locked || !destination.stability) {
    const budget =
      destination.slowTime < criteria.within ? ` (the look-ahead's budget ran out at ${destination.slowTime.toPrecision(4)})` : '';
    return unlocked(`did not lock within ${criteria.within} slow time units${budget}`);
  }
  const { nodes, modes } = model.params;
  const description = describeLockedState(model, destination.locked, destination.stability, []);
  const pattern = patternOfState(destination.state, nodes, modes);
  const lockTime = destination.transitSlowTime;
  const reasons = patternReasons(criteria, pattern, lockTime);
  const margin = description.margin;
  if (criteria.minMargin !== null && !(-margin >= criteria.minMargin)) {
    reasons.push(`margin ${margin.toPrecision(3)} per slow time unit: decays slower than minMargin ${criteria.minMargin}`);
  }
  return {
    pass: reasons.length === 0,
    reasons,
    locked: true,
    pattern,
    lockTime,
    margin,
    stability: description.stability,
    outputOffsetPpm: description.outputOffsetPpm,
  };
}

/**
 * The full equations' verdict on one board: a co-simulation run to `within` plus one lock window,
 * judged by its lock detector. The lock time is where the settled window began (the detector
 * declares a lock at the end of a window that stayed settled). The margin criterion is the
 * guiding system's alone.
 */
export function judgeWithFullSystem(scenario: Scenario, criteria: Criteria): SampleOutcome {
  const session = new CoSimulation(scenario);
  const eps = scenario.epsilon;
  if (!(eps > 0)) return unlocked('epsilon is 0: nothing couples');
  const frame = session.runUntil(criteria.within / eps + session.lock.window);
  if (!frame || frame.status === 'halted') return unlocked(`the full system halted: ${session.halted ?? 'no frame'}`);
  const report = frame.full.pattern;
  if (!report.locked || report.lockedSince === null)
    return unlocked(`the full system did not lock within ${criteria.within} slow time units`);
  const lockTime = Math.max(0, (report.lockedSince - session.lock.window) * eps);
  const pattern = patternOfState(session.full.state, session.params.nodes, session.params.modes);
  const reasons = patternReasons(criteria, pattern, lockTime);
  return { pass: reasons.length === 0, reasons, locked: true, pattern, lockTime, margin: null, stability: null, outputOffsetPpm: null };
}

/** The guide's verdict with the margin criterion left out: what the full system is compared with. */
function passesWithoutMargin(outcome: SampleOutcome): boolean {
  return outcome.locked && outcome.reasons.every((r) => r.startsWith('margin '));
}

/** The record of sample `sample` at sweep point `point` (with the full system when `confirm` says so). */
export function runSample(study: Study, point: number, sample: number, confirm: boolean): YieldSampleRecord {
  const setup = sampleSetup(study, point, sample);
  const guide = judgeWithGuide(setup.scenario, study.criteria);
  const record: YieldSampleRecord = {
    index: point * study.samples + sample,
    point,
    sample,
    seed: setup.seed,
    sweepValue: setup.sweepValue,
    parameters: setup.parameters,
    startSeed: setup.startSeed,
    guide,
    pass: guide.pass,
  };
  if (confirm) {
    const full = judgeWithFullSystem(setup.scenario, study.criteria);
    const agrees = full.pass === passesWithoutMargin(guide) && (full.pattern?.label ?? null) === (guide.pattern?.label ?? null);
    record.full = { ...full, agrees };
  }
  return record;
}

/** Whether sample `sample` is one of those re-run with the full system. */
export function isConfirmed(study: Study, sample: number): boolean {
  return binarySearch(study.confirmIndices, sample);
}

function binarySearch(sorted: readonly number[], value: number): boolean {
  let low = 0;
  let high = sorted.length - 1;
  while (low <= high) {
    const mid = (low + high) >> 1;
    if (sorted[mid] === value) return true;
    if (sorted[mid] < value) low = mid + 1;
    else high = mid - 1;
  }
  return false;
}

/** The record at global index `index` (point * samples + sample). */
export function runIndex(study: Study, index: number): YieldSampleRecord {
  const point = Math.floor(index / study.samples);
  const sample = index % study.samples;
  return runSample(study, point, sample, isConfirmed(study, sample));
}
