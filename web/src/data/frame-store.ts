import { historyPointOf, type HistoryPoint, type SessionInfo, type WireFrame } from '../../../src/protocol/messages.js';
import type { SessionEvent } from '../../../src/session/session.js';
import { ChartHistory } from './chart-history.js';

/** What changed since subscribers last heard from the store. */
export interface StoreChange {
  frame: boolean;
  /** The contents were replaced (new session, late join, replay position): rebuild everything. */
  reset: boolean;
  session: boolean;
  events: boolean;
}

export type StoreListener = (change: StoreChange, store: FrameStore) => void;

const NOTHING: StoreChange = { frame: false, reset: false, session: false, events: false };
export const EVERYTHING: StoreChange = { frame: true, reset: true, session: true, events: true };

/** Newest events kept for the timeline. */
const MAX_EVENTS = 500;

/**
 * The one place a dashboard's data lives: session info, the latest frame, the chart history and
 * the event list. Live messages and replay positions write into it; panels subscribe. However
 * many frames arrive, subscribers are told at most once per animation frame.
 */
export class FrameStore {
  session: SessionInfo | null = null;
  latest: WireFrame | null = null;
  events: SessionEvent[] = [];
  readonly history: ChartHistory;
  /** Frames received since the store was created (live) or position in the log (replay). */
  frameCount = 0;

  private readonly listeners = new Set<StoreListener>();
  private pending: StoreChange = { ...NOTHING };
  private scheduled = false;

  constructor(historyCapacity?: number) {
    this.history = new ChartHistory(historyCapacity);
  }

  /** Replace everything at once (hello, replay position). */
  reset(
    session: SessionInfo | null,
    history: readonly HistoryPoint[],
    events: readonly SessionEvent[],
    latest: WireFrame | null = null,
  ): void {
    this.session = session;
    this.history.load(history);
    this.events = events.slice(-MAX_EVENTS);
    this.latest = latest;
    this.mark(EVERYTHING);
  }

  pushFrame(frame: WireFrame): void {
    // Time going backwards means the run was reset or replaced: its old history no longer applies.
    const restarted = this.latest !== null && frame.tau < this.latest.tau;
    if (restarted) this.history.clear();
    this.latest = frame;
    this.frameCount++;
    this.history.push(historyPointOf(frame));
    this.mark({ ...NOTHING, frame: true, reset: restarted });
  }

  pushEvent(event: SessionEvent): void {
    if (this.events.some((e) => e.seq === event.seq && e.tau === event.tau && e.message === event.message)) return;
    this.events.push(event);
    if (this.events.length > MAX_EVENTS) this.events.splice(0, this.events.length - MAX_EVENTS);
    this.mark({ ...NOTHING, events: true });
  }

  setSession(session: SessionInfo): void {
    this.session = session;
    this.mark({ ...NOTHING, session: true });
  }

  subscribe(listener: StoreListener): () => void {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }

  private mark(change: StoreChange): void {
    const p = this.pending;
    this.pending = {
      frame: p.frame || change.frame,
      reset: p.reset || change.reset,
      session: p.session || change.session,
      events: p.events || change.events,
    };
    if (this.scheduled) return;
    this.scheduled = true;
    requestAnimationFrame(() => this.flush());
  }

  private flush(): void {
    this.scheduled = false;
    const change = this.pending;
    this.pending = { ...NOTHING };
    for (const listener of [...this.listeners]) listener(change, this);
  }
}
