import type { ReactiveController, ReactiveControllerHost } from 'lit';
import {
  Chart,
  Filler,
  LinearScale,
  LineController,
  LineElement,
  LogarithmicScale,
  PointElement,
  type ChartConfiguration,
  type Plugin,
} from 'chart.js';
import { EVENT_MARKER } from '../theme.js';

Chart.register(LineController, LineElement, PointElement, LinearScale, LogarithmicScale, Filler);

type ChartHost = ReactiveControllerHost & HTMLElement & { renderRoot: ParentNode; hasUpdated: boolean };

/**
 * Owns one chart.js Chart for a Lit element: created once the element has rendered its canvas
 * (the first update), destroyed when the element leaves the document and created again if it
 * comes back. Data is pushed by the element through `chart`, never through reactive properties.
 */
export class ChartController<TConfig extends ChartConfiguration = ChartConfiguration> implements ReactiveController {
  chart: Chart | null = null;

  constructor(
    private readonly host: ChartHost,
    private readonly configure: () => TConfig,
    private readonly onCreated: (chart: Chart) => void = () => {},
    private readonly canvasSelector = 'canvas',
  ) {
    host.addController(this);
  }

  hostConnected(): void {
    if (this.host.hasUpdated && !this.chart) this.create();
  }

  hostUpdated(): void {
    if (!this.chart) this.create();
  }

  hostDisconnected(): void {
    this.chart?.destroy();
    this.chart = null;
  }

  private create(): void {
    const canvas = this.host.renderRoot.querySelector(this.canvasSelector);
    if (!(canvas instanceof HTMLCanvasElement)) return;
    this.chart = new Chart(canvas, this.configure() as ChartConfiguration);
    this.onCreated(this.chart);
  }
}

/** Options shared by every streaming chart: no animation, no parsing, no points, fixed layout. */
export function streamingOptions() {
  return {
    animation: false as const,
    parsing: false as const,
    normalized: true,
    responsive: true,
    maintainAspectRatio: false,
    events: [] as [],
    elements: { point: { radius: 0, hitRadius: 0, hoverRadius: 0 }, line: { borderWidth: 2, tension: 0 } },
    plugins: { legend: { display: false }, tooltip: { enabled: false } },
  };
}

export interface EventMarkerOptions {
  /** x positions (slow time) of perturbations to mark with a vertical line. */
  at: number[];
  colour: string;
}

/** Vertical lines where operators or the schedule changed something, so cause and effect line up. */
export const eventMarkers: Plugin<'line', EventMarkerOptions> = {
  id: 'eventMarkers',
  defaults: { at: [], colour: EVENT_MARKER },
  afterDatasetsDraw(chart, _args, options) {
    const x = chart.scales.x;
    if (!x || options.at.length === 0) return;
    const { ctx, chartArea } = chart;
    ctx.save();
    ctx.strokeStyle = options.colour;
    ctx.lineWidth = 1.5;
    ctx.setLineDash([4, 3]);
    for (const at of options.at) {
      if (at < x.min || at > x.max) continue;
      const px = x.getPixelForValue(at);
      ctx.beginPath();
      ctx.moveTo(px, chartArea.top);
      ctx.lineTo(px, chartArea.bottom);
      ctx.stroke();
    }
    ctx.restore();
  },
};
Chart.register(eventMarkers);

declare module 'chart.js' {
  // TType stays unused: every declaration of chart.js's PluginOptionsByType must name the same type parameters
  // eslint-disable-next-line @typescript-eslint/no-unused-vars
  interface PluginOptionsByType<TType extends import('chart.js').ChartType> {
    eventMarkers?: Partial<EventMarkerOptions>;
  }
}
