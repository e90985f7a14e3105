import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parentPort } from 'node:worker_threads';
import { ScenarioError } from '../../src/scenario/errors.js';
import { predict, type PredictArgs } from '../commands/predict.js';
import type { PredictOutput } from '../../src/protocol/predict-output.js';
import { UsageError } from '../scenario-file.js';
import type { WorkerReply } from './worker-client.js';

/**
 * Worker-thread home of the dashboard's prediction requests: the catalogue and a continuation
 * take seconds, which must not hold up the event loop serving WebSocket frames. Each request is
 * `syncring predict` itself (server/commands/predict.ts) on a scenario carrying the live
 * parameters; predict reads scenarios from files, so the scenario goes through a private
 * temporary file that is removed at once.
 *
 * In: {id, scenario (ScenarioJSON), args (PredictArgs without `scenario`)}.
 * Out: {id, ok: true, value: predict's JSON} or {id, ok: false, error: {status, message}}.
 */
export interface PredictionRequest {
  scenario: unknown;
  args: Omit<PredictArgs, 'scenario'>;
}

if (!parentPort) throw new Error('prediction-worker must run in a worker thread');
const port = parentPort;

port.on('message', (message: PredictionRequest & { id: number }) => {
  port.postMessage(answer(message));
});

function answer({ id, scenario, args }: PredictionRequest & { id: number }): WorkerReply<PredictOutput> {
  const dir = mkdtempSync(join(tmpdir(), 'syncring-predict-'));
  const file = join(dir, 'live-scenario.json');
  try {
    writeFileSync(file, JSON.stringify(scenario));
    return { id, ok: true, value: predict({ ...args, scenario: file }) };
  } catch (error) {
    const message = (error as Error).message.split(file).join('the live scenario');
    if (error instanceof UsageError || error instanceof ScenarioError) return { id, ok: false, error: { status: 400, message } };
    return { id, ok: false, error: { status: 500, message: `prediction failed: ${message}` } };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
