import type { YieldSummary } from '../../src/protocol/yield-files.js';
import { scenarioToJSON, type ScenarioJSON } from '../../src/scenario/parse.js';
import { totalSamples } from '../../src/yield/study.js';
import { sampleSetup } from '../../src/yield/sample.js';
import { UsageError } from '../usage-error.js';
import { runStudy, type SampleEngine } from '../yield/coordinator.js';
import { LocalEngine } from '../yield/local-engine.js';
import { loadStudy } from '../yield/study-file.js';

export interface YieldArgs {
  study: string;
  out: string;
  workers?: number;
  redis?: string;
  resume: boolean;
}

/** `syncring yield`: a Monte Carlo yield study on the local thread pool or on workers behind a Redis queue (README, 'Yield studies'). */
export async function yieldCommand(args: YieldArgs): Promise<YieldSummary> {
  if (args.workers !== undefined && !(Number.isInteger(args.workers) && args.workers >= 1)) {
    throw new UsageError(`--workers must be a positive integer (got ${args.workers})`);
  }
  if (args.workers !== undefined && args.redis !== undefined) {
    throw new UsageError(
      '--workers counts local threads; with --redis the workers are the `syncring worker` processes started against that Redis',
    );
  }
  const study = loadStudy(args.study);
  let engine: SampleEngine;
  if (args.redis !== undefined) {
    const { RedisEngine } = await import('../yield/redis-engine.js');
    engine = new RedisEngine(args.redis);
  } else {
    engine = new LocalEngine(args.workers);
  }
  try {
    return await runStudy(study, { out: args.out, resume: args.resume, engine });
  } finally {
    await engine.close();
  }
}

/**
 * `syncring yield STUDY --board INDEX`: the scenario of one sample (its drawn parameters, its
 * start and noise seeds), rebuilt from the study and the index alone, so a failing board from
 * samples.ndjson can be opened live with `syncring serve --scenario FILE` or simulated again.
 */
export function boardScenario(path: string, index: number): ScenarioJSON {
  const study = loadStudy(path);
  const total = totalSamples(study);
  if (!(Number.isInteger(index) && index >= 0 && index < total)) {
    throw new UsageError(`--board must be a sample index, 0 to ${total - 1} (got ${index})`);
  }
  return scenarioToJSON(sampleSetup(study, Math.floor(index / study.samples), index % study.samples).scenario);
}
