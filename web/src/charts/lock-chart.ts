import { html } from 'lit';
import type { Chart, ChartConfiguration } from 'chart.js';
import type { FrameStore, StoreChange } from '../data/frame-store.js';
import { CAUTION, INK, LOCKED, LOCKED_BAND } from '../theme.js';
import { axis, leftAxis, plainTickLabel, RIGHT_AXIS_WIDTH, StreamingChart } from './streaming-chart.js';
import { SeriesCache } from './series-cache.js';
import { applySeries, perturbationTimes } from './chart-data.js';
import { streamingOptions } from './chart-controller.js';
import { symbol, type HeadingPart } from '../panels/heading-text.js';

const DIVERGENCE_FLOOR = 1e-5;

/**
 * Lock status (shaded band while the full system is locked), the order parameter R of its
 * pattern (0..1) and, on a log axis at the right, the full-vs-guide divergence max |a - a_guide|.
 */
export class LockChart extends StreamingChart {
  private readonly cache = new SeriesCache((p) => [p.locked ? 1 : 0, p.orderParameter, Math.max(DIVERGENCE_FLOOR, p.divergence)]);

  get heading(): readonly HeadingPart[] {
    return ['Lock, order parameter ', symbol('R'), ' and divergence'];
  }

  protected override legend() {
    return html`
      <span class="key" style="color:${LOCKED}"><span class="swatch block"></span>locked</span>
      <span class="key" style="color:${INK}"><span class="swatch"></span>order parameter R (left)</span>
      <span class="key" style="color:${CAUTION}"><span class="swatch"></span>full − guide divergence (right, log)</span>
    `;
  }

  protected configure(): ChartConfiguration {
    const base = streamingOptions();
    return {
      type: 'line',
      data: {
        datasets: [
          { label: 'locked', data: [], stepped: 'before', borderWidth: 0, fill: 'origin', backgroundColor: LOCKED_BAND, yAxisID: 'y' },
          { label: 'R', data: [], borderColor: INK, borderWidth: 2.5, yAxisID: 'y' },
          { label: 'divergence', data: [], borderColor: CAUTION, borderWidth: 2, yAxisID: 'divergence' },
        ],
      },
      options: {
        ...base,
        scales: {
          x: this.timeAxis(),
          y: {
            type: 'linear',
            min: 0,
            max: 1.02,
            ...leftAxis('R'),
            afterBuildTicks: (s) => void (s.ticks = [0, 0.25, 0.5, 0.75, 1].map((value) => ({ value }))),
            ticks: { ...axis('').ticks, callback: plainTickLabel },
          },
          divergence: {
            type: 'logarithmic',
            position: 'right',
            min: DIVERGENCE_FLOOR,
            max: 10,
            ...axis('divergence'),
            afterFit: (scale: { width: number }) => void (scale.width = RIGHT_AXIS_WIDTH),
            grid: { display: false },
            afterBuildTicks: (s) => void (s.ticks = [1e-4, 1e-2, 1].map((value) => ({ value }))),
            ticks: { ...axis('').ticks, callback: plainTickLabel },
          },
        },
        plugins: { ...base.plugins, eventMarkers: {} },
      },
    };
  }

  protected fill(chart: Chart, store: FrameStore, _change: StoreChange): number {
    return applySeries(chart, this.cache.build(store.history), perturbationTimes(store));
  }
}

customElements.define('sr-lock-chart', LockChart);
