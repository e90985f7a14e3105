import { afterAll, describe, expect, test } from 'vitest';
import { HttpError } from '../../server/http/http-error.js';
import type { PredictionRequest } from '../../server/http/prediction-worker.js';
import { BackgroundWorker, compiledHttpWorker } from '../../server/http/worker-client.js';
import { builtInScenarioRaw } from '../../src/scenarios/index.js';

/**
 * The prediction worker's refusals cross a thread boundary as data: the status, the message
 * in the API's own words, and the query field at fault. (The worker once answered in command-line
 * flags and the main thread reworded the text by regular expression.)
 */
describe('prediction worker refusals', () => {
  const worker = new BackgroundWorker<PredictionRequest, Record<string, unknown>>(compiledHttpWorker('prediction-worker'), 'prediction');
  afterAll(() => worker.close());

  async function refusal(request: PredictionRequest): Promise<HttpError> {
    const error = await worker.request(request).then(
      () => null,
      (e: unknown) => e,
    );
    expect(error).toBeInstanceOf(HttpError);
    return error as HttpError;
  }

  test('a bad range: 400, worded in query fields, the field kept as data', async () => {
    const error = await refusal({ scenario: builtInScenarioRaw('ring-one-way-5'), args: { continueIn: 'coupling', range: '1:0' } });
    expect({ status: error.status, field: error.field, message: error.message }).toEqual({
      status: 400,
      field: 'range',
      message: 'range: MIN must be below MAX (got 1:0)',
    });
  });

  test('a bad scenario is named as the live scenario, with the field it fails at', async () => {
    const raw = { ...(builtInScenarioRaw('ring-one-way-5') as Record<string, unknown>), epsilon: 0.7 };
    const error = await refusal({ scenario: raw, args: {} });
    expect({ status: error.status, field: error.field, message: error.message }).toEqual({
      status: 400,
      field: 'epsilon',
      message: 'the live scenario: epsilon: must be between 0 and 0.5 (got 0.7)',
    });
  });
});
