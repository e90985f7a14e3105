import { html, nothing } from 'lit';
import type { Chart, ChartConfiguration, Plugin } from 'chart.js';
import { CAUTION, LABEL_GROUND, translucent } from '../theme.js';
import { streamingOptions } from './chart-controller.js';
import { axis, leftAxis } from './streaming-chart.js';
import { ResultChart } from './result-chart.js';

/** One curve of a noise chart: values on the chart's x grid. */
export interface NoiseCurve {
  label: string;
  values: readonly number[];
  colour: string;
  width: number;
  dashed?: boolean;
}

/** A labelled vertical line (the locking bandwidth). */
export interface NoiseMark {
  x: number;
  label: string;
  colour: string;
}

interface NoiseMarkerOptions {
  marks: NoiseMark[];
  /** The x interval where the averaged model is beyond its range (an end may be infinite): shaded and labelled. */
  beyond: { from: number; to: number; label: string } | null;
}

/** Where the averaged model stops being trustworthy: a light caution-coloured wash. */
const BEYOND_WASH = translucent(CAUTION, 0.09);

const noiseMarkers: Plugin<'line', NoiseMarkerOptions> = {
  id: 'noiseMarkers',
  defaults: { marks: [], beyond: null },
  beforeDatasetsDraw(chart, _args, options) {
    const x = chart.scales.x;
    const beyond = options.beyond;
    if (!x || !beyond || beyond.from >= x.max || beyond.to <= x.min) return;
    const { ctx, chartArea } = chart;
    const left = beyond.from <= x.min ? chartArea.left : x.getPixelForValue(beyond.from);
    const right = beyond.to >= x.max ? chartArea.right : x.getPixelForValue(beyond.to);
    ctx.save();
    ctx.fillStyle = BEYOND_WASH;
    ctx.fillRect(left, chartArea.top, right - left, chartArea.bottom - chartArea.top);
    ctx.fillStyle = CAUTION;
    ctx.font = '600 13px sans-serif';
    const atRight = right >= chartArea.right;
    ctx.textAlign = atRight ? 'right' : 'left';
    ctx.textBaseline = 'top';
    ctx.fillText(beyond.label, atRight ? right - 6 : left + 6, chartArea.top + 6);
    ctx.restore();
  },
  afterDatasetsDraw(chart, _args, options) {
    const x = chart.scales.x;
    if (!x) return;
    const { ctx, chartArea } = chart;
    ctx.save();
    for (const mark of options.marks) {
      if (!(mark.x > x.min && mark.x < x.max)) continue;
      const px = x.getPixelForValue(mark.x);
      ctx.strokeStyle = mark.colour;
      ctx.lineWidth = 2;
      ctx.setLineDash([7, 5]);
      ctx.beginPath();
      ctx.moveTo(px, chartArea.top);
      ctx.lineTo(px, chartArea.bottom);
      ctx.stroke();
      ctx.setLineDash([]);
      ctx.font = '700 14px sans-serif';
      const width = ctx.measureText(mark.label).width + 10;
      const boxX = Math.min(chartArea.right - width, Math.max(chartArea.left, px + 6));
      const boxY = chartArea.bottom - 28;
      ctx.fillStyle = LABEL_GROUND;
      ctx.fillRect(boxX, boxY, width, 22);
      ctx.fillStyle = mark.colour;
      ctx.textBaseline = 'middle';
      ctx.textAlign = 'left';
      ctx.fillText(mark.label, boxX + 5, boxY + 11);
    }
    ctx.restore();
  },
};

declare module 'chart.js' {
  // TType stays unused: every declaration of chart.js's PluginOptionsByType must name the same type parameters
  // eslint-disable-next-line @typescript-eslint/no-unused-vars
  interface PluginOptionsByType<TType extends import('chart.js').ChartType> {
    noiseMarkers?: Partial<NoiseMarkerOptions>;
  }
}

/**
 * A static chart of a noise analysis: a logarithmic x (offset frequency or averaging time), a
 * linear (dBc/Hz) or logarithmic (deviation) y, curves with a legend above, a labelled vertical
 * line for the locking bandwidth and a wash over the range where the averaged model is beyond
 * its validity. Decade ticks with their units, written by `xTick` and `yTick`.
 */
export class NoiseChart extends ResultChart {
  static override properties = {
    x: { attribute: false },
    curves: { attribute: false },
    marks: { attribute: false },
    beyond: { attribute: false },
    logY: { type: Boolean },
    xTitle: { type: String },
    yTitle: { type: String },
    xTick: { attribute: false },
    yTick: { attribute: false },
    label: { type: String },
  };

