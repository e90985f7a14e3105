import type { IncomingHttpHeaders } from 'node:http';
import { isIP } from 'node:net';

/**
 * The one Host/Origin policy of the server, applied to every HTTP request (server/http/app.ts)
 * and to every WebSocket upgrade (hub.ts), against cross-site requests and DNS rebinding (RFC
 * 6455 section 10.2; README "Security"). A rebinding page runs under the attacker's DNS name,
 * which the browser sends as Host, so the Host must name this server: a loopback name or the
 * listen address with the listening port, or an allowed host. When the server listens on every
 * interface its addresses cannot be listed in advance, so any IP address literal is accepted,
 * but a DNS name only when it is allowed. A browser's Origin must be this server as plain http
 * (the server speaks no TLS, so an https:// Origin is another origin) on the same host and port,
 * or explicitly allowed. Clients without an Origin header are not browsers and are judged by
 * Host alone.
 */
export interface OriginPolicy {
  /** Names this server answers to besides loopback: `NAME:PORT`, or `NAME` for that name on any port. */
  allowedHosts: string[];
  /** Full origins (scheme://host:port) allowed besides same-origin. */
  allowedOrigins: string[];
  /** Listening on every interface: any IP address literal is a name of this server. */
  anyHost?: boolean;
}

const LOOPBACK = new Set(['127.0.0.1', 'localhost', '[::1]']);

function splitHost(host: string): { name: string; port: string } {
  const match = /^(\[[0-9a-f:.]+\]|[^:[\]]+)(?::(\d+))?$/.exec(host.trim().toLowerCase());
  return match ? { name: match[1], port: match[2] ?? '' } : { name: '', port: '' };
}

/** Whether `text` is a host as a Host header gives it: NAME or NAME:PORT (an IPv6 address in brackets). */
export function isHostName(text: string): boolean {
  return /^[a-z0-9.-]+$|^\[/i.test(splitHost(text).name);
}

/** An IPv4 literal, or an IPv6 literal in brackets as it stands in a Host header. */
function isAddressLiteral(name: string): boolean {
  return isIP(name) === 4 || (name.startsWith('[') && isIP(name.slice(1, -1)) === 6);
}

/** The port a Host header or an http Origin names; omitted, it is http's default. */
function portOf(port: string): string {
  return port === '' ? '80' : port;
}

/**
 * Whether an allowed entry names the Host header's parts: `NAME:PORT` that name on that port,
 * a bare `NAME` that name on any port (a rebinding page controls the name, not the port, so a
 * trusted name is trusted on every port, which also lets a reverse proxy on port 80 or 443
 * forward it).
 */
function allowedHost(allowed: string, name: string, port: string): boolean {
  const other = splitHost(allowed);
  return other.name === name && (other.port === '' || other.port === portOf(port));
}

/** Why the request may not be served (a sentence for the 403), or null when it may. */
export function checkHostAndOrigin(request: { headers: IncomingHttpHeaders }, port: number, policy: OriginPolicy): string | null {
  const host = request.headers.host;
  if (!host) return 'missing Host header';
  const { name, port: hostPort } = splitHost(host);
  if (name === '') return `malformed Host header ${JSON.stringify(host)}`;
  const ours = portOf(hostPort) === String(port) && (LOOPBACK.has(name) || (policy.anyHost === true && isAddressLiteral(name)));
  if (!ours && !policy.allowedHosts.some((allowed) => allowedHost(allowed, name, hostPort))) {
    return (
      `Host ${host} is not this server: open it as http://127.0.0.1:${port}/ or by the address it listens on, ` +
      'or allow the name with --allow-host'
    );
  }
  const origin = request.headers.origin;
  if (origin === undefined) return null;
  if (policy.allowedOrigins.includes(origin)) return null;
  let url: URL;
  try {
    url = new URL(origin);
  } catch {
    return `Origin ${origin} is not allowed: a page of another site cannot use this server`;
  }
  if (url.protocol !== 'http:')
    return `Origin ${origin} is not allowed: this server is plain http://, so ${url.protocol}// is another site`;
  // same origin: the page came from the very name and port the request is sent to (the Host,
  // which has passed above); loopback names count as one, they all reach this machine only
  const { name: originName } = splitHost(url.host);
  const sameName = originName === name || (LOOPBACK.has(originName) && LOOPBACK.has(name));
  if (portOf(url.port) === portOf(hostPort) && sameName) return null;
  return `Origin ${origin} is not allowed: a page of another site cannot use this server`;
}
