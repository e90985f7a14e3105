import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { request } from 'node:http';
import { join, resolve } from 'node:path';

/**
 * A bounded load generator on loopback for the figures of README "Security": it starts
 * `syncring serve` from a checkout (`--root DIR`, default this one, built) on a free port and
 *   1. times a normal what-if from one source (127.0.0.2) with the server idle, then while
 *      another source (127.0.0.1) floods the prediction endpoints with `--flooders` connections
 *      for `--flood-seconds`, and reads the server's resident memory before and after;
 *   2. guesses operator tokens at full speed from one source for `--guess-seconds` on /ws and
 *      on POST /api/soaks, counting the answers per second and how many guesses were checked
 *      (answered 403/401, not refused unchecked with 429).
 * Run after `npm run build`: node dist/tests/bench/security-load.js [--root DIR] [--json].
 * Every loop stops at its deadline and every request has a timeout, so it cannot run away.
 */

/** The flood's requests, the n-th of each made a question not asked before (no cached answer). */
const FLOOD_QUERIES = [
  // the adversarial test's request
  (n: number) => `param=coupling&maxSteps=100000000&range=0:${1e12 - n}`,
  // the heaviest request within the bounds (a branch that does not end, 1000 steps each way)
  (n: number) => `param=dissipative&maxSteps=1000&range=-10000:${10000 - n / 1000}`,
];
const NORMAL_SOURCE = '127.0.0.2';
const FLOOD_SOURCE = '127.0.0.1';
/** Token guesses on /ws and on the soak POSTs, each from its own source. */
const GUESS_SOURCES = { ws: '127.0.0.3', soaks: '127.0.0.4' };
/** A normal what-if that is not answered within this is counted as not answered. */
const NORMAL_TIMEOUT_MS = 120_000;
const TOKEN = 'security-load-token-0123456789';

interface Options {
  root: string;
  flooders: number;
  floodSeconds: number;
  guessSeconds: number;
  guessers: number;
  json: boolean;
}

function options(argv: string[]): Options {
  const value = (name: string, fallback: string) => {
    const i = argv.indexOf(`--${name}`);
    return i >= 0 && argv[i + 1] !== undefined ? argv[i + 1] : fallback;
  };
  return {
    root: resolve(value('root', '.')),
    flooders: Number(value('flooders', '16')),
    floodSeconds: Number(value('flood-seconds', '20')),
    guessSeconds: Number(value('guess-seconds', '5')),
    guessers: Number(value('guessers', '8')),
    json: argv.includes('--json'),
  };
}

interface Answer {
  status: number;
  ms: number;
}

function get(
  port: number,
  path: string,
  localAddress: string,
  timeoutMs: number,
  headers: Record<string, string> = {},
  method = 'GET',
): Promise<Answer> {
  const started = performance.now();
  return new Promise((done) => {
    const req = request({ host: '127.0.0.1', port, path, method, localAddress, agent: false, headers, timeout: timeoutMs }, (res) => {
      res.resume();
      res.on('end', () => done({ status: res.statusCode ?? 0, ms: performance.now() - started }));
    });
    req.on('upgrade', (_res, socket) => {
      socket.destroy();
      done({ status: 101, ms: performance.now() - started });
    });
    req.on('timeout', () => req.destroy(new Error('timeout')));
    req.on('error', () => done({ status: 0, ms: performance.now() - started }));
    req.end(method === 'POST' ? '{}' : undefined);
  });
}

function rssMiB(pid: number): number {
  const line = readFileSync(`/proc/${pid}/status`, 'utf8')
    .split('\n')
    .find((l) => l.startsWith('VmRSS:'));
  return Number(/(\d+)/.exec(line ?? '')?.[1] ?? NaN) / 1024;
}

