import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync } from 'node:fs';
import { createServer } from 'node:net';

/**
 * Debian's redis-server for the queue tests, started on a free port with nothing saved to disk.
 * Without it the tests skip, loudly; under CI a missing server is a failure (the caller turns
 * `mustFail` into a failing test), as for the browser tests. SYNCRING_REDIS_SERVER points elsewhere.
 */
export const REDIS_SERVER_PATH = process.env.SYNCRING_REDIS_SERVER ?? '/usr/bin/redis-server';

export function redisAvailability(): { available: boolean; mustFail: boolean } {
  const available = existsSync(REDIS_SERVER_PATH);
  if (!available) {
    const line = `REDIS TESTS SKIPPED: ${REDIS_SERVER_PATH} not found (apt-get install -y redis-server)`;
    process.stderr.write(`\n${'!'.repeat(line.length)}\n${line}\n${'!'.repeat(line.length)}\n\n`);
  }
  return { available, mustFail: !available && Boolean(process.env.CI) };
}

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const address = server.address();
      const port = typeof address === 'object' && address ? address.port : 0;
      server.close(() => resolve(port));
    });
  });
}

export interface RunningRedis {
  url: string;
  stop(): Promise<void>;
}

export async function startRedis(): Promise<RunningRedis> {
  const port = await freePort();
  const child: ChildProcess = spawn(
    REDIS_SERVER_PATH,
    ['--port', String(port), '--bind', '127.0.0.1', '--save', '', '--appendonly', 'no'],
    {
      stdio: ['ignore', 'pipe', 'pipe'],
    },
  );
  await new Promise<void>((resolve, reject) => {
    let output = '';
    const timer = setTimeout(() => reject(new Error(`redis-server did not start: ${output}`)), 15_000);
    child.stdout!.on('data', (d: Buffer) => {
      output += d.toString();
      if (output.includes('Ready to accept connections')) {
        clearTimeout(timer);
        resolve();
      }
    });
    child.once('exit', (code) => reject(new Error(`redis-server exited (${code}): ${output}`)));
  });
  return {
    url: `redis://127.0.0.1:${port}`,
    stop: () =>
      new Promise<void>((resolve) => {
        if (child.exitCode !== null) return resolve();
        child.once('exit', () => resolve());
        child.kill('SIGTERM');
      }),
  };
}
