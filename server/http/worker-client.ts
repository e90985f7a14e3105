import { Worker } from 'node:worker_threads';
import { HttpError, type HttpErrorData } from './http-error.js';
import { FairQueue } from './fair-queue.js';

/** What a background worker posts back for one request: the value, or the HttpError to answer with. */
export type WorkerReply<T> = { id: number; ok: true; value: T } | { id: number; ok: false; error: HttpErrorData };

/**
 * The compiled worker module `name` of server/http: beside the caller when the server runs
 * compiled, in dist/ when it runs from its TypeScript sources (tests), as the live session does.
 */
export function compiledHttpWorker(name: string): URL {
  const here = new URL(import.meta.url);
  if (here.pathname.endsWith('.js')) return new URL(`./${name}.js`, here);
  return new URL(`../../dist/server/http/${name}.js`, here);
}

/** How much work the workers behind one endpoint take on (README "Security"). */
export interface WorkerLimits {
  /** How long one request may compute before its worker is stopped and started again (ms). */
  timeBudgetMs: number;
  /** Requests waiting or in progress at most, from all sources together. */
  queueLimit: number;
  /** Requests waiting or in progress at most from one source. */
  perSource: number;
  /** Worker threads; one source computes on one of them at a time, so the others stay free for everyone else. */
  threads: number;
  /** What to do instead, said to a request that overran its budget. */
  overrunAdvice: string;
}

/**
 * A normal what-if takes about a second, the heaviest one within the query bounds a few
 * seconds of CPU, so 30 s is a backstop even on a machine loaded many times over. Two threads: one for a
 * source that floods, one for everyone else (the live run has its own). Three per source: the
 * dashboard's catalogue and what-if at once, with room for one more click.
 */
const DEFAULT_LIMITS: WorkerLimits = { timeBudgetMs: 30_000, queueLimit: 12, perSource: 3, threads: 2, overrunAdvice: 'ask for less' };

interface Job<TRequest, TValue> {
  message: TRequest;
  source: string;
  id: number;
  resolve: (value: TValue) => void;
  reject: (error: Error) => void;
}

/** One thread of the pool and the request it computes. */
interface Slot<TRequest, TValue> {
  worker: Worker | null;
  job: Job<TRequest, TValue> | null;
  timer: NodeJS.Timeout | null;
}

/**
 * Worker threads for slow, synchronous computations behind HTTP requests, so they never block
 * the event loop that serves WebSocket frames. Threads start on first use. Requests wait in a
 * queue bounded in all and per source, taken in turn by source (fair-queue.ts); a source
 * computes on one thread at a time, so one client that floods holds at most one thread and
 * everyone else's requests go to the others. A request that overruns its time budget is the
 * only one lost when its thread is terminated: it is answered 504 and the thread started again.
 * A full queue is answered 503, a source over its share 429. A request whose asker has gone
 * (its signal aborted) leaves the queue. A crashed thread fails the request it was computing.
 */
export class BackgroundWorker<TRequest extends object, TValue> {
  private nextId = 1;
  private readonly queue = new FairQueue<Job<TRequest, TValue>>();
  private readonly slots: Slot<TRequest, TValue>[];
  private closed = false;
  private readonly limits: WorkerLimits;

  constructor(
    private readonly url: URL,
    private readonly label: string,
    limits: Partial<WorkerLimits> = {},
  ) {
    this.limits = { ...DEFAULT_LIMITS, ...limits };
    this.slots = Array.from({ length: Math.max(1, this.limits.threads) }, () => ({ worker: null, job: null, timer: null }));
  }

