import { nearResonances } from '../../src/guide/resonance.js';
import { GuideModel } from '../../src/predict/guide-model.js';
import { CATALOGUE_SIZE_LIMIT } from '../../src/predict/catalogue.js';
import { continueBranch, type Branch } from '../../src/predict/continuation.js';
import { CONTINUATION_SYNTAX } from '../../src/predict/continuation-parameter.js';
import { catalogueWithStart } from '../../src/predict/start-pattern.js';
import { catalogueWithBasins, MAX_BASIN_STARTS } from '../../src/yield/basins.js';
import type { Scenario } from '../../src/scenario/types.js';
import { ASSUMED_FREQUENCY_NOTE } from '../../src/scenario/units.js';
import type { ContinuationOutput, PredictOutput } from '../../src/protocol/predict-output.js';
import { InputError } from '../../src/util/input-error.js';
import { loadScenario } from '../scenario-file.js';
import { UsageError, callError } from '../usage-error.js';
import { choosePattern } from './pattern-choice.js';
import { FLAG_NAMES, continuationArgument, type ArgumentNames } from './predict-arguments.js';

export interface PredictArgs {
  scenario: string;
  /** Parameter to continue in (see CONTINUATION_SYNTAX). */
  continueIn?: string;
  /** Index into `patterns` of the pattern to continue; default the one the initial state settles into. */
  pattern?: number;
  /** "MIN:MAX" bounds for the continued parameter. */
  range?: string;
  /** Accepted continuation steps per direction. */
  maxSteps?: number;
  /** Seeded random starts whose destinations give each pattern's start-up probability. */
  basins?: number;
}

/** "MIN:MAX" with either side optional ("0:", ":0.3"); errors name the argument as `names` call it. */
export function parseRange(text: string, names: ArgumentNames): { min?: number; max?: number } {
  const match = /^\s*([^:]*):([^:]*)\s*$/.exec(text);
  if (!match) throw new UsageError(`${names.range} must look like MIN:MAX, e.g. -0.1:0.1 (got ${JSON.stringify(text)})`);
  const side = (word: string, name: string): number | undefined => {
    if (word.trim() === '') return undefined;
    const value = Number(word);
    if (!Number.isFinite(value)) throw new InputError(names.range, `${name} ${JSON.stringify(word)} is not a number`);
    return value;
  };
  const range = { min: side(match[1], 'MIN'), max: side(match[2], 'MAX') };
  if (range.min !== undefined && range.max !== undefined && !(range.min < range.max))
    throw new InputError(names.range, `MIN must be below MAX (got ${text})`);
  return range;
}

/**
 * `syncring predict`: the catalogue of locked patterns of the guiding system with their
 * stability, what the scenario's initial state settles into, and with --continue the branch of
 * one pattern in one parameter with its limits (also in ppm for a detuning).
 */
export function predict(args: PredictArgs): PredictOutput {
  const { scenario } = loadScenario(args.scenario);
  return predictScenario(scenario, args.scenario, args, FLAG_NAMES);
}

/**
 * predict on a scenario already read from `source` (named in errors about the scenario), with
 * errors about the arguments worded in `names` (the command line's flags or the API's query fields).
 */
