import type { ModelParameters } from '../../src/model/parameters.js';
import { parseContinuationParameter, type ContinuationParameter } from '../../src/predict/continuation-parameter.js';
import { InputError } from '../../src/util/input-error.js';

/**
 * How predict's arguments are named to whoever gave them: flags on the command line, query
 * fields in the HTTP API. predict words its errors with the caller's names, so each audience
 * reads its own and no message is reworded on the way.
 */
export interface ArgumentNames {
  continueIn: string;
  pattern: string;
  range: string;
  maxSteps: string;
  basins: string;
  /** An argument together with the value it was given: `--continue coupling`, `param=coupling`. */
  given(name: string, value: string): string;
}

export const FLAG_NAMES: ArgumentNames = {
  continueIn: '--continue',
  pattern: '--pattern',
  range: '--range',
  maxSteps: '--max-steps',
  basins: '--basins',
  given: (name, value) => `${name} ${value}`,
};

/** The query fields of GET /api/what-if. */
export const QUERY_NAMES: ArgumentNames = {
  continueIn: 'param',
  pattern: 'pattern',
  range: 'range',
  maxSteps: 'maxSteps',
  basins: 'basins',
  given: (name, value) => `${name}=${value}`,
};

/**
 * The continuation parameter `text` names. An error's path is the argument as it was given
 * (`--continue speed: unknown parameter "speed" ...`, `param=speed: ...`).
 */
export function continuationArgument(text: string, params: ModelParameters, names: ArgumentNames): ContinuationParameter {
  try {
    return parseContinuationParameter(text, params);
  } catch (error) {
    if (error instanceof InputError) throw error.under(names.given(names.continueIn, text.trim()));
    throw error;
  }
}
