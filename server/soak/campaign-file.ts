import { existsSync, readFileSync } from 'node:fs';
import { parseCampaign, type Campaign } from '../../src/campaign/index.js';
import type { Scenario } from '../../src/scenario/types.js';
import { builtInCampaignNames, builtInCampaignRaw } from '../../src/scenarios/index.js';
import { UsageError, parseJsonText } from '../scenario-file.js';

/**
 * A campaign from a JSON file, or a built-in campaign by name when no such file exists,
 * validated against the scenario it will run on. Errors name the file and the field.
 */
export function loadCampaign(pathOrName: string, scenario: Scenario): { campaign: Campaign; raw: unknown; source: string } {
  if (!existsSync(pathOrName)) {
    if (builtInCampaignNames.includes(pathOrName)) {
      const raw = builtInCampaignRaw(pathOrName);
      return { campaign: parseCampaign(raw, scenario, `built-in campaign ${pathOrName}`), raw, source: `built-in:${pathOrName}` };
    }
    throw new UsageError(`${pathOrName}: no such file (built-in campaigns: ${builtInCampaignNames.join(', ')})`);
  }
  let text: string;
  try {
    text = readFileSync(pathOrName, 'utf8');
  } catch (error) {
    throw new UsageError(`${pathOrName}: cannot be read: ${(error as Error).message}`);
  }
  const raw = parseJsonText(text, pathOrName);
  return { campaign: parseCampaign(raw, scenario, pathOrName), raw, source: pathOrName };
}
