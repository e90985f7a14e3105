/** The lists of built-ins the dashboard offers: GET /api/scenarios and GET /api/campaigns. */

/** GET /api/scenarios: a built-in scenario by its name and its title. */
export interface ScenarioChoice {
  name: string;
  title: string;
}

/** GET /api/campaigns: a built-in campaign and the built-in scenarios it fits. */
export interface CampaignChoice {
  name: string;
  title: string;
  description: string;
  scenarios: string[];
}
