/**
 * Waiting work from many sources, taken in turn: next is the waiting source served longest ago
 * (one never served first), each source's items in order. A source that sends many requests
 * therefore waits behind itself, while another source's request comes next after the one in
 * progress. (Bounds on how much may wait are the caller's: worker-client.ts.)
 */
export class FairQueue<T> {
  private readonly sources = new Map<string, { items: T[]; lastTurn: number }>();
  private turn = 0;
  private count = 0;

  /**
   * A source with nothing waiting is remembered for this many turns, so that its next request
   * still queues behind sources served less recently; after that it is forgotten (the map stays small).
   */
  private static readonly MEMORY_TURNS = 16;

  get size(): number {
    return this.count;
  }

  /** Items `source` has waiting. */
  waiting(source: string): number {
    return this.sources.get(source)?.items.length ?? 0;
  }

  push(source: string, item: T): void {
    const entry = this.sources.get(source);
    if (entry) entry.items.push(item);
    else this.sources.set(source, { items: [item], lastTurn: -1 });
    this.count++;
  }

  /** The next item in turn, passing over the sources `skip` names (those already being served). */
  shift(skip: (source: string) => boolean = () => false): T | undefined {
    let next: { items: T[]; lastTurn: number } | undefined;
    for (const [source, entry] of this.sources) {
      if (entry.items.length === 0) {
        if (entry.lastTurn < this.turn - FairQueue.MEMORY_TURNS) this.sources.delete(source);
        continue;
      }
      if (skip(source)) continue;
      if (!next || entry.lastTurn < next.lastTurn) next = entry;
    }
    if (!next) return undefined;
    next.lastTurn = this.turn++;
    this.count--;
    return next.items.shift();
  }

  /** Take `item` of `source` out before its turn; whether it was waiting. */
  remove(source: string, item: T): boolean {
    const items = this.sources.get(source)?.items;
    const at = items?.indexOf(item) ?? -1;
    if (at < 0) return false;
    items!.splice(at, 1);
    this.count--;
    return true;
  }

  /** Take every item out (in no particular order). */
  drain(): T[] {
    const all = [...this.sources.values()].flatMap((entry) => entry.items);
    this.sources.clear();
    this.count = 0;
    return all;
  }
}
