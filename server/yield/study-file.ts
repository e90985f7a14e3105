import { existsSync } from 'node:fs';
import { dirname, isAbsolute, join } from 'node:path';
import { parseScenario } from '../../src/scenario/parse.js';
import { builtInScenarioNames } from '../../src/scenarios/index.js';
import { InputError } from '../../src/util/input-error.js';
import { parseStudy, type Study } from '../../src/yield/study.js';
import { loadJsonInput, loadScenario } from '../scenario-file.js';

/**
 * A study from its JSON file. Its `scenario` is a file (relative paths from the study's folder),
 * a built-in scenario's name, or the scenario object inline; errors about an inline scenario name
 * it as `scenario.FIELD`, errors about a scenario file name that file.
 */
export function loadStudy(path: string): Study {
  const { raw, label } = loadJsonInput(path, { kind: 'study', names: [], raw: () => undefined });
  return studyFromRaw(raw, label, dirname(path));
}

/** A study already parsed as JSON (from a file in `folder`, or an HTTP body with folder null: no scenario files then). */
export function studyFromRaw(raw: unknown, label: string, folder: string | null): Study {
  const named = raw !== null && typeof raw === 'object' && !Array.isArray(raw) ? (raw as Record<string, unknown>).scenario : undefined;
  let scenario;
  if (typeof named === 'string') {
    if (folder === null && !builtInScenarioNames.includes(named)) {
      throw new InputError(
        'scenario',
        `must be a built-in scenario (${builtInScenarioNames.join(', ')}) or inline here (got ${JSON.stringify(named)})`,
        {
          source: label,
        },
      );
    }
    const relative = folder !== null && !isAbsolute(named) ? join(folder, named) : named;
    scenario = loadScenario(existsSync(relative) ? relative : named).scenario;
  } else if (named !== null && typeof named === 'object') {
    try {
      scenario = parseScenario(named);
    } catch (error) {
      if (error instanceof InputError) throw error.under('scenario').from(label);
      throw error;
    }
  } else {
    throw new InputError('scenario', 'is required: a scenario file, a built-in scenario name or an inline scenario object', {
      source: label,
    });
  }
  return parseStudy(raw, scenario, label);
}
