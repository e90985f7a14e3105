import { parentPort } from 'node:worker_threads';
import { parseScenario } from '../../src/scenario/parse.js';
import { InputError } from '../../src/util/input-error.js';
import { predictScenario, type PredictArgs } from '../commands/predict.js';
import { QUERY_NAMES } from '../commands/predict-arguments.js';
import type { PredictOutput } from '../../src/protocol/predict-output.js';
import { HttpError } from './http-error.js';
import type { WorkerReply } from './worker-client.js';

/**
 * Worker-thread home of the dashboard's prediction requests: the catalogue and a continuation
 * take seconds, which must not hold up the event loop serving WebSocket frames. Each request is
 * `syncring predict` itself (server/commands/predict.ts) on a scenario carrying the live
 * parameters, read as "the live scenario" and with its errors worded in the API's query fields.
 *
 * In: {id, scenario (ScenarioJSON), args (PredictArgs without `scenario`)}.
 * Out: {id, ok: true, value: predict's JSON} or {id, ok: false, error: HttpErrorData}.
 */
export interface PredictionRequest {
  scenario: unknown;
  args: Omit<PredictArgs, 'scenario'>;
}

/** What errors about the scenario name it as. */
const LIVE_SCENARIO = 'the live scenario';

if (!parentPort) throw new Error('prediction-worker must run in a worker thread');
const port = parentPort;

port.on('message', (message: PredictionRequest & { id: number }) => {
  port.postMessage(answer(message));
});

function answer({ id, scenario, args }: PredictionRequest & { id: number }): WorkerReply<PredictOutput> {
  try {
    return { id, ok: true, value: predictScenario(parseScenario(scenario, LIVE_SCENARIO), LIVE_SCENARIO, args, QUERY_NAMES) };
  } catch (error) {
    const failure =
      error instanceof InputError ? HttpError.fromInput(error) : new HttpError(500, `prediction failed: ${(error as Error).message}`);
    return { id, ok: false, error: failure.toData() };
  }
}
