/**
 * A bounded history that always spans the whole run: it keeps every `stride`-th item, and when
 * it fills up it drops every other kept item and doubles the stride. Memory stays bounded
 * however long the run, and a late joiner still sees the run from its start.
 */
export class DecimatingHistory<T> {
  private items: T[] = [];
  private stride = 1;
  private seen = 0;

  constructor(readonly capacity = 1000) {
    if (!(capacity >= 2)) throw new RangeError('DecimatingHistory: capacity must be at least 2');
  }

  push(item: T): void {
    if (this.seen++ % this.stride !== 0) return;
    this.items.push(item);
    if (this.items.length >= this.capacity) {
      this.items = this.items.filter((_, i) => i % 2 === 0);
      this.stride *= 2;
    }
  }

  toArray(): T[] {
    return this.items.slice();
  }

  get size(): number {
    return this.items.length;
  }

  clear(): void {
    this.items = [];
    this.stride = 1;
    this.seen = 0;
  }
}
