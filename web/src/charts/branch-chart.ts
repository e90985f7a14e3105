import { html, nothing } from 'lit';
import type { Chart, ChartConfiguration, Plugin, ScriptableLineSegmentContext } from 'chart.js';
import type { BranchLimit } from '../../../src/predict/continuation.js';
import { branchSeries, branchX, isLossLimit, type BranchQuantity, type BranchXY, type Continuation } from '../data/prediction-data.js';
import { formatNumber, ppmOf } from '../data/engineering.js';
import { FAULT, HOLDS_BAND, HOLDS_LABEL, INK, LABEL_GROUND, SURFACE, nodeColour } from '../theme.js';
import { axis, leftAxis } from './streaming-chart.js';
import { ResultChart } from './result-chart.js';

interface MarkerLine {
  x: number;
  label: string;
  colour: string;
  dash: number[];
  row: number;
}

export interface BranchMarkerOptions {
  lines: MarkerLine[];
  /** Points to ring (the branch's ends at a fold or Hopf limit). */
  dots: { x: number; y: number; colour: string }[];
  /** A shaded x interval (where the pattern is predicted to hold). */
  band: { from: number; to: number; label: string } | null;
}

/**
 * Vertical lines with labels (the live value, the limits), rings on the points where the branch
 * ends at a limit, and the interval between the limits shaded: what a projector audience must
 * see first in a branch diagram.
 */
export const branchMarkers: Plugin<'line', BranchMarkerOptions> = {
  id: 'branchMarkers',
  defaults: { lines: [], dots: [], band: null },
  beforeDatasetsDraw(chart, _args, options) {
    const x = chart.scales.x;
    if (!x || !options.band) return;
    const { ctx, chartArea } = chart;
    const left = Math.max(chartArea.left, x.getPixelForValue(Math.min(options.band.from, options.band.to)));
    const right = Math.min(chartArea.right, x.getPixelForValue(Math.max(options.band.from, options.band.to)));
    if (!(right > left)) return;
    ctx.save();
    ctx.fillStyle = HOLDS_BAND;
    ctx.fillRect(left, chartArea.top, right - left, chartArea.bottom - chartArea.top);
    ctx.fillStyle = HOLDS_LABEL;
    ctx.font = '600 14px sans-serif';
    ctx.textAlign = 'center';
    ctx.textBaseline = 'bottom';
    ctx.fillText(options.band.label, (left + right) / 2, chartArea.bottom - 6);
    ctx.restore();
  },
  afterDatasetsDraw(chart, _args, options) {
    const x = chart.scales.x;
    const y = chart.scales.y;
    if (!x || !y) return;
    const { ctx, chartArea } = chart;
    ctx.save();
    for (const line of options.lines) {
      if (line.x < x.min || line.x > x.max) continue;
      const px = x.getPixelForValue(line.x);
      ctx.strokeStyle = line.colour;
      ctx.lineWidth = 2.5;
      ctx.setLineDash(line.dash);
      ctx.beginPath();
      ctx.moveTo(px, chartArea.top);
      ctx.lineTo(px, chartArea.bottom);
      ctx.stroke();
      ctx.setLineDash([]);
      ctx.font = '700 15px sans-serif';
      const width = ctx.measureText(line.label).width + 12;
      const boxX = Math.min(chartArea.right - width, Math.max(chartArea.left, px - width / 2));
      const boxY = chartArea.top + 4 + line.row * 26;
      ctx.fillStyle = LABEL_GROUND;
      ctx.fillRect(boxX, boxY, width, 22);
      ctx.strokeStyle = line.colour;
      ctx.lineWidth = 1.5;
      ctx.strokeRect(boxX, boxY, width, 22);
      ctx.fillStyle = line.colour;
      ctx.textBaseline = 'middle';
      ctx.textAlign = 'left';
      ctx.fillText(line.label, boxX + 6, boxY + 11);
    }
    for (const dot of options.dots) {
      if (dot.x < x.min || dot.x > x.max || dot.y < y.min || dot.y > y.max) continue;
      ctx.beginPath();
      ctx.arc(x.getPixelForValue(dot.x), y.getPixelForValue(dot.y), 6.5, 0, 2 * Math.PI);
      ctx.fillStyle = SURFACE;
      ctx.fill();
      ctx.lineWidth = 3;
      ctx.strokeStyle = dot.colour;
      ctx.stroke();
    }
    ctx.restore();
  },
};

