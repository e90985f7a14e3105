import { spawn } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import WebSocket from 'ws';

/**
 * Streaming benchmark: a real server process on loopback and `clients` WebSocket viewers for
 * `seconds`. Measures the server's CPU share (all threads, from /proc), the frame age at the
 * clients (receive time minus the simulation's emittedAt, same clock), the frames per second each
 * client got, and the server's resident memory at the end against the start (after a warm-up).
 * Only loopback traffic; bounded in time and count.
 */
export interface StreamingResult {
  clients: number;
  seconds: number;
  serverCpuShare: number;
  frameAgeP50Ms: number;
  frameAgeP99Ms: number;
  framesPerClientPerSecond: number;
  slowestClientFramesPerSecond: number;
  rssStartMb: number;
  rssEndMb: number;
  memoryGrowth: number;
}

const CLOCK_TICKS = 100; // USER_HZ on Linux

function procCpuSeconds(pid: number): number {
  const fields = readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1].split(' ');
  return (Number(fields[11]) + Number(fields[12])) / CLOCK_TICKS;
}

function procRssMb(pid: number): number {
  const line = readFileSync(`/proc/${pid}/status`, 'utf8').split('\n').find((l) => l.startsWith('VmRSS:'))!;
  return Number(line.split(/\s+/)[1]) / 1024;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

function percentile(sorted: number[], p: number): number {
  return sorted.length === 0 ? Number.NaN : sorted[Math.min(sorted.length - 1, Math.floor(p * sorted.length))];
}

export async function benchStreaming(options: { clients?: number; seconds?: number; warmupSeconds?: number; speed?: number } = {}): Promise<StreamingResult> {
  const clients = options.clients ?? 50;
  const seconds = options.seconds ?? 60;
  const main = fileURLToPath(new URL('../../server/main.js', import.meta.url));
  const server = spawn(process.execPath, [main, '--port', '0', '--speed', String(options.speed ?? 2)], { stdio: ['ignore', 'pipe', 'inherit'], env: { ...process.env, SYNCRING_TOKEN: 'bench' } });
  try {
    const url = await new Promise<string>((resolve, reject) => {
      let text = '';
      server.stdout!.on('data', (chunk) => {
        text += chunk;
        const match = /viewers:\s+(http:\/\/\S+)/.exec(text);
        if (match) resolve(match[1]);
      });
      server.once('exit', (code) => reject(new Error(`server exited with ${code}`)));
    });
    const ws = `${url.replace('http', 'ws')}ws`;
    const ages: number[] = [];
    const counts = new Array<number>(clients).fill(0);
    let measuring = false;
    const sockets = await Promise.all(
      Array.from({ length: clients }, (_, i) =>
        new Promise<WebSocket>((resolve, reject) => {
          const socket = new WebSocket(ws);
          socket.on('message', (data) => {
            if (!measuring) return;
            const text = String(data);
            if (!text.startsWith('{"type":"frame"')) return;
            const emittedAt = Number(/"emittedAt":(\d+)/.exec(text.slice(-40))?.[1]);
            ages.push(Date.now() - emittedAt);
            counts[i]++;
          });
          socket.once('open', () => resolve(socket));
          socket.once('error', reject);
        }),
      ),
    );
    await sleep((options.warmupSeconds ?? 5) * 1000);
    const pid = server.pid!;
    const rssStartMb = procRssMb(pid);
    const cpu0 = procCpuSeconds(pid);
    const t0 = performance.now();
    measuring = true;
    await sleep(seconds * 1000);
    measuring = false;
    const wall = (performance.now() - t0) / 1000;
    const serverCpuShare = (procCpuSeconds(pid) - cpu0) / wall;
    const rssEndMb = procRssMb(pid);
    for (const socket of sockets) socket.close();
    ages.sort((a, b) => a - b);
    return {
      clients,
      seconds: wall,
      serverCpuShare,
      frameAgeP50Ms: percentile(ages, 0.5),
      frameAgeP99Ms: percentile(ages, 0.99),
      framesPerClientPerSecond: counts.reduce((a, b) => a + b, 0) / clients / wall,
      slowestClientFramesPerSecond: Math.min(...counts) / wall,
      rssStartMb,
      rssEndMb,
      memoryGrowth: rssEndMb / rssStartMb - 1,
    };
  } finally {
    server.kill('SIGTERM');
  }
}

// Run alone: node dist/tests/bench/streaming.js [seconds]
if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const seconds = Number(process.argv[2] ?? 60);
  benchStreaming({ seconds }).then((r) => console.log(JSON.stringify(r, null, 2)));
}
