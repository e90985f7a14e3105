import { describe, expect, test } from 'vitest';
import { linePlot, type PlotBand } from '../../server/report/svg-plot.js';

const series = [{ name: 'phase', color: '#1f5fa8', x: [0, 100], y: [0, 1] }];
const band = (from: number, label: string): PlotBand => ({ from, to: from + 0.5, label, color: '#f0b000' });

describe('report plots: fault intervals', () => {
  test('a few well spaced faults are all shaded and labelled', () => {
    const svg = linePlot({
      title: 't',
      xLabel: 'x',
      yLabel: 'y',
      series,
      bands: [band(10, 'open-link'), band(50, 'kick'), band(90, 'drift')],
    });
    expect(svg.match(/<rect [^>]*fill-opacity="0.16"/g)).toHaveLength(3);
    for (const label of ['open-link', 'kick', 'drift']) expect(svg).toContain(`>${label}</text>`);
    expect(svg).not.toContain('without a label');
  });

  test('many crowded faults: every one is shaded, labels never overlap, and the rest are counted', () => {
    const bands = Array.from({ length: 130 }, (_, i) => band(i * 0.7, `random-${i}`));
    const svg = linePlot({ title: 't', xLabel: 'x', yLabel: 'y', series, bands });
    expect(svg.match(/<rect [^>]*fill-opacity="0.16"/g)).toHaveLength(130);
    const labels = [...svg.matchAll(/<text x="([\d.]+)" y="([\d.]+)" font-size="10" fill="#5a3a00">(random-\d+)<\/text>/g)].map((m) => ({
      x: Number(m[1]),
      y: Number(m[2]),
      text: m[3],
    }));
    expect(labels.length).toBeGreaterThan(0);
    expect(labels.length).toBeLessThan(130);
    // same row: each label starts after the previous one ends (5.6 px per character, the plot's estimate)
    const rows = new Map<number, { x: number; text: string }[]>();
    for (const l of labels) rows.set(l.y, [...(rows.get(l.y) ?? []), l]);
    expect(rows.size).toBeLessThanOrEqual(4);
    for (const row of rows.values())
      for (let i = 1; i < row.length; i++) expect(row[i].x).toBeGreaterThanOrEqual(row[i - 1].x + row[i - 1].text.length * 5.6);
    expect(svg).toContain(`${130 - labels.length} more shaded intervals without a label`);
  });
});
