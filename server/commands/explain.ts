import type { ExplainOutput } from '../../src/protocol/explain-output.js';
import { explainScenario } from '../../src/scenario/parts/explain.js';
import { loadScenario } from '../scenario-file.js';

/** `syncring explain SCENARIO.json`: every model number of a board described by its parts, with its formula and source. */
export function explain(pathOrName: string): ExplainOutput {
  const { scenario } = loadScenario(pathOrName);
  return explainScenario(scenario, pathOrName);
}
