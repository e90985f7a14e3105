import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { serve, type RunningServer } from '../../server/commands/serve.js';
import { parseLog } from '../../src/protocol/log-reader.js';
import { TestClient, sleep } from '../support/ws-client.js';

const fixture = (name: string) => new URL(`./fixtures/${name}`, import.meta.url).pathname;

describe('run control over the WebSocket', () => {
  let server: RunningServer;
  let operator: TestClient;
  let viewer: TestClient;

  beforeAll(async () => {
    server = await serve({
      port: 0,
      scenario: fixture('fast-ring-6.json'),
      token: 't',
      logDir: mkdtempSync(join(tmpdir(), 'syncring-ctl-')),
      speed: 20,
      quiet: true,
    });
    const ws = server.url.replace('http', 'ws') + 'ws';
    operator = await TestClient.connect(`${ws}?token=t`);
    viewer = await TestClient.connect(ws);
    await operator.next('hello');
    await viewer.next('hello');
  });
  afterAll(async () => {
    operator.close();
    viewer.close();
    await server.close();
  });

  test('pause stops the clock for everyone; a perturbation while paused still shows; resume goes on', async () => {
    operator.command({ action: 'pause', id: 1 });
    await operator.next('ack', (m) => m.id === 1);
    await viewer.next('status', (m) => m.session.status === 'paused');
    const tau = server.live.tau;
    await sleep(300);
    expect(server.live.tau).toBe(tau);
    operator.command({ action: 'set-detuning', node: 2, delta: 0.05, id: 2 });
    await viewer.next('event', (m) => m.event.message.startsWith('detuning of node 2'));
    await viewer.next('status', (m) => Math.abs(m.session.detuning[2] - 0.05) < 1e-12);
    expect(server.live.tau).toBe(tau);
    operator.command({ action: 'resume', id: 3 });
    await viewer.next('status', (m) => m.session.status === 'running');
    await sleep(300);
    expect(server.live.tau).toBeGreaterThan(tau);
  });

  test('set-speed paces the run in slow-time units per wall second', async () => {
    operator.command({ action: 'set-speed', speed: 5, id: 4 });
    await operator.next('ack', (m) => m.id === 4);
    const eps = server.live.info().epsilon;
    const s0 = eps * server.live.tau;
    const t0 = performance.now();
    await sleep(1500);
    const rate = (eps * server.live.tau - s0) / ((performance.now() - t0) / 1000);
    // paced to 5 per second within a tick's worth of jitter
    expect(rate).toBeGreaterThan(3.5);
    expect(rate).toBeLessThan(6.5);
    operator.command({ action: 'set-speed', speed: -1, id: 5 });
    expect((await operator.next('error', (m) => m.id === 5)).path).toBe('speed');
  });

  test('reset starts the run again from tau = 0 with a new log; load-scenario switches to a built-in', async () => {
    const firstLog = server.live.log!.path;
    operator.command({ action: 'reset', id: 6 });
    await viewer.next('event', (m) => m.event.message === 'run reset to its start');
    expect(server.live.tau).toBeLessThan(50);
    expect(server.live.log!.path).not.toBe(firstLog);
    operator.command({ action: 'load-scenario', name: 'pair-adler', id: 7 });
    await viewer.next('status', (m) => m.session.nodes === 2);
    operator.command({ action: 'load-scenario', name: 'no-such', id: 8 });
    expect((await operator.next('error', (m) => m.id === 8)).reason).toMatch(/no built-in scenario "no-such"/);
    operator.command({ action: 'load-scenario', scenario: { nodes: 2 }, id: 9 });
    const bad = await operator.next('error', (m) => m.id === 9);
    // the parser's field, nested under the command's field `scenario`, and its reason, answered to command 9 after crossing the worker thread
    expect(bad).toEqual({ type: 'error', id: 9, path: 'scenario.topology', reason: 'is required' });
    expect(server.live.info().nodes).toBe(2);
    // the earlier log is complete and readable
    await sleep(100);
    const parsed = parseLog(readFileSync(firstLog, 'utf8'), { firstSeq: 0 });
    expect(parsed.problems).toEqual([]);
    expect(parsed.events.some((e) => e.event.message.startsWith('detuning of node 2'))).toBe(true);
  });
});

describe('heartbeat', () => {
  test('a connection that stops answering pings is dropped', async () => {
    const server = await serve({ port: 0, scenario: fixture('fast-ring-6.json'), logDir: null, quiet: true, limits: { heartbeatMs: 150 } });
    try {
      const ws = server.url.replace('http', 'ws') + 'ws';
      const silent = await TestClient.connect(ws, { autoPong: false });
      const lively = await TestClient.connect(ws);
      await silent.next('hello');
      for (let i = 0; i < 40 && !silent.closed; i++) await sleep(50);
      expect(silent.closed).not.toBeNull();
      expect(lively.closed).toBeNull();
      expect(server.hub.viewers).toBe(1);
      lively.close();
    } finally {
      await server.close();
    }
  });
});

describe('worker thread', () => {
  test('the worker-thread session gives bit-identical results to the in-thread one for the same seed', async () => {
    const { LiveSession } = await import('../../server/live/live-session.js');
    const { loadScenario } = await import('../../server/scenario-file.js');
    const { scenario } = loadScenario('timing-board-8');
    const sessions = (['worker', 'main'] as const).map((thread) => new LiveSession({ scenario, logDir: null, speed: 1e-9, thread }));
    try {
      await Promise.all(sessions.map((s) => s.ready));
      const [fromWorker, inThread] = await Promise.all(sessions.map((s) => s.runToTick(400)));
      expect(fromWorker.tick).toBe(400);
      expect(inThread.tick).toBe(400);
      expect(fromWorker.full).toEqual(inThread.full);
      expect(fromWorker.guide).toEqual(inThread.guide);
      expect(fromWorker.random).toEqual(inThread.random);
    } finally {
      await Promise.all(sessions.map((s) => s.close()));
    }
  });
});
