import { existsSync, readFileSync } from 'node:fs';
import { parseScenario } from '../src/scenario/parse.js';
import type { Scenario } from '../src/scenario/types.js';
import { builtInScenarioNames, builtInScenarioRaw } from '../src/scenarios/index.js';
import { jsonErrorOffset } from './json-error-offset.js';

/** Thrown for input the user must fix; the CLI prints the message and exits non-zero. */
export class UsageError extends Error {
  override name = 'UsageError';
}

/** Parse JSON text, turning a syntax error into a message with the file and line. */
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
      throw new UsageError(`${source}: not valid JSON at line ${line}, column ${column}: ${message}`);
    }
    throw new UsageError(`${source}: not valid JSON: ${message}`);
  }
}

/**
 * A scenario from a JSON file, or a built-in scenario by name when no such file exists.
 * Errors name the file and the offending field.
 */
export function loadScenario(pathOrName: string): { scenario: Scenario; raw: unknown; source: string } {
  if (!existsSync(pathOrName)) {
    if (builtInScenarioNames.includes(pathOrName)) {
      const raw = builtInScenarioRaw(pathOrName);
      return { scenario: parseScenario(raw, `built-in scenario ${pathOrName}`), raw, source: `built-in:${pathOrName}` };
    }
    throw new UsageError(`${pathOrName}: no such file (built-in scenarios: ${builtInScenarioNames.join(', ')})`);
  }
  let text: string;
  try {
    text = readFileSync(pathOrName, 'utf8');
  } catch (error) {
    throw new UsageError(`${pathOrName}: cannot be read: ${(error as Error).message}`);
  }
  const raw = parseJsonText(text, pathOrName);
  return { scenario: parseScenario(raw, pathOrName), raw, source: pathOrName };
}
