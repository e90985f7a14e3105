import { html } from 'lit';
import type { Chart, ChartConfiguration, ChartDataset } from 'chart.js';
import type { FrameStore, StoreChange } from '../data/frame-store.js';
import { nodeColour } from '../theme.js';
import { axis, leftAxis, plainTickLabel, RIGHT_AXIS_WIDTH, StreamingChart } from './streaming-chart.js';
import { SeriesCache } from './series-cache.js';
import { applySeries, perturbationTimes } from './chart-data.js';
import { streamingOptions } from './chart-controller.js';
import { symbol, type HeadingPart } from '../panels/heading-text.js';

/** Lowest amplitude drawn; anything smaller sits on the floor of the log axis. */
const FLOOR = 1e-4;

/**
 * |a| of each node's wanted mode (solid) and unwanted mode (dotted) in the full system, on a
 * log axis so that a dying or a growing second mode is visible decades before it matters.
 */
export class AmplitudeChart extends StreamingChart {
  private readonly cache = new SeriesCache((p) => p.full.amplitude.flatMap((row) => row.map((a) => Math.max(FLOOR, a))));
  private shape = '';

  get heading(): readonly HeadingPart[] {
    return ['Mode amplitudes ', symbol('|a|'), ' per node'];
  }

  protected override legend() {
    const n = this.store?.session?.nodes ?? 0;
    const m = this.store?.session?.modes ?? 1;
    return html`
      <span class="key"><span class="swatch"></span>wanted mode</span>
      ${m > 1 ? html`<span class="key"><span class="swatch dotted"></span>unwanted mode</span>` : ''}
      ${Array.from({ length: n }, (_, k) => html`<span class="key" style="color:${nodeColour(k)}"><span class="swatch"></span>node ${k}</span>`)}
    `;
  }

  protected configure(): ChartConfiguration {
    const base = streamingOptions();
    return {
      type: 'line',
      data: { datasets: [] },
      options: {
        ...base,
        layout: { padding: { right: RIGHT_AXIS_WIDTH } },
        scales: {
          x: this.timeAxis(),
          y: {
            type: 'logarithmic',
            min: FLOOR,
            max: 5,
            ...leftAxis('amplitude'),
            afterBuildTicks: (scale) => {
              scale.ticks = [1e-4, 1e-3, 1e-2, 0.1, 1].map((value) => ({ value }));
            },
            ticks: { ...axis('').ticks, callback: plainTickLabel },
          },
        },
        plugins: { ...base.plugins, eventMarkers: {} },
      },
    };
  }

  protected fill(chart: Chart, store: FrameStore, change: StoreChange): number {
    const n = store.session?.nodes ?? 0;
    const m = store.session?.modes ?? 1;
    const shape = `${n}x${m}`;
    if (change.reset || shape !== this.shape) {
      this.shape = shape;
      chart.data.datasets = datasetsFor(n, m);
    }
    return applySeries(chart, this.cache.build(store.history), perturbationTimes(store));
  }
}

/** Same order as the cache's values: node by node, mode by mode. */
function datasetsFor(n: number, m: number): ChartDataset<'line', { x: number; y: number }[]>[] {
  const sets: ChartDataset<'line', { x: number; y: number }[]>[] = [];
  for (let k = 0; k < n; k++) {
    for (let j = 0; j < m; j++) {
      sets.push(
        j === 0
          ? { label: `node ${k} wanted`, data: [], borderColor: nodeColour(k), borderWidth: 2.5 }
          : { label: `node ${k} mode ${j}`, data: [], borderColor: nodeColour(k), borderWidth: 2, borderDash: [2, 3] },
      );
    }
  }
  return sets;
}

customElements.define('sr-amplitude-chart', AmplitudeChart);
