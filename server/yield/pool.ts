/**
 * The embedded engine: a pool of worker threads (all local cores by default) that run chunks of a
 * study's samples. The pool knows nothing of files or queues: the coordinator hands it chunks and
 * gets records back; the queue worker (`syncring worker`) hands it the chunks it takes off the
 * queue, so its own event loop stays free to renew the queue's locks while a chunk computes.
 */
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import type { YieldSampleRecord } from '../../src/protocol/yield-files.js';
import type { StudyJSON } from '../../src/yield/study.js';

export interface ChunkRequest {
  id: number;
  studyId: string;
  /** Sent the first time a thread sees the study. */
  study?: StudyJSON;
  indices: number[];
}

export type ChunkReply = { id: number; ok: true; records: YieldSampleRecord[] } | { id: number; ok: false; error: string };

/** The compiled sample worker: beside this module when it runs compiled, in dist/ when it runs from its sources (tests). */
function workerUrl(): URL {
  const here = new URL(import.meta.url);
  if (here.pathname.endsWith('.js')) return new URL('./sample-worker.js', here);
  return new URL('../../dist/server/yield/sample-worker.js', here);
}

/** Threads by default: one per core the machine offers. */
export function defaultWorkers(): number {
  return Math.max(1, availableParallelism());
}

interface Slot {
  worker: Worker;
  studies: Set<string>;
  busy: boolean;
}

interface Waiting {
  studyId: string;
  study: StudyJSON;
  indices: number[];
  resolve: (records: YieldSampleRecord[]) => void;
  reject: (error: Error) => void;
}

export class SamplePool {
  private readonly slots: Slot[] = [];
  private readonly queue: Waiting[] = [];
  private readonly pending = new Map<number, { slot: Slot; job: Waiting }>();
  private nextId = 1;
  private closed = false;

  constructor(readonly size: number = defaultWorkers()) {
    if (!(Number.isInteger(size) && size >= 1)) throw new RangeError(`a pool needs at least one worker (got ${size})`);
    for (let i = 0; i < size; i++) this.slots.push(this.startSlot());
  }

  /** The records of `indices` of the study, in that order. */
  run(studyId: string, study: StudyJSON, indices: number[]): Promise<YieldSampleRecord[]> {
    if (this.closed) return Promise.reject(new Error('the sample pool is closed'));
    return new Promise((resolve, reject) => {
      this.queue.push({ studyId, study, indices, resolve, reject });
      this.dispatch();
    });
  }

  async close(): Promise<void> {
    this.closed = true;
    for (const job of this.queue.splice(0)) job.reject(new Error('the sample pool was closed'));
    await Promise.all(this.slots.map((s) => s.worker.terminate()));
  }

  private startSlot(): Slot {
    const worker = new Worker(workerUrl());
    const slot: Slot = { worker, studies: new Set(), busy: false };
    worker.on('message', (reply: ChunkReply) => {
      const entry = this.pending.get(reply.id);
      this.pending.delete(reply.id);
      slot.busy = false;
      if (entry) {
        if (reply.ok) entry.job.resolve(reply.records);
        else entry.job.reject(new Error(reply.error));
      }
      this.dispatch();
    });
    const lost = (error: Error): void => {
      for (const [id, entry] of this.pending) {
        if (entry.slot !== slot) continue;
        this.pending.delete(id);
        entry.job.reject(error);
      }
      if (this.closed) return;
      const index = this.slots.indexOf(slot);
      if (index >= 0) this.slots[index] = this.startSlot();
      this.dispatch();
    };
    worker.on('error', (error) => lost(new Error(`a sample worker failed: ${error.message}`)));
    worker.on('exit', (code) => {
      if (!this.closed) lost(new Error(`a sample worker stopped (exit code ${code})`));
    });
    return slot;
  }

  private dispatch(): void {
    for (const slot of this.slots) {
      if (slot.busy || this.queue.length === 0) continue;
      const job = this.queue.shift()!;
      const id = this.nextId++;
      slot.busy = true;
      this.pending.set(id, { slot, job });
      const request: ChunkRequest = { id, studyId: job.studyId, indices: job.indices };
      if (!slot.studies.has(job.studyId)) {
        request.study = job.study;
        slot.studies.add(job.studyId);
      }
      slot.worker.postMessage(request);
    }
  }
}
