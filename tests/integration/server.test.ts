import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { connect } from 'node:net';
import { serve, type RunningServer } from '../../server/commands/serve.js';
import { parseLog } from '../../src/protocol/log-reader.js';
import { PROTOCOL_VERSION } from '../../src/protocol/messages.js';
import { TestClient, sleep } from '../support/ws-client.js';

const fixture = (name: string) => new URL(`./fixtures/${name}`, import.meta.url).pathname;

describe('live server with real WebSocket clients', () => {
  let server: RunningServer;
  let wsUrl: string;
  let logDir: string;

  beforeAll(async () => {
    logDir = mkdtempSync(join(tmpdir(), 'syncring-server-'));
    server = await serve({ port: 0, scenario: fixture('fast-ring-6.json'), token: 'op-secret', logDir, speed: 20, quiet: true });
    wsUrl = server.url.replace('http', 'ws') + 'ws';
  });
  afterAll(async () => {
    await server?.close();
  });

  test('three browsers get hello and frames; an operator break-link reaches all three and changes the frames', async () => {
    const operator = await TestClient.connect(`${wsUrl}?token=op-secret`);
    const viewers = [await TestClient.connect(wsUrl), await TestClient.connect(wsUrl)];
    const everyone = [operator, ...viewers];
    const hellos = await Promise.all(everyone.map((c) => c.next('hello')));
    expect(hellos.map((h) => h.role)).toEqual(['operator', 'viewer', 'viewer']);
    expect(hellos[0].protocol).toBe(PROTOCOL_VERSION);
    expect(hellos[0].session.nodes).toBe(6);
    expect(hellos[0].session.links).toHaveLength(12);
    await Promise.all(everyone.map((c) => c.next('frame', (m) => m.frame.tick > 5)));
    // the two-way ring's full symmetry D_6 before the fault
    const before = await operator.next('frame', (m) => m.frame.full.pattern.locked);
    expect(before.frame.full.pattern.symmetry.length).toBe(12);

    operator.command({ action: 'break-link', from: 2, to: 3, id: 7 });
    const ack = await operator.next('ack', (m) => m.id === 7);
    expect(ack.action).toBe('break-link');
    const events = await Promise.all(everyone.map((c) => c.next('event', (m) => m.event.kind === 'perturbation')));
    for (const { event } of events) {
      expect(event.message).toBe('link 2 -> 3 broken');
      expect(event.by).toBe('operator-1');
    }
    // status updates carry the broken link; frames after the fault show the lowered symmetry
    const status = await viewers[0].next('status', (m) => m.session.links.some((l) => l.from === 2 && l.to === 3 && l.weight === 0));
    expect(status.viewers).toBeGreaterThanOrEqual(3);
    const tauOfFault = events[0].event.tau;
    const after = await viewers[1].next('frame', (m) => m.frame.tau > tauOfFault);
    expect(after.frame.full.pattern.symmetry.length).toBeLessThan(12);
    everyone.forEach((c) => c.close());
  });

  test('a viewer command is refused and changes nothing', async () => {
    const viewer = await TestClient.connect(wsUrl);
    await viewer.next('hello');
    viewer.command({ action: 'set-coupling', strength: 5, id: 'v1' });
    const error = await viewer.next('error', (m) => m.id === 'v1');
    expect(error.reason).toMatch(/viewers cannot send commands/);
    expect(server.live.info().coupling.strength).toBe(0.2);
    viewer.close();
  });

  test('malformed JSON, a wrong type, a bad field and an unknown action each get their own error while the run goes on', async () => {
    const operator = await TestClient.connect(`${wsUrl}?token=op-secret`);
    await operator.next('hello');
    const tauBefore = server.live.tau;
    operator.ws.send('{"type": "command", "action": ');
    await operator.next('error', (m) => /not valid JSON/.test(m.reason));
    operator.ws.send(JSON.stringify({ type: 'chat', text: 'hi' }));
    await operator.next('error', (m) => m.path === 'type' && /must be "command"/.test(m.reason));
    operator.command({ action: 'set-detuning', node: 99, ppm: 1, id: 3 });
    const badNode = await operator.next('error', (m) => m.id === 3);
    expect(badNode).toMatchObject({ path: 'node', reason: 'must be between 0 and 5 (got 99)' });
    operator.command({ action: 'self-destruct', id: 4 });
    expect((await operator.next('error', (m) => m.id === 4)).path).toBe('action');
    operator.ws.send(Buffer.from([1, 2, 3]));
    await operator.next('error', (m) => /binary/.test(m.reason));
    await sleep(300);
    expect(server.live.tau).toBeGreaterThan(tauBefore);
    expect(operator.closed).toBeNull();
    operator.close();
  });

  test('an oversized message closes only that connection (1009); the others go on', async () => {
    const big = await TestClient.connect(`${wsUrl}?token=op-secret`);
    const other = await TestClient.connect(wsUrl);
    await big.next('hello');
    big.ws.send(JSON.stringify({ type: 'command', action: 'pause', padding: 'x'.repeat(64 * 1024) }));
    for (let i = 0; i < 50 && !big.closed; i++) await sleep(50);
    expect(big.closed?.code).toBe(1009);
    const seen = other.all('frame').length;
    await sleep(400);
    expect(other.all('frame').length).toBeGreaterThan(seen);
    expect(server.live.status).toBe('running');
    other.close();
  });

  test('a flood is throttled with an error and then cut off, while other clients keep their frames', async () => {
    const flooder = await TestClient.connect(`${wsUrl}?token=op-secret`);
    const other = await TestClient.connect(wsUrl);
    await flooder.next('hello');
    for (let i = 0; i < 400; i++) flooder.command({ action: 'set-speed', speed: 20, id: i });
    await flooder.next('error', (m) => /too many messages/.test(m.reason));
    for (let i = 0; i < 60 && !flooder.closed; i++) await sleep(50);
    expect(flooder.closed?.code).toBe(1008);
    const seen = other.all('frame').length;
    await sleep(400);
    expect(other.all('frame').length).toBeGreaterThan(seen);
    other.close();
  });

  test('upgrades from a foreign Origin, to a wrong Host, or with a wrong token are refused with 403', async () => {
    await expect(TestClient.connect(wsUrl, { origin: 'http://evil.example' })).rejects.toThrow('403');
    await expect(TestClient.connect(wsUrl, { headers: { host: 'attacker.example:80' } })).rejects.toThrow('403');
    await expect(TestClient.connect(`${wsUrl}?token=guess`)).rejects.toThrow('403');
    const sameOrigin = await TestClient.connect(wsUrl, { origin: server.url.replace(/\/$/, '') });
    await sameOrigin.next('hello');
    sameOrigin.close();
  });

  test('HTTP API: session info, scenarios, log download', async () => {
    const info = await (await fetch(`${server.url}api/session`)).json();
    expect(info.nodes).toBe(6);
    const scenarios = await (await fetch(`${server.url}api/scenarios`)).json();
    expect(scenarios.map((s: { name: string }) => s.name)).toContain('timing-board-8');
    const log = await fetch(`${server.url}api/log`);
    expect(log.headers.get('content-type')).toMatch(/ndjson/);
    const parsed = parseLog(await log.text());
    expect(parsed.header?.format).toBe('syncring-log');
    expect((await fetch(`${server.url}api/nothing`)).status).toBe(404);
  });

  test('the log file holds every event, in sequence, and reads back into a replay', async () => {
    await server.live.log!.drain();
    const text = readFileSync(server.live.log!.path, 'utf8');
    const parsed = parseLog(text, { firstSeq: 0 });
    expect(parsed.problems).toEqual([]);
    expect(parsed.header?.scenario).toMatchObject({ nodes: 6 });
    const logged = parsed.events.map((r) => r.event.seq);
    const published = server.live.recentEvents.map((e) => e.seq);
    expect(logged).toEqual(published);
    expect(parsed.events.some((r) => r.event.message === 'link 2 -> 3 broken')).toBe(true);
    expect(parsed.samples.length).toBeGreaterThan(3);
    // samples increase in tau and carry what a replay needs
    const taus = parsed.samples.map((s) => s.frame.tau);
    expect(taus).toEqual([...taus].sort((a, b) => a - b));
    expect(parsed.samples[0].frame.full.amplitude).toHaveLength(6);
  });
});

