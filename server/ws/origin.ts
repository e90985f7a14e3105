import type { IncomingMessage } from 'node:http';

/**
 * Upgrade checks against cross-site and DNS-rebinding attacks (RFC 6455 section 10.2): the Host
 * header must name this server (loopback names, the listen address, or an allowed host), and a
 * browser's Origin must be the same host and port or explicitly allowed. Clients without an
 * Origin header are not browsers and are judged by Host alone.
 */
export interface OriginPolicy {
  /** host:port strings this server answers to, besides loopback. */
  allowedHosts: string[];
  /** Full origins (scheme://host:port) allowed besides same-origin. */
  allowedOrigins: string[];
  /** Listening on every interface: the Host cannot be known in advance, so only Origin is checked. */
  anyHost?: boolean;
}

const LOOPBACK = new Set(['127.0.0.1', 'localhost', '[::1]', '::1']);

function splitHost(host: string): { name: string; port: string } {
  const match = /^(\[[^\]]+\]|[^:]+)(?::(\d+))?$/.exec(host.trim().toLowerCase());
  return match ? { name: match[1], port: match[2] ?? '' } : { name: '', port: '' };
}

export function checkUpgrade(request: IncomingMessage, port: number, policy: OriginPolicy): string | null {
  const host = request.headers.host;
  if (!host) return 'missing Host header';
  const { name, port: hostPort } = splitHost(host);
  const hostAllowed =
    policy.anyHost || (LOOPBACK.has(name) && hostPort === String(port)) || policy.allowedHosts.includes(host.toLowerCase());
  if (!hostAllowed) return `Host ${host} is not this server`;
  const origin = request.headers.origin;
  if (origin === undefined) return null;
  if (policy.allowedOrigins.includes(origin)) return null;
  try {
    const url = new URL(origin);
    const originPort = url.port || (url.protocol === 'https:' ? '443' : '80');
    const originHost = splitHost(url.host).name;
    if (originPort === String(port) && (originHost === name || (LOOPBACK.has(originHost) && LOOPBACK.has(name)))) return null;
  } catch {
    return `malformed Origin ${origin}`;
  }
  return `Origin ${origin} is not allowed`;
}