  /** Queue one request from `source` (sourceOf of the client's address); `signal` withdraws it while it waits. */
  request(message: TRequest, source = 'local', signal?: AbortSignal): Promise<TValue> {
    if (this.closed) return Promise.reject(new Error(`the ${this.label} worker is closed`));
    const { perSource, queueLimit } = this.limits;
    if (this.pendingFrom(source) >= perSource) {
      return Promise.reject(
        new HttpError(429, `too many ${this.label} requests from this address at once: at most ${perSource} waiting or in progress`),
      );
    }
    if (this.busy >= queueLimit) {
      return Promise.reject(
        new HttpError(503, `the ${this.label} queue is full (${queueLimit} requests waiting or in progress): try again shortly`),
      );
    }
    return new Promise<TValue>((resolve, reject) => {
      const job: Job<TRequest, TValue> = { message, source, id: this.nextId++, resolve, reject };
      this.queue.push(source, job);
      signal?.addEventListener('abort', () => {
        if (this.queue.remove(source, job)) reject(new Error(`the ${this.label} request was withdrawn`));
      });
      this.pump();
    });
  }

  /** Requests waiting or in progress. */
  get busy(): number {
    return this.queue.size + this.slots.filter((slot) => slot.job).length;
  }

  async close(): Promise<void> {
    this.closed = true;
    const error = new Error(`the ${this.label} worker was closed`);
    const workers = this.slots.map((slot) => slot.worker);
    for (const slot of this.slots) {
      slot.worker = null;
      if (slot.job) this.finish(slot, slot.job, (job) => job.reject(error));
    }
    for (const job of this.queue.drain()) job.reject(error);
    await Promise.all(workers.map((worker) => worker?.terminate()));
  }

  private pendingFrom(source: string): number {
    return this.queue.waiting(source) + this.slots.filter((slot) => slot.job?.source === source).length;
  }

  /** Hand the next requests in turn to idle threads, passing over sources already computing. */
  private pump(): void {
    if (this.closed) return;
    for (const slot of this.slots) {
      if (slot.job) continue;
      const job = this.queue.shift((source) => this.slots.some((other) => other.job?.source === source));
      if (!job) return;
      const worker = this.start(slot);
      slot.job = job;
      slot.timer = setTimeout(() => this.overran(slot, job), this.limits.timeBudgetMs);
      slot.timer.unref();
      worker.postMessage({ ...job.message, id: job.id });
    }
  }

  private finish(slot: Slot<TRequest, TValue>, job: Job<TRequest, TValue>, settle: (job: Job<TRequest, TValue>) => void): void {
    if (slot.job !== job) return;
    if (slot.timer) clearTimeout(slot.timer);
    slot.job = null;
    slot.timer = null;
    settle(job);
    this.pump();
  }

  /** The request computed past its budget: a synchronous computation cannot be interrupted, so its thread goes. */
  private overran(slot: Slot<TRequest, TValue>, job: Job<TRequest, TValue>): void {
    const worker = slot.worker;
    slot.worker = null;
    void worker?.terminate();
    const seconds = this.limits.timeBudgetMs / 1000;
    const message = `the ${this.label} took longer than its time budget of ${seconds} s and was stopped: ${this.limits.overrunAdvice}`;
    this.finish(slot, job, (j) => j.reject(new HttpError(504, message)));
  }

  private start(slot: Slot<TRequest, TValue>): Worker {
    if (slot.worker) return slot.worker;
    const worker = new Worker(this.url);
    // Never keep the process alive just for an idle worker.
    worker.unref();
    worker.on('message', (reply: WorkerReply<TValue>) => {
      const job = slot.job;
      if (slot.worker !== worker || !job || job.id !== reply.id) return;
      this.finish(slot, job, (j) => (reply.ok ? j.resolve(reply.value) : j.reject(HttpError.fromData(reply.error))));
    });
    const lost = (error: Error) => {
      if (slot.worker !== worker) return;
      slot.worker = null;
      if (slot.job) this.finish(slot, slot.job, (j) => j.reject(error));
    };
    worker.on('error', (error) => lost(new Error(`the ${this.label} worker failed: ${error.message}`)));
    worker.on('exit', (code) => lost(new Error(`the ${this.label} worker stopped (exit code ${code})`)));
    slot.worker = worker;
    return worker;
  }
}
