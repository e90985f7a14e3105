import { PARTS_CAUTION } from '../../campaign/cautions.js';
import type { ExplainOutput } from '../../protocol/explain-output.js';
import { InputError } from '../../util/input-error.js';
import { scenarioToJSON } from '../parse.js';
import type { Scenario } from '../types.js';
import { DERIVATION } from './derivation-steps.js';

/** `syncring explain`: a board described by its parts, with every model number and where it comes from. */
export function explainScenario(scenario: Scenario, source?: string): ExplainOutput {
  const parts = scenario.parts;
  if (parts === undefined) {
    throw new InputError(
      'parts',
      'is missing: explain shows how model numbers follow from a board\'s parts, and this scenario gives model numbers directly (README, "The parts section")',
      {
        ...(source !== undefined ? { source } : {}),
      },
    );
  }
  const detunings = parts.nodes.map((n) => n.detuningPpm);
  const spurious = parts.spec.spurious;
  const margins = parts.nodes.flatMap((n) => (n.spurious ? [n.spurious.startupMargin] : []));
  return {
    scenario: scenario.name,
    nodes: parts.nodes,
    model: scenarioToJSON(scenario),
    board: {
      nominalFrequencyHz: parts.nominalFrequencyHz,
      nominalFrequencyFrom: parts.nominalFrequencyFromCrystal ? 'nominal crystal at its nominal load' : 'given',
      epsilon: parts.epsilon,
      epsilonFrom: parts.epsilonFromQuality ? 'R1 / (2 pi f0 L1) of the nominal crystal' : 'given',
      coupling: parts.coupling,
      detuningSpanPpm: Math.max(...detunings) - Math.min(...detunings),
      spurious:
        spurious && parts.spuriousOffsetPpm !== null
          ? { offsetHz: spurious.offsetHz, offsetPpmAtLoad: parts.spuriousOffsetPpm, startupMarginMax: Math.max(...margins) }
          : null,
      wattsAtUnitAmplitude: parts.wattsAtUnitAmplitude,
    },
    parts: parts.spec,
    derivation: [...DERIVATION],
    warnings: [...parts.warnings],
    caution: PARTS_CAUTION,
  };
}
