import { failInput } from './input-error.js';

/**
 * Field checks for JSON input (scenarios, commands, campaigns, perturbations). Each check fails
 * through `fail(path, reason)`, by default an InputError naming the field, so the wording and the
 * rules stay the same everywhere; a caller with another way of refusing input passes its own.
 */
export type JsonObject = Record<string, unknown>;
export type Fail = (path: string, reason: string) => never;
export type Check = (n: number, path: string) => number;

export const UINT32_MAX = 0xffffffff;

export function describeValue(value: unknown): string {
  if (value === null) return 'null';
  if (Array.isArray(value)) return 'an array';
  switch (typeof value) {
    case 'string': {
      const shown = value.length > 40 ? `${value.slice(0, 40)}...` : value;
      return `string ${JSON.stringify(shown)}`;
    }
    case 'number':
      return String(value);
    case 'object':
      return 'an object';
    default:
      return `${typeof value} ${String(value)}`;
  }
}

export const child = (parent: string, key: string): string => (parent === '' ? key : `${parent}.${key}`);
export const item = (parent: string, index: number): string => `${parent}[${index}]`;

/** Present means an own property whose value is not undefined. */
export function has(obj: JsonObject, key: string): boolean {
  return Object.prototype.hasOwnProperty.call(obj, key) && obj[key] !== undefined;
}

/** The checks, bound to one way of failing (an InputError unless `fail` says otherwise). */
export function fieldChecks(fail: Fail = failInput) {
  const describe = describeValue;
  function expectObject(value: unknown, path: string, allowed: readonly string[]): JsonObject {
    if (value === null || typeof value !== 'object' || Array.isArray(value)) {
      fail(path, `must be an object (got ${describe(value)})`);
    }
    const obj = value as JsonObject;
    for (const key of Object.keys(obj)) {
      if (!allowed.includes(key)) {
        fail(child(path, key), `unknown field (allowed here: ${allowed.join(', ')})`);
      }
    }
    return obj;
  }

  function expectArray(value: unknown, path: string): unknown[] {
    if (!Array.isArray(value)) fail(path, `must be an array (got ${describe(value)})`);
    return value;
  }

  function expectLength(arr: unknown[], path: string, expected: number, what: string): void {
    if (arr.length !== expected) {
      fail(path, `must have ${expected} ${what} (got ${arr.length})`);
    }
  }

  function required(obj: JsonObject, key: string, path: string): unknown {
    if (!has(obj, key)) fail(child(path, key), 'is required');
    return obj[key];
  }

  function finiteNumber(value: unknown, path: string): number {
    if (typeof value !== 'number') fail(path, `must be a number (got ${describe(value)})`);
    if (!Number.isFinite(value)) fail(path, `must be a finite number (got ${value})`);
    return value;
  }

  function integer(value: unknown, path: string): number {
    const n = finiteNumber(value, path);
    if (!Number.isInteger(n)) fail(path, `must be an integer (got ${n})`);
    return n;
  }

  function inRange(n: number, path: string, min: number, max: number): number {
    if (n < min || n > max) fail(path, `must be between ${min} and ${max} (got ${n})`);
    return n;
  }

  function atLeast(n: number, path: string, min: number): number {
    if (n < min) fail(path, `must be >= ${min} (got ${n})`);
    return n;
  }

  function positive(n: number, path: string): number {
    if (!(n > 0)) fail(path, `must be > 0 (got ${n})`);
    return n;
  }

  function uint32(value: unknown, path: string): number {
    const n = integer(value, path);
    if (n < 0 || n > UINT32_MAX) {
      fail(path, `must be an unsigned 32-bit integer, 0 to ${UINT32_MAX} (got ${n})`);
    }
    return n;
  }

  const anyFinite: Check = (n) => n;
  const nonNegative: Check = (n, path) => atLeast(n, path, 0);

  /**
   * The number at `path.key`, run through `check`. Absent: `fallback`, or "is required" when there
   * is none.
   */
  function numberField(obj: JsonObject, path: string, key: string, check: Check, fallback?: number): number {
    const fieldPath = child(path, key);
    if (!has(obj, key)) {
      if (fallback === undefined) fail(fieldPath, 'is required');
      return fallback;
    }
    return check(finiteNumber(obj[key], fieldPath), fieldPath);
  }

  return {
    expectObject,
    expectArray,
    expectLength,
    required,
    finiteNumber,
    integer,
    inRange,
    atLeast,
    positive,
    uint32,
    anyFinite,
    nonNegative,
    numberField,
  };
}
