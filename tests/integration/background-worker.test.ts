import { afterEach, describe, expect, test } from 'vitest';
import { HttpError } from '../../server/http/http-error.js';
import { BackgroundWorker, type WorkerLimits } from '../../server/http/worker-client.js';

/**
 * The worker behind the slow HTTP endpoints, on a stand-in worker that computes for as long as
 * it is told: a request over its time budget is answered 504 and its worker replaced, the
 * requests behind it are still answered; a source over its share is answered 429 at once, a
 * full queue 503; a source that sends many waits behind itself, not another source, and on a
 * pool of threads computes on one at a time; a request whose asker has gone leaves the queue.
 */

interface Spin {
  spinMs: number;
  label: string;
}
interface Done {
  label: string;
  startedAt: number;
}

const SPIN_WORKER = new URL('./fixtures/spin-worker.js', import.meta.url);
let worker: BackgroundWorker<Spin, Done> | null = null;
afterEach(() => worker?.close());

function spinWorker(limits: Partial<WorkerLimits>): BackgroundWorker<Spin, Done> {
  worker = new BackgroundWorker<Spin, Done>(SPIN_WORKER, 'test computation', limits);
  return worker;
}

/** The request's value, or the HttpError it was refused with. */
const settled = (p: Promise<Done>) =>
  p.then(
    (value) => value,
    (error: unknown) => error as HttpError,
  );

describe('BackgroundWorker limits', () => {
  test('a request over its time budget is answered 504 and the next one is answered by a new worker', async () => {
    const w = spinWorker({ timeBudgetMs: 400, overrunAdvice: 'ask for less' });
    const started = Date.now();
    const slow = settled(w.request({ spinMs: 60_000, label: 'slow' }, 'a'));
    const next = settled(w.request({ spinMs: 10, label: 'next' }, 'a'));
    const refusal = await slow;
    expect(refusal).toBeInstanceOf(HttpError);
    expect({ status: (refusal as HttpError).status, message: (refusal as HttpError).message }).toEqual({
      status: 504,
      message: 'the test computation took longer than its time budget of 0.4 s and was stopped: ask for less',
    });
    // answered at the budget, not when the minute of work would have ended
    expect(Date.now() - started).toBeLessThan(10_000);
    expect(await next).toMatchObject({ label: 'next' });
    expect(w.busy).toBe(0);
  });

  test('on one thread: a source over its share is refused 429 at once; a full queue 503; other sources are served next', async () => {
    const w = spinWorker({ timeBudgetMs: 10_000, perSource: 2, queueLimit: 4, threads: 1 });
    const flood = Array.from({ length: 6 }, (_, i) => settled(w.request({ spinMs: 300, label: `a${i}` }, 'a')));
    const other = settled(w.request({ spinMs: 10, label: 'b' }, 'b'));
    const third = settled(w.request({ spinMs: 10, label: 'c' }, 'c'));
    const full = await settled(w.request({ spinMs: 10, label: 'd' }, 'd'));
    expect((full as HttpError).status).toBe(503);
    const results = await Promise.all(flood);
    const refused = results.filter((r): r is HttpError => r instanceof HttpError);
    expect(refused.map((r) => r.status)).toEqual([429, 429, 429, 429]);
    expect(refused[0].message).toBe('too many test computation requests from this address at once: at most 2 waiting or in progress');
    const done = results.filter((r): r is Done => !(r instanceof HttpError));
    const [b, c] = (await Promise.all([other, third])) as Done[];
    // b and c waited behind a's first request only, not behind a's second
    expect(b.startedAt).toBeLessThan(done[1].startedAt);
    expect(c.startedAt).toBeLessThan(done[1].startedAt);
  });

  test('on two threads: a source computes on one at a time, so another source starts at once beside it', async () => {
    const w = spinWorker({ timeBudgetMs: 10_000, perSource: 3, threads: 2 });
    const flood = [0, 1, 2].map((i) => settled(w.request({ spinMs: 500, label: `a${i}` }, 'a')));
    // let a's first start (its thread has to start too)
    await new Promise((r) => setTimeout(r, 100));
    const asked = Date.now();
    const other = (await settled(w.request({ spinMs: 10, label: 'b' }, 'b'))) as Done;
    const done = (await Promise.all(flood)) as Done[];
    // a's three ran one after another: each started after the one before had spun its 500 ms
    expect(done[1].startedAt - done[0].startedAt).toBeGreaterThanOrEqual(500);
    expect(done[2].startedAt - done[1].startedAt).toBeGreaterThanOrEqual(500);
    // b did not wait for a's first to end (its worker thread started for it, a few hundred ms at most)
    expect(other.startedAt).toBeLessThan(done[0].startedAt + 500);
    expect(other.startedAt - asked).toBeLessThan(2000);
  });

  test('a waiting request whose asker has gone leaves the queue and frees its share', async () => {
    const w = spinWorker({ timeBudgetMs: 10_000, perSource: 2, threads: 1 });
    const first = settled(w.request({ spinMs: 300, label: 'a0' }, 'a'));
    const gone = new AbortController();
    const withdrawn = settled(w.request({ spinMs: 300, label: 'a1' }, 'a', gone.signal));
    expect(w.busy).toBe(2);
    gone.abort();
    expect((await withdrawn) as Error).toEqual(new Error('the test computation request was withdrawn'));
    expect(w.busy).toBe(1);
    // the share is free again: a third request from the same source is taken, not refused
    const again = settled(w.request({ spinMs: 10, label: 'a2' }, 'a'));
    expect(await first).toMatchObject({ label: 'a0' });
    expect(await again).toMatchObject({ label: 'a2' });
    // a running request is not withdrawn: its answer may serve others (the prediction cache)
    const running = new AbortController();
    const kept = settled(w.request({ spinMs: 300, label: 'a3' }, 'a', running.signal));
    await new Promise((r) => setTimeout(r, 100));
    running.abort();
    expect(await kept).toMatchObject({ label: 'a3' });
  });
});
