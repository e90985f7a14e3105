import { describe, expect, test } from 'vitest';
import { ModelParameters } from '../../../src/model/parameters.js';
import { parseClientMessage } from '../../../src/protocol/messages.js';
import { InputError } from '../../../src/util/input-error.js';
import { makeScenario } from '../../support/scenarios.js';
import { thrown } from '../../support/thrown.js';

const params = new ModelParameters(
  makeScenario({
    nodes: 4,
    epsilon: 0.01,
    modes: [{ omega: 1, gain: 1, loss: 0 }],
    coupling: { strength: 0.1, reactive: 0, dissipative: 1 },
  }),
);

const refusal = (message: unknown) =>
  thrown(() => parseClientMessage(typeof message === 'string' ? message : JSON.stringify(message), params), InputError);

// Reasons written by hand from the rules in src/session/perturbation.ts and src/protocol/messages.ts.
describe('a refused client message', () => {
  test('a perturbation field error keeps the field and the command id as data', () => {
    const error = refusal({ type: 'command', action: 'set-detuning', node: 7, delta: 0.1, id: 'op-12' });
    expect({ path: error.path, reason: error.reason, requestId: error.requestId }).toEqual({
      path: 'node',
      reason: 'must be between 0 and 3 (got 7)',
      requestId: 'op-12',
    });
  });

  test('a control command error answers its id too', () => {
    const error = refusal({ type: 'command', action: 'set-speed', speed: -1, id: 5 });
    expect({ path: error.path, requestId: error.requestId }).toEqual({ path: 'speed', requestId: 5 });
  });

  test('before an id can be read there is none to answer', () => {
    const error = refusal('{"type": ');
    expect(error.path).toBe('');
    expect(error.requestId).toBeNull();
    expect(error.reason).toMatch(/^not valid JSON: /);
  });
});
