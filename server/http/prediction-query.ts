import type { Request } from 'express';
import type { ModelParameters } from '../../src/model/parameters.js';
import { CONTINUATION_SYNTAX } from '../../src/predict/continuation-parameter.js';
import { InputError } from '../../src/util/input-error.js';
import { QUERY_NAMES, continuationArgument } from '../commands/predict-arguments.js';
import type { PredictionRequest } from './prediction-worker.js';
import { HttpError } from './http-error.js';

/**
 * The query of GET /api/what-if?param=PARAM[&pattern=INDEX][&range=MIN:MAX][&maxSteps=N], read into
 * predict's arguments. What can be checked without the catalogue is checked here, at once; an
 * error is a 400 HttpError naming its query field. The range and the pattern index are checked
 * by predict itself in the worker, worded with the same query names (QUERY_NAMES).
 */
export function whatIfArguments(req: Request, params: ModelParameters): PredictionRequest['args'] {
  const param = oneText(req, 'param');
  if (param === undefined || param.trim() === '') throw new HttpError(400, `param is required: one of ${CONTINUATION_SYNTAX}`, 'param');
  try {
    continuationArgument(param, params, QUERY_NAMES);
  } catch (error) {
    if (error instanceof InputError) throw new HttpError(400, error.message, 'param');
    throw error;
  }
  return {
    continueIn: param.trim(),
    pattern: integerQuery(req, 'pattern', 0),
    range: oneText(req, 'range'),
    maxSteps: integerQuery(req, 'maxSteps', 1),
  };
}

export function oneText(req: Request, name: string): string | undefined {
  const value = req.query[name];
  if (value === undefined) return undefined;
  if (typeof value !== 'string') throw new HttpError(400, `${name} must be given once, as text`, name);
  return value;
}

export function integerQuery(req: Request, name: string, min: number): number | undefined {
  const text = oneText(req, name);
  if (text === undefined) return undefined;
  const value = Number(text);
  if (text.trim() === '' || !Number.isInteger(value) || value < min)
    throw new HttpError(400, `${name} must be an integer >= ${min} (got ${JSON.stringify(text)})`, name);
  return value;
}
