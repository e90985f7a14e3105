import { afterAll, afterEach, beforeAll, describe, expect, test, vi } from 'vitest';
import { serve, type RunningServer } from '../../server/commands/serve.js';
import { TestClient } from '../support/ws-client.js';
import { rawRequest } from '../support/raw-http.js';

/**
 * Wrong operator tokens are throttled per source and logged (README "Security"): a few free
 * failures, then every token from that source is refused for a lockout that doubles, on the
 * WebSocket and on the soak POSTs alike; each failure is logged to stderr with its source, the
 * endpoint and the time, never with the token tried. Sources are loopback addresses
 * (127.0.0.x), so they stay apart on one machine.
 */

const TOKEN = 'token-throttle-test-0123456789';
/** Failures answered as failures before a source is locked out (failure-throttle.ts). */
const FREE = 5;

describe('throttling wrong operator tokens', () => {
  let server: RunningServer;
  let wsUrl: string;
  let logged: string[];

  beforeAll(async () => {
    server = await serve({ port: 0, scenario: 'pair-adler', token: TOKEN, logDir: null, speed: 1, quiet: true });
    wsUrl = server.url.replace('http', 'ws') + 'ws';
  });
  afterAll(() => server?.close());
  beforeAll(() => {
    logged = [];
    const write = process.stderr.write.bind(process.stderr);
    vi.spyOn(process.stderr, 'write').mockImplementation((chunk: string | Uint8Array, ...rest: unknown[]) => {
      if (String(chunk).includes('wrong operator token')) {
        logged.push(String(chunk));
        return true;
      }
      return (write as (c: string | Uint8Array, ...r: unknown[]) => boolean)(chunk, ...rest);
    });
  });
  afterAll(() => vi.restoreAllMocks());

  /** The status an upgrade with `token` from `localAddress` is answered with (101 when it opens). */
  async function upgrade(token: string, localAddress: string): Promise<number> {
    try {
      const client = await TestClient.connect(`${wsUrl}?token=${encodeURIComponent(token)}`, { localAddress });
      client.close();
      return 101;
    } catch (error) {
      return Number(/HTTP (\d+)/.exec((error as Error).message)?.[1] ?? 0);
    }
  }

  function startSoak(token: string, localAddress: string) {
    return rawRequest(new URL('api/soaks', server.url).href, {
      method: 'POST',
      headers: { authorization: `Bearer ${token}`, 'content-type': 'application/json' },
      body: '{}',
      localAddress,
    });
  }

  test('on the WebSocket: a few 403s, then 429 for every token from that source, logged without the token; other sources go on', async () => {
    const source = '127.0.0.11';
    const statuses: number[] = [];
    for (let i = 0; i < FREE + 4; i++) statuses.push(await upgrade(`guess-${i}`, source));
    expect(statuses).toEqual([...Array(FREE + 1).fill(403), 429, 429, 429]);
    // locked out: the right token from there is refused too (answering it would confirm a guess)
    expect(await upgrade(TOKEN, source)).toBe(429);
    // the lockout counts for the soak POSTs as well: one throttle per source
    const post = await startSoak(TOKEN, source);
    expect(post.status).toBe(429);
    expect(Number(post.headers['retry-after'])).toBeGreaterThanOrEqual(1);
    expect(JSON.parse(post.body).error).toMatch(/^too many wrong operator tokens from this address: try again in \d+ s$/);
    // another source is not held up
    expect(await upgrade(TOKEN, '127.0.0.12')).toBe(101);
    const mine = logged.filter((line) => line.includes(source));
    expect(mine).toHaveLength(FREE + 1);
    expect(mine[0]).toMatch(
      /^syncring: wrong operator token from 127\.0\.0\.11 on \/ws at \d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z \(failure 1 from this source\)\n$/,
    );
    expect(mine[FREE]).toMatch(/\(failure 6 from this source; refusing every token from 127\.0\.0\.11 for 1 s\)\n$/);
    for (const line of mine) expect(line).not.toMatch(/guess-/);
  });

  test('on the soak POSTs: a few 401s, then 429 with Retry-After; after the lockout a right token is taken again', async () => {
    const source = '127.0.0.13';
    const statuses: number[] = [];
    for (let i = 0; i < FREE + 3; i++) statuses.push((await startSoak(`guess-${i}`, source)).status);
    expect(statuses).toEqual([...Array(FREE + 1).fill(401), 429, 429]);
    expect(logged.filter((line) => line.includes(`from ${source} on POST /api/soaks`))).toHaveLength(FREE + 1);
    await new Promise((r) => setTimeout(r, 1100));
    // the right token, after the first lockout: past the token check (the empty body is the next problem)
    const answer = await startSoak(TOKEN, source);
    expect(answer.status).toBe(400);
    expect(JSON.parse(answer.body).error).toMatch(/^name/);
  });

  test('guessing at full speed: only the first few guesses are checked, the rest are refused unchecked', async () => {
    const source = '127.0.0.14';
    const deadline = Date.now() + 2000;
    let tries = 0;
    const statuses = new Map<number, number>();
    // a bounded load: 8 at a time, for at most 2 s or 400 tries
    await Promise.all(
      Array.from({ length: 8 }, async () => {
        while (Date.now() < deadline && tries < 400) {
          tries++;
          const status = await upgrade(`guess-${tries}`, source);
          statuses.set(status, (statuses.get(status) ?? 0) + 1);
        }
      }),
    );
    expect(tries).toBeGreaterThan(50);
    // the five free failures, the one that started the lockout, and at most the next lockout's
    // one (if the 2 s outlasted the first 1 s lockout)
    expect(statuses.get(403) ?? 0).toBeLessThanOrEqual(FREE + 2);
    expect(statuses.get(429) ?? 0).toBeGreaterThanOrEqual(tries - FREE - 2);
    expect(statuses.get(101) ?? 0).toBe(0);
  });
});

describe('a short SYNCRING_TOKEN', () => {
  const saved = process.env.SYNCRING_TOKEN;
  afterEach(() => {
    if (saved === undefined) delete process.env.SYNCRING_TOKEN;
    else process.env.SYNCRING_TOKEN = saved;
    vi.restoreAllMocks();
  });

  async function startupWarnings(token: string): Promise<string[]> {
    process.env.SYNCRING_TOKEN = token;
    const lines: string[] = [];
    vi.spyOn(process.stderr, 'write').mockImplementation((chunk: string | Uint8Array) => (lines.push(String(chunk)), true));
    const server = await serve({ port: 0, scenario: 'pair-adler', logDir: null, quiet: true });
    await server.close();
    return lines.filter((line) => line.includes('SYNCRING_TOKEN'));
  }

  test('is named at start-up, with what to use and why; a long one is not', async () => {
    const warnings = await startupWarnings('letmein');
    expect(warnings).toHaveLength(1);
    expect(warnings[0]).toMatch(/^syncring: warning: SYNCRING_TOKEN is 7 characters long; use at least 16 random ones/);
    expect(warnings[0]).toMatch(/the only thing between anyone who can reach this server and its controls/);
    expect(warnings[0]).not.toContain('letmein');
    expect(await startupWarnings('a-long-enough-random-token-42')).toEqual([]);
  });
});