async function startServer(root: string): Promise<{ child: ChildProcess; port: number; cwd: string }> {
  const cwd = mkdtempSync(join(tmpdir(), 'syncring-security-load-'));
  const child = spawn(process.execPath, [resolve(root, 'bin/syncring.js'), 'serve', '--port', '0', '--speed', '2'], {
    // logs and soaks go to a folder of their own, removed afterwards
    cwd,
    env: { ...process.env, SYNCRING_TOKEN: TOKEN, PORT: '0' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stderr!.resume();
  // never leave the server behind, whatever ends this process
  process.once('exit', () => child.kill('SIGKILL'));
  const port = await new Promise<number>((done, fail) => {
    let text = '';
    child.stdout!.on('data', (chunk: Buffer) => {
      text += chunk.toString();
      const match = /viewers:\s+http:\/\/127\.0\.0\.1:(\d+)\//.exec(text);
      if (match) done(Number(match[1]));
    });
    child.once('exit', (code) => fail(new Error(`the server exited (${code}) before it listened`)));
  });
  return { child, port, cwd };
}

/** Each normal what-if as `N ms`, or its status beside the time when it was not answered 200 (0: no answer within the timeout). */
async function normalLatencies(port: number, count: number, offset: number): Promise<string[]> {
  const times: string[] = [];
  for (let i = 0; i < count; i++) {
    // a question not asked before (no cached answer): the continuation's default step count, give or take
    const answer = await get(port, `/api/what-if?param=coupling&maxSteps=${200 - offset - i}`, NORMAL_SOURCE, NORMAL_TIMEOUT_MS);
    times.push(answer.status === 200 ? `${Math.round(answer.ms)} ms` : `${answer.status} after ${Math.round(answer.ms)} ms`);
  }
  return times;
}

async function flood(port: number, o: Options): Promise<{ sent: number; statuses: Record<number, number>; normal: string[] }> {
  const deadline = performance.now() + o.floodSeconds * 1000;
  const statuses: Record<number, number> = {};
  let sent = 0;
  const flooders = Array.from({ length: o.flooders }, async () => {
    while (performance.now() < deadline) {
      const n = sent++;
      const answer = await get(
        port,
        `/api/what-if?${FLOOD_QUERIES[n % FLOOD_QUERIES.length](n)}`,
        FLOOD_SOURCE,
        o.floodSeconds * 1000 + NORMAL_TIMEOUT_MS,
      );
      statuses[answer.status] = (statuses[answer.status] ?? 0) + 1;
    }
  });
  // let the flood take hold, then ask as a normal user would
  await new Promise((r) => setTimeout(r, 1000));
  const normal = await normalLatencies(port, 3, 10);
  await Promise.all(flooders);
  return { sent, statuses, normal };
}

async function guess(
  port: number,
  o: Options,
  where: 'ws' | 'soaks',
): Promise<{ perSecond: number; checkedPerSecond: number; statuses: Record<number, number> }> {
  const started = performance.now();
  const deadline = started + o.guessSeconds * 1000;
  const statuses: Record<number, number> = {};
  let tries = 0;
  await Promise.all(
    Array.from({ length: o.guessers }, async () => {
      while (performance.now() < deadline) {
        const token = `guess-${tries++}`;
        const answer =
          where === 'ws'
            ? await get(port, `/ws?token=${token}`, GUESS_SOURCES[where], 5000, {
                host: `127.0.0.1:${port}`,
                connection: 'Upgrade',
                upgrade: 'websocket',
                'sec-websocket-version': '13',
                'sec-websocket-key': 'dGhlIHNhbXBsZSBub25jZQ==',
              })
            : await get(
                port,
                '/api/soaks',
                GUESS_SOURCES[where],
                5000,
                { authorization: `Bearer ${token}`, 'content-type': 'application/json' },
                'POST',
              );
        statuses[answer.status] = (statuses[answer.status] ?? 0) + 1;
      }
    }),
  );
  const seconds = (performance.now() - started) / 1000;
  const checked = (statuses[403] ?? 0) + (statuses[401] ?? 0);
  return { perSecond: tries / seconds, checkedPerSecond: checked / seconds, statuses };
}

function guessLine(where: string, g: { answeredPerSecond: number; checkedPerSecond: number; statuses: Record<number, number> }): string {
  return `token guesses on ${where}: ${g.answeredPerSecond}/s answered, ${g.checkedPerSecond}/s checked ${JSON.stringify(g.statuses)}\n`;
}

async function main(): Promise<void> {
  const o = options(process.argv.slice(2));
  const { child, port, cwd } = await startServer(o.root);
  try {
    // the first request starts the worker: not a figure
    await get(port, '/api/what-if?param=coupling', NORMAL_SOURCE, NORMAL_TIMEOUT_MS);
    const idle = await normalLatencies(port, 3, 0);
    const rssBefore = rssMiB(child.pid!);
    const flooded = await flood(port, o);
    const rssAfter = rssMiB(child.pid!);
    const ws = await guess(port, o, 'ws');
    await new Promise((r) => setTimeout(r, 100));
    const soaks = await guess(port, { ...o }, 'soaks');
    const result = {
      root: o.root,
      loadAverage: loadavg()[0],
      whatIfIdle: idle,
      whatIfDuringFlood: flooded.normal,
      floodRequests: flooded.sent,
      floodStatuses: flooded.statuses,
      rssMiB: { before: Math.round(rssBefore), after: Math.round(rssAfter) },
      tokenGuesses: {
        ws: {
          answeredPerSecond: Math.round(ws.perSecond),
          checkedPerSecond: Number(ws.checkedPerSecond.toFixed(1)),
          statuses: ws.statuses,
        },
        soaks: {
          answeredPerSecond: Math.round(soaks.perSecond),
          checkedPerSecond: Number(soaks.checkedPerSecond.toFixed(1)),
          statuses: soaks.statuses,
        },
      },
    };
    if (o.json) process.stdout.write(`${JSON.stringify(result)}\n`);
    else {
      process.stdout.write(
        `what-if, idle: ${idle.join(', ')}\n` +
          `what-if during a flood of ${flooded.sent} requests from ${o.flooders} connections: ${result.whatIfDuringFlood.join(', ')}\n` +
          `  flood answers by status: ${JSON.stringify(flooded.statuses)}\n` +
          `server memory (RSS): ${result.rssMiB.before} MiB before the flood, ${result.rssMiB.after} MiB after\n` +
          guessLine('/ws', result.tokenGuesses.ws) +
          guessLine('POST /api/soaks', result.tokenGuesses.soaks) +
          `machine load average (1 min) at the end: ${loadavg()[0].toFixed(1)}\n`,
      );
    }
  } finally {
    child.kill('SIGKILL');
    rmSync(cwd, { recursive: true, force: true });
  }
}

try {
  await main();
} catch (error) {
  process.stderr.write(`security-load: ${(error as Error).stack}\n`);
  process.exitCode = 1;
}
