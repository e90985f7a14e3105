/**
 * Yield-study figures for `npm run bench` (section `yield`): samples per second of the embedded
 * pool with 1 and 2 threads (scaling), the Redis engine with 2 `syncring worker` processes against
 * the pool with 2 threads (the queue's overhead at equal workers; skipped without redis-server),
 * and the cost of one board judged by the guiding system against the full system.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseScenario } from '../../src/scenario/parse.js';
import { parseStudy } from '../../src/yield/study.js';
import { judgeWithFullSystem, judgeWithGuide, sampleSetup } from '../../src/yield/sample.js';
import { runStudy, type SampleEngine } from '../../server/yield/coordinator.js';
import { LocalEngine } from '../../server/yield/local-engine.js';
import { RedisEngine } from '../../server/yield/redis-engine.js';
import { adlerPairScenario } from '../support/adler-pair.js';
import { redisAvailability, startRedis } from '../support/redis-server.js';

/** Boards per engine run: enough that start-up (threads, queue) is a small part of the time. */
const BENCH_SAMPLES = 192;
/** Boards timed one by one for the guide-versus-full cost. */
const COST_SAMPLES = 6;

export interface YieldBench {
  samples: number;
  local1: number;
  local2: number;
  scaling: number;
  redis2: number | null;
  redisOverLocal: number | null;
  guideMsPerSample: number;
  fullMsPerSample: number;
  fullOverGuide: number;
  notes: string[];
}

function studyJson(samples: number) {
  return {
    name: 'bench: Adler pair yield',
    scenario: 'inline',
    samples,
    seed: 11,
    tolerances: [{ parameter: 'detuning', nodes: 'all', distribution: 'normal', sigma: 0.04 }],
    start: 'random',
    criteria: { pattern: 'in-phase', mode: 0, within: 300 },
  };
}

async function rate(engine: SampleEngine, samples: number): Promise<number> {
  const study = parseStudy(studyJson(samples), parseScenario(adlerPairScenario(0.01, 0.05)));
  const out = mkdtempSync(join(tmpdir(), 'syncring-bench-yield-'));
  const progress = { write: () => true, isTTY: false } as unknown as NodeJS.WriteStream;
  try {
    const summary = await runStudy(study, { out, resume: false, engine, progress });
    return summary.samplesPerSecond;
  } finally {
    await engine.close();
  }
}

export async function benchYield(): Promise<YieldBench> {
  const notes: string[] = [];
  const local1 = await rate(new LocalEngine(1), BENCH_SAMPLES);
  const local2 = await rate(new LocalEngine(2), BENCH_SAMPLES);
  let redis2: number | null = null;
  if (redisAvailability().available) {
    const redis = await startRedis();
    const bin = fileURLToPath(new URL('../../../bin/syncring.js', import.meta.url));
    const workers: ChildProcess[] = [0, 1].map(() => spawn(process.execPath, [bin, 'worker', '--redis', redis.url], { stdio: 'ignore' }));
    try {
      redis2 = await rate(new RedisEngine(redis.url), BENCH_SAMPLES);
    } finally {
      for (const w of workers) w.kill('SIGTERM');
      await redis.stop();
    }
  } else notes.push('yield: the Redis row is skipped (no redis-server)');
  const cost = parseStudy(studyJson(COST_SAMPLES), parseScenario(adlerPairScenario(0.01, 0.05)));
  const time = (judge: typeof judgeWithGuide): number => {
    const started = performance.now();
    for (let i = 0; i < COST_SAMPLES; i++) judge(sampleSetup(cost, 0, i).scenario, cost.criteria);
    return (performance.now() - started) / COST_SAMPLES;
  };
  const guideMsPerSample = time(judgeWithGuide);
  const fullMsPerSample = time(judgeWithFullSystem);
  return {
    samples: BENCH_SAMPLES,
    local1,
    local2,
    scaling: local2 / local1,
    redis2,
    redisOverLocal: redis2 === null ? null : redis2 / local2,
    guideMsPerSample,
    fullMsPerSample,
    fullOverGuide: fullMsPerSample / guideMsPerSample,
    notes,
  };
}
