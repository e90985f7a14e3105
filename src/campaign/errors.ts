/**
 * The one error type for bad campaign input. Like ScenarioError it carries the field path
 * (`faults[2].params.node`, `random.actions[0].rate`; '' for the campaign itself) and the reason
 * separately; the message reads `"<source>: <path>: <reason>"`.
 */
export class CampaignError extends Error {
  readonly path: string;
  readonly reason: string;
  readonly source: string | undefined;

  constructor(path: string, reason: string, source?: string) {
    super([source, path, reason].filter((part) => part !== undefined && part !== '').join(': '));
    this.name = 'CampaignError';
    this.path = path;
    this.reason = reason;
    this.source = source;
  }
}
