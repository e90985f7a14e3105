import type { Response } from 'express';

/** A computation and how many requests still wait for it (withdrawn from the queue when none does). */
interface CacheEntry<T> {
  result: Promise<T>;
  askers: number;
  withdraw: AbortController;
}

/**
 * Answers of slow computations kept by the question they answer: one computation per key
 * (concurrent requests share it), the least recently asked dropped first, failures not kept
 * (the next request tries again), and a computation still waiting when everyone who asked for
 * it has hung up withdrawn, so it is never made.
 */
export class AnswerCache<T> {
  private readonly entries = new Map<string, CacheEntry<T>>();

  constructor(private readonly size: number) {}

  /** The answer to `key` for the request answered by `res`; `compute` is called only for a new key. */
  ask(key: string, res: Response, compute: (signal: AbortSignal) => Promise<T>): { result: Promise<T>; fromCache: boolean } {
    let entry = this.entries.get(key);
    const fromCache = entry !== undefined;
    if (entry) {
      this.entries.delete(key);
      this.entries.set(key, entry);
    } else {
      const withdraw = new AbortController();
      const fresh: CacheEntry<T> = { result: compute(withdraw.signal), askers: 0, withdraw };
      entry = fresh;
      this.entries.set(key, fresh);
      fresh.result.catch(() => {
        if (this.entries.get(key) === fresh) this.entries.delete(key);
      });
      while (this.entries.size > this.size) this.entries.delete(this.entries.keys().next().value!);
    }
    const asked = entry;
    asked.askers++;
    res.on('close', () => {
      if (--asked.askers === 0) asked.withdraw.abort();
    });
    return { result: asked.result, fromCache };
  }
}
