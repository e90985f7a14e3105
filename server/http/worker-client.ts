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

/** How much work one worker takes on (README "Security"). */
export interface WorkerLimits {
  /** How long one request may compute before the worker is stopped and started again (ms). */
  timeBudgetMs: number;
  /** Requests waiting or in progress at most, from all sources together. */
  queueLimit: number;
  /** Requests waiting or in progress at most from one source. */
  perSource: number;
  /** What to do instead, said to a request that overran its budget. */
  overrunAdvice: string;
}

const DEFAULT_LIMITS: WorkerLimits = { timeBudgetMs: 30_000, queueLimit: 8, perSource: 2, overrunAdvice: 'ask for less' };

interface Job<TRequest, TValue> {
  message: TRequest;
  source: string;
  id: number;
  resolve: (value: TValue) => void;
  reject: (error: Error) => void;
}

/**
 * One worker thread for slow, synchronous computations behind HTTP requests, so they never
 * block the event loop that serves WebSocket frames. Started on the first request. Requests
 * wait in a queue bounded in all and per source, taken in turn by source (fair-queue.ts), and
 * go to the worker one at a time, so that a request which overruns its time budget is the only
 * one lost when the worker is terminated: it is answered 504 and the next one starts on a new
 * worker. A full queue is answered 503, a source over its share 429. A crashed worker fails
 * the request it was computing and is started again for the next.
 */
export class BackgroundWorker<TRequest extends object, TValue> {
  private worker: Worker | null = null;
  private nextId = 1;
  private readonly queue = new FairQueue<Job<TRequest, TValue>>();
  private running: { job: Job<TRequest, TValue>; timer: NodeJS.Timeout } | null = null;
  private closed = false;
  private readonly limits: WorkerLimits;

  constructor(
    private readonly url: URL,
    private readonly label: string,
    limits: Partial<WorkerLimits> = {},
  ) {
    this.limits = { ...DEFAULT_LIMITS, ...limits };
  }

  /** Queue one request from `source` (sourceOf of the client's address). */
  request(message: TRequest, source = 'local'): Promise<TValue> {
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
      this.queue.push(source, { message, source, id: this.nextId++, resolve, reject });
      this.pump();
    });
  }

  /** Requests waiting or in progress. */
  get busy(): number {
    return this.queue.size + (this.running ? 1 : 0);
  }

  async close(): Promise<void> {
    this.closed = true;
    const worker = this.worker;
    this.worker = null;
    const error = new Error(`the ${this.label} worker was closed`);
    if (this.running) {
      clearTimeout(this.running.timer);
      this.running.job.reject(error);
      this.running = null;
    }
    for (const job of this.queue.drain()) job.reject(error);
    await worker?.terminate();
  }

  private pendingFrom(source: string): number {
    return this.queue.waiting(source) + (this.running?.job.source === source ? 1 : 0);
  }

  /** Hand the next request in turn to the worker when it is idle. */
  private pump(): void {
    if (this.running || this.closed) return;
    const job = this.queue.shift();
    if (!job) return;
    const worker = this.start();
    const timer = setTimeout(() => this.overran(job), this.limits.timeBudgetMs);
    timer.unref();
    this.running = { job, timer };
    worker.postMessage({ ...job.message, id: job.id });
  }

  private finish(job: Job<TRequest, TValue>, settle: () => void): void {
    if (this.running?.job !== job) return;
    clearTimeout(this.running.timer);
    this.running = null;
    settle();
    this.pump();
  }

  /** The request computed past its budget: a synchronous computation cannot be interrupted, so the worker goes. */
  private overran(job: Job<TRequest, TValue>): void {
    const worker = this.worker;
    this.worker = null;
    void worker?.terminate();
    const seconds = this.limits.timeBudgetMs / 1000;
    this.finish(job, () =>
      job.reject(
        new HttpError(
          504,
          `the ${this.label} took longer than its time budget of ${seconds} s and was stopped: ${this.limits.overrunAdvice}`,
        ),
      ),
    );
  }

  private start(): Worker {
    if (this.worker) return this.worker;
    const worker = new Worker(this.url);
    // Never keep the process alive just for an idle worker.
    worker.unref();
    worker.on('message', (reply: WorkerReply<TValue>) => {
      const job = this.running?.job;
      if (!job || job.id !== reply.id) return;
      this.finish(job, () => (reply.ok ? job.resolve(reply.value) : job.reject(HttpError.fromData(reply.error))));
    });
    const lost = (error: Error) => {
      if (this.worker !== worker) return;
      this.worker = null;
      const job = this.running?.job;
      if (job) this.finish(job, () => job.reject(error));
    };
    worker.on('error', (error) => lost(new Error(`the ${this.label} worker failed: ${error.message}`)));
    worker.on('exit', (code) => lost(new Error(`the ${this.label} worker stopped (exit code ${code})`)));
    this.worker = worker;
    return worker;
  }
}
