import type { Request } from 'express';
import type { ModelParameters } from '../../src/model/parameters.js';
import { CONTINUATION_SYNTAX } from '../../src/predict/continuation-parameter.js';
import { InputError } from '../../src/util/input-error.js';
import { QUERY_NAMES, continuationArgument } from '../commands/predict-arguments.js';
import { parseRange } from '../commands/predict.js';
import type { PredictionRequest } from './prediction-worker.js';
import { HttpError } from './http-error.js';

/**
 * What a what-if may ask for (README "Security"): enough for any question the dashboard asks
 * (it sends no maxSteps, so the continuation's 200, and ranges of a few locking widths or a few
 * times the live coupling), small enough that one request stays a bounded amount of work.
 */
export const WHAT_IF_BOUNDS = {
  /** Longest PARAM text ("detuning:K", "edge:A-B" with node indices). */
  paramLength: 40,
  pattern: { min: 0, max: 999 },
  /** Accepted continuation steps per direction. */
  maxSteps: { min: 1, max: 1000 },
  /** The largest |MIN| and |MAX| of range, in the parameter's model units. */
  rangeMagnitude: 1e4,
};

const FIELDS = ['param', 'pattern', 'range', 'maxSteps'];

/**
 * The query of GET /api/what-if?param=PARAM[&pattern=INDEX][&range=MIN:MAX][&maxSteps=N], read into
 * predict's arguments. Everything that can be checked without the catalogue is checked here, at
 * once, against WHAT_IF_BOUNDS: an error is a 400 HttpError naming its query field and the
 * values allowed. Whether the pattern index exists is checked by predict itself in the worker,
 * worded with the same query names (QUERY_NAMES).
 */
export function whatIfArguments(req: Request, params: ModelParameters): PredictionRequest['args'] {
  const unknown = Object.keys(req.query).find((name) => !FIELDS.includes(name));
  if (unknown !== undefined) throw new HttpError(400, `${unknown} is not a what-if field (the fields are ${FIELDS.join(', ')})`, unknown);
  const param = oneText(req, 'param');
  if (param === undefined || param.trim() === '') throw new HttpError(400, `param is required: one of ${CONTINUATION_SYNTAX}`, 'param');
  if (param.length > WHAT_IF_BOUNDS.paramLength)
    throw new HttpError(400, `param must be at most ${WHAT_IF_BOUNDS.paramLength} characters, one of ${CONTINUATION_SYNTAX}`, 'param');
  try {
    continuationArgument(param, params, QUERY_NAMES);
  } catch (error) {
    if (error instanceof InputError) throw new HttpError(400, error.message, 'param');
    throw error;
  }
  return {
    continueIn: param.trim(),
    pattern: integerQuery(req, 'pattern', WHAT_IF_BOUNDS.pattern),
    range: rangeQuery(req),
    maxSteps: integerQuery(req, 'maxSteps', WHAT_IF_BOUNDS.maxSteps),
  };
}

export function oneText(req: Request, name: string): string | undefined {
  const value = req.query[name];
  if (value === undefined) return undefined;
  if (typeof value !== 'string') throw new HttpError(400, `${name} must be given once, as text`, name);
  return value;
}

export function integerQuery(req: Request, name: string, bounds: { min: number; max: number }): number | undefined {
  const text = oneText(req, name);
  if (text === undefined) return undefined;
  const value = Number(text);
  if (text.trim() === '' || !Number.isInteger(value) || value < bounds.min || value > bounds.max)
    throw new HttpError(400, `${name} must be an integer from ${bounds.min} to ${bounds.max} (got ${JSON.stringify(text)})`, name);
  return value;
}

/** range=MIN:MAX as predict reads it (either side may be left out), each side within WHAT_IF_BOUNDS. */
function rangeQuery(req: Request): string | undefined {
  const text = oneText(req, 'range');
  if (text === undefined) return undefined;
  let range: { min?: number; max?: number };
  try {
    range = parseRange(text, QUERY_NAMES);
  } catch (error) {
    if (error instanceof InputError) throw new HttpError(400, error.message, 'range');
    throw error;
  }
  const limit = WHAT_IF_BOUNDS.rangeMagnitude;
  if ([range.min, range.max].some((side) => side !== undefined && Math.abs(side) > limit))
    throw new HttpError(
      400,
      `range: MIN and MAX must lie from ${-limit} to ${limit} in model units (got ${JSON.stringify(text)})`,
      'range',
    );
  return text;
}
