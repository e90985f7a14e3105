import type { NextFunction, Request, Response } from 'express';
import { describe, expect, test } from 'vitest';
import { HttpError, httpErrorHandler, httpErrorOf, sendHttpError } from '../../../server/http/http-error.js';
import { InputError } from '../../../src/util/input-error.js';

/** Just enough of express's Response to see what an answer would be. */
function recorder(headersSent = false) {
  const seen: { status?: number; body?: unknown } = {};
  const res = {
    headersSent,
    status(code: number) {
      seen.status = code;
      return res;
    },
    json(body: unknown) {
      seen.body = body;
      return res;
    },
  };
  return { res: res as unknown as Response, seen };
}

describe('HttpError', () => {
  test('bad input becomes a 400 carrying the input error message and its path as the field', () => {
    const error = HttpError.fromInput(new InputError('range', 'MIN must be below MAX (got 1:0)'));
    expect({ status: error.status, field: error.field, message: error.message }).toEqual({
      status: 400,
      field: 'range',
      message: 'range: MIN must be below MAX (got 1:0)',
    });
    expect(HttpError.fromInput(new InputError('', 'nothing here'), 404).field).toBeUndefined();
    expect(HttpError.fromInput(new InputError('', 'nothing here'), 404).status).toBe(404);
  });

  test('toData() and fromData() carry status, message and field across a worker boundary', () => {
    const copy = HttpError.fromData(structuredClone(new HttpError(409, 'until: taken', 'until').toData()));
    expect(copy).toBeInstanceOf(HttpError);
    expect({ status: copy.status, message: copy.message, field: copy.field }).toEqual({
      status: 409,
      message: 'until: taken',
      field: 'until',
    });
  });

  test('the JSON answer: the HttpError status and { error: message }; anything else is a 500 with its message', () => {
    const refused = recorder();
    sendHttpError(refused.res, new HttpError(429, 'too many soaks'));
    expect(refused.seen).toEqual({ status: 429, body: { error: 'too many soaks' } });
    const broken = recorder();
    sendHttpError(broken.res, new TypeError('x is not a function'));
    expect(broken.seen).toEqual({ status: 500, body: { error: 'x is not a function' } });
    expect(httpErrorOf('a string').message).toBe('a string');
  });

  test('the express error handler answers from the error, and leaves an answer already started to express', () => {
    const fresh = recorder();
    let passedOn: unknown = null;
    const next = ((error: unknown) => (passedOn = error)) as NextFunction;
    httpErrorHandler(new HttpError(404, 'no such soak'), {} as Request, fresh.res, next);
    expect(fresh.seen).toEqual({ status: 404, body: { error: 'no such soak' } });
    expect(passedOn).toBeNull();
    const started = recorder(true);
    const late = new HttpError(500, 'late');
    httpErrorHandler(late, {} as Request, started.res, next);
    expect(started.seen).toEqual({});
    expect(passedOn).toBe(late);
  });
});
