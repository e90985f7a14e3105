import { afterEach, beforeEach, describe, expect, test, vi } from 'vitest';
import type { ReactiveController, ReactiveControllerHost } from 'lit';
import { ApiError, getJson, postJson } from '../../web/src/data/api-client.js';
import { PollingController, type PollingOptions } from '../../web/src/data/polling-controller.js';

/**
 * The dashboard's API client and polling controller, without a browser: what goes over the wire
 * (address, token header, body), how a refusal reaches the panels, and when reads happen.
 */

describe('API client', () => {
  const sent: { url: string; init: RequestInit | undefined }[] = [];
  let answer: () => Response;

  beforeEach(() => {
    sent.length = 0;
    // A dashboard served behind a path prefix: requests stay under it.
    vi.stubGlobal('document', { baseURI: 'http://127.0.0.1:8300/lab/index.html' });
    vi.stubGlobal('fetch', async (url: string, init?: RequestInit) => {
      sent.push({ url, init });
      return answer();
    });
  });
  afterEach(() => vi.unstubAllGlobals());

  test('a GET goes to the page-relative address and returns the JSON answer', async () => {
    answer = () => Response.json({ dir: 'soaks', soaks: [] });
    expect(await getJson('/api/soaks')).toEqual({ dir: 'soaks', soaks: [] });
    expect(sent.map((s) => s.url)).toEqual(['http://127.0.0.1:8300/lab/api/soaks']);
    expect(sent[0].init?.method).toBeUndefined();
  });

  test("a refusal throws an ApiError with the server's own message and the status", async () => {
    answer = () => Response.json({ error: 'until must be a positive number' }, { status: 400 });
    const error = await postJson('/api/soaks', 'secret', { until: -1 }).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ApiError);
    expect(error).toMatchObject({ message: 'until must be a positive number', status: 400 });
  });

  test('an error answer without a message names the status and the path', async () => {
    answer = () => new Response('<html>bad gateway</html>', { status: 502 });
    await expect(getJson('/api/catalogue')).rejects.toMatchObject({ message: 'HTTP 502 from /api/catalogue', status: 502 });
  });

  test('a GET answered without JSON is an error, a POST answered without JSON is an empty answer', async () => {
    answer = () => new Response('', { status: 200 });
    await expect(getJson('/api/scenarios')).rejects.toThrow('/api/scenarios did not answer with JSON');
    expect(await postJson('/api/soaks/a/stop', 'secret')).toEqual({});
  });

  test('a POST carries the operator token, and a JSON body only when there is one', async () => {
    answer = () => Response.json({ pid: 42 });
    await postJson('/api/soaks', 'secret', { name: 'a' });
    await postJson('/api/soaks/a/resume', 'secret');
    expect(sent.map((s) => [s.init?.method, s.init?.headers, s.init?.body])).toEqual([
      ['POST', { Authorization: 'Bearer secret', 'Content-Type': 'application/json' }, '{"name":"a"}'],
      ['POST', { Authorization: 'Bearer secret' }, undefined],
    ]);
  });
});

/** A stand-in for a Lit element: holds controllers and counts render requests. */
class FakeHost implements ReactiveControllerHost {
  readonly controllers: ReactiveController[] = [];
  updates = 0;
  active = true;
  addController(c: ReactiveController): void {
    this.controllers.push(c);
  }
  removeController(): void {}
  requestUpdate(): void {
    this.updates++;
  }
  get updateComplete(): Promise<boolean> {
    return Promise.resolve(true);
  }
  connect(): void {
    for (const c of this.controllers) c.hostConnected?.();
  }
  updated(): void {
    for (const c of this.controllers) c.hostUpdated?.();
  }
  disconnect(): void {
    for (const c of this.controllers) c.hostDisconnected?.();
  }
}

/** Reads that stay out until the test answers them, so overlaps can be seen. */
function pendingReads() {
  const reads: { signal: AbortSignal; answer: () => void }[] = [];
  const read = (signal: AbortSignal) => new Promise<void>((resolve) => reads.push({ signal, answer: resolve }));
  return { reads, read };
}

/** Lets the controller see a read's end (it follows the read's promise). */
async function settle(): Promise<void> {
  for (let i = 0; i < 5; i++) await Promise.resolve();
}

describe('polling controller', () => {
  beforeEach(() => vi.useFakeTimers());
  afterEach(() => vi.useRealTimers());

  function poller(options: Omit<PollingOptions, 'read'>) {
    const host = new FakeHost();
    const { reads, read } = pendingReads();
    const controller = new PollingController(host, { read, ...options });
    return { host, reads, controller };
  }

  test('an active panel reads on connect and again a period after each answer, never two at once', async () => {
    const { host, reads } = poller({ active: () => host.active, everyMs: 2000 });
    host.connect();
    expect(reads.length).toBe(1);
    vi.advanceTimersByTime(10_000);
    expect(reads.length).toBe(1); // the first read is still out: no second one
    reads[0].answer();
    await settle();
    vi.advanceTimersByTime(1999);
    expect(reads.length).toBe(1);
    vi.advanceTimersByTime(1);
    expect(reads.length).toBe(2);
  });

  test('asking while a read is out gives exactly one follow-up read when it is back', async () => {
    const { host, reads, controller } = poller({ active: () => host.active, everyMs: 2000 });
    host.connect();
    controller.readNow();
    controller.readNow();
    expect(reads.length).toBe(1);
    reads[0].answer();
    await settle();
    expect(reads.length).toBe(2);
    expect(reads[0].signal.aborted).toBe(false);
  });

  test('a hidden panel stops reading and starts again when shown; disconnecting abandons the read out', async () => {
    const { host, reads } = poller({ active: () => host.active, everyMs: 2000 });
    host.connect();
    reads[0].answer();
    await settle();
    host.active = false;
    host.updated();
    vi.advanceTimersByTime(10_000);
    expect(reads.length).toBe(1);
    host.active = true;
    host.updated();
    expect(reads.length).toBe(2);
    host.disconnect();
    expect(reads[1].signal.aborted).toBe(true);
    vi.advanceTimersByTime(10_000);
    expect(reads.length).toBe(2);
  });

  test('superseding reads abandon the one out; a burst of requests gives one read after the delay', async () => {
    let due = true;
    const { host, reads, controller } = poller({ due: () => due, whileReading: 'supersede' });
    host.connect();
    expect(reads.length).toBe(0); // without `active`, it reads only when asked
    controller.readSoon(400);
    vi.advanceTimersByTime(200);
    controller.readSoon(400);
    vi.advanceTimersByTime(200);
    expect(reads.length).toBe(1);
    expect(controller.busy).toBe(true);
    controller.readNow();
    expect(reads.length).toBe(2);
    expect(reads[0].signal.aborted).toBe(true);
    // nothing due: the read out is kept
    due = false;
    controller.readNow();
    expect(reads.length).toBe(2);
    expect(reads[1].signal.aborted).toBe(false);
    reads[0].answer();
    await settle();
    expect(controller.busy).toBe(true); // the abandoned read's end does not end the newer one
    reads[1].answer();
    await settle();
    expect(controller.busy).toBe(false);
    expect(host.updates).toBe(3); // two starts and the newer one's end: the host shows "busy" and then not
  });
});
