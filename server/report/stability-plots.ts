/**
 * The stability plots' pieces that the soak report and the `syncring stability` report share:
 * curves with their confidence intervals as error bars (unreliable values as open markers), the
 * mask as a curve, the reference slopes, and the table of values with edf, interval and noise
 * type (README, "Stability statistics").
 */
import type { MeasuredStability } from '../../src/campaign/index.js';
import { maskLimit, type StabilityMask } from '../../src/stability/index.js';
import { esc, type PlotGuide, type PlotSeries } from './svg-plot.js';

export type CurveMetric = 'oadev' | 'mdev' | 'tdev' | 'mtie';

/** One metric of an analysed series as a plot curve, with error bars where the metric has intervals. */
export function stabilityCurve(
  s: Pick<MeasuredStability, 'sweep' | 'intervals'>,
  metric: CurveMetric,
  name: string,
  color: string,
  scale = 1,
  dash?: string,
): PlotSeries {
  // summaries written before the intervals existed have none
  const intervals = metric === 'mtie' ? undefined : (s.intervals as MeasuredStability['intervals'] | undefined)?.[metric];
  const scaled = (v: number | null) => (v === null ? null : v * scale);
  return {
    name,
    color,
    x: s.sweep.tau,
    y: s.sweep.series[metric]!.deviation.map((v) => v * scale),
    markers: true,
    dash,
    ...(intervals
      ? { low: intervals.map((i) => scaled(i.low)), high: intervals.map((i) => scaled(i.high)), open: intervals.map((i) => !i.reliable) }
      : {}),
  };
}

/** The mask's points (and log-log straight lines between them, as it is interpolated), scaled like the curves. */
export function maskCurve(mask: StabilityMask, scale: number): PlotSeries {
  return {
    name: `mask: ${mask.name}`,
    color: '#7a1f1f',
    x: mask.points.map((p) => p[0]),
    y: mask.points.map((p) => p[1] * scale),
    dash: '8 3 2 3',
    width: 2,
  };
}

/** Dashed reference slopes of the power-law noise types through (tau0, y0). */
export function slopeGuides(tau0: number, tauMax: number, y0: number): PlotGuide[] {
  return [
    // ADEV falls as 1/tau for white and for flicker PM alike (MDEV tells them apart)
    [-1, 'slope -1: white or flicker PM'],
    [-0.5, 'slope -1/2: white FM'],
    [0, 'slope 0: flicker FM'],
    [0.5, 'slope +1/2: random-walk FM'],
  ].map(([slope, label]) => ({
    points: [
      [tau0 / 1.5, y0 * (1 / 1.5) ** (slope as number)],
      [tauMax, y0 * (tauMax / tau0) ** (slope as number)],
    ] as [number, number][],
    label: label as string,
  }));
}

/** The caption sentence for error bars, open markers and the thresholds behind them. */
export function intervalCaption(confidence: number): string {
  return (
    `Error bars: ${(confidence * 100).toFixed(1)} % chi-squared confidence intervals from each value's equivalent degrees of freedom ` +
    '(NIST SP 1065 formulas for the noise type identified at that tau by the lag-1 autocorrelation, or assumed where too few points remain). ' +
    'Open markers rest on fewer than 4 independent terms: unreliable, left out of slopes and headline ratios.'
  );
}

/** Rows of one series: tau, m, and for OADEV, MDEV, TDEV the value, interval, edf; the noise type; MTIE; the mask limit. */
export function intervalTable(
  s: Pick<MeasuredStability, 'sweep' | 'intervals' | 'noise'>,
  formatSeconds: (v: number) => string,
  mask?: StabilityMask,
): string {
  const num = (text: string): string => `<td class="num">${text}</td>`;
  const sci = (v: number | null | undefined): string => (v === null || v === undefined || !Number.isFinite(v) ? '-' : v.toExponential(3));
  const metrics = (['oadev', 'mdev', 'tdev'] as const).filter((m) => s.sweep.series[m] && s.intervals?.[m]);
  if (metrics.length === 0 || !s.noise) return '<p>This record has no intervals (written before syncring computed them).</p>';
  const head = [
    '<th class="num">tau</th><th class="num">m</th>',
    ...metrics.map(
      (m) => `<th class="num">${m.toUpperCase()}${m === 'tdev' ? ' (s)' : ''}</th><th class="num">interval</th><th class="num">edf</th>`,
    ),
    '<th>noise type</th>',
    s.sweep.series.mtie ? '<th class="num">MTIE (s)</th>' : '',
    mask ? `<th class="num">mask limit (${mask.metric.toUpperCase()}, s)</th>` : '',
  ].join('');
  const rows = s.sweep.tau
    .map((tau, i) => {
      const cells = metrics.map((m) => {
        const iv = s.intervals[m]![i];
        const mark = iv.reliable ? '' : ' <span class="small" title="fewer than 4 independent terms">(unreliable)</span>';
        return (
          num(`${sci(s.sweep.series[m]!.deviation[i])}${mark}`) +
          num(iv.low === null ? '-' : `${sci(iv.low)} .. ${sci(iv.high)}`) +
          num(iv.edf === null ? '-' : iv.edf.toPrecision(3))
        );
      });
      const noise = s.noise[i];
      const limit = mask ? maskLimit(mask, tau) : null;
      return (
        `<tr>${num(formatSeconds(tau))}${num(String(s.sweep.m[i]))}${cells.join('')}` +
        `<td>${esc(noise.type)} <span class="small">(${noise.basis})</span></td>` +
        `${s.sweep.series.mtie ? num(sci(s.sweep.series.mtie.deviation[i])) : ''}${mask ? num(limit === null ? '-' : sci(limit)) : ''}</tr>`
      );
    })
    .join('');
  return `<div class="wide-table"><table data-testid="interval-table"><thead><tr>${head}</tr></thead><tbody>${rows}</tbody></table></div>`;
}