declare module 'chart.js' {
  // TType stays unused: every declaration of chart.js's PluginOptionsByType must name the same type parameters
  // eslint-disable-next-line @typescript-eslint/no-unused-vars
  interface PluginOptionsByType<TType extends import('chart.js').ChartType> {
    branchMarkers?: Partial<BranchMarkerOptions>;
  }
}

/** Short names of the limits where a pattern is lost, for the labels on the chart. */
const LIMIT_NAMES: Record<string, string> = { fold: 'fold', hopf: 'Hopf', 'branch-point': 'branch point' };

/** Dashes by stability: stable solid, unstable dashed, marginal dotted. */
const DASH = { stable: undefined, unstable: [9, 6], marginal: [2, 4] } as const;

/**
 * The branch diagram of a what-if: the continued parameter on x (ppm for a detuning), the
 * carrying mode's neighbour phase differences or amplitudes on y, one curve per node in the
 * live charts' colours; stable stretches solid, unstable dashed, marginal dotted; the live value
 * a dark vertical line, fold / Hopf / branch-point limits red ones with their values.
 * The chart is owned by a ChartController; the data is put in imperatively after each update.
 */
export class BranchChart extends ResultChart {
  static override properties = {
    continuation: { attribute: false },
    quantity: { type: String },
    current: { attribute: false },
    inPpm: { type: Boolean },
    symbol: { type: String },
    epsilon: { type: Number },
  };

  declare continuation: Continuation | null;
  declare quantity: BranchQuantity;
  /** Live value of the parameter in model units (null when unknown). */
  declare current: number | null;
  declare inPpm: boolean;
  declare symbol: string;
  declare epsilon: number;

  constructor() {
    super();
    this.continuation = null;
    this.quantity = 'phase';
    this.current = null;
    this.inPpm = false;
    this.symbol = '';
    this.epsilon = 0;
  }

  override render() {
    const c = this.continuation;
    const n = c?.branch[0]?.phaseDifferences.length ?? 0;
    const nodeKey = (k: number) =>
      html`<span class="key" style="color:${nodeColour(k)}"
        ><span class="swatch"></span>${this.quantity === 'phase' ? `${k}→${(k + 1) % n}` : `node ${k}`}</span
      >`;
    return html`
      <div class="legend">
        ${
          c
            ? html`<span class="key"><span class="swatch"></span>stable</span>
                <span class="key"><span class="swatch dashed"></span>unstable</span>
                <span class="key"><span class="swatch dotted"></span>marginal</span>
                <span class="key" style="color:${INK}"><span class="swatch"></span>live value</span>
                <span class="key" style="color:${FAULT}"><span class="swatch dashed"></span>limit (pattern lost)</span>
                ${Array.from({ length: n }, (_, k) => nodeKey(k))}`
            : nothing
        }
      </div>
      <div class="frame">
        <canvas role="img" aria-label="branch diagram"></canvas>
        ${c ? nothing : html`<div class="empty">Run a what-if to draw the branch: how the pattern changes as one parameter moves, and where it is lost.</div>`}
      </div>
    `;
  }

  protected configure(): ChartConfiguration {
    return {
      type: 'line',
      data: { datasets: [] },
      options: {
        animation: false,
        parsing: false,
        // Not normalized: past a fold the parameter runs back, so x is not monotonic.
        normalized: false,
        responsive: true,
        maintainAspectRatio: false,
        events: [],
        elements: { point: { radius: 0, hitRadius: 0, hoverRadius: 0 }, line: { borderWidth: 3, tension: 0 } },
        plugins: { legend: { display: false }, tooltip: { enabled: false }, branchMarkers: {} },
        scales: {
          x: { type: 'linear', ...axis(''), ticks: { ...axis('').ticks, callback: (v) => formatNumber(Number(v), 3) } },
          y: { type: 'linear', ...leftAxis('') },
        },
      },
      plugins: [branchMarkers],
    } as ChartConfiguration;
  }

