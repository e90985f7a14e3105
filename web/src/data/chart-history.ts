import type { HistoryPoint } from '../../../src/protocol/messages.js';
import { DecimatingHistory } from '../../../src/observe/decimating-history.js';

/**
 * The chart history of one run: the engine's DecimatingHistory (bounded, always spanning the
 * whole run, the same thinning the server applies for late joiners) plus what charts need on
 * top: the newest point even when thinning skipped it (so the live edge never lags), and a
 * `generation` that changes whenever earlier points were removed, telling readers to rebuild.
 */
export class ChartHistory {
  private readonly kept: DecimatingHistory<HistoryPoint>;
  private latest: HistoryPoint | null = null;
  private view: HistoryPoint[] | null = null;
  generation = 0;

  constructor(capacity = 1200) {
    this.kept = new DecimatingHistory<HistoryPoint>(capacity);
  }

  /** The kept points in time order (one shared array until the next change; do not modify). */
  get points(): readonly HistoryPoint[] {
    return (this.view ??= this.kept.toArray());
  }

  /** The newest point when it is not among the kept ones, else null. */
  get tail(): HistoryPoint | null {
    const points = this.points;
    return this.latest !== null && points[points.length - 1] !== this.latest ? this.latest : null;
  }

  get newest(): HistoryPoint | null {
    return this.latest;
  }

  clear(): void {
    this.kept.clear();
    this.latest = null;
    this.view = null;
    this.generation++;
  }

  /** Replace the contents (a late join or a replay position). */
  load(points: readonly HistoryPoint[]): void {
    this.clear();
    for (const p of points) this.push(p);
  }

  push(point: HistoryPoint): void {
    const before = this.kept.size;
    this.kept.push(point);
    if (this.kept.size < before) this.generation++;
    this.latest = point;
    this.view = null;
  }
}
