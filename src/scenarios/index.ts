/**
 * Scenarios shipped with syncring. The JSON is bundled (imported, not read from disk) so the
 * engine stays free of file I/O. Names are the file names without ".json".
 */
import { parseScenario } from '../scenario/parse.js';
import type { Scenario } from '../scenario/types.js';
import pairAdler from './pair-adler.json' with { type: 'json' };
import ringOneWay5 from './ring-one-way-5.json' with { type: 'json' };
import timingBoard8 from './timing-board-8.json' with { type: 'json' };
import timingBoard8Campaign from './timing-board-8-campaign.json' with { type: 'json' };

const RAW_BY_NAME: ReadonlyMap<string, unknown> = new Map<string, unknown>([
  ['timing-board-8', timingBoard8],
  ['ring-one-way-5', ringOneWay5],
  ['pair-adler', pairAdler],
]);

/** Names of the built-in scenarios; the first is the demo. */
export const builtInScenarioNames: string[] = [...RAW_BY_NAME.keys()];

/** A fresh copy of a built-in scenario's raw JSON (safe to modify). */
export function builtInScenarioRaw(name: string): unknown {
  const raw = RAW_BY_NAME.get(name);
  if (raw === undefined) {
    throw new Error(`unknown built-in scenario ${JSON.stringify(name)}; available: ${builtInScenarioNames.join(', ')}`);
  }
  return structuredClone(raw);
}

/** A built-in scenario, parsed and normalized. */
export function loadBuiltInScenario(name: string): Scenario {
  return parseScenario(builtInScenarioRaw(name), `built-in scenario ${name}`);
}

/** Fault campaigns shipped beside the scenarios (`<scenario>-campaign.json`), by name. */
const CAMPAIGN_BY_NAME: ReadonlyMap<string, unknown> = new Map<string, unknown>([['timing-board-8-campaign', timingBoard8Campaign]]);

export const builtInCampaignNames: string[] = [...CAMPAIGN_BY_NAME.keys()];

/** A fresh copy of a built-in campaign's raw JSON (validate it with parseCampaign against its scenario). */
export function builtInCampaignRaw(name: string): unknown {
  const raw = CAMPAIGN_BY_NAME.get(name);
  if (raw === undefined) {
    throw new Error(`unknown built-in campaign ${JSON.stringify(name)}; available: ${builtInCampaignNames.join(', ')}`);
  }
  return structuredClone(raw);
}
