import { request } from 'node:http';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { serve, type RunningServer } from '../../server/commands/serve.js';
import { TestClient } from '../support/ws-client.js';
import { rawRequest, type RawAnswer } from '../support/raw-http.js';

/**
 * The prediction endpoints need no token, so what one request may cost is bounded (README
 * "Security"): every query field has bounds (400 naming the field and what is allowed), a
 * request that computes past its time budget is stopped (504) and the worker replaced, and the
 * queue has a share per source (429), so one client can neither hold the worker nor fill it.
 * Two sources on one machine: requests from 127.0.0.1 and from 127.0.0.2.
 */

const OTHER_SOURCE = '127.0.0.2';

/** A what-if within the bounds on a 64-node ring: 1000 steps each way, more than 7 s of CPU (measured). */
const HEAVY_WHAT_IF = 'api/what-if?param=coupling&maxSteps=1000&range=-10000:10000';
const WIDE_RING = new URL('./fixtures/wide-ring-64.json', import.meta.url).pathname;

const json = (answer: RawAnswer) => JSON.parse(answer.body) as { error?: string };

describe('what-if query bounds', () => {
  let server: RunningServer;
  beforeAll(async () => {
    server = await serve({ port: 0, scenario: 'pair-adler', logDir: null, speed: 0.5, quiet: true });
  });
  afterAll(() => server?.close());

  test('an unbounded what-if is a 400 naming the field and the values allowed, before any work', async () => {
    const cases: [string, string, RegExp][] = [
      // the request of the adversarial test, as it was sent
      ['param=coupling&maxSteps=100000000&range=0:1e12', 'range', /^range: MIN and MAX must lie from -10000 to 10000 in model units/],
      ['param=coupling&maxSteps=100000000', 'maxSteps', /^maxSteps must be an integer from 1 to 1000 \(got "100000000"\)/],
      ['param=coupling&maxSteps=1e4', 'maxSteps', /^maxSteps must be an integer from 1 to 1000 \(got "1e4"\)/],
      ['param=coupling&range=-1e5:', 'range', /^range: MIN and MAX must lie from -10000 to 10000/],
      ['param=coupling&range=0:Infinity', 'range', /^range: MAX "Infinity" is not a number/],
      ['param=coupling&range=1', 'range', /^range must look like MIN:MAX/],
      ['param=coupling&pattern=1000', 'pattern', /^pattern must be an integer from 0 to 999/],
      [`param=${'coupling'.repeat(6)}`, 'param', /^param must be at most 40 characters/],
      ['param=coupling&steps=5', 'steps', /^steps is not a what-if field \(the fields are param, pattern, range, maxSteps\)/],
    ];
    for (const [query, field, message] of cases) {
      const started = Date.now();
      const answer = await rawRequest(new URL(`api/what-if?${query}`, server.url).href);
      expect({ query, status: answer.status }).toEqual({ query, status: 400 });
      expect(json(answer).error, query).toMatch(message);
      expect(json(answer).error, query).toContain(field);
      expect(Date.now() - started, query).toBeLessThan(1000);
    }
  });
});

