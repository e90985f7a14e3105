import type { ServerMessage } from '../../../src/protocol/messages.js';

export type ConnectionPhase = 'connecting' | 'open' | 'waiting' | 'stopped';

export interface ConnectionState {
  phase: ConnectionPhase;
  /** Failed attempts in a row (0 while connected). */
  attempt: number;
  /** When the next attempt starts (ms since epoch) while waiting. */
  retryAt: number | null;
  /** Why the last connection ended, if known. */
  lastClose: string | null;
}

export interface ConnectionHandlers {
  onMessage(message: ServerMessage): void;
  onState(state: ConnectionState): void;
}

/** Reconnect delays: 0.5 s doubling to at most 15 s, each with +-20 % jitter so a room of browsers does not reconnect in lockstep. */
export const FIRST_RETRY_MS = 500;
export const LONGEST_RETRY_MS = 15_000;

export function retryDelay(attempt: number, random: () => number = Math.random): number {
  const base = Math.min(LONGEST_RETRY_MS, FIRST_RETRY_MS * 2 ** Math.max(0, attempt - 1));
  return Math.round(base * (0.8 + 0.4 * random()));
}

/** ws(s)://host/ws, with the operator token when the page was opened with one. */
export function socketUrl(location: Pick<Location, 'protocol' | 'host'>, token: string | null): string {
  const scheme = location.protocol === 'https:' ? 'wss' : 'ws';
  return `${scheme}://${location.host}/ws${token ? `?token=${encodeURIComponent(token)}` : ''}`;
}

/**
 * The live link to the server: one WebSocket, reopened with exponential backoff whenever it
 * drops. Messages are parsed and handed over as they come; commands get a running id so the
 * server's ack or error can be matched to them.
 */
export class ConnectionClient {
  private socket: WebSocket | null = null;
  private timer: ReturnType<typeof setTimeout> | null = null;
  private nextId = 1;
  private state: ConnectionState = { phase: 'stopped', attempt: 0, retryAt: null, lastClose: null };

  constructor(
    private readonly url: string,
    private readonly handlers: ConnectionHandlers,
  ) {}

  get current(): ConnectionState {
    return this.state;
  }

  start(): void {
    if (this.state.phase !== 'stopped') return;
    this.open();
  }

  stop(): void {
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = null;
    const socket = this.socket;
    this.socket = null;
    socket?.close(1000, 'dashboard closed');
    this.setState({ phase: 'stopped', attempt: 0, retryAt: null, lastClose: this.state.lastClose });
  }

  /** Skip the rest of the backoff wait. */
  retryNow(): void {
    if (this.state.phase !== 'waiting') return;
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = null;
    this.open();
  }

  /** Send a command; returns its id, or null when there is no open connection. */
  send(action: string, fields: Record<string, unknown> = {}): number | null {
    if (!this.socket || this.socket.readyState !== WebSocket.OPEN) return null;
    const id = this.nextId++;
    this.socket.send(JSON.stringify({ ...fields, type: 'command', action, id }));
    return id;
  }

  private open(): void {
    this.setState({ ...this.state, phase: 'connecting', retryAt: null });
    let socket: WebSocket;
    try {
      socket = new WebSocket(this.url);
    } catch (error) {
      this.scheduleRetry(`could not open the socket: ${(error as Error).message}`);
      return;
    }
    this.socket = socket;
    socket.addEventListener('open', () => {
      if (this.socket !== socket) return;
      this.setState({ phase: 'open', attempt: 0, retryAt: null, lastClose: null });
    });
    socket.addEventListener('message', (event) => {
      if (this.socket !== socket) return;
      const message = parseServerMessage(event.data);
      if (message) this.handlers.onMessage(message);
    });
    socket.addEventListener('close', (event) => {
      if (this.socket !== socket) return;
      this.socket = null;
      this.scheduleRetry(event.reason || `connection closed (code ${event.code})`);
    });
    // 'error' is always followed by 'close', which does the bookkeeping.
  }

  private scheduleRetry(reason: string): void {
    const attempt = this.state.attempt + 1;
    const delay = retryDelay(attempt);
    this.setState({ phase: 'waiting', attempt, retryAt: Date.now() + delay, lastClose: reason });
    this.timer = setTimeout(() => {
      this.timer = null;
      this.open();
    }, delay);
  }

  private setState(state: ConnectionState): void {
    this.state = state;
    this.handlers.onState(state);
  }
}

const SERVER_TYPES = new Set(['hello', 'frame', 'event', 'status', 'ack', 'error']);

/** A server message, or null (and a console note) for anything this dashboard does not know. */
export function parseServerMessage(data: unknown): ServerMessage | null {
  if (typeof data !== 'string') {
    console.warn('syncring: ignoring a binary WebSocket message');
    return null;
  }
  try {
    const message = JSON.parse(data) as { type?: unknown };
    if (message && typeof message === 'object' && typeof message.type === 'string' && SERVER_TYPES.has(message.type))
      return message as ServerMessage;
    console.warn('syncring: ignoring a message of unknown type', message?.type);
  } catch (error) {
    console.warn('syncring: ignoring a message that is not JSON', (error as Error).message);
  }
  return null;
}
