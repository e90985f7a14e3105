import type { IncomingMessage } from 'node:http';
import type { Duplex } from 'node:stream';
import { WebSocketServer, type WebSocket } from 'ws';
import {
  MAX_CLIENT_MESSAGE_BYTES,
  PROTOCOL_VERSION,
  parseClientMessage,
  type Role,
  type ServerMessage,
  type WireFrame,
} from '../../src/protocol/messages.js';
import type { SessionEvent } from '../../src/session/session.js';
import { InputError } from '../../src/util/input-error.js';
import type { LiveSession } from '../live/live-session.js';
import { checkHostAndOrigin, type OriginPolicy } from './origin.js';
import { SOFTWARE_VERSION } from '../version.js';
import { throttledMessage, type OperatorToken } from '../operator-token.js';
import { sourceOf } from '../request-source.js';

export interface HubOptions {
  /** The operator token, checked and throttled per source. */
  token: OperatorToken;
  port: () => number;
  policy: OriginPolicy;
  heartbeatMs?: number;
  /** A state frame is skipped for a client whose send buffer holds more than this (bytes). */
  frameBacklogBytes?: number;
  /** A client whose send buffer exceeds this is cut off (bytes). */
  cutoffBytes?: number;
  /** A client that has had to skip frames for this long without catching up is cut off (ms). */
  stallMs?: number;
  /** Token bucket for client messages: burst size and refill per second. */
  burst?: number;
  ratePerSecond?: number;
}

interface Client {
  ws: WebSocket;
  role: Role;
  name: string;
  alive: boolean;
  tokens: number;
  refilled: number;
  refused: number;
  droppedFrames: number;
  /** When the client started skipping frames (null while it keeps up). */
  behindSince: number | null;
}

/**
 * Fans the live session out to every connected browser and takes operators' commands.
 * Frames are serialised once and the same string goes to all; a client whose buffer is backed
 * up skips frames (the newest frame wins, the run never waits) and is cut off when it stays
 * behind for stallMs or its buffer passes cutoffBytes. Events are never skipped. Commands need the operator token; every message is
 * validated, and a bad one gets an `error` reply for that client only and changes nothing.
 */
export class Hub {
  private readonly wss: WebSocketServer;
  private readonly clients = new Set<Client>();
  private readonly heartbeat: NodeJS.Timeout;
  private counter = 0;
  private readonly frameBacklog: number;
  private readonly cutoff: number;
  private readonly stallMs: number;
  private readonly burst: number;
  private readonly rate: number;

  constructor(
    private readonly live: LiveSession,
    private readonly options: HubOptions,
  ) {
    this.wss = new WebSocketServer({ noServer: true, maxPayload: MAX_CLIENT_MESSAGE_BYTES, perMessageDeflate: false });
    this.frameBacklog = options.frameBacklogBytes ?? 256 * 1024;
    this.cutoff = options.cutoffBytes ?? 4 * 1024 * 1024;
    this.stallMs = options.stallMs ?? 10_000;
    this.burst = options.burst ?? 40;
    this.rate = options.ratePerSecond ?? 20;
    this.heartbeat = setInterval(() => this.beat(), options.heartbeatMs ?? 15_000);
    this.heartbeat.unref();
    live.on('frame', (frame: WireFrame, emittedAt: number) => this.broadcastFrame(frame, emittedAt));
    live.on('event', (event: SessionEvent) => this.broadcast({ type: 'event', event }));
    live.on('status', () => this.broadcastStatus());
  }

  get viewers(): number {
    return this.clients.size;
  }

  /** Handle an HTTP upgrade request (path, Host, Origin and token checks). */
  handleUpgrade(request: IncomingMessage, socket: Duplex, head: Buffer): void {
    socket.on('error', () => socket.destroy());
    const url = new URL(request.url ?? '/', 'http://placeholder');
    if (url.pathname !== '/ws') return refuse(socket, 404, 'Not Found');
    const problem = checkHostAndOrigin(request, this.options.port(), this.options.policy);
    if (problem) return refuse(socket, 403, 'Forbidden', problem);
    const token = url.searchParams.get('token');
    if (token !== null) {
      const verdict = this.options.token.check(token, sourceOf(request.socket.remoteAddress), '/ws');
      if (!verdict.ok && verdict.throttled) {
        const retry = `Retry-After: ${verdict.retryAfterSeconds}\r\n`;
        return refuse(socket, 429, 'Too Many Requests', throttledMessage(verdict.retryAfterSeconds), retry);
      }
      if (!verdict.ok) return refuse(socket, 403, 'Forbidden', 'wrong operator token');
    }
    const role: Role = token !== null ? 'operator' : 'viewer';
    this.wss.handleUpgrade(request, socket, head, (ws) => this.attach(ws, role));
  }

