import { parseCampaign, type Campaign } from '../../src/campaign/index.js';
import type { Scenario } from '../../src/scenario/types.js';
import { builtInCampaignNames, builtInCampaignRaw } from '../../src/scenarios/index.js';
import { inlineCampaignMask } from '../report/mask-file.js';
import { loadJsonInput } from '../scenario-file.js';

/**
 * A campaign from a JSON file, or a built-in campaign by name when no such file exists,
 * validated against the scenario it will run on. Errors name the file and the field.
 */
export function loadCampaign(pathOrName: string, scenario: Scenario): { campaign: Campaign; raw: unknown; source: string } {
  const read = loadJsonInput(pathOrName, { kind: 'campaign', names: builtInCampaignNames, raw: builtInCampaignRaw });
  const { source, label } = read;
  const raw = inlineCampaignMask(read.raw, source);
  return { campaign: parseCampaign(raw, scenario, label), raw, source };
}
