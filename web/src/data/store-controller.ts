import type { ReactiveController, ReactiveControllerHost } from 'lit';
import { EVERYTHING, type FrameStore, type StoreChange } from './frame-store.js';

/**
 * Subscribes an element to whichever store it currently shows (live or replay) for as long as
 * it is connected. By default a change just asks the host to re-render; `minIntervalMs` keeps
 * text panels readable (numbers that change 60 times a second cannot be read on a projector).
 * Switching to another store delivers one full change, so the host rebuilds from scratch.
 */
export class StoreController implements ReactiveController {
  private current: FrameStore | null = null;
  private unsubscribe: (() => void) | null = null;
  private waiting: StoreChange | null = null;
  private timer: ReturnType<typeof setTimeout> | null = null;
  private lastDelivered = 0;

  constructor(
    private readonly host: ReactiveControllerHost,
    private readonly storeOf: () => FrameStore | null,
    private readonly onChange: (change: StoreChange, store: FrameStore) => void = () => host.requestUpdate(),
    private readonly minIntervalMs = 0,
  ) {
    host.addController(this);
  }

  hostConnected(): void {
    this.sync();
  }

  hostUpdated(): void {
    this.sync();
  }

  hostDisconnected(): void {
    this.unsubscribe?.();
    this.unsubscribe = null;
    this.current = null;
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = null;
    this.waiting = null;
  }

  private sync(): void {
    const store = this.storeOf();
    if (store === this.current) return;
    this.unsubscribe?.();
    this.current = store;
    this.unsubscribe = store ? store.subscribe((change) => this.receive(change)) : null;
    if (store) this.deliver(EVERYTHING);
  }

  private receive(change: StoreChange): void {
    if (this.minIntervalMs <= 0 || change.reset) {
      this.waiting = null;
      this.deliver(change);
      return;
    }
    const w = this.waiting;
    this.waiting = w
      ? {
          frame: w.frame || change.frame,
          reset: w.reset || change.reset,
          session: w.session || change.session,
          events: w.events || change.events,
        }
      : change;
    if (this.timer !== null) return;
    const wait = Math.max(0, this.lastDelivered + this.minIntervalMs - performance.now());
    this.timer = setTimeout(() => {
      this.timer = null;
      const pending = this.waiting;
      this.waiting = null;
      if (pending) this.deliver(pending);
    }, wait);
  }

  private deliver(change: StoreChange): void {
    if (!this.current) return;
    this.lastDelivered = performance.now();
    this.onChange(change, this.current);
  }
}
