import { readFileSync } from 'node:fs';
import { parseScenario } from '../../src/scenario/parse.js';
import type { ModeState, Scenario } from '../../src/scenario/types.js';

export interface ReferenceCase {
  scenario: Scenario;
  samples: { tau: number; state: ModeState[][] }[];
  selfCheckMaxDiff: number;
  scipy: string;
  limitCycle?: { period: number; maxX: number };
}

/** A SciPy DOP853 reference case from tests/reference (made by make_reference.py). */
export function loadReference(name: string): ReferenceCase {
  const dir = new URL('../reference/', import.meta.url);
  const data = JSON.parse(readFileSync(new URL(`${name}.dop853.json`, dir), 'utf8'));
  const raw = JSON.parse(readFileSync(new URL(data.scenario, dir), 'utf8'));
  return { ...data, scenario: parseScenario(raw, data.scenario) };
}