  async close(): Promise<void> {
    clearInterval(this.heartbeat);
    for (const client of this.clients) client.ws.close(1001, 'server shutting down');
    const deadline = Date.now() + 1000;
    while (this.clients.size > 0 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 20));
    for (const client of this.clients) client.ws.terminate();
    await new Promise<void>((resolve) => this.wss.close(() => resolve()));
  }

  private attach(ws: WebSocket, role: Role): void {
    const client: Client = {
      ws,
      role,
      name: `${role}-${++this.counter}`,
      alive: true,
      tokens: this.burst,
      refilled: Date.now(),
      refused: 0,
      droppedFrames: 0,
      behindSince: null,
    };
    this.clients.add(client);
    ws.on('error', () => ws.terminate());
    ws.on('pong', () => (client.alive = true));
    ws.on('close', () => {
      this.clients.delete(client);
      this.broadcastStatus();
    });
    ws.on('message', (data, isBinary) => this.receive(client, data as Buffer, isBinary));
    this.send(client, {
      type: 'hello',
      protocol: PROTOCOL_VERSION,
      software: `syncring ${SOFTWARE_VERSION}`,
      role,
      session: this.live.info(),
      history: this.live.history.toArray(),
      events: this.live.recentEvents.slice(),
      viewers: this.clients.size,
    });
    if (this.live.latestFrame) this.send(client, { type: 'frame', frame: this.live.latestFrame, emittedAt: this.live.latestEmittedAt });
    this.broadcastStatus();
  }

  private receive(client: Client, data: Buffer, isBinary: boolean): void {
    if (!this.takeToken(client)) {
      if (++client.refused > 4 * this.burst) {
        client.ws.close(1008, 'message flood');
        return;
      }
      if (client.refused === 1 || client.refused % this.burst === 0) {
        this.send(client, {
          type: 'error',
          reason: `too many messages: at most ${this.rate} per second (burst ${this.burst}); messages are being dropped`,
        });
      }
      return;
    }
    client.refused = 0;
    void this.dispatch(client, data, isBinary);
  }

  /** Validate one message, hand it to the live run, and answer the sender with ack or error. */
  private async dispatch(client: Client, data: Buffer, isBinary: boolean): Promise<void> {
    let id: string | number | null = null;
    try {
      if (isBinary) throw new InputError('', 'binary messages are not accepted; send JSON text');
      const command = parseClientMessage(data.toString('utf8'), this.live.params);
      id = command.id;
      if (client.role !== 'operator') {
        throw new InputError('', 'viewers cannot send commands: open the operator URL (it carries the token)', { requestId: id });
      }
      const action = command.kind === 'perturbation' ? command.perturbation.action : command.action;
      await this.live.command(command, client.name);
      this.send(client, { type: 'ack', id, action });
    } catch (error) {
      if (!(error instanceof InputError)) {
        this.send(client, { type: 'error', reason: `internal error: ${(error as Error).message}`, id });
        return;
      }
      this.send(client, { type: 'error', reason: error.reason, ...(error.path ? { path: error.path } : {}), id: error.requestId ?? id });
    }
  }

  private takeToken(client: Client): boolean {
    const now = Date.now();
    client.tokens = Math.min(this.burst, client.tokens + ((now - client.refilled) / 1000) * this.rate);
    client.refilled = now;
    if (client.tokens < 1) return false;
    client.tokens -= 1;
    return true;
  }

  private broadcastFrame(frame: WireFrame, emittedAt: number): void {
    const text = JSON.stringify({ type: 'frame', frame, emittedAt } satisfies ServerMessage);
    for (const client of this.clients) {
      if (client.ws.readyState !== client.ws.OPEN) continue;
      const backlog = client.ws.bufferedAmount;
      if (backlog > this.cutoff) {
        client.ws.terminate();
        continue;
      }
      if (backlog + text.length > this.frameBacklog) {
        client.droppedFrames++;
        const now = Date.now();
        client.behindSince ??= now;
        if (now - client.behindSince > this.stallMs) client.ws.terminate();
        continue;
      }
      client.behindSince = null;
      client.ws.send(text);
    }
  }

  private broadcast(message: ServerMessage): void {
    const text = JSON.stringify(message);
    for (const client of this.clients) {
      if (client.ws.readyState !== client.ws.OPEN) continue;
      if (client.ws.bufferedAmount > this.cutoff) client.ws.terminate();
      else client.ws.send(text);
    }
  }

  private broadcastStatus(): void {
    this.broadcast({ type: 'status', session: this.live.info(), viewers: this.clients.size });
  }

  private send(client: Client, message: ServerMessage): void {
    if (client.ws.readyState === client.ws.OPEN) client.ws.send(JSON.stringify(message));
  }

  private beat(): void {
    for (const client of this.clients) {
      if (!client.alive) {
        client.ws.terminate();
        continue;
      }
      client.alive = false;
      client.ws.ping();
    }
  }
}

function refuse(socket: Duplex, status: number, text: string, detail = '', extraHeaders = ''): void {
  socket.write(`HTTP/1.1 ${status} ${text}\r\nConnection: close\r\nContent-Type: text/plain\r\n${extraHeaders}\r\n${detail}\n`);
  socket.destroy();
}