export function predictScenario(
  scenario: Scenario,
  source: string,
  args: Omit<PredictArgs, 'scenario'>,
  names: ArgumentNames,
): PredictOutput {
  const model = new GuideModel(scenario);
  if (model.size > CATALOGUE_SIZE_LIMIT) {
    throw new InputError(
      '',
      `${scenario.nodes} nodes x ${model.modes} modes give ${model.size} slow variables; predict handles at most ${CATALOGUE_SIZE_LIMIT}`,
      { source },
    );
  }
  const parameter = args.continueIn !== undefined ? continuationArgument(args.continueIn, model.params, names) : null;
  const range = args.range !== undefined ? parseRange(args.range, names) : undefined;
  const needsParameter = (name: string) => callError(`${name} needs ${names.given(names.continueIn, 'PARAM')}`);
  if (range && !parameter) throw needsParameter(names.range);
  if (args.pattern !== undefined && !parameter) throw needsParameter(names.pattern);
  if (args.maxSteps !== undefined && (!Number.isInteger(args.maxSteps) || args.maxSteps < 1))
    throw new UsageError(`${names.maxSteps} must be a positive integer (got ${args.maxSteps})`);

  if (args.basins !== undefined && !(Number.isInteger(args.basins) && args.basins >= 1 && args.basins <= MAX_BASIN_STARTS))
    throw new UsageError(`${names.basins} must be a whole number of starts, 1 to ${MAX_BASIN_STARTS} (got ${args.basins})`);

  const started = Date.now();
  const counted = args.basins !== undefined ? catalogueWithBasins(model, scenario, args.basins) : null;
  const plain = counted ? null : catalogueWithStart(model, scenario);
  const catalogue = counted ? counted.catalogue : plain!.catalogue;
  const settledIndex = counted ? counted.settledIndex : plain!.settledIndex;
  const destination = counted ? { settled: counted.initialSettled, slowTime: counted.initialSlowTime } : plain!.destination;

  const result: PredictOutput = {
    scenario: scenario.name,
    nodes: model.nodes,
    modes: model.modes,
    epsilon: model.params.epsilon,
    nominalFrequency: { hz: scenario.units.nominalFrequencyHz, assumed: scenario.units.nominalFrequencyAssumed },
    group: catalogue.group,
    parts: catalogue.parts,
    notes: {
      units:
        'eigenvalues, margins and rotation rates are in slow time (per unit eps tau); timeConstant = 1/|margin| in slow time, tau, carrier periods and seconds',
      seconds: scenario.units.nominalFrequencyAssumed
        ? ASSUMED_FREQUENCY_NOTE
        : `seconds at the scenario's nominal frequency, ${scenario.units.nominalFrequencyHz} Hz`,
      mirror:
        'rotations and phase shifts make copies of a pattern (one entry; candidate.conjugates counts them); ' +
        'a reflection makes its mirror image (a rotating wave q becomes N - q), an entry of its own linked through mirror.partner, ' +
        'or mirror.relation "self" when the image is a copy',
      marginal:
        'a pattern is marginal when |margin| <= marginTolerance = eps rateScale K / omega_min + 1e-8 max(1, rateScale), ' +
        'K the coupling rate: the first-order guiding system cannot resolve its sign',
    },
    patterns: catalogue.patterns.map((p, index) => ({ index, ...p })),
    initial: {
      settled: destination.settled,
      slowTime: destination.slowTime,
      pattern: settledIndex >= 0 ? settledIndex : null,
    },
    warnings: nearResonances(model.params.omega, model.params.epsilon).map((w) => w.message),
    classesExamined: catalogue.classesExamined,
    solves: catalogue.solves,
    mirrors: catalogue.mirrors,
    numbering: catalogue.numbering,
    search: catalogue.search,
    ...(counted ? { basins: counted.basins } : {}),
    wallSeconds: 0,
  };

  if (parameter) {
    const chosen = choosePattern(catalogue.patterns, args.pattern, settledIndex, names.pattern, 'continue');
    let branch: Branch;
    try {
      branch = continueBranch(model, Float64Array.from(catalogue.patterns[chosen].state), parameter, {
        ...(range ? { range } : {}),
        ...(args.maxSteps !== undefined ? { maxSteps: args.maxSteps } : {}),
      });
    } catch (error) {
      if (error instanceof RangeError) throw new InputError(names.given(names.continueIn, args.continueIn!), error.message);
      throw error;
    }
    result.continuation = {
      parameter: args.continueIn!,
      syntax: CONTINUATION_SYNTAX,
      pattern: {
        index: chosen,
        kind: catalogue.patterns[chosen].kind,
        q: catalogue.patterns[chosen].q ?? null,
        mode: catalogue.patterns[chosen].mode,
      },
      ...summariseBranch(branch),
    } satisfies ContinuationOutput;
  }
  result.wallSeconds = (Date.now() - started) / 1000;
  return result;
}

function summariseBranch(branch: Branch): Omit<ContinuationOutput, 'parameter' | 'syntax' | 'pattern'> {
  const { decreasing, increasing } = branch.limits;
  return {
    name: branch.parameter.name,
    start: branch.parameter.start,
    startPpm: branch.parameter.startPpm,
    limits: { decreasing, increasing },
    range: {
      lower: decreasing?.parameter ?? null,
      upper: increasing?.parameter ?? null,
      lowerPpm: decreasing?.ppm ?? null,
      upperPpm: increasing?.ppm ?? null,
      lowerKind: decreasing?.kind ?? null,
      upperKind: increasing?.kind ?? null,
    },
    startIndex: branch.startIndex,
    steps: branch.steps,
    branch: branch.points,
  };
}
