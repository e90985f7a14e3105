/**
 * Small self-contained SVG line plots for the soak report: linear or log10 axes with 1-2-5
 * (linear) or decade (log) ticks, shaded intervals, dashed guide lines and a legend. Output is
 * a string of SVG markup with no scripts and no external references.
 */

export interface PlotSeries {
  name: string;
  color: string;
  x: ArrayLike<number>;
  y: ArrayLike<number>;
  dash?: string;
  width?: number;
  /** Break the line where consecutive y values jump by more than this (wrapped angles). */
  breakAbove?: number;
  /** Draw a marker at every point (for sparse curves such as deviations versus tau). */
  markers?: boolean;
  /** Error bars: the lower and upper end of each point's interval (null or non-finite: no bar). */
  low?: ArrayLike<number | null>;
  high?: ArrayLike<number | null>;
  /** Points drawn as open markers (values marked unreliable), the same length as y. */
  open?: ArrayLike<boolean>;
}

export interface PlotBand {
  from: number;
  to: number;
  label: string;
  color: string;
}

export interface PlotGuide {
  /** Two or more points in data coordinates. */
  points: [number, number][];
  label: string;
}

export interface PlotOptions {
  title: string;
  xLabel: string;
  yLabel: string;
  series: PlotSeries[];
  xLog?: boolean;
  yLog?: boolean;
  bands?: PlotBand[];
  guides?: PlotGuide[];
  /** Fixed y range; otherwise fitted to the data (and guides are clipped to it). */
  yRange?: [number, number];
  /** Tick values with labels to use instead of the automatic ones (e.g. multiples of pi). */
  yTicks?: { value: number; label: string }[];
  width?: number;
  height?: number;
  caption?: string;
}

export const PALETTE = ['#1f5fa8', '#d1661b', '#2b8a3e', '#c0392b', '#7048a8', '#8c5a3c', '#c2418f', '#5f6b73'];

/** Rows of interval labels at the top of a plot. */
const LABEL_ROWS = 4;
const MARGIN = { left: 78, right: 18, top: 34, bottom: 50 };

