import { spawn } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import WebSocket from 'ws';

/**
 * Streaming benchmark: a real server process on loopback and `clients` WebSocket viewers for
 * `seconds`. Measures the server's CPU share (all threads, from /proc), the frame age at the
 * clients (receive time minus the simulation's emittedAt, same clock), the frames per second each
 * client got, and the server's resident memory over the run.
 *
 * Memory: a garbage-collected server's resident set saws up and down by tens of MB as V8 grows
 * and trims its heaps (measured here: 108 -> 152 -> 124 MB within two minutes, no leak), so one
 * reading at each end says more about where the collector was than about growth. The resident
 * set is sampled every 2 s; growth is the median of the last tenth of the samples against the
 * median of the first tenth (after a warm-up), and the least-squares trend over the run is
 * reported beside it. Only loopback traffic; bounded in time and count.
 */
export interface StreamingResult {
  clients: number;
  seconds: number;
  serverCpuShare: number;
  frameAgeP50Ms: number;
  frameAgeP99Ms: number;
  framesPerClientPerSecond: number;
  slowestClientFramesPerSecond: number;
  /** Median resident set of the first and of the last tenth of the samples. */
  rssStartMb: number;
  rssEndMb: number;
  rssPeakMb: number;
  /** rssEndMb / rssStartMb - 1. */
  memoryGrowth: number;
  /** Least-squares slope of the resident set times the run's length, over rssStartMb. */
  memoryTrend: number;
  rssSamples: number;
}

const CLOCK_TICKS = 100; // USER_HZ on Linux

function procCpuSeconds(pid: number): number {
  const fields = readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1].split(' ');
  return (Number(fields[11]) + Number(fields[12])) / CLOCK_TICKS;
}

function procRssMb(pid: number): number {
  const line = readFileSync(`/proc/${pid}/status`, 'utf8')
    .split('\n')
    .find((l) => l.startsWith('VmRSS:'))!;
  return Number(line.split(/\s+/)[1]) / 1024;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const RSS_SAMPLE_MS = 2000;

function median(values: number[]): number {
  const sorted = values.slice().sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

/** Least-squares slope of mb against t. */
function slope(points: { t: number; mb: number }[]): number {
  const n = points.length;
  if (n < 2) return 0;
  const mt = points.reduce((s, p) => s + p.t, 0) / n;
  const mm = points.reduce((s, p) => s + p.mb, 0) / n;
  let num = 0;
  let den = 0;
  for (const p of points) {
    num += (p.t - mt) * (p.mb - mm);
    den += (p.t - mt) ** 2;
  }
  return den > 0 ? num / den : 0;
}

function percentile(sorted: number[], p: number): number {
  return sorted.length === 0 ? Number.NaN : sorted[Math.min(sorted.length - 1, Math.floor(p * sorted.length))];
}

export async function benchStreaming(
  options: { clients?: number; seconds?: number; warmupSeconds?: number; speed?: number } = {},
): Promise<StreamingResult> {
  const clients = options.clients ?? 50;
  const seconds = options.seconds ?? 60;
  const main = fileURLToPath(new URL('../../server/main.js', import.meta.url));
  const server = spawn(process.execPath, [main, '--port', '0', '--speed', String(options.speed ?? 2)], {
    stdio: ['ignore', 'pipe', 'inherit'],
    env: { ...process.env, SYNCRING_TOKEN: 'bench' },
  });
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
      Array.from(
        { length: clients },
        (_, i) =>
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
    const cpu0 = procCpuSeconds(pid);
    const t0 = performance.now();
    const rss: { t: number; mb: number }[] = [];
    measuring = true;
    while (performance.now() - t0 < seconds * 1000) {
      rss.push({ t: (performance.now() - t0) / 1000, mb: procRssMb(pid) });
      await sleep(Math.min(RSS_SAMPLE_MS, seconds * 1000 - (performance.now() - t0)));
    }
    measuring = false;
    const wall = (performance.now() - t0) / 1000;
    const serverCpuShare = (procCpuSeconds(pid) - cpu0) / wall;
    rss.push({ t: wall, mb: procRssMb(pid) });
    const tenth = Math.max(1, Math.floor(rss.length / 10));
    const rssStartMb = median(rss.slice(0, tenth).map((r) => r.mb));
    const rssEndMb = median(rss.slice(-tenth).map((r) => r.mb));
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
      rssPeakMb: Math.max(...rss.map((r) => r.mb)),
      memoryGrowth: rssEndMb / rssStartMb - 1,
      memoryTrend: (slope(rss) * wall) / rssStartMb,
      rssSamples: rss.length,
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