  declare x: readonly number[];
  declare curves: NoiseCurve[];
  declare marks: NoiseMark[];
  declare beyond: NoiseMarkerOptions['beyond'];
  declare logY: boolean;
  declare xTitle: string;
  declare yTitle: string;
  declare xTick: (value: number) => string;
  declare yTick: (value: number) => string;
  declare label: string;

  constructor() {
    super();
    this.x = [];
    this.curves = [];
    this.marks = [];
    this.beyond = null;
    this.logY = false;
    this.xTitle = '';
    this.yTitle = '';
    this.xTick = String;
    this.yTick = String;
    this.label = 'noise chart';
  }

  override render() {
    return html`
      <div class="legend">
        ${this.curves.map(
          (c) =>
            html`<span class="key" style="color:${c.colour}"><span class="swatch ${c.dashed ? 'dashed' : ''}"></span>${c.label}</span>`,
        )}
      </div>
      <div class="frame">
        <canvas role="img" aria-label=${this.label}></canvas>
        ${this.x.length === 0 ? html`<div class="empty">No analysis yet.</div>` : nothing}
      </div>
    `;
  }

  protected configure(): ChartConfiguration {
    const base = streamingOptions();
    return {
      type: 'line',
      data: { datasets: [] },
      options: {
        ...base,
        plugins: { ...base.plugins, noiseMarkers: {} },
        scales: { x: { type: 'logarithmic', ...axis('') }, y: { type: 'linear', ...leftAxis('') } },
      },
      plugins: [noiseMarkers],
    } as ChartConfiguration;
  }

  protected fill(chart: Chart): void {
    const xs = this.x;
    chart.data.datasets = this.curves.map((c) => ({
      label: c.label,
      data: xs.map((x, i) => ({ x, y: c.values[i] })).filter((p) => Number.isFinite(p.y) && (!this.logY || p.y > 0)),
      borderColor: c.colour,
      borderWidth: c.width,
      borderDash: c.dashed ? [8, 5] : undefined,
    })) as never;
    const scales = chart.options.scales!;
    const ys = this.curves.flatMap((c) => c.values.filter((v) => Number.isFinite(v) && (!this.logY || v > 0)));
    if (xs.length > 0) {
      Object.assign(scales.x!, {
        min: xs[0],
        max: xs[xs.length - 1],
        afterBuildTicks: (scale: { ticks: { value: number }[]; min: number; max: number }) =>
          void (scale.ticks = decadeTicks(scale.min, scale.max)),
        ticks: { ...axis('').ticks, callback: (v: number | string) => this.xTick(Number(v)) },
      });
    }
    if (ys.length > 0) {
      const lo = Math.min(...ys);
      const hi = Math.max(...ys);
      Object.assign(
        scales.y!,
        this.logY
          ? {
              type: 'logarithmic',
              min: 10 ** Math.floor(Math.log10(lo)),
              max: 10 ** Math.ceil(Math.log10(hi)),
              afterBuildTicks: (scale: { ticks: { value: number }[]; min: number; max: number }) =>
                void (scale.ticks = decadeTicks(scale.min, scale.max)),
              ticks: { ...axis('').ticks, callback: (v: number | string) => this.yTick(Number(v)) },
            }
          : {
              type: 'linear',
              min: Math.floor(lo / 20) * 20,
              max: Math.ceil(hi / 20) * 20,
              afterBuildTicks: undefined,
              ticks: { ...axis('').ticks, stepSize: 20, callback: (v: number | string) => this.yTick(Number(v)) },
            },
      );
    }
    (scales.x as { title: { text: string } }).title.text = this.xTitle;
    (scales.y as { title: { text: string } }).title.text = this.yTitle;
    (chart.options.plugins as { noiseMarkers: NoiseMarkerOptions }).noiseMarkers = { marks: this.marks, beyond: this.beyond };
    chart.update('none');
    // Exposed for tests and for anyone inspecting the page.
    chart.canvas.dataset.curves = String(this.curves.length);
    chart.canvas.dataset.points = String(xs.length);
  }
}

/** Ticks at the powers of ten inside [min, max]. */
function decadeTicks(min: number, max: number): { value: number }[] {
  const ticks: { value: number }[] = [];
  for (let decade = Math.ceil(Math.log10(min) - 1e-9); decade <= Math.floor(Math.log10(max) + 1e-9); decade++) {
    ticks.push({ value: Number((10 ** decade).toPrecision(1)) });
  }
  return ticks;
}

customElements.define('sr-noise-chart', NoiseChart);
