/** Public API of the scenario layer: validation, normalization and the engineering-unit mapping. */
export { parseScenario, scenarioToJSON, ringLinks, defaultMacroPeriods, MAX_NODES, DEFAULT_NAME, DEFAULT_AVERAGING_GRID } from './parse.js';
export type { ScenarioJSON } from './parse.js';
export {
  ppmToDelta,
  deltaToPpm,
  qualityToLoss,
  lossToQuality,
  offsetPpmToOmega,
  omegaToOffsetPpm,
  tauToSeconds,
  secondsToTau,
  DEFAULT_NOMINAL_FREQUENCY_HZ,
  ASSUMED_FREQUENCY_TAG,
  ASSUMED_FREQUENCY_NOTE,
} from './units.js';
export type * from './types.js';
