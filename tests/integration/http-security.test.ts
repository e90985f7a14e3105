import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { serve, type RunningServer } from '../../server/commands/serve.js';
import { WEB_ROOT } from '../../server/http/app.js';
import { checkHostAndOrigin, type OriginPolicy } from '../../server/ws/origin.js';
import { TestClient } from '../support/ws-client.js';
import { rawRequest } from '../support/raw-http.js';
import { runPairSoak } from '../support/pair-soak.js';

/**
 * The HTTP side against a real server (README "Security"): one Host/Origin policy for every
 * request, static files included, and for the WebSocket; the security headers on every answer;
 * a path that is not percent-encoded UTF-8 is bad input; and what viewers receive names no path
 * of the server's disk.
 */

const fixture = (name: string) => new URL(`./fixtures/${name}`, import.meta.url).pathname;
const TOKEN = 'http-security-token-0123';
const SOAK = 'pair-finished';

describe('HTTP security of a live server', () => {
  let server: RunningServer;
  let port: number;
  let host: string;
  let logDir: string;
  let soaksDir: string;
  let work: string;

  beforeAll(async () => {
    logDir = mkdtempSync(join(tmpdir(), 'syncring-http-logs-'));
    soaksDir = mkdtempSync(join(tmpdir(), 'syncring-http-soaks-'));
    work = mkdtempSync(join(tmpdir(), 'syncring-http-work-'));
    const { code } = await runPairSoak(work, join(soaksDir, SOAK));
    expect(code).toBe(0);
    server = await serve({ port: 0, scenario: fixture('fast-ring-6.json'), token: TOKEN, logDir, soaksDir, speed: 5, quiet: true });
    port = Number(new URL(server.url).port);
    host = `127.0.0.1:${port}`;
  });
  afterAll(async () => {
    await server?.close();
    for (const dir of [logDir, soaksDir, work]) if (dir) rmSync(dir, { recursive: true, force: true });
  });

  /** Every kind of thing the server serves: the page, a bundle file, each API, a report, nothing. */
  function paths(): string[] {
    const page = join(WEB_ROOT, 'index.html');
    const asset = existsSync(page) ? /src="\.\/(assets\/[^"]+\.js)"/.exec(readFileSync(page, 'utf8'))?.[1] : undefined;
    return [
      '/',
      '/index.html',
      ...(asset ? [`/${asset}`] : []),
      '/api/health',
      '/api/session',
      '/api/scenarios',
      '/api/log',
      '/api/soaks',
      '/api/campaigns',
      '/api/catalogue',
      '/api/what-if?param=coupling',
      `/soaks/${SOAK}/report.html`,
      '/api/nothing',
      '/nothing',
    ];
  }

  test('every path under a foreign Host is refused 403, saying why; the same paths under this server answer', async () => {
    for (const path of paths()) {
      const foreign = await rawRequest(server.url, { path, headers: { host: `evil.example:${port}` } });
      expect({ path, status: foreign.status }).toEqual({ path, status: 403 });
      expect(JSON.parse(foreign.body).error).toMatch(/^refused: Host evil\.example:\d+ is not this server/);
    }
    const post = await rawRequest(server.url, {
      method: 'POST',
      path: '/api/soaks',
      headers: { host: `evil.example:${port}`, authorization: `Bearer ${TOKEN}`, 'content-type': 'application/json' },
      body: '{}',
    });
    expect(post.status).toBe(403);
    // a DNS name of this machine's loopback, another port, no Host at all (HTTP/1.0)
    expect((await rawRequest(server.url, { path: '/api/session', headers: { host: `127.0.0.1:${port + 1}` } })).status).toBe(403);
    for (const name of [host, `localhost:${port}`, `[::1]:${port}`]) {
      expect((await rawRequest(server.url, { path: '/api/session', headers: { host: name } })).status).toBe(200);
    }
  });

  test('an Origin must be this server over plain http: https, another site, or null are refused on HTTP and on the WebSocket', async () => {
    const refused = [`https://127.0.0.1:${port}`, `https://localhost:${port}`, `http://evil.example:${port}`, 'http://127.0.0.1:1', 'null'];
    for (const origin of refused) {
      const answer = await rawRequest(server.url, { path: '/api/session', headers: { host, origin } });
      expect({ origin, status: answer.status }).toEqual({ origin, status: 403 });
      expect(JSON.parse(answer.body).error).toMatch(/^refused: Origin .* is not allowed/);
      await expect(TestClient.connect(`ws://${host}/ws`, { origin })).rejects.toThrow('HTTP 403');
    }
    expect(
      JSON.parse((await rawRequest(server.url, { path: '/api/session', headers: { host, origin: `https://${host}` } })).body).error,
    ).toMatch(/plain http:\/\/, so https:\/\/ is another site/);
    for (const origin of [`http://${host}`, `http://localhost:${port}`]) {
      expect((await rawRequest(server.url, { path: '/api/session', headers: { host, origin } })).status).toBe(200);
    }
    const sameOrigin = await TestClient.connect(`ws://${host}/ws`, { origin: `http://${host}` });
    await sameOrigin.next('hello');
    sameOrigin.close();
  });

  test('every answer carries the security headers; the dashboard and a report each their own policy', async () => {
    const answers = [
      ...(await Promise.all(paths().map(async (path) => ({ path, answer: await rawRequest(server.url, { path, headers: { host } }) })))),
      { path: 'foreign Host', answer: await rawRequest(server.url, { path: '/', headers: { host: 'evil.example' } }) },
    ];
    for (const { path, answer } of answers) {
      expect({ path, headers: pick(answer.headers) }).toEqual({
        path,
        headers: { 'x-content-type-options': 'nosniff', 'x-frame-options': 'DENY', 'referrer-policy': 'no-referrer' },
      });
      expect(answer.headers['content-security-policy'], path).toMatch(/frame-ancestors 'none'/);
    }
    const page = answers.find((a) => a.path === '/')!.answer.headers['content-security-policy'];
    expect(page).toMatch(/^default-src 'self'; script-src 'self'; style-src 'self'; /);
    expect(page).toContain(`connect-src 'self' ws://${host};`);
    expect(page).not.toMatch(/script-src[^;]*unsafe/);
    const report = answers.find((a) => a.path.endsWith('report.html'))!.answer;
    expect(report.status).toBe(200);
    expect(report.headers['content-security-policy']).toBe(
      "default-src 'none'; style-src 'unsafe-inline'; base-uri 'none'; form-action 'none'; frame-ancestors 'none'",
    );
    expect(report.body).not.toMatch(/<script/i);
  });

  test('a path that is not percent-encoded UTF-8 is a 400 naming the problem, never a 500', async () => {
    for (const path of ['/soaks/%c0%ae/report.html', '/soaks/%E0%A4%A/report.html', '/soaks/%ff/report.html']) {
      const answer = await rawRequest(server.url, { path, headers: { host } });
      expect({ path, status: answer.status }).toEqual({ path, status: 400 });
      expect(JSON.parse(answer.body).error).toMatch(/^the request path is not percent-encoded UTF-8/);
    }
    const stop = await rawRequest(server.url, {
      method: 'POST',
      path: '/api/soaks/%c0%ae/stop',
      headers: { host, authorization: `Bearer ${TOKEN}` },
    });
    expect(stop.status).toBe(400);
    expect(JSON.parse(stop.body).error).toMatch(/^the request path is not percent-encoded UTF-8/);
    expect((await rawRequest(server.url, { path: '/%c0%ae', headers: { host } })).status).toBe(404);
  });

  test('viewers are told file names relative to what the server serves, never a path on its disk', async () => {
    const viewer = await TestClient.connect(server.url.replace('http', 'ws') + 'ws');
    const hello = await viewer.next('hello');
    await viewer.next('status');
    viewer.close();
    expect(hello.session.logFile).toMatch(/^[^/]+\.ndjson$/);
    expect(server.live.log!.path.endsWith(`/${hello.session.logFile}`)).toBe(true);
    const soaks = JSON.parse((await rawRequest(server.url, { path: '/api/soaks', headers: { host } })).body);
    expect(soaks.dir).toBe('soaks');
    expect(soaks.soaks.map((s: { name: string }) => s.name)).toEqual([SOAK]);
    const seen = [
      JSON.stringify(viewer.messages),
      (await rawRequest(server.url, { path: '/api/session', headers: { host } })).body,
      JSON.stringify(soaks),
      (await rawRequest(server.url, { path: `/soaks/${SOAK}/report.html`, headers: { host } })).body,
      (await rawRequest(server.url, { path: '/soaks/nobody/report.html', headers: { host } })).body,
    ];
    for (const text of seen) {
      for (const dir of [process.cwd(), logDir, soaksDir, work]) expect(text).not.toContain(dir);
    }
    expect(seen[3]).toContain(`soaks/${SOAK}`);
  });
});

