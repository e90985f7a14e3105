import { Worker } from 'node:worker_threads';
import { HttpError, type HttpErrorData } from './http-error.js';

/** What a background worker posts back for one request: the value, or the HttpError to answer with. */
export type WorkerReply<T> = { id: number; ok: true; value: T } | { id: number; ok: false; error: HttpErrorData };

// A request the worker refused or failed is an HttpError; the old name stays for soak-api.ts.

/**
 * The compiled worker module `name` of server/http: beside the caller when the server runs
 * compiled, in dist/ when it runs from its TypeScript sources (tests), as the live session does.
 */
export function compiledHttpWorker(name: string): URL {
  const here = new URL(import.meta.url);
  if (here.pathname.endsWith('.js')) return new URL(`./${name}.js`, here);
  return new URL(`../../dist/server/http/${name}.js`, here);
}

/**
 * One worker thread for slow, synchronous computations behind HTTP requests, so they never
 * block the event loop that serves WebSocket frames. Started on the first request, requests
 * answered in order; a crashed worker fails its pending requests and is started again next time.
 */
export class BackgroundWorker<TRequest extends object, TValue> {
  private worker: Worker | null = null;
  private nextId = 1;
  private readonly pending = new Map<number, { resolve: (value: TValue) => void; reject: (error: Error) => void }>();
  private closed = false;

  constructor(
    private readonly url: URL,
    private readonly label: string,
  ) {}

  request(message: TRequest): Promise<TValue> {
    if (this.closed) return Promise.reject(new Error(`the ${this.label} worker is closed`));
    const worker = this.start();
    const id = this.nextId++;
    return new Promise<TValue>((resolve, reject) => {
      this.pending.set(id, { resolve, reject });
      worker.postMessage({ ...message, id });
    });
  }

  /** Requests waiting for an answer. */
  get busy(): number {
    return this.pending.size;
  }

  async close(): Promise<void> {
    this.closed = true;
    const worker = this.worker;
    this.worker = null;
    this.failAll(new Error(`the ${this.label} worker was closed`));
    await worker?.terminate();
  }

  private start(): Worker {
    if (this.worker) return this.worker;
    const worker = new Worker(this.url);
    // Never keep the process alive just for an idle worker.
    worker.unref();
    worker.on('message', (reply: WorkerReply<TValue>) => {
      const waiting = this.pending.get(reply.id);
      this.pending.delete(reply.id);
      if (!waiting) return;
      if (reply.ok) waiting.resolve(reply.value);
      else waiting.reject(HttpError.fromData(reply.error));
    });
    const lost = (error: Error) => {
      if (this.worker !== worker) return;
      this.worker = null;
      this.failAll(error);
    };
    worker.on('error', (error) => lost(new Error(`the ${this.label} worker failed: ${error.message}`)));
    worker.on('exit', (code) => lost(new Error(`the ${this.label} worker stopped (exit code ${code})`)));
    this.worker = worker;
    return worker;
  }

  private failAll(error: Error): void {
    for (const waiting of this.pending.values()) waiting.reject(error);
    this.pending.clear();
  }
}
