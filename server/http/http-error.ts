import type { ErrorRequestHandler, Response } from 'express';
import type { InputError } from '../../src/util/input-error.js';

/** What crosses from a worker thread (an Error loses its own fields when it is cloned). */
export interface HttpErrorData {
  status: number;
  message: string;
  field?: string;
}

/**
 * A request refused or failed, with the HTTP status to answer with (400 bad input, 401 no or
 * wrong token, 403 refused, 404 no such thing, 409 the state forbids it, 413 too large, 429 too
 * many at once, 500 the server's fault, 503 too busy, 504 over its time budget) and, when one
 * field of the request is at fault, that field as data beside the message.
 */
export class HttpError extends Error {
  readonly status: number;
  /** The request's field at fault (`param`, `until`, `body.pace`), if one is. */
  readonly field: string | undefined;

  constructor(status: number, message: string, field?: string) {
    super(message);
    this.name = 'HttpError';
    this.status = status;
    this.field = field;
  }

  /** Bad input in the request, answered with `status` (400 unless told); its path is the field. */
  static fromInput(error: InputError, status = 400): HttpError {
    return new HttpError(status, error.message, error.path === '' ? undefined : error.path);
  }

  static fromData(data: HttpErrorData): HttpError {
    return new HttpError(data.status, data.message, data.field);
  }

  toData(): HttpErrorData {
    return { status: this.status, message: this.message, ...(this.field !== undefined ? { field: this.field } : {}) };
  }
}

/**
 * An HttpError as it is; a request path that is not percent-encoded UTF-8 (express decodes route
 * parameters and throws a URIError) is bad input, 400; anything else is the server's fault: 500
 * with its message.
 */
export function httpErrorOf(error: unknown): HttpError {
  if (error instanceof HttpError) return error;
  if (error instanceof URIError) return new HttpError(400, `the request path is not percent-encoded UTF-8 (${error.message})`, 'path');
  return new HttpError(500, error instanceof Error ? error.message : String(error));
}

/** The JSON API's answer to a failed request: the status, and `{ error: message }`. */
export function sendHttpError(res: Response, error: unknown): void {
  const answer = httpErrorOf(error);
  res.status(answer.status).json({ error: answer.message });
}

/** Express error handler for JSON endpoints: answers from the HttpError (500 for anything else). */
export const httpErrorHandler: ErrorRequestHandler = (error, _req, res, next) => {
  if (res.headersSent) {
    next(error);
    return;
  }
  sendHttpError(res, error);
};
