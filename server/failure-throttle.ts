/**
 * Failed attempts per source with a growing lockout, so a guesser gets a handful of tries and
 * then one per lockout, while the lockout doubles: 5 free failures, then 1 s, 2 s, 4 s, ... up
 * to a minute, about 60 guesses an hour per source. While a source is locked out every attempt
 * is refused unchecked (a right answer too: answering it would tell the guesser it was right).
 * A success clears the source; a source with no failure for `forgetMs` is forgotten. At most
 * `maxSources` are remembered (the oldest forgotten first), so a spread of sources costs
 * bounded memory.
 */
export interface ThrottleOptions {
  freeFailures?: number;
  firstLockoutMs?: number;
  maxLockoutMs?: number;
  forgetMs?: number;
  maxSources?: number;
}

interface SourceRecord {
  failures: number;
  lastFailure: number;
  lockedUntil: number;
}

export class FailureThrottle {
  private readonly sources = new Map<string, SourceRecord>();
  private readonly freeFailures: number;
  private readonly firstLockoutMs: number;
  private readonly maxLockoutMs: number;
  private readonly forgetMs: number;
  private readonly maxSources: number;

  constructor(
    options: ThrottleOptions = {},
    private readonly now: () => number = Date.now,
  ) {
    this.freeFailures = options.freeFailures ?? 5;
    this.firstLockoutMs = options.firstLockoutMs ?? 1000;
    this.maxLockoutMs = options.maxLockoutMs ?? 60_000;
    this.forgetMs = options.forgetMs ?? 15 * 60_000;
    this.maxSources = options.maxSources ?? 10_000;
  }

  /** Milliseconds the source is still locked out for (0: it may try). */
  lockedFor(source: string): number {
    const record = this.current(source);
    return record ? Math.max(0, record.lockedUntil - this.now()) : 0;
  }

  /** Count a failure; returns how many the source has made and the lockout it starts now (0 for none). */
  fail(source: string): { failures: number; lockoutMs: number } {
    const now = this.now();
    const record = this.current(source) ?? { failures: 0, lastFailure: now, lockedUntil: 0 };
    record.failures++;
    record.lastFailure = now;
    const beyond = record.failures - this.freeFailures;
    const lockoutMs = beyond > 0 ? Math.min(this.maxLockoutMs, this.firstLockoutMs * 2 ** (beyond - 1)) : 0;
    record.lockedUntil = now + lockoutMs;
    // re-inserted, so the map's order is the order of the latest failures
    this.sources.delete(source);
    this.sources.set(source, record);
    while (this.sources.size > this.maxSources) this.sources.delete(this.sources.keys().next().value!);
    return { failures: record.failures, lockoutMs };
  }

  succeed(source: string): void {
    this.sources.delete(source);
  }

  private current(source: string): SourceRecord | undefined {
    const record = this.sources.get(source);
    if (record && this.now() - record.lastFailure > this.forgetMs && record.lockedUntil <= this.now()) {
      this.sources.delete(source);
      return undefined;
    }
    return record;
  }
}