describe('a client that never reads', () => {
  test('is dropped behind and finally cut off without slowing the others', async () => {
    const logDir = mkdtempSync(join(tmpdir(), 'syncring-slow-'));
    const server = await serve({
      port: 0,
      scenario: fixture('wide-ring-64.json'),
      logDir,
      speed: 'max',
      quiet: true,
      frameRate: 50,
      limits: { frameBacklogBytes: 64 * 1024, cutoffBytes: 512 * 1024, stallMs: 2000 },
    });
    try {
      const url = new URL(server.url);
      // a raw socket that completes the handshake and then never reads another byte
      const stalled = connect(Number(url.port), url.hostname);
      await new Promise<void>((resolve) => stalled.once('connect', () => resolve()));
      stalled.write(
        `GET /ws HTTP/1.1\r\nHost: ${url.host}\r\nUpgrade: websocket\r\nConnection: Upgrade\r\nSec-WebSocket-Key: dGhlIHNhbXBsZSBub25jZQ==\r\nSec-WebSocket-Version: 13\r\n\r\n`,
      );
      await new Promise<void>((resolve) => stalled.once('data', () => resolve()));
      stalled.pause();
      const reader = await TestClient.connect(server.url.replace('http', 'ws') + 'ws');
      await reader.next('hello');
      expect(server.hub.viewers).toBe(2);
      const start = Date.now();
      const startFrames = reader.all('frame').length;
      // loopback kernel buffers take a few MB before the server's own buffer backs up
      let cutOff = false;
      for (let i = 0; i < 600 && !cutOff; i++) {
        await sleep(50);
        cutOff = server.hub.viewers === 1;
      }
      const seconds = (Date.now() - start) / 1000;
      const rate = (reader.all('frame').length - startFrames) / seconds;
      expect(cutOff).toBe(true);
      // the reading client kept getting frames at a good share of the 50 per second sent
      expect(rate).toBeGreaterThan(10);
      reader.close();
      stalled.destroy();
    } finally {
      await server.close();
    }
  });
});
