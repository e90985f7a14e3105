import { html } from 'lit';
import type { Chart, ChartConfiguration, ChartDataset } from 'chart.js';
import type { FrameStore, StoreChange } from '../data/frame-store.js';
import { nodeColour } from '../theme.js';
import { axis, leftAxis, RIGHT_AXIS_WIDTH, StreamingChart } from './streaming-chart.js';
import { SeriesCache } from './series-cache.js';
import { applySeries, perturbationTimes } from './chart-data.js';
import { streamingOptions } from './chart-controller.js';
import { symbol, type HeadingPart } from '../panels/heading-text.js';

/**
 * Neighbour phase differences phi_{k+1} - phi_k of the wanted mode over slow time, in units of
 * pi: the full system solid, the guiding system dashed in the same colour. A locked pattern is a
 * set of flat lines; a slip shows as a line running off one edge and back in at the other.
 */
export class PhaseChart extends StreamingChart {
  private readonly cache = new SeriesCache((p) => [...p.full.phaseDifferences, ...p.guide.phaseDifferences].map((d) => d / Math.PI), 1);
  private nodes = 0;

  get heading(): readonly HeadingPart[] {
    return ['Phase differences ', symbol('φₖ₊₁ − φₖ'), ' (wanted mode)'];
  }

  protected override legend() {
    const n = this.store?.session?.nodes ?? 0;
    return html`
      <span class="key"><span class="swatch"></span>full system</span>
      <span class="key"><span class="swatch dashed"></span>guiding prediction</span>
      ${Array.from({ length: n }, (_, k) => html`<span class="key" style="color:${nodeColour(k)}"><span class="swatch"></span>${k}→${(k + 1) % n}</span>`)}
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
            type: 'linear',
            min: -1.05,
            max: 1.05,
            ...leftAxis('phase difference'),
            afterBuildTicks: (scale) => {
              scale.ticks = [-1, -0.5, 0, 0.5, 1].map((value) => ({ value }));
            },
            ticks: { ...axis('').ticks, callback: (v) => piLabel(Number(v)) },
          },
        },
        plugins: { ...base.plugins, eventMarkers: {} },
      },
    };
  }

  protected fill(chart: Chart, store: FrameStore, change: StoreChange): number {
    const n = store.session?.nodes ?? 0;
    if (change.reset || n !== this.nodes || chart.data.datasets.length !== 2 * n) {
      this.nodes = n;
      chart.data.datasets = datasetsFor(n);
    }
    return applySeries(chart, this.cache.build(store.history), perturbationTimes(store));
  }
}

function datasetsFor(n: number): ChartDataset<'line', { x: number; y: number }[]>[] {
  const full = Array.from({ length: n }, (_, k) => ({ label: `full ${k}`, data: [], borderColor: nodeColour(k), borderWidth: 2.5 }));
  const guide = Array.from({ length: n }, (_, k) => ({
    label: `guide ${k}`,
    data: [],
    borderColor: nodeColour(k),
    borderWidth: 1.8,
    borderDash: [7, 5],
  }));
  return [...full, ...guide];
}

function piLabel(turns: number): string {
  const labels: Record<string, string> = { '-1': '−π', '-0.5': '−π/2', '0': '0', '0.5': 'π/2', '1': 'π' };
  return labels[String(turns)] ?? '';
}

customElements.define('sr-phase-chart', PhaseChart);
