import type { Chart } from 'chart.js';
import type { FrameStore } from '../data/frame-store.js';
import type { XY } from './series-cache.js';

/** x range of the data (the whole run, thinned), or a unit range before anything arrived. */
export function xRange(series: XY[][]): { min: number; max: number } {
  let min = Infinity;
  let max = -Infinity;
  for (const s of series) {
    if (s.length === 0) continue;
    min = Math.min(min, s[0].x);
    max = Math.max(max, s[s.length - 1].x);
  }
  if (!Number.isFinite(min)) return { min: 0, max: 1 };
  return max > min ? { min, max } : { min, max: min + 1 };
}

/** Slow times of the perturbations in the store, for the event markers. */
export function perturbationTimes(store: FrameStore): number[] {
  const eps = store.session?.epsilon ?? 0;
  return store.events.filter((e) => e.kind === 'perturbation').map((e) => e.tau * eps);
}

/** Put series into the chart's datasets (same order) and fix the x scale to their range. */
export function applySeries(chart: Chart, series: XY[][], markers: number[]): number {
  let points = 0;
  series.forEach((data, i) => {
    const dataset = chart.data.datasets[i];
    if (!dataset) return;
    dataset.data = data;
    points += data.length;
  });
  const { min, max } = xRange(series);
  const x = chart.options.scales?.x;
  if (x) {
    x.min = min;
    x.max = max;
  }
  const plugins = chart.options.plugins as { eventMarkers?: { at: number[] } } | undefined;
  if (plugins?.eventMarkers) plugins.eventMarkers.at = markers;
  return points;
}