describe('the prediction worker under load', () => {
  let server: RunningServer;
  beforeAll(async () => {
    // a budget far below what the heavy what-if needs on the wide ring, far above what the
    // small pair's catalogue needs (0.2 s of CPU, the worker's start included)
    server = await serve({
      port: 0,
      scenario: WIDE_RING,
      token: 'prediction-limits-token',
      logDir: null,
      speed: 5,
      quiet: true,
      predictionLimits: { timeBudgetMs: 4000 },
    });
  });
  afterAll(() => server?.close());

  test('a request over its time budget is stopped with a 504 while frames go on; the next request is answered', async () => {
    const viewer = await TestClient.connect(server.url.replace('http', 'ws') + 'ws');
    await viewer.next('hello');
    const started = Date.now();
    const heavy = await rawRequest(new URL(HEAVY_WHAT_IF, server.url).href);
    expect(heavy.status).toBe(504);
    expect(json(heavy).error).toBe(
      'the prediction took longer than its time budget of 4 s and was stopped: ask for a narrower range or fewer steps (maxSteps)',
    );
    expect(Date.now() - started).toBeLessThan(9000);
    expect(viewer.all('frame').length).toBeGreaterThan(5);
    viewer.close();
    // the next request needs the worker again (a scenario it has not seen): a new one answers it
    const operator = await TestClient.connect(`${server.url.replace('http', 'ws')}ws?token=prediction-limits-token`);
    await operator.next('hello');
    operator.command({ action: 'load-scenario', name: 'pair-adler', id: 1 });
    await operator.next('ack', (m) => m.id === 1);
    operator.close();
    const next = await rawRequest(new URL('api/catalogue', server.url).href);
    expect(next.status).toBe(200);
    expect(JSON.parse(next.body).nodes).toBe(2);
  });
});

describe('one source flooding the prediction endpoints', () => {
  let server: RunningServer;
  beforeAll(async () => {
    server = await serve({ port: 0, scenario: 'timing-board-8', logDir: null, speed: 0.5, quiet: true });
  });
  afterAll(() => server?.close());

  test('gets 429 beyond its share and holds one thread, while another source is answered beside it', async () => {
    // distinct questions (maxSteps differs), so none is answered from another's computation
    let answered = 0;
    const flood = Array.from({ length: 7 }, (_, i) => {
      const url = new URL(`api/what-if?param=coupling&maxSteps=${20 + i}`, server.url).href;
      return rawRequest(url).then((answer) => (answered++, { answer, at: Date.now() }));
    });
    // the refusals come at once, the three admitted requests take seconds: then the queue holds the flood
    await expect.poll(() => answered, { timeout: 2000, interval: 20 }).toBe(4);
    const other = await rawRequest(new URL('api/catalogue', server.url).href, { localAddress: OTHER_SOURCE }).then((answer) => ({
      answer,
      at: Date.now(),
    }));
    const results = await Promise.all(flood);
    const statuses = results.map((r) => r.answer.status);
    expect(statuses.filter((s) => s === 429)).toHaveLength(4);
    expect(statuses.filter((s) => s === 200)).toHaveLength(3);
    expect(json(results.find((r) => r.answer.status === 429)!.answer).error).toBe(
      'too many prediction requests from this address at once: at most 3 waiting or in progress',
    );
    expect(other.answer.status).toBe(200);
    // the flood computes on one thread, one request after another; the other source was
    // answered on the other thread beside the flood's first, not after its second
    const admitted = results.filter((r) => r.answer.status === 200).sort((a, b) => a.at - b.at);
    expect(other.at).toBeLessThan(admitted[1].at);
  });
  test('requests whose clients hung up while they waited leave the queue: the source may ask again', async () => {
    const source = '127.0.0.5';
    const heavy = (n: number) => new URL(`api/what-if?param=dissipative&maxSteps=500&range=-10000:${9000 + n}`, server.url).href;
    // one computing, two waiting: the source's whole share
    const first = rawRequest(heavy(1), { localAddress: source });
    const hungUp = [2, 3].map((n) => {
      const req = request(heavy(n), { localAddress: source, agent: false });
      req.on('error', () => undefined);
      req.end();
      return req;
    });
    await new Promise((r) => setTimeout(r, 300));
    for (const req of hungUp) req.destroy();
    await new Promise((r) => setTimeout(r, 200));
    // without the withdrawal these two would be 429 (three waiting or in progress already)
    const again = await Promise.all([4, 5].map((n) => rawRequest(heavy(n), { localAddress: source })));
    expect(again.map((a) => a.status)).not.toContain(429);
    expect((await first).status).not.toBe(429);
    // three computations of seconds one after another on one thread, each within its 30 s budget
  }, 150_000);
});
