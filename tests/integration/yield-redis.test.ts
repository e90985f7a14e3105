import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { sortedSampleLines, writeAdlerStudy } from '../support/yield-study.js';
import { redisAvailability, startRedis, type RunningRedis } from '../support/redis-server.js';

/**
 * The scale-out engine on a real Redis (Debian's redis-server on a free port): the same study run
 * on the local pool, with one `syncring worker`, and with three workers of which one is killed
 * with SIGKILL while it holds a chunk, gives the same samples.ndjson. The killed worker's chunk
 * comes back through BullMQ's stalled-job recovery (a short --lock-seconds keeps the wait short)
 * and no sample is lost or counted twice.
 */
const root = new URL('../../', import.meta.url).pathname;
const bin = join(root, 'bin/syncring.js');
const { available, mustFail } = redisAvailability();
const dir = mkdtempSync(join(tmpdir(), 'syncring-yield-redis-'));
const SAMPLES = 64;
const study = writeAdlerStudy(dir, SAMPLES);

test.runIf(mustFail)('redis-server is required when CI is set', () => {
  expect.fail('redis-server not found: .ci/run installs it with apt-get install -y redis-server');
});

function run(args: string[]): { child: ChildProcess; done: Promise<{ code: number | null; stdout: string; stderr: string }> } {
  const child = spawn(process.execPath, [bin, ...args], { stdio: ['ignore', 'pipe', 'pipe'] });
  let stdout = '';
  let stderr = '';
  child.stdout!.on('data', (d: Buffer) => (stdout += d.toString()));
  child.stderr!.on('data', (d: Buffer) => (stderr += d.toString()));
  return { child, done: new Promise((resolve) => child.on('close', (code) => resolve({ code, stdout, stderr }))) };
}

function startWorker(url: string): ChildProcess {
  return run(['worker', '--redis', url, '--lock-seconds', '2']).child;
}

const stopWorker = (child: ChildProcess): Promise<void> =>
  new Promise((resolve) => {
    if (child.exitCode !== null || child.signalCode !== null) return resolve();
    child.once('close', () => resolve());
    child.kill('SIGTERM');
  });

const samplesOf = (out: string): string[] => sortedSampleLines(readFileSync(join(out, 'samples.ndjson'), 'utf8'));

describe.runIf(available)('syncring yield on a Redis queue', () => {
  let redis: RunningRedis;
  let local: string[];
  beforeAll(async () => {
    redis = await startRedis();
    const out = join(dir, 'local');
    const result = await run(['yield', study, '--out', out, '--workers', '2']).done;
    expect(result.code, result.stderr).toBe(0);
    local = samplesOf(out);
    expect(local).toHaveLength(SAMPLES);
  }, 180_000);
  afterAll(async () => {
    await redis?.stop();
  });

  test('one worker gives the same samples as the local pool', async () => {
    const worker = startWorker(redis.url);
    try {
      const out = join(dir, 'one');
      const result = await run(['yield', study, '--out', out, '--redis', redis.url]).done;
      expect(result.code, result.stderr).toBe(0);
      expect(samplesOf(out)).toEqual(local);
      expect((JSON.parse(result.stdout) as { engine: { kind: string } }).engine.kind).toBe('redis');
    } finally {
      await stopWorker(worker);
    }
  });

  test('three workers, one killed mid-run, give the same samples: nothing lost, nothing twice', async () => {
    const workers = [startWorker(redis.url), startWorker(redis.url), startWorker(redis.url)];
    try {
      const out = join(dir, 'three');
      const coordinator = run(['yield', study, '--out', out, '--redis', redis.url]);
      const path = join(out, 'samples.ndjson');
      await new Promise<void>((resolve) => {
        const timer = setInterval(() => {
          if (existsSync(path) && readFileSync(path, 'utf8').split('\n').length > 8) {
            clearInterval(timer);
            workers[0].kill('SIGKILL');
            resolve();
          }
        }, 20);
      });
      const result = await coordinator.done;
      expect(result.code, result.stderr).toBe(0);
      expect(workers[0].signalCode).toBe('SIGKILL');
      const lines = samplesOf(out);
      expect(lines).toEqual(local);
      expect(new Set(lines.map((l) => (JSON.parse(l) as { index: number }).index)).size).toBe(SAMPLES);
    } finally {
      await Promise.all(workers.map(stopWorker));
    }
  });

  test('a bad --redis URL is an input error', async () => {
    const result = await run(['yield', study, '--out', join(dir, 'bad'), '--redis', 'http://nowhere']).done;
    expect(result.code).toBe(2);
    expect(result.stderr).toContain('--redis must be a redis:// or rediss:// URL');
  });
});
