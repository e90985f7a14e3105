import { describe, expect, test } from 'vitest';
import { predictScenario } from '../../../server/commands/predict.js';
import { FLAG_NAMES, QUERY_NAMES, type ArgumentNames } from '../../../server/commands/predict-arguments.js';
import { loadBuiltInScenario } from '../../../src/scenarios/index.js';
import { InputError } from '../../../src/util/input-error.js';
import { thrown } from '../../support/thrown.js';

const ring = loadBuiltInScenario('ring-one-way-5');

const refusal = (args: Parameters<typeof predictScenario>[2], names: ArgumentNames) =>
  thrown(() => predictScenario(ring, 'ring.json', args, names), InputError);

// predict words its errors in the names of whoever called it; no message is reworded afterwards.
// The expected texts are the command line's (tests/unit/predict/predict-command.test.ts) and the
// API's (tests/integration/prediction-api.test.ts), written out in full here.
describe('predict names its arguments as its caller does', () => {
  test('a bad continuation parameter: the argument as given is the path, in flags or in query fields', () => {
    const flag = refusal({ continueIn: 'speed' }, FLAG_NAMES);
    const query = refusal({ continueIn: 'speed' }, QUERY_NAMES);
    const reason = 'unknown parameter "speed" (expected one of detuning:K, coupling, reactive, dissipative, link:A-B or edge:A-B)';
    expect({ path: flag.path, reason: flag.reason }).toEqual({ path: '--continue speed', reason });
    expect({ path: query.path, reason: query.reason }).toEqual({ path: 'param=speed', reason });
    expect(query.message).toBe(`param=speed: ${reason}`);
  });

  test('a bad range keeps its field as data', () => {
    const query = refusal({ continueIn: 'coupling', range: '1:0' }, QUERY_NAMES);
    expect({ path: query.path, reason: query.reason, message: query.message }).toEqual({
      path: 'range',
      reason: 'MIN must be below MAX (got 1:0)',
      message: 'range: MIN must be below MAX (got 1:0)',
    });
    expect(refusal({ continueIn: 'coupling', range: '1:0' }, FLAG_NAMES).message).toBe('--range: MIN must be below MAX (got 1:0)');
  });

  test('sentences name the other arguments in the same words', () => {
    expect(refusal({ pattern: 1 }, FLAG_NAMES).message).toBe('--pattern needs --continue PARAM');
    expect(refusal({ pattern: 1 }, QUERY_NAMES).message).toBe('pattern needs param=PARAM');
    expect(refusal({ continueIn: 'coupling', maxSteps: 0 }, QUERY_NAMES).message).toBe('maxSteps must be a positive integer (got 0)');
  });
});