export function linePlot(o: PlotOptions): string {
  const width = o.width ?? 760;
  const height = o.height ?? 340;
  const legendRows = Math.ceil(o.series.length / 2);
  const legendHeight = legendRows * 18 + 8;
  const plotW = width - MARGIN.left - MARGIN.right;
  const plotH = height - MARGIN.top - MARGIN.bottom;
  const totalH = height + legendHeight;

  const fx = axisTransform(o.xLog ?? false);
  const fy = axisTransform(o.yLog ?? false);
  const xs: number[] = [];
  const ys: number[] = [];
  for (const s of o.series) {
    for (let i = 0; i < s.x.length; i++) {
      if (usable(s.x[i], o.xLog) && usable(s.y[i], o.yLog)) {
        xs.push(s.x[i]);
        ys.push(s.y[i]);
        // error bars stay inside the fitted range
        for (const end of [s.low?.[i], s.high?.[i]]) if (typeof end === 'number' && usable(end, o.yLog)) ys.push(end);
      }
    }
  }
  if (xs.length === 0) return emptyPlot(o.title, width, height, 'no data to plot');
  const xDomain = padDomain(extent(xs.map(fx.to)), o.xLog ? 0 : 0);
  const yDomain = o.yRange
    ? ([fy.to(o.yRange[0]), fy.to(o.yRange[1])] as [number, number])
    : padDomain(extent(ys.map(fy.to)), o.yLog ? 0.05 : 0.06);
  const px = (v: number) => MARGIN.left + ((fx.to(v) - xDomain[0]) / (xDomain[1] - xDomain[0] || 1)) * plotW;
  const py = (v: number) => MARGIN.top + plotH - ((fy.to(v) - yDomain[0]) / (yDomain[1] - yDomain[0] || 1)) * plotH;

  const parts: string[] = [];
  parts.push(
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${width} ${totalH}" width="${width}" height="${totalH}" role="img" aria-label="${esc(o.title)}" font-family="system-ui, -apple-system, 'Segoe UI', sans-serif" font-size="12">`,
  );
  parts.push(`<rect x="0" y="0" width="${width}" height="${totalH}" fill="#ffffff"/>`);
  parts.push(`<text x="${MARGIN.left}" y="20" font-size="14" font-weight="600" fill="#1b1f23">${esc(o.title)}</text>`);
  const clipId = `clip${Math.abs(hash(o.title))}`;
  parts.push(
    `<defs><clipPath id="${clipId}"><rect x="${MARGIN.left}" y="${MARGIN.top}" width="${plotW}" height="${plotH}"/></clipPath></defs>`,
  );

  // shaded intervals under everything; labels step down a row when they would run into the
  // previous one, and are left out when all rows are taken there (the band stays; a note counts them)
  const rowEnds: number[] = [];
  let unlabelled = 0;
  for (const band of o.bands ?? []) {
    const x0 = Math.max(MARGIN.left, px(band.from));
    const x1 = Math.min(MARGIN.left + plotW, px(band.to));
    if (!(x1 > x0 - 0.5)) continue;
    parts.push(
      `<rect x="${f(x0)}" y="${MARGIN.top}" width="${f(Math.max(1.5, x1 - x0))}" height="${plotH}" fill="${band.color}" fill-opacity="0.16"/>`,
    );
    let row = rowEnds.findIndex((end) => x0 + 2 >= end + 4);
    if (row < 0 && rowEnds.length < LABEL_ROWS) row = rowEnds.length;
    if (row < 0) {
      unlabelled++;
      continue;
    }
    rowEnds[row] = x0 + 2 + band.label.length * 5.6;
    parts.push(`<text x="${f(x0 + 2)}" y="${MARGIN.top + 11 + row * 11}" font-size="10" fill="#5a3a00">${esc(band.label)}</text>`);
  }
  if (unlabelled > 0) {
    parts.push(
      `<text x="${MARGIN.left}" y="${MARGIN.top + plotH + 48}" font-size="10" fill="#5a3a00">` +
        `${unlabelled} more shaded intervals without a label (too close together; see the verdict table)</text>`,
    );
  }

  // grid and ticks
  const xTicks = o.xLog ? logTicks(xDomain) : linearTicks(xDomain).map((v) => ({ value: v, label: formatNumber(v), major: true }));
  const yTicks = o.yTicks
    ? o.yTicks.map((t) => ({ value: fy.to(t.value), label: t.label, major: true }))
    : o.yLog
      ? logTicks(yDomain)
      : linearTicks(yDomain).map((v) => ({ value: v, label: formatNumber(v), major: true }));
  for (const t of xTicks) {
    const x = MARGIN.left + ((t.value - xDomain[0]) / (xDomain[1] - xDomain[0] || 1)) * plotW;
    if (x < MARGIN.left - 0.5 || x > MARGIN.left + plotW + 0.5) continue;
    parts.push(
      `<line x1="${f(x)}" x2="${f(x)}" y1="${MARGIN.top}" y2="${MARGIN.top + plotH}" stroke="${t.major ? '#d8dde3' : '#eef1f4'}"/>`,
    );
    if (t.label) parts.push(`<text x="${f(x)}" y="${MARGIN.top + plotH + 16}" text-anchor="middle" fill="#3c4650">${t.label}</text>`);
  }
  for (const t of yTicks) {
    const y = MARGIN.top + plotH - ((t.value - yDomain[0]) / (yDomain[1] - yDomain[0] || 1)) * plotH;
    if (y < MARGIN.top - 0.5 || y > MARGIN.top + plotH + 0.5) continue;
    parts.push(
      `<line x1="${MARGIN.left}" x2="${MARGIN.left + plotW}" y1="${f(y)}" y2="${f(y)}" stroke="${t.major ? '#d8dde3' : '#eef1f4'}"/>`,
    );
    if (t.label) parts.push(`<text x="${MARGIN.left - 6}" y="${f(y + 4)}" text-anchor="end" fill="#3c4650">${t.label}</text>`);
  }
  parts.push(`<rect x="${MARGIN.left}" y="${MARGIN.top}" width="${plotW}" height="${plotH}" fill="none" stroke="#8a949e"/>`);
  parts.push(
    `<text x="${MARGIN.left + plotW / 2}" y="${MARGIN.top + plotH + 36}" text-anchor="middle" fill="#1b1f23">${esc(o.xLabel)}</text>`,
  );
  parts.push(
    `<text transform="translate(16 ${MARGIN.top + plotH / 2}) rotate(-90)" text-anchor="middle" fill="#1b1f23">${esc(o.yLabel)}</text>`,
  );

  // guide lines (reference slopes), clipped to the plot
  parts.push(`<g clip-path="url(#${clipId})">`);
  for (const g of o.guides ?? []) {
    const d = g.points.map(([x, y], i) => `${i === 0 ? 'M' : 'L'}${f(px(x))},${f(py(y))}`).join('');
    parts.push(`<path d="${d}" fill="none" stroke="#8a949e" stroke-width="1" stroke-dasharray="5 4"/>`);
  }
  for (const s of o.series) parts.push(seriesPath(s, px, py, o));
  parts.push('</g>');
  for (const g of o.guides ?? []) {
    const label = guideLabelPosition(g, px, py, MARGIN.left, MARGIN.top, plotW, plotH);
    if (label)
      parts.push(`<text x="${f(label[0])}" y="${f(label[1])}" font-size="11" fill="#5f6b73" text-anchor="end">${esc(g.label)}</text>`);
  }

  // legend below the plot, two columns
  o.series.forEach((s, i) => {
    const col = i % 2;
    const row = Math.floor(i / 2);
    const x = MARGIN.left + col * (plotW / 2);
    const y = height + row * 18 + 4;
    parts.push(
      `<line x1="${x}" x2="${x + 22}" y1="${y}" y2="${y}" stroke="${s.color}" stroke-width="${(s.width ?? 1.6) + 0.6}"${s.dash ? ` stroke-dasharray="${s.dash}"` : ''}/>`,
    );
    parts.push(`<text x="${x + 28}" y="${y + 4}" fill="#1b1f23">${esc(s.name)}</text>`);
  });
  parts.push('</svg>');
  return parts.join('');
}

