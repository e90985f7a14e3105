/**
 * The one error type for input someone must fix: a scenario, a campaign, a WebSocket command,
 * a perturbation, a file, a request. It keeps the offending field and the reason apart, so each
 * audience shows them its own way (the WebSocket answer as `path` and `reason`, the command line
 * after the file name) and nobody takes a message apart again. The message is composed here only:
 * `"<source>: <path>: <reason>"`, leaving out the parts that are empty.
 */

/** What crosses a thread or a process boundary (an Error itself loses its fields when cloned). */
export interface InputErrorData {
  path: string;
  reason: string;
  source?: string;
  requestId?: string | number | null;
}

export interface InputErrorOptions {
  source?: string;
  requestId?: string | number | null;
}

export class InputError extends Error {
  /** The offending field, e.g. `faults[2].params.node` or `modes[1].omega`; '' for the input as a whole. */
  readonly path: string;
  /** What is wrong with it, e.g. `must be a finite number (got NaN)`. */
  readonly reason: string;
  /** What was being read (a file name, "built-in scenario pair-adler"), if the reader named it. */
  readonly source: string | undefined;
  /** The id of the request the input came with (a WebSocket command's `id`), so the answer can name it; null when there is none. */
  readonly requestId: string | number | null;

  constructor(path: string, reason: string, options: InputErrorOptions = {}) {
    super(composeMessage(options.source, path, reason));
    this.name = 'InputError';
    this.path = path;
    this.reason = reason;
    this.source = options.source;
    this.requestId = options.requestId ?? null;
  }

  /** The same error, read from `source` (a parser names what it read once, where it was called). */
  from(source: string): InputError {
    return new InputError(this.path, this.reason, { source, requestId: this.requestId });
  }

  /** The same error one level down: its path under `parent` (a scenario inside a command is `scenario.nodes`). */
  under(parent: string): InputError {
    return new InputError(nestedPath(parent, this.path), this.reason, { source: this.source, requestId: this.requestId });
  }

  /** The same error answering the request `requestId`. */
  answering(requestId: string | number | null): InputError {
    return new InputError(this.path, this.reason, { source: this.source, requestId });
  }

  toData(): InputErrorData {
    return {
      path: this.path,
      reason: this.reason,
      ...(this.source !== undefined ? { source: this.source } : {}),
      requestId: this.requestId,
    };
  }

  static fromData(data: InputErrorData): InputError {
    return new InputError(data.path, data.reason, { source: data.source, requestId: data.requestId });
  }
}

/** Throws an InputError: the way of failing the shared JSON field checks use unless told otherwise. */
export function failInput(path: string, reason: string): never {
  throw new InputError(path, reason);
}

function composeMessage(source: string | undefined, path: string, reason: string): string {
  return [source, path, reason].filter((part) => part !== undefined && part !== '').join(': ');
}

/** `parent` + `path` as one field path: `scenario` + `nodes` is `scenario.nodes`, + `[2]` is `scenario[2]`. */
function nestedPath(parent: string, path: string): string {
  if (parent === '') return path;
  if (path === '') return parent;
  return path.startsWith('[') ? `${parent}${path}` : `${parent}.${path}`;
}
