import { parentPort, workerData } from 'node:worker_threads';
import type { ClientCommand } from '../../src/protocol/messages.js';
import { InputError } from '../../src/util/input-error.js';
import { SessionRunner, type RunnerOptions } from './session-runner.js';

/**
 * Worker-thread home of the live run: stepping never waits for socket traffic and socket
 * traffic never waits for stepping. Messages in: {kind: 'command', id, command, by} and
 * {kind: 'stop'}; out: the runner's outputs and {kind: 'reply', id, error?}.
 */
if (!parentPort) throw new Error('session-worker must run in a worker thread');
const port = parentPort;
const runner = new SessionRunner(workerData as RunnerOptions, (output) => port.postMessage(output));
port.postMessage({ kind: 'status', info: runner.info(), tau: runner.session.tau, tick: runner.session.tick });

port.on(
  'message',
  (
    message:
      | { kind: 'command'; id: number; command: ClientCommand; by: string }
      | { kind: 'stop' }
      | { kind: 'run-to-tick'; id: number; tick: number },
  ) => {
    if (message.kind === 'stop') {
      runner.stop();
      port.close();
      return;
    }
    if (message.kind === 'run-to-tick') {
      runner.runToTick(message.tick);
      port.postMessage({ kind: 'reply', id: message.id, checkpoint: runner.session.checkpoint() });
      return;
    }
    try {
      runner.command(message.command, message.by);
      port.postMessage({ kind: 'reply', id: message.id });
    } catch (error) {
      if (!(error instanceof InputError)) throw error;
      port.postMessage({ kind: 'reply', id: message.id, error: error.toData() });
    }
  },
);
