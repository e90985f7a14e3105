import { Worker } from 'bullmq';
import type { YieldSampleRecord } from '../../src/protocol/yield-files.js';
import { UsageError } from '../usage-error.js';
import { SamplePool } from '../yield/pool.js';
import { QUEUE_NAME, redisConnection, type ChunkJobData } from '../yield/redis-connection.js';

export interface WorkerArgs {
  redis: string;
  /** Sample threads, and chunks taken at once; default 1 (start one worker per core, or give more threads). */
  threads?: number;
  /** How long a chunk's lock lasts without renewal (s); a worker that dies frees its chunk after about this long. */
  lockSeconds?: number;
}

/** BullMQ's own default lock: long enough for a stalled machine's hiccup, short enough that a dead worker's chunk comes back soon. */
const DEFAULT_LOCK_SECONDS = 30;
/** A chunk that stalls more often than this (its worker killed again and again) fails the study instead of looping. */
const MAX_STALLS = 5;

/**
 * `syncring worker --redis URL`: takes chunks of yield studies off the queue and runs them on a
 * pool of sample threads, so this process's event loop stays free to renew the chunks' locks
 * while they compute. Runs until SIGINT or SIGTERM.
 */
export async function worker(args: WorkerArgs): Promise<{ close(): Promise<void> }> {
  const threads = args.threads ?? 1;
  if (!(Number.isInteger(threads) && threads >= 1)) throw new UsageError(`--threads must be a positive integer (got ${threads})`);
  const lockSeconds = args.lockSeconds ?? DEFAULT_LOCK_SECONDS;
  if (!(lockSeconds >= 1)) throw new UsageError(`--lock-seconds must be at least 1 (got ${lockSeconds})`);
  const pool = new SamplePool(threads);
  const lockDuration = Math.round(lockSeconds * 1000);
  const queueWorker = new Worker<ChunkJobData, YieldSampleRecord[]>(
    QUEUE_NAME,
    (job) => pool.run(job.data.studyId, job.data.study, job.data.indices),
    {
      connection: redisConnection(args.redis),
      concurrency: threads,
      lockDuration,
      stalledInterval: Math.max(500, Math.round(lockDuration / 2)),
      maxStalledCount: MAX_STALLS,
    },
  );
  queueWorker.on('error', (error) => process.stderr.write(`syncring worker: ${error.message}\n`));
  await queueWorker.waitUntilReady();
  process.stderr.write(
    `syncring worker: taking yield chunks from ${new URL(args.redis).host} (${threads} thread${threads === 1 ? '' : 's'})\n`,
  );
  return {
    async close() {
      await queueWorker.close();
      await pool.close();
    },
  };
}