  protected fill(chart: Chart): void {
    const c = this.continuation;
    const canvas = chart.canvas;
    if (!c || c.branch.length === 0) {
      chart.data.datasets = [];
      chart.update('none');
      canvas.dataset.points = '0';
      canvas.dataset.limits = '0';
      return;
    }
    const inPpm = this.inPpm && c.branch[0].ppm !== null;
    const series = branchSeries(c, this.quantity, inPpm);
    const phase = this.quantity === 'phase';
    const scaled = series.map((s) => s.map((p) => (phase ? { ...p, y: p.y / Math.PI } : p)));
    chart.data.datasets = scaled.map((data, k) => ({
      label: phase ? `${k}→${(k + 1) % scaled.length}` : `node ${k}`,
      data,
      borderColor: nodeColour(k),
      borderWidth: 3,
      segment: { borderDash: (ctx: ScriptableLineSegmentContext) => dashOf(data, ctx) },
    })) as never;

    const { lines, dots, band, lossCount } = this.markers(c, scaled, inPpm);
    const xs = [...scaled.flatMap((s) => s.map((p) => p.x)), ...lines.map((l) => l.x)];
    const ys = scaled.flatMap((s) => s.map((p) => p.y));
    // A positive parameter over more than a decade (coupling from its fold to a few times the
    // live value) is read on a log axis, or the fold would be squeezed against the edge.
    const logX = !inPpm && xs.every((x) => x > 0) && Math.max(...xs) / Math.min(...xs) >= 20;
    const xr = logX ? { min: Math.min(...xs) / 1.15, max: Math.max(...xs) * 1.15 } : paddedRange(xs, 0.04);
    const yr = paddedRange(ys, 0.08, phase ? 0.15 : 0.05);
    if (!phase) yr.min = Math.max(0, yr.min);
    const scales = chart.options.scales!;
    Object.assign(scales.x!, {
      type: logX ? 'logarithmic' : 'linear',
      min: xr.min,
      max: xr.max,
      afterBuildTicks: logX
        ? (scale: { ticks: { value: number }[]; min: number; max: number }) => void (scale.ticks = oneTwoFiveTicks(scale.min, scale.max))
        : undefined,
    });
    (scales.x as { title: { text: string } }).title.text = inPpm ? `${c.name} — in ppm` : logX ? `${c.name} (log scale)` : c.name;
    Object.assign(scales.y!, {
      min: yr.min,
      max: yr.max,
      afterBuildTicks: phase
        ? (scale: { ticks: { value: number }[]; min: number; max: number }) => void (scale.ticks = halfTurnTicks(scale.min, scale.max))
        : undefined,
      ticks: { ...axis('').ticks, callback: (v: number | string) => (phase ? piLabel(Number(v)) : formatNumber(Number(v), 3)) },
    });
    (scales.y as { title: { text: string } }).title.text = phase ? 'phase difference' : `amplitude |a| (mode ${c.pattern.mode})`;
    const plugins = chart.options.plugins as { branchMarkers: BranchMarkerOptions };
    plugins.branchMarkers = { lines, dots, band };
    chart.update('none');
    // Exposed for tests and for anyone inspecting the page.
    canvas.dataset.points = String(scaled.reduce((sum, s) => sum + s.length, 0));
    canvas.dataset.limits = String(lossCount);
  }

