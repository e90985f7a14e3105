/**
 * The scale-out engine: the coordinator puts the study's chunks on a BullMQ queue in Redis and
 * collects the records that `syncring worker` processes on any number of machines return. Each
 * chunk's job id is the study's fingerprint and the chunk's first index, so adding a chunk again
 * (a resumed coordinator) adds nothing, and a finished chunk's records stay in Redis until the
 * study is done. BullMQ delivers at least once: a worker that dies holding a chunk loses its lock,
 * the chunk goes back to the queue (stalled-job recovery) and another worker runs it; the
 * coordinator writes each index once, so a chunk run twice counts once.
 */
import { Job, Queue, QueueEvents } from 'bullmq';
import type { YieldSampleRecord } from '../../src/protocol/yield-files.js';
import type { StudyJSON } from '../../src/yield/study.js';
import type { SampleEngine } from './coordinator.js';
import { QUEUE_NAME, redisConnection, type ChunkJobData } from './redis-connection.js';

/** Tries per chunk before the study fails: a chunk that throws three times has a real error, not a lost worker. */
const CHUNK_ATTEMPTS = 3;
/** How often (ms) the coordinator also asks Redis about the chunks it still waits for: events can be missed (one finished before it listened). */
const POLL_MS = 2000;

export function chunkJobId(studyId: string, chunk: readonly number[]): string {
  return `${studyId}-${chunk[0]}`;
}

export class RedisEngine implements SampleEngine {
  readonly kind = 'redis' as const;
  readonly workers = null;
  private readonly queue: Queue;
  private readonly events: QueueEvents;

  constructor(url: string) {
    const connection = redisConnection(url);
    this.queue = new Queue(QUEUE_NAME, { connection });
    this.events = new QueueEvents(QUEUE_NAME, { connection });
  }

  async run(studyId: string, study: StudyJSON, chunks: number[][], onRecords: (records: YieldSampleRecord[]) => void): Promise<void> {
    if (chunks.length === 0) return;
    await this.events.waitUntilReady();
    const outstanding = new Map(chunks.map((c) => [chunkJobId(studyId, c), c]));
    await new Promise<void>((resolve, reject) => {
      let settled = false;
      const finish = (error?: Error): void => {
        if (settled) return;
        settled = true;
        clearInterval(timer);
        this.events.off('completed', completed);
        this.events.off('failed', failed);
        if (error) reject(error);
        else resolve();
      };
      const take = (jobId: string, value: unknown): void => {
        if (!outstanding.has(jobId)) return;
        const records = (typeof value === 'string' ? JSON.parse(value) : value) as YieldSampleRecord[];
        outstanding.delete(jobId);
        onRecords(records);
        if (outstanding.size === 0) finish();
      };
      const completed = ({ jobId, returnvalue }: { jobId: string; returnvalue: unknown }): void => {
        try {
          take(jobId, returnvalue);
        } catch (error) {
          finish(error as Error);
        }
      };
      const failed = ({ jobId, failedReason }: { jobId: string; failedReason: string }): void => {
        void Job.fromId(this.queue, jobId).then((job) => {
          if (outstanding.has(jobId) && job && job.attemptsMade >= CHUNK_ATTEMPTS)
            finish(new Error(`chunk ${jobId} failed: ${failedReason}`));
        });
      };
      const poll = async (): Promise<void> => {
        for (const jobId of [...outstanding.keys()]) {
          const job = await Job.fromId(this.queue, jobId);
          if (!job) continue;
          if (job.finishedOn && job.returnvalue !== undefined && job.returnvalue !== null && !job.failedReason)
            take(jobId, job.returnvalue);
          else if (job.failedReason && job.attemptsMade >= CHUNK_ATTEMPTS) finish(new Error(`chunk ${jobId} failed: ${job.failedReason}`));
        }
      };
      const timer = setInterval(() => void poll().catch((error: Error) => finish(error)), POLL_MS);
      this.events.on('completed', completed);
      this.events.on('failed', failed);
      void this.queue
        .addBulk(
          chunks.map((indices) => ({
            name: 'chunk',
            data: { studyId, study, indices } satisfies ChunkJobData,
            opts: { jobId: chunkJobId(studyId, indices), attempts: CHUNK_ATTEMPTS, removeOnComplete: false, removeOnFail: false },
          })),
        )
        .then(() => poll())
        .catch((error: Error) => finish(error));
    });
    // the records are on disk now: the study's jobs need not stay in the user's Redis
    await Promise.all(
      chunks.map((c) => Job.fromId(this.queue, chunkJobId(studyId, c)).then((job) => job?.remove().catch(() => undefined))),
    );
  }

  async close(): Promise<void> {
    await this.events.close();
    await this.queue.close();
  }
}