function seriesPath(s: PlotSeries, px: (v: number) => number, py: (v: number) => number, o: PlotOptions): string {
  let d = '';
  let pen = false;
  let previous = Number.NaN;
  const dots: string[] = [];
  for (let i = 0; i < s.x.length; i++) {
    const x = s.x[i];
    const y = s.y[i];
    if (!usable(x, o.xLog) || !usable(y, o.yLog)) {
      pen = false;
      continue;
    }
    if (s.breakAbove !== undefined && Math.abs(y - previous) > s.breakAbove) pen = false;
    d += `${pen ? 'L' : 'M'}${f(px(x))},${f(py(y))}`;
    pen = true;
    previous = y;
    if (s.low && s.high) dots.push(errorBar(px(x), s.low[i], s.high[i], py, s.color, o.yLog));
    if (s.markers) {
      const hollow = s.open?.[i] ?? false;
      dots.push(
        hollow
          ? `<circle cx="${f(px(x))}" cy="${f(py(y))}" r="3" fill="#ffffff" stroke="${s.color}" stroke-width="1.3"/>`
          : `<circle cx="${f(px(x))}" cy="${f(py(y))}" r="2.6" fill="${s.color}"/>`,
      );
    }
  }
  const dash = s.dash ? ` stroke-dasharray="${s.dash}"` : '';
  return `<path d="${d}" fill="none" stroke="${s.color}" stroke-width="${s.width ?? 1.6}" stroke-linejoin="round"${dash}/>${dots.join('')}`;
}

/** A vertical bar from low to high with short caps (an end that cannot be drawn, as 0 on a log axis, is left open). */
function errorBar(x: number, low: number | null, high: number | null, py: (v: number) => number, color: string, log?: boolean): string {
  if (low === null || high === null || !usable(high, log)) return '';
  const top = py(high);
  const bottom = usable(low, log) ? py(low) : null;
  const cap = (y: number) => `<line x1="${f(x - 3)}" x2="${f(x + 3)}" y1="${f(y)}" y2="${f(y)}" stroke="${color}" stroke-width="1"/>`;
  const end = bottom ?? top + 40;
  return (
    `<line class="error-bar" x1="${f(x)}" x2="${f(x)}" y1="${f(top)}" y2="${f(end)}" stroke="${color}" stroke-width="1" stroke-opacity="0.8"/>` +
    cap(top) +
    (bottom === null ? '' : cap(bottom))
  );
}

/** Put a guide's label near its last point inside the plot. */
function guideLabelPosition(
  g: PlotGuide,
  px: (v: number) => number,
  py: (v: number) => number,
  left: number,
  top: number,
  w: number,
  h: number,
): [number, number] | null {
  for (let i = g.points.length - 1; i >= 0; i--) {
    const x = px(g.points[i][0]);
    const y = py(g.points[i][1]);
    if (x >= left && x <= left + w && y >= top && y <= top + h) return [Math.min(x, left + w - 4), Math.max(top + 12, y - 4)];
  }
  // the far end may be clipped: walk along the line for the last visible point
  const [a, b] = [g.points[0], g.points[g.points.length - 1]];
  for (let t = 1; t >= 0; t -= 0.02) {
    const x = px(a[0]) + (px(b[0]) - px(a[0])) * t;
    const y = py(a[1]) + (py(b[1]) - py(a[1])) * t;
    if (x >= left && x <= left + w && y >= top && y <= top + h) return [Math.min(x, left + w - 4), Math.max(top + 12, y - 4)];
  }
  return null;
}

