import type { HistoryPoint } from '../../../src/protocol/messages.js';
import type { ChartHistory } from '../data/chart-history.js';

export interface XY {
  x: number;
  y: number;
}

/**
 * Turns a history into chart.js point arrays, one per series, appending only the points that
 * are new since the last call (and rebuilding after the history was thinned or replaced). For
 * wrapped quantities (phases) a jump larger than `wrapJump` is drawn as a gap, not as a line
 * across the whole chart. Every call returns fresh arrays, as chart.js expects for new data.
 */
export class SeriesCache {
  private series: XY[][] = [];
  private consumed = 0;
  private generation = -1;
  private count = -1;

  constructor(
    private readonly values: (point: HistoryPoint) => number[],
    private readonly wrapJump = Infinity,
  ) {}

  build(history: ChartHistory): XY[][] {
    const points = history.points;
    const first = points[0] ?? history.tail;
    const count = first ? this.values(first).length : 0;
    if (history.generation !== this.generation || count !== this.count) {
      this.generation = history.generation;
      this.count = count;
      this.series = Array.from({ length: count }, () => []);
      this.consumed = 0;
    }
    for (let i = this.consumed; i < points.length; i++) this.append(this.series, points[i]);
    this.consumed = points.length;
    const tail = history.tail;
    if (!tail) return this.series.map((s) => s.slice());
    const withTail = this.series.map((s) => s.slice());
    this.append(withTail, tail);
    return withTail;
  }

  private append(target: XY[][], point: HistoryPoint): void {
    const ys = this.values(point);
    const x = point.slowTime;
    for (let j = 0; j < target.length; j++) {
      const s = target[j];
      const y = ys[j];
      const previous = s[s.length - 1];
      if (previous && Math.abs(y - previous.y) > this.wrapJump) s.push({ x: (x + previous.x) / 2, y: NaN });
      s.push({ x, y });
    }
  }
}
