/**
 * A bounded history that always spans the whole run: it keeps every `stride`-th item, and when
 * it fills up it drops every other kept item and doubles the stride. Memory stays bounded
 * however long the run, and a late joiner still sees the run from its start.
 */
export class DecimatingHistory<T> {
  private state: DecimatedItems<T> = emptyDecimated();

  constructor(readonly capacity = 1000) {
    if (!(capacity >= 2)) throw new RangeError('DecimatingHistory: capacity must be at least 2');
  }

  push(item: T): void {
    pushDecimated(this.state, item, this.capacity);
  }

  toArray(): T[] {
    return this.state.items.slice();
  }

  get size(): number {
    return this.state.items.length;
  }

  clear(): void {
    this.state = emptyDecimated();
  }
}

/** The same history as plain JSON, for holders that are saved in checkpoints as they are. */
export interface DecimatedItems<T> {
  items: T[];
  stride: number;
  seen: number;
}

export function emptyDecimated<T>(): DecimatedItems<T> {
  return { items: [], stride: 1, seen: 0 };
}

/** Keeps every `stride`-th item; at `capacity` drops every other kept item and doubles the stride. */
export function pushDecimated<T>(history: DecimatedItems<T>, item: T, capacity: number): void {
  if (history.seen++ % history.stride !== 0) return;
  history.items.push(item);
  if (history.items.length >= capacity) {
    history.items = history.items.filter((_, i) => i % 2 === 0);
    history.stride *= 2;
  }
}
