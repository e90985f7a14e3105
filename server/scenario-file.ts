import { existsSync, readFileSync } from 'node:fs';
import { parseScenario } from '../src/scenario/parse.js';
import type { Scenario } from '../src/scenario/types.js';
import { builtInScenarioNames, builtInScenarioRaw } from '../src/scenarios/index.js';
import { InputError } from '../src/util/input-error.js';
import { jsonErrorOffset } from './json-error-offset.js';

/** Parse JSON text, turning a syntax error into an InputError whose source is the file, with the line. */
export function parseJsonText(text: string, source: string): unknown {
  try {
    return JSON.parse(text);
  } catch (error) {
    const message = (error as Error).message;
    const offset = jsonErrorOffset(text);
    if (offset >= 0) {
      const before = text.slice(0, offset);
      const line = before.split('\n').length;
      const column = offset - before.lastIndexOf('\n');
      throw new InputError('', `not valid JSON at line ${line}, column ${column}: ${message}`, { source });
    }
    throw new InputError('', `not valid JSON: ${message}`, { source });
  }
}

/** Built-ins of one kind that a command-line argument may name instead of a file. */
export interface BuiltIns {
  kind: string;
  names: readonly string[];
  raw(name: string): unknown;
}

/**
 * The raw JSON of a file, or of a built-in by name when no such file exists. `label` is the
 * source to name in errors ("FILE" or "built-in KIND NAME").
 */
export function loadJsonInput(pathOrName: string, builtIns: BuiltIns): { raw: unknown; source: string; label: string } {
  if (!existsSync(pathOrName)) {
    if (builtIns.names.includes(pathOrName)) {
      return { raw: builtIns.raw(pathOrName), source: `built-in:${pathOrName}`, label: `built-in ${builtIns.kind} ${pathOrName}` };
    }
    throw new InputError('', `no such file (built-in ${builtIns.kind}s: ${builtIns.names.join(', ')})`, { source: pathOrName });
  }
  let text: string;
  try {
    text = readFileSync(pathOrName, 'utf8');
  } catch (error) {
    throw new InputError('', `cannot be read: ${(error as Error).message}`, { source: pathOrName });
  }
  return { raw: parseJsonText(text, pathOrName), source: pathOrName, label: pathOrName };
}

/**
 * A scenario from a JSON file, or a built-in scenario by name when no such file exists.
 * Errors name the file and the offending field.
 */
export function loadScenario(pathOrName: string): { scenario: Scenario; raw: unknown; source: string } {
  const { raw, source, label } = loadJsonInput(pathOrName, { kind: 'scenario', names: builtInScenarioNames, raw: builtInScenarioRaw });
  return { scenario: parseScenario(raw, label), raw, source };
}
