import { STABILITY_CAUTION } from '../../src/campaign/cautions.js';
import { nearResonances } from '../../src/guide/resonance.js';
import { lockedPatternNoise } from '../../src/noise/locked-noise.js';
import { NO_POWER_LAW_NOISE, addPowerLaw, parsePowerLawNoise, type PowerLawNoise } from '../../src/noise/power-law.js';
import { CATALOGUE_SIZE_LIMIT } from '../../src/predict/catalogue.js';
import { GuideModel } from '../../src/predict/guide-model.js';
import { solveLockedState } from '../../src/predict/locked-state.js';
import { catalogueWithStart } from '../../src/predict/start-pattern.js';
import type { NoiseOutput } from '../../src/protocol/noise-output.js';
import type { Scenario } from '../../src/scenario/types.js';
import { ASSUMED_FREQUENCY_NOTE } from '../../src/scenario/units.js';
import { InputError } from '../../src/util/input-error.js';
import { loadScenario } from '../scenario-file.js';
import { UsageError } from '../usage-error.js';
import { choosePattern } from './pattern-choice.js';

export interface NoiseArgs {
  scenario: string;
  /** Index into predict's `patterns`; default the pattern the initial state settles into. */
  pattern?: number;
  /** Measurement bandwidth of the deviations (Hz). */
  bandwidth?: number;
  /** "h0=...,h-1=..." power-law noise of every part, added to the model's own and the scenario's part noise. */
  partNoise?: string;
}

/** How a caller names the arguments, so that errors quote them as the user typed them. */
export interface NoiseArgumentNames {
  pattern: string;
  bandwidth: string;
  partNoise: string;
}

/** The command line's flags. */
export const NOISE_FLAGS: NoiseArgumentNames = { pattern: '--pattern', bandwidth: '--bandwidth', partNoise: '--part-noise' };

/** The query fields of GET /api/noise. */
export const NOISE_QUERY_NAMES: NoiseArgumentNames = { pattern: 'pattern', bandwidth: 'bandwidth', partNoise: 'partNoise' };

/**
 * `syncring noise`: phase noise and ADEV, MDEV, TDEV of one locked pattern at every time scale,
 * for every node, the array output and one uncoupled part, by linear analysis of the guiding
 * system at the locked state (docs/model.md, 'Noise of a locked pattern').
 */
export function noise(args: NoiseArgs): NoiseOutput {
  const { scenario } = loadScenario(args.scenario);
  return noiseOfScenario(scenario, args.scenario, args);
}

