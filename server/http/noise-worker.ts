import { parentPort } from 'node:worker_threads';
import { parseScenario } from '../../src/scenario/parse.js';
import { InputError } from '../../src/util/input-error.js';
import type { NoiseOutput } from '../../src/protocol/noise-output.js';
import { NOISE_QUERY_NAMES, noiseOfScenario, type NoiseArgs } from '../commands/noise.js';
import { HttpError } from './http-error.js';
import type { WorkerReply } from './worker-client.js';

/**
 * Worker-thread home of GET /api/noise: `syncring noise` itself (server/commands/noise.ts) on a
 * scenario carrying the live parameters, its errors worded in the query's field names. The
 * catalogue it starts from takes a second or more, which must not hold up WebSocket frames.
 *
 * In: {id, scenario (ScenarioJSON), args}. Out: {id, ok: true, value} or {id, ok: false, error}.
 */
export interface NoiseRequest {
  scenario: unknown;
  args: Omit<NoiseArgs, 'scenario'>;
}

const LIVE_SCENARIO = 'the live scenario';

if (!parentPort) throw new Error('noise-worker must run in a worker thread');
const port = parentPort;

port.on('message', ({ id, scenario, args }: NoiseRequest & { id: number }) => {
  let reply: WorkerReply<NoiseOutput>;
  try {
    reply = { id, ok: true, value: noiseOfScenario(parseScenario(scenario, LIVE_SCENARIO), LIVE_SCENARIO, args, NOISE_QUERY_NAMES) };
  } catch (error) {
    const failure =
      error instanceof InputError ? HttpError.fromInput(error) : new HttpError(500, `noise analysis failed: ${(error as Error).message}`);
    reply = { id, ok: false, error: failure.toData() };
  }
  port.postMessage(reply);
});
