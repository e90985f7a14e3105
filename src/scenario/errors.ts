/**
 * The one error type for bad scenario input. It carries the field path (for example
 * `modes[1].omega`, `topology.edges[3][2]`, `initial.state[2][0].xdot`; the empty string means
 * the scenario as a whole) and the reason separately, so callers such as the server can show them
 * side by side, while the message reads `"<source>: <path>: <reason>"`.
 */
export class ScenarioError extends Error {
  /** Path of the offending field; '' for the scenario itself. */
  readonly path: string;
  /** What is wrong with it, e.g. `must be a finite number (got NaN)`. */
  readonly reason: string;
  /** Where the scenario came from (a file name, "built-in scenario ..."), if known. */
  readonly source: string | undefined;

  constructor(path: string, reason: string, source?: string) {
    super([source, path, reason].filter((part) => part !== undefined && part !== '').join(': '));
    this.name = 'ScenarioError';
    this.path = path;
    this.reason = reason;
    this.source = source;
  }
}
