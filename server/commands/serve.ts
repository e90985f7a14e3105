import { createServer, type Server } from 'node:http';
import { randomBytes } from 'node:crypto';
import type { AddressInfo } from 'node:net';
import { resolve } from 'node:path';
import type { Speed } from '../../src/protocol/messages.js';
import { LiveSession } from '../live/live-session.js';
import { Hub, type HubOptions } from '../ws/hub.js';
import { createApp } from '../http/app.js';
import { loadScenario } from '../scenario-file.js';
import { UsageError } from '../usage-error.js';
import { isHostName, type OriginPolicy } from '../ws/origin.js';
import { SIMULATION_CAUTION } from '../../src/campaign/cautions.js';
import { OperatorToken, SHORT_TOKEN_LENGTH } from '../operator-token.js';
import type { ThrottleOptions } from '../failure-throttle.js';
import type { WorkerLimits } from '../http/worker-client.js';

export interface ServeOptions {
  /** 0 picks a free port. Default: PORT, else 8300. */
  port?: number;
  /** Default 127.0.0.1: only this machine can connect unless told otherwise. */
  host?: string;
  /** Scenario file or built-in name; default the demo, timing-board-8. */
  scenario?: string;
  /** Operator token; default SYNCRING_TOKEN or a random one. */
  token?: string;
  /** Folder for session logs; default ./logs; null for none. */
  logDir?: string | null;
  /** Folder whose subfolders are soaks (`syncring soak --out`) listed in the dashboard; default ./soaks. */
  soaksDir?: string;
  /** Slow-time units per second, or 'max'; default 2. */
  speed?: Speed;
  /** Do not print the URLs. */
  quiet?: boolean;
  /** Extra origins allowed to use the server, HTTP and WebSocket (scheme://host:port). */
  allowedOrigins?: string[];
  /**
   * Extra names the server answers to, NAME:PORT or NAME for any port (`--allow-host`), besides
   * SYNCRING_ALLOWED_HOSTS (comma-separated), loopback and the listen address.
   */
  allowedHosts?: string[];
  /** Throttling of wrong operator tokens per source (defaults in failure-throttle.ts). */
  tokenThrottle?: ThrottleOptions;
  /** Time budget and queue of the prediction worker (defaults in worker-client.ts). */
  predictionLimits?: Partial<Pick<WorkerLimits, 'timeBudgetMs' | 'queueLimit' | 'perSource'>>;
  /** Frames per second sent to each browser at most; default 20. */
  frameRate?: number;
  /** Where the run steps: a worker thread (default) or the main thread. */
  thread?: 'worker' | 'main';
  /** Backpressure and flood limits of the WebSocket hub (defaults in hub.ts). */
  limits?: Pick<HubOptions, 'frameBacklogBytes' | 'cutoffBytes' | 'stallMs' | 'burst' | 'ratePerSecond' | 'heartbeatMs'>;
}

export interface RunningServer {
  url: string;
  operatorUrl: string;
  token: string;
  live: LiveSession;
  hub: Hub;
  close(): Promise<void>;
}

export const DEFAULT_PORT = 8300;

