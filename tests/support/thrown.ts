import { expect } from 'vitest';

/** The error `run` throws, checked to be a `kind`; a test fails here when nothing is thrown. */
export function thrown<E extends Error>(run: () => unknown, kind: abstract new (...args: never[]) => E): E {
  try {
    run();
  } catch (error) {
    expect(error).toBeInstanceOf(kind);
    return error as E;
  }
  throw new Error('expected an error, but nothing was thrown');
}
