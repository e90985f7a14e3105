import { describe, expect, test } from 'vitest';
import { InputError, failInput } from '../../../src/util/input-error.js';
import { fieldChecks } from '../../../src/util/json-fields.js';
import { thrown } from '../../support/thrown.js';

// The expected messages are written by hand from the rule in src/util/input-error.ts:
// "<source>: <path>: <reason>", leaving out the parts that are empty.
describe('InputError', () => {
  test('keeps source, path and reason as data and composes the message from them', () => {
    const error = new InputError('faults[2].params.node', 'must be between 0 and 3 (got 9)', { source: 'c.json' });
    expect(error).toBeInstanceOf(Error);
    expect(error.name).toBe('InputError');
    expect(error.source).toBe('c.json');
    expect(error.path).toBe('faults[2].params.node');
    expect(error.reason).toBe('must be between 0 and 3 (got 9)');
    expect(error.requestId).toBeNull();
    expect(error.message).toBe('c.json: faults[2].params.node: must be between 0 and 3 (got 9)');
  });

  test.each([
    ['', 'must be an object (got an array)', undefined, 'must be an object (got an array)'],
    ['nodes', 'is required', undefined, 'nodes: is required'],
    ['', 'no such file', 'nowhere.json', 'nowhere.json: no such file'],
  ])('empty parts are left out: path %j, source %j', (path, reason, source, message) => {
    expect(new InputError(path, reason, { source }).message).toBe(message);
  });

  test('from() names the source, under() nests the path, answering() names the request; nothing else changes', () => {
    const base = new InputError('topology', 'is required');
    const sourced = base.from('built-in scenario pair-adler');
    expect(sourced.message).toBe('built-in scenario pair-adler: topology: is required');
    expect(base.message).toBe('topology: is required');

    const nested = sourced.under('scenario').answering(9);
    expect(nested.path).toBe('scenario.topology');
    expect(nested.reason).toBe('is required');
    expect(nested.source).toBe('built-in scenario pair-adler');
    expect(nested.requestId).toBe(9);

    expect(new InputError('[2].x', 'is required').under('state').path).toBe('state[2].x');
    expect(new InputError('', 'unknown parameter "speed"').under('--continue speed').message).toBe(
      '--continue speed: unknown parameter "speed"',
    );
  });

  test('toData() and fromData() carry every field across a thread boundary (a structured clone)', () => {
    const error = new InputError('node', 'must be between 0 and 5 (got 99)', { source: 'message', requestId: 'k-3' });
    const copy = InputError.fromData(structuredClone(error.toData()));
    expect(copy).toBeInstanceOf(InputError);
    expect({ path: copy.path, reason: copy.reason, source: copy.source, requestId: copy.requestId, message: copy.message }).toEqual({
      path: 'node',
      reason: 'must be between 0 and 5 (got 99)',
      source: 'message',
      requestId: 'k-3',
      message: 'message: node: must be between 0 and 5 (got 99)',
    });
  });

  test('the shared field checks fail with an InputError naming the field, unless given another way to fail', () => {
    expect(() => failInput('speed', 'is required')).toThrow(new InputError('speed', 'is required'));
    const { numberField } = fieldChecks();
    const caught = thrown(() => numberField({ weight: 'heavy' }, 'faults[0].params', 'weight', (n) => n), InputError);
    expect({ path: caught.path, reason: caught.reason }).toEqual({
      path: 'faults[0].params.weight',
      reason: 'must be a number (got string "heavy")',
    });

    const own = fieldChecks((path, reason) => {
      throw new RangeError(`${path} / ${reason}`);
    });
    expect(() => own.required({}, 'name', 'body')).toThrow(new RangeError('body.name / is required'));
  });
});