function emptyPlot(title: string, width: number, height: number, message: string): string {
  return `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${width} ${height / 2}" width="${width}" height="${height / 2}" font-family="system-ui, sans-serif" font-size="13"><rect width="100%" height="100%" fill="#fff" stroke="#ccc"/><text x="16" y="24" font-weight="600">${esc(title)}</text><text x="16" y="52" fill="#666">${esc(message)}</text></svg>`;
}

function axisTransform(log: boolean): { to: (v: number) => number } {
  return { to: log ? (v: number) => Math.log10(v) : (v: number) => v };
}

function usable(v: number, log?: boolean): boolean {
  return Number.isFinite(v) && (!log || v > 0);
}

function extent(values: number[]): [number, number] {
  let min = Infinity;
  let max = -Infinity;
  for (const v of values) {
    if (v < min) min = v;
    if (v > max) max = v;
  }
  return [min, max];
}

function padDomain([min, max]: [number, number], fraction: number): [number, number] {
  if (min === max) return [min - (Math.abs(min) || 1) * 0.5, max + (Math.abs(max) || 1) * 0.5];
  const pad = (max - min) * fraction;
  return [min - pad, max + pad];
}

/** 1-2-5 ticks across a linear domain (about six of them). */
export function linearTicks([min, max]: [number, number]): number[] {
  const raw = (max - min) / 6;
  const power = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * power).find((s) => s >= raw) ?? 10 * power;
  const ticks: number[] = [];
  for (let v = Math.ceil(min / step) * step; v <= max + step * 1e-9; v += step) ticks.push(Math.abs(v) < step * 1e-9 ? 0 : v);
  return ticks;
}

/** Decade ticks (labelled 10^k) with unlabelled 2..9 minor ticks, in log10 units. */
function logTicks([min, max]: [number, number]): { value: number; label: string; major: boolean }[] {
  const ticks: { value: number; label: string; major: boolean }[] = [];
  const span = max - min;
  const every = span > 12 ? 3 : span > 7 ? 2 : 1;
  for (let k = Math.floor(min); k <= Math.ceil(max); k++) {
    ticks.push({ value: k, label: k % every === 0 ? powerOfTen(k) : '', major: true });
    if (span < 6) for (let m = 2; m <= 9; m++) ticks.push({ value: k + Math.log10(m), label: '', major: false });
  }
  return ticks;
}

function powerOfTen(k: number): string {
  if (k === 0) return '1';
  if (k === 1) return '10';
  return `10<tspan dy="-5" font-size="9">${k}</tspan>`;
}

export function formatNumber(v: number): string {
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e5 || a < 1e-3) return v.toExponential(1).replace('e+', 'e');
  return Number(v.toPrecision(4)).toString();
}

function f(v: number): string {
  return (Math.round(v * 10) / 10).toString();
}

export function esc(text: string): string {
  return text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

function hash(text: string): number {
  let h = 0;
  for (let i = 0; i < text.length; i++) h = (Math.imul(h, 31) + text.charCodeAt(i)) | 0;
  return h;
}

/** At most `buckets` min/max pairs per series, so long records stay light but keep their envelope. */
export function decimateMinMax(x: ArrayLike<number>, y: ArrayLike<number>, buckets: number): { x: number[]; y: number[] } {
  const n = x.length;
  if (n <= 2 * buckets) return { x: Array.from(x), y: Array.from(y) };
  const outX: number[] = [];
  const outY: number[] = [];
  const size = n / buckets;
  for (let b = 0; b < buckets; b++) {
    const start = Math.floor(b * size);
    const end = Math.min(n, Math.floor((b + 1) * size));
    let lo = start;
    let hi = start;
    for (let i = start; i < end; i++) {
      if (y[i] < y[lo]) lo = i;
      if (y[i] > y[hi]) hi = i;
    }
    for (const i of lo <= hi ? [lo, hi] : [hi, lo]) {
      outX.push(x[i]);
      outY.push(y[i]);
    }
  }
  return { x: outX, y: outY };
}