describe('the Host/Origin policy when listening on every interface', () => {
  const policy: OriginPolicy = { allowedHosts: ['board.lab:8300', 'proxy.lab'], allowedOrigins: [], anyHost: true };
  const check = (headers: Record<string, string>) => checkHostAndOrigin({ headers }, 8300, policy);

  test('any IP address literal names the server, a DNS name only when allowed (a rebinding page has a DNS name)', () => {
    expect(check({ host: '192.0.2.7:8300' })).toBeNull();
    expect(check({ host: '[2001:db8::7]:8300' })).toBeNull();
    expect(check({ host: 'board.lab:8300', origin: 'http://board.lab:8300' })).toBeNull();
    expect(check({ host: 'evil.example:8300' })).toMatch(/^Host evil\.example:8300 is not this server/);
    expect(check({ host: '192.0.2.7:8301' })).toMatch(/is not this server/);
    expect(check({ host: '192.0.2.7:8300', origin: 'http://evil.example:8300' })).toMatch(
      /^Origin http:\/\/evil\.example:8300 is not allowed/,
    );
    expect(check({ host: '192.0.2.7:8300', origin: 'https://192.0.2.7:8300' })).toMatch(/https:\/\/ is another site/);
  });

  test('an allowed NAME:PORT is that port only; a bare NAME any port (a reverse proxy on 80 forwards Host without one)', () => {
    expect(check({ host: 'board.lab:8301' })).toMatch(/is not this server.*--allow-host/);
    expect(check({ host: 'BOARD.lab:8300' })).toBeNull();
    expect(check({ host: 'proxy.lab', origin: 'http://proxy.lab' })).toBeNull();
    expect(check({ host: 'proxy.lab:9000', origin: 'http://proxy.lab:9000' })).toBeNull();
    // the Origin must still be the page's own: the same name and port as the Host
    expect(check({ host: 'proxy.lab', origin: 'http://proxy.lab:9000' })).toMatch(/is not allowed/);
    expect(check({ host: 'sub.proxy.lab' })).toMatch(/is not this server/);
  });

  test('an allowed host that is not NAME or NAME:PORT is a usage error at start-up, before anything listens', async () => {
    for (const entry of ['http://board.lab:8300', 'board.lab:port', 'board lab']) {
      await expect(serve({ port: 0, scenario: 'pair-adler', logDir: null, quiet: true, allowedHosts: [entry] })).rejects.toThrow(
        `--allow-host and SYNCRING_ALLOWED_HOSTS take NAME or NAME:PORT, e.g. board.lab:8300 (got ${JSON.stringify(entry)})`,
      );
    }
  });
});

function pick(headers: Record<string, string | string[] | undefined>): Record<string, string | string[] | undefined> {
  return {
    'x-content-type-options': headers['x-content-type-options'],
    'x-frame-options': headers['x-frame-options'],
    'referrer-policy': headers['referrer-policy'],
  };
}