export function noiseOfScenario(
  scenario: Scenario,
  source: string,
  args: Omit<NoiseArgs, 'scenario'>,
  names: NoiseArgumentNames = NOISE_FLAGS,
): NoiseOutput {
  const started = Date.now();
  if (args.bandwidth !== undefined && !(Number.isFinite(args.bandwidth) && args.bandwidth > 0))
    throw new UsageError(`${names.bandwidth} must be a positive number of Hz (got ${args.bandwidth})`);
  const parts = args.partNoise !== undefined ? parsePowerLawNoise(args.partNoise, names.partNoise) : null;
  const model = new GuideModel(scenario);
  if (model.size > CATALOGUE_SIZE_LIMIT) {
    throw new InputError(
      '',
      `${scenario.nodes} nodes x ${model.modes} modes give ${model.size} slow variables; noise handles at most ${CATALOGUE_SIZE_LIMIT}`,
      {
        source,
      },
    );
  }
  const { intensity, detuningWalk } = scenario.noise;
  // the scenario's own part noise (noise.powerLaw or noise.phaseNoise), with the flag's on top
  const scenarioParts = scenario.noise.parts?.map((p): PowerLawNoise => ({ ...NO_POWER_LAW_NOISE, ...p })) ?? null;
  const partNoise =
    scenarioParts || parts
      ? Array.from({ length: model.nodes }, (_, k) => addPowerLaw(scenarioParts?.[k] ?? NO_POWER_LAW_NOISE, parts ?? NO_POWER_LAW_NOISE))
      : null;
  const partsAreQuiet = !partNoise || partNoise.every((p) => Object.values(p).every((h) => h === 0));
  if (!(intensity > 0) && !(detuningWalk > 0) && partsAreQuiet) {
    throw new UsageError(
      'the scenario has no noise (noise.intensity and noise.detuningWalk are 0, no noise.powerLaw or noise.phaseNoise) ' +
        `and no ${names.partNoise} was given: there is nothing to analyse`,
    );
  }

  const { catalogue, settledIndex } = catalogueWithStart(model, scenario);
  const index = choosePattern(catalogue.patterns, args.pattern, settledIndex, names.pattern, 'analyse');
  const chosen = catalogue.patterns[index];
  if (chosen.stable === false) {
    throw new UsageError(
      `pattern ${index} (${chosen.kind}) is unstable: it does not stay locked, so it has no stationary noise; choose a stable one with ${names.pattern}`,
    );
  }
  const warnings = nearResonances(model.params.omega, model.params.epsilon).map((w) => w.message);
  if (chosen.stable === null)
    warnings.push(`pattern ${index} is marginal: its stability is unresolved, and the noise holds only while it stays locked`);
  if (!chosen.wantedMode)
    warnings.push(`pattern ${index} is carried by mode ${chosen.mode}, not the wanted mode: a design defect whatever its noise`);

  const locked = solveLockedState(model.field, Float64Array.from(chosen.state), model.modes, { parts: model.parts() });
  let analysis;
  try {
    analysis = lockedPatternNoise(model, locked, {
      ...(args.bandwidth !== undefined ? { bandwidthHz: args.bandwidth } : {}),
      ...(partNoise ? { partNoise } : {}),
    });
  } catch (error) {
    if (error instanceof RangeError) throw new InputError('', error.message, { source });
    throw error;
  }
  if (args.bandwidth !== undefined && analysis.bandwidthHz < args.bandwidth) {
    warnings.push(`${names.bandwidth} ${args.bandwidth} Hz is above half the carrier; the deviations use ${analysis.bandwidthHz} Hz`);
  }
  return {
    scenario: scenario.name,
    pattern: { index, kind: chosen.kind, q: chosen.q ?? null, mode: chosen.mode, stable: chosen.stable, wantedMode: chosen.wantedMode },
    carrierAssumed: scenario.units.nominalFrequencyAssumed,
    sources: { model: { intensity, detuningWalk }, parts, scenarioParts },
    ...analysis,
    notes: {
      method:
        'linear analysis of the guiding system at the locked state, the common phase kept (it is what drifts); valid while the pattern stays locked and the noise is small',
      phaseNoise: 'L(f) = S_phi(f) / 2 in dBc/Hz of each node, of the array output (the mean phase of the nodes) and of one part alone',
      deviations:
        'ADEV and MDEV from S_y(f) by the NIST SP 1065 integral relations up to bandwidthHz ' +
        '(default f0 / 2, a record taken once per carrier period); TDEV = tau MDEV / sqrt 3 in seconds',
      validity:
        'offsets above averagedModelLimitHz (f0 / 100), and deviations at tau below about 1 / averagedModelLimitHz, ' +
        'rest on the averaged model beyond its range: the resonator selectivity it leaves out shapes real noise there',
      modelNoise:
        "the model's white noise q enters as white FM with amplitude noise beside it; its detuning random walk as random-walk FM; " +
        "the scenario's part noise (noise.powerLaw, noise.phaseNoise) and --part-noise add each part's h2 h1 h0 h-1 h-2",
      seconds: scenario.units.nominalFrequencyAssumed
        ? ASSUMED_FREQUENCY_NOTE
        : `seconds at the scenario's nominal frequency, ${scenario.units.nominalFrequencyHz} Hz`,
    },
    warnings,
    caution: STABILITY_CAUTION,
    wallSeconds: (Date.now() - started) / 1000,
  };
}
