import { timingSafeEqual } from 'node:crypto';
import { FailureThrottle, type ThrottleOptions } from './failure-throttle.js';

/** The operator token check of the WebSocket hub and the HTTP control endpoints: constant time, so its timing gives nothing away. */
export function sameToken(given: string, expected: string): boolean {
  const a = Buffer.from(given);
  const b = Buffer.from(expected);
  return a.length === b.length && timingSafeEqual(a, b);
}

/** A token shorter than this is named at start-up (serve.ts): see README "Security". */
export const SHORT_TOKEN_LENGTH = 16;

export type TokenVerdict = { ok: true } | { ok: false; throttled: false } | { ok: false; throttled: true; retryAfterSeconds: number };

/**
 * The operator token as every endpoint that takes it checks it: wrong tokens are counted per
 * source and throttled (failure-throttle.ts), and each failure is logged with its source, where
 * it was tried and when, never with the token that was tried.
 */
export class OperatorToken {
  private readonly throttle: FailureThrottle;
  private readonly now: () => number;
  private readonly log: (line: string) => void;

  constructor(
    private readonly expected: string,
    options: { throttle?: ThrottleOptions; log?: (line: string) => void; now?: () => number } = {},
  ) {
    this.now = options.now ?? Date.now;
    this.throttle = new FailureThrottle(options.throttle, this.now);
    this.log = options.log ?? ((line) => process.stderr.write(`${line}\n`));
  }

  /** Check `given` from `source` (sourceOf) at `where` (`/ws`, `POST /api/soaks`). */
  check(given: string, source: string, where: string): TokenVerdict {
    const locked = this.throttle.lockedFor(source);
    if (locked > 0) return { ok: false, throttled: true, retryAfterSeconds: Math.ceil(locked / 1000) };
    if (sameToken(given, this.expected)) {
      this.throttle.succeed(source);
      return { ok: true };
    }
    const { failures, lockoutMs } = this.throttle.fail(source);
    const lockout = lockoutMs > 0 ? `; refusing every token from ${source} for ${lockoutMs / 1000} s` : '';
    this.log(
      `syncring: wrong operator token from ${source} on ${where} at ${new Date(this.now()).toISOString()} ` +
        `(failure ${failures} from this source${lockout})`,
    );
    return { ok: false, throttled: false };
  }
}

/** The answer's text to a throttled source. */
export function throttledMessage(retryAfterSeconds: number): string {
  return `too many wrong operator tokens from this address: try again in ${retryAfterSeconds} s`;
}
