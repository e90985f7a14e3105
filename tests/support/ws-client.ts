import WebSocket from 'ws';
import type { ServerMessage } from '../../src/protocol/messages.js';

/** A test client that records every server message and can wait for one that matches. */
export class TestClient {
  readonly messages: ServerMessage[] = [];
  private waiters: { match: (m: ServerMessage) => boolean; resolve: (m: ServerMessage) => void }[] = [];
  closed: { code: number; reason: string } | null = null;
  readonly opened: Promise<void>;

  constructor(readonly ws: WebSocket) {
    ws.on('message', (data) => {
      const message = JSON.parse(String(data)) as ServerMessage;
      this.messages.push(message);
      this.waiters = this.waiters.filter((w) => {
        if (!w.match(message)) return true;
        w.resolve(message);
        return false;
      });
    });
    ws.on('close', (code, reason) => (this.closed = { code, reason: String(reason) }));
    ws.on('error', () => undefined);
    this.opened = new Promise((resolve, reject) => {
      ws.once('open', () => resolve());
      ws.once('unexpected-response', (_req, res) => reject(new Error(`HTTP ${res.statusCode}`)));
      ws.once('error', reject);
    });
  }

  static async connect(url: string, options: WebSocket.ClientOptions = {}): Promise<TestClient> {
    const client = new TestClient(new WebSocket(url, options));
    await client.opened;
    return client;
  }

  /** Resolves with the first message (already received or coming) that matches. */
  next<T extends ServerMessage['type']>(
    type: T,
    match: (m: Extract<ServerMessage, { type: T }>) => boolean = () => true,
    timeoutMs = 15_000,
  ): Promise<Extract<ServerMessage, { type: T }>> {
    const test = (m: ServerMessage) => m.type === type && match(m as Extract<ServerMessage, { type: T }>);
    const seen = this.messages.find(test);
    if (seen) return Promise.resolve(seen as Extract<ServerMessage, { type: T }>);
    return new Promise((resolve, reject) => {
      const timer = setTimeout(() => reject(new Error(`no ${type} message within ${timeoutMs} ms`)), timeoutMs);
      this.waiters.push({
        match: test,
        resolve: (m) => {
          clearTimeout(timer);
          resolve(m as Extract<ServerMessage, { type: T }>);
        },
      });
    });
  }

  /** Messages of one type received so far. */
  all<T extends ServerMessage['type']>(type: T): Extract<ServerMessage, { type: T }>[] {
    return this.messages.filter((m) => m.type === type) as Extract<ServerMessage, { type: T }>[];
  }

  command(fields: Record<string, unknown>): void {
    this.ws.send(JSON.stringify({ type: 'command', ...fields }));
  }

  close(): void {
    this.ws.close();
  }
}

export const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