  private markers(c: Continuation, series: BranchXY[][], inPpm: boolean) {
    const lines: MarkerLine[] = [];
    const dots: BranchMarkerOptions['dots'] = [];
    const value = (limit: BranchLimit) => branchX(limit, inPpm);
    const unit = inPpm ? ' ppm' : '';
    let lossCount = 0;
    const ends: [BranchLimit | null, 'first' | 'last'][] = [
      [c.limits.decreasing, 'first'],
      [c.limits.increasing, 'last'],
    ];
    for (const [limit, end] of ends) {
      if (!limit) continue;
      if (isLossLimit(limit)) {
        lossCount++;
        lines.push({
          x: value(limit),
          label: `${LIMIT_NAMES[limit.kind]} ${this.symbol} = ${formatNumber(value(limit), 4)}${unit}`,
          colour: FAULT,
          dash: [8, 5],
          row: 1,
        });
        for (const s of series) {
          const p = end === 'first' ? s[0] : s[s.length - 1];
          if (p) dots.push({ x: p.x, y: p.y, colour: FAULT });
        }
      }
    }
    if (this.current !== null && Number.isFinite(this.current)) {
      const now = inPpm ? (ppmOf(this.current, this.epsilon) ?? this.current) : this.current;
      lines.push({ x: now, label: `live ${this.symbol} = ${formatNumber(now, 4)}${unit}`, colour: INK, dash: [], row: 0 });
    }
    const start = c.branch[c.startIndex];
    let band: BranchMarkerOptions['band'] = null;
    if (start?.stable) {
      const first = series[0]?.[0]?.x;
      const last = series[0]?.[series[0].length - 1]?.x;
      const from = isLossLimit(c.limits.decreasing) ? value(c.limits.decreasing) : first;
      const to = isLossLimit(c.limits.increasing) ? value(c.limits.increasing) : last;
      if (from !== undefined && to !== undefined) band = { from, to, label: 'pattern predicted to hold' };
    }
    return { lines, dots, band, lossCount };
  }
}

function dashOf(data: BranchXY[], ctx: ScriptableLineSegmentContext): number[] | undefined {
  const a = data[ctx.p0DataIndex]?.stability;
  const b = data[ctx.p1DataIndex]?.stability;
  if (a === 'unstable' || b === 'unstable') return [...DASH.unstable];
  if (a === 'marginal' || b === 'marginal') return [...DASH.marginal];
  return undefined;
}

/** [min, max] of the values with a relative margin (at least `least` either side). */
function paddedRange(values: number[], fraction: number, least = 0): { min: number; max: number } {
  const finite = values.filter(Number.isFinite);
  if (finite.length === 0) return { min: 0, max: 1 };
  const lo = Math.min(...finite);
  const hi = Math.max(...finite);
  const pad = Math.max((hi - lo) * fraction, least, 1e-12);
  return { min: lo - pad, max: hi + pad };
}

/** Ticks at 1, 2 and 5 times the powers of ten inside [min, max] (a log axis). */
function oneTwoFiveTicks(min: number, max: number): { value: number }[] {
  const ticks: { value: number }[] = [];
  for (let decade = Math.floor(Math.log10(min)); decade <= Math.ceil(Math.log10(max)); decade++) {
    for (const m of [1, 2, 5]) {
      const value = m * 10 ** decade;
      if (value >= min && value <= max) ticks.push({ value: Number(value.toPrecision(1)) });
    }
  }
  return ticks;
}

/** Ticks at multiples of pi/2 (values in units of pi), or of pi/4 for a narrow range. */
function halfTurnTicks(min: number, max: number): { value: number }[] {
  const step = max - min > 1.5 ? 0.5 : max - min > 0.6 ? 0.25 : 0.125;
  const ticks: { value: number }[] = [];
  for (let v = Math.ceil(min / step) * step; v <= max + 1e-9; v += step) ticks.push({ value: Math.round(v / step) * step });
  return ticks;
}

/** A multiple of pi as text: "0", "π/2", "−3π/4", "2π". */
function piLabel(turns: number): string {
  if (Math.abs(turns) < 1e-9) return '0';
  const sign = turns < 0 ? '−' : '';
  const a = Math.abs(turns);
  for (const den of [1, 2, 4, 8]) {
    const num = Math.round(a * den);
    if (Math.abs(a * den - num) < 1e-6) return `${sign}${num === 1 ? '' : num}π${den === 1 ? '' : `/${den}`}`;
  }
  return `${sign}${a.toFixed(2)}π`;
}

customElements.define('sr-branch-chart', BranchChart);
