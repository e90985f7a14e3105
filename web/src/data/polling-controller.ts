import type { ReactiveController, ReactiveControllerHost } from 'lit';

export interface PollingOptions {
  /**
   * One read: asks the server and puts the answer into the host. Handles its own errors;
   * `signal` is aborted when the host disconnects or a newer read supersedes this one.
   */
  read: (signal: AbortSignal) => Promise<void>;
  /** Read only while this holds (the tab is shown); turning true reads at once, turning false drops a waiting read. */
  active?: () => boolean;
  /** Checked just before a read starts: false skips it (what it would ask for was asked already). */
  due?: () => boolean;
  /** While active, read again this long after each read is back. */
  everyMs?: number;
  /**
   * Asking while a read is out: 'follow-up' reads once more when it is back (a listing, where
   * every answer is worth showing); 'supersede' abandons it and reads now (an answer for
   * parameters that have changed since is not worth showing).
   */
  whileReading?: 'follow-up' | 'supersede';
}

/**
 * Keeps a panel's reads of one API resource together: at most one read out at a time, reads
 * again on a period or when asked, starts when the panel is shown and stops when it is hidden or
 * disconnected. `busy` says a read is out (the host re-renders when it starts and ends).
 */
export class PollingController implements ReactiveController {
  private connected = false;
  private wasActive = false;
  private timer: ReturnType<typeof setTimeout> | null = null;
  private reading: AbortController | null = null;
  private again = false;

  constructor(
    private readonly host: ReactiveControllerHost,
    private readonly options: PollingOptions,
  ) {
    host.addController(this);
  }

  get busy(): boolean {
    return this.reading !== null;
  }

  hostConnected(): void {
    this.connected = true;
    this.followActive();
  }

  hostUpdated(): void {
    this.followActive();
  }

  hostDisconnected(): void {
    this.connected = false;
    this.wasActive = false;
    this.again = false;
    this.cancelWaiting();
    this.reading?.abort();
    this.reading = null;
  }

  /** Read now: a waiting read is dropped; a read already out is followed up or superseded. */
  readNow(): void {
    if (this.reading && this.options.whileReading !== 'supersede') {
      this.again = true;
      return;
    }
    this.cancelWaiting();
    if (!this.connected || !this.isActive() || !(this.options.due?.() ?? true)) return;
    this.reading?.abort();
    const reading = (this.reading = new AbortController());
    this.host.requestUpdate();
    void this.run(reading);
  }

  /** Read in `delayMs` unless a read is already waiting (it keeps its time, so a burst of changes gives one read) or none is due. */
  readSoon(delayMs: number): void {
    if (this.timer !== null || !(this.options.due?.() ?? true)) return;
    this.wait(delayMs);
  }

  private async run(reading: AbortController): Promise<void> {
    try {
      await this.options.read(reading.signal);
    } finally {
      this.finish(reading);
    }
  }

  private finish(reading: AbortController): void {
    // a superseded read, or one out when the host went away: whoever came after is in charge
    if (this.reading !== reading) return;
    this.reading = null;
    this.host.requestUpdate();
    if (this.again) {
      this.again = false;
      this.readNow();
    } else if (this.options.everyMs !== undefined && this.connected && this.isActive() && this.timer === null) {
      this.wait(this.options.everyMs);
    }
  }

  private followActive(): void {
    if (!this.options.active) return;
    const active = this.connected && this.options.active();
    if (active === this.wasActive) return;
    this.wasActive = active;
    if (active) this.readNow();
    else this.cancelWaiting();
  }

  private isActive(): boolean {
    return this.options.active?.() ?? true;
  }

  private wait(delayMs: number): void {
    this.timer = setTimeout(() => {
      this.timer = null;
      this.readNow();
    }, delayMs);
  }

  private cancelWaiting(): void {
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = null;
  }
}