/** `syncring serve`: start the live co-simulation server: HTTP, the dashboard and the WebSocket endpoint /ws. */
export async function serve(options: ServeOptions = {}): Promise<RunningServer> {
  const { scenario } = loadScenario(options.scenario ?? 'timing-board-8');
  const token = options.token ?? process.env.SYNCRING_TOKEN ?? randomBytes(12).toString('base64url');
  if (options.token === undefined && process.env.SYNCRING_TOKEN !== undefined) warnIfShort(process.env.SYNCRING_TOKEN);
  const host = options.host ?? '127.0.0.1';
  const logDir = options.logDir === undefined ? resolve('logs') : options.logDir;
  const soaksDir = resolve(options.soaksDir ?? 'soaks');
  const allowedHosts = [...(options.allowedHosts ?? []), ...commaList(process.env.SYNCRING_ALLOWED_HOSTS)];
  const badHost = allowedHosts.find((entry) => !isHostName(entry));
  if (badHost !== undefined) {
    throw new UsageError(
      `--allow-host and SYNCRING_ALLOWED_HOSTS take NAME or NAME:PORT, e.g. board.lab:8300 (got ${JSON.stringify(badHost)})`,
    );
  }
  const live = new LiveSession({ scenario, speed: options.speed ?? 2, logDir, frameRate: options.frameRate, thread: options.thread });
  await live.ready;
  live.on('log-error', (error: Error) => process.stderr.write(`syncring: ${error.message}\n`));
  let port = 0;
  const policy: OriginPolicy = {
    allowedHosts,
    allowedOrigins: options.allowedOrigins ?? [],
    anyHost: host === '0.0.0.0' || host === '::',
  };
  const operatorToken = new OperatorToken(token, { throttle: options.tokenThrottle });
  const hub = new Hub(live, { token: operatorToken, port: () => port, policy, ...options.limits });
  const { app, close: closeApp } = createApp(live, () => hub.viewers, {
    access: { policy, port: () => port },
    soaksDir,
    control: { token: operatorToken },
    predictionLimits: options.predictionLimits,
  });
  const server: Server = createServer(app);
  server.on('upgrade', (request, socket, head) => hub.handleUpgrade(request, socket, head));
  server.on('clientError', (_error, socket) => socket.destroy());
  const requested = options.port ?? (process.env.PORT !== undefined ? Number(process.env.PORT) : DEFAULT_PORT);
  if (!Number.isInteger(requested) || requested < 0 || requested > 65535) {
    await live.close();
    throw new UsageError(`port must be an integer from 0 to 65535 (got ${requested})`);
  }
  await new Promise<void>((resolveListen, reject) => {
    server.once('error', reject);
    server.listen(requested, host, () => resolveListen());
  }).catch(async (error: NodeJS.ErrnoException) => {
    await live.close();
    throw new UsageError(error.code === 'EADDRINUSE' ? `port ${requested} is in use (choose another with --port or PORT)` : error.message);
  });
  port = (server.address() as AddressInfo).port;
  const shownHost = host.includes(':') ? `[${host}]` : host;
  policy.allowedHosts.push(`${shownHost}:${port}`);
  const url = `http://${shownHost}:${port}/`;
  const operatorUrl = `${url}?token=${encodeURIComponent(token)}`;
  if (!options.quiet) {
    process.stdout.write(
      `syncring is running "${scenario.name}"\n` +
        `  viewers:  ${url}\n` +
        `  operator: ${operatorUrl}\n` +
        (logDir ? `  session log: ${live.log?.path}\n` : '') +
        `  soaks: ${soaksDir}\n` +
        `${SIMULATION_CAUTION}\n`,
    );
  }
  let closing: Promise<void> | null = null;
  const close = () =>
    (closing ??= (async () => {
      await hub.close();
      await closeApp();
      await live.close();
      server.closeAllConnections?.();
      await new Promise<void>((r) => server.close(() => r()));
    })());
  return { url, operatorUrl, token, live, hub, close };
}

/**
 * Wrong tokens are throttled per source (about 60 guesses an hour after the first few), but a
 * short token still falls to many sources or a long time: say so where whoever set it reads.
 */
function warnIfShort(token: string): void {
  if (token.length >= SHORT_TOKEN_LENGTH) return;
  process.stderr.write(
    `syncring: warning: SYNCRING_TOKEN is ${token.length} characters long; use at least ${SHORT_TOKEN_LENGTH} random ones ` +
      '(or leave it unset for a random token): it is the only thing between anyone who can reach this server and its controls, ' +
      'and wrong tokens are only slowed down, not refused for good\n',
  );
}

/** The items of a comma-separated list (`--allow-host`, SYNCRING_ALLOWED_HOSTS), blanks dropped. */
export function commaList(text: string | undefined): string[] {
  return (text ?? '')
    .split(',')
    .map((item) => item.trim())
    .filter(Boolean);
}
