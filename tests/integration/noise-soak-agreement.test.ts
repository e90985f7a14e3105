import { execFile } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { noiseOfScenario } from '../../server/commands/noise.js';
import { parseScenario } from '../../src/scenario/parse.js';
import type { NoiseOutput } from '../../src/protocol/noise-output.js';
import type { DeviationInterval } from '../../src/stability/confidence.js';
import { chiSquaredInterval } from '../../src/stability/confidence.js';
import { predictedAt } from '../../server/report/noise-prediction.js';

/**
 * The frequency-domain analysis (`syncring noise`, linear analysis of the guiding system) against
 * the time-domain statistics of a real soak of the same scenario (the full equations, stepped with
 * their noise), at the soak's own taus, within the soak's chi-squared intervals (NIST SP 1065
 * edf). Four identical nodes in a two-way dissipative ring, locked in phase, white noise q: the
 * array output, one coupled node, one free-running part and the uncoupled ensemble average.
 */

const root = new URL('../../', import.meta.url).pathname;
const bin = join(root, 'bin/syncring.js');
const NODES = 4;
/** Comparisons are made at this confidence: the soak's one-sigma intervals would miss a third of the time by design. */
const LEVEL = 0.99;

const scenario = {
  name: 'Four in a ring, white noise',
  nodes: NODES,
  topology: 'ring-two-way',
  epsilon: 0.01,
  nominalFrequencyHz: 1e6,
  modes: [{ omega: 1, gain: 1, loss: 0 }],
  coupling: { strength: 0.05, reactive: 0, dissipative: 1 },
  detuning: [0, 0, 0, 0],
  noise: { intensity: 1e-6, seed: 5 },
  initial: { pattern: { q: 0, amplitude: 2 } },
  integrator: { stepsPerPeriod: 16 },
};

/** A campaign whose one fault changes nothing (a detuning set to the value it has), after the ring has locked. */
const campaign = {
  name: 'no real fault',
  timeUnit: 'slow',
  detector: { lockWindow: 5 },
  faults: [{ id: 'same-detuning', start: 100, action: 'set-detuning', params: { node: 0, delta: 0 }, duration: 1 }],
  stability: { uncoupledReference: true },
};

interface SoakSeries {
  name: string;
  sweep: { tau: number[]; series: Record<string, { deviation: number[] }> };
  intervals: Record<string, DeviationInterval[]>;
}

/** The predicted value at tau; the tables cover the soak's taus, so a miss is a defect of the test. */
function predictedValue(taus: readonly number[], values: readonly number[], tau: number): number {
  const value = predictedAt(taus, values, tau);
  if (value === null) throw new Error(`tau ${tau} is outside the predicted table`);
  return value;
}

describe('noise analysis against a soak of the same scenario', () => {
  let work: string;
  let series: SoakSeries[];
  let predicted: NoiseOutput;
  let out: string;

  beforeAll(async () => {
    work = mkdtempSync(join(tmpdir(), 'syncring-agreement-'));
    writeFileSync(join(work, 'ring.json'), JSON.stringify(scenario));
    writeFileSync(join(work, 'campaign.json'), JSON.stringify(campaign));
    out = join(work, 'soak');
    await new Promise<void>((resolve, reject) =>
      execFile(
        'node',
        [bin, 'soak', join(work, 'ring.json'), '--campaign', join(work, 'campaign.json'), '--until', '2e5', '--out', out],
        { cwd: root, timeout: 240_000 },
        (error) => (error ? reject(error) : resolve()),
      ),
    );
    series = (JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8')) as { stability: { series: SoakSeries[] } }).stability.series;
    predicted = noiseOfScenario(parseScenario(scenario, 'ring'), 'ring', {});
  }, 300_000);

  afterAll(() => {
    if (work) rmSync(work, { recursive: true, force: true });
  });

  test('ADEV and MDEV of the array, a node, a free part and the uncoupled ensemble fall inside the 99 % intervals', () => {
    expect(predicted.pattern.kind).toBe('in-phase');
    // which predicted curve each soak series is: the uncoupled ensemble averages N independent parts
    const curves: Record<string, (t: NoiseOutput['adev']) => number[]> = {
      ensemble: (t) => t.array,
      node: (t) => t.nodes[0],
      singlePart: (t) => t.uncoupled,
      uncoupledEnsemble: (t) => t.uncoupled.map((v) => v / Math.sqrt(NODES)),
    };
    expect(series.map((s) => s.name).sort()).toEqual(Object.keys(curves).sort());
    // below about 1 / averagedModelLimitHz the averaged model is beyond its range
    const shortest = 1 / predicted.averagedModelLimitHz;
    let compared = 0;
    const outside: string[] = [];
    const missedTaus = new Set<number>();
    const weighted: { logRatio: number; edf: number }[] = [];
    for (const s of series) {
      for (const [metric, table] of [
        ['oadev', predicted.adev],
        ['mdev', predicted.mdev],
      ] as const) {
        s.sweep.tau.forEach((tau, i) => {
          const interval = s.intervals[metric][i];
          if (tau < shortest || !interval.usedInFits || interval.edf === null) return;
          const measured = s.sweep.series[metric].deviation[i];
          const expected = predictedValue(table.tau, curves[s.name](table), tau);
          const { low, high } = chiSquaredInterval(measured, interval.edf, LEVEL);
          compared++;
          weighted.push({ logRatio: Math.log(measured / expected), edf: interval.edf });
          if (expected < low || expected > high)
            outside.push(`${s.name} ${metric} tau ${tau}: ${measured} vs ${expected} [${low}, ${high}]`);
        });
      }
    }
    expect(compared).toBeGreaterThanOrEqual(30);
    // The four series are driven by one noise realisation (the array's mean phase and the uncoupled
    // ensemble's are the same sum of the same noises, a node shares most of it), and ADEV and MDEV at
    // one tau use the same data: a chance excursion of the realisation shows in all of them at
    // once. The independent comparisons are the taus; at 99 % one of them may miss by chance.
    expect(missedTaus.size, outside.join('\n')).toBeLessThanOrEqual(1);
    // and no bias: measured / predicted averaged in logs, each value weighted by its edf (the
    // variance of the log of a deviation estimate is about 1 / (2 edf)). The taus are nested views
    // of one record, so the average knows no more than its best-determined value: three of that
    // value's standard errors bound it.
    const totalEdf = weighted.reduce((sum, w) => sum + w.edf, 0);
    const meanLog = weighted.reduce((sum, w) => sum + w.edf * w.logRatio, 0) / totalEdf;
    const bestEdf = Math.max(...weighted.map((w) => w.edf));
    expect(Math.abs(meanLog)).toBeLessThan(3 / Math.sqrt(2 * bestEdf));
  });

  test('the coupling gain the soak sees is the one predicted: a node is about 1 / sqrt(N) of a free part at long taus', () => {
    // locking bandwidth from the analysis; beyond a few of its time constants a node averages with its neighbours
    const bandwidth = predicted.lockingBandwidthHz!;
    expect(bandwidth).toBeGreaterThan(0);
    const node = series.find((s) => s.name === 'node')!;
    const part = series.find((s) => s.name === 'singlePart')!;
    const ratioAt = (tau: number) =>
      predictedValue(predicted.adev.tau, predicted.adev.nodes[0], tau) / predictedValue(predicted.adev.tau, predicted.adev.uncoupled, tau);
    // where the prediction has a node well on its way to 1 / sqrt(N) of a part (0.5 for four)
    const longTaus = node.sweep.tau.filter(
      (tau, i) => tau > 1 / (2 * Math.PI * bandwidth) && ratioAt(tau) < 0.65 && node.intervals.oadev[i].usedInFits,
    );
    expect(longTaus.length).toBeGreaterThan(0);
    for (const tau of longTaus) {
      const i = node.sweep.tau.indexOf(tau);
      const predictedRatio = ratioAt(tau);
      expect(predictedRatio).toBeGreaterThan(1 / Math.sqrt(NODES) - 0.01);
      const measuredRatio = node.sweep.series.oadev.deviation[i] / part.sweep.series.oadev.deviation[i];
      // both estimates carry their own scatter: within the two intervals' combined reach
      const spread = (iv: DeviationInterval, v: number) => chiSquaredInterval(v, iv.edf!, LEVEL).high / v;
      const reach =
        spread(node.intervals.oadev[i], node.sweep.series.oadev.deviation[i]) *
        spread(part.intervals.oadev[i], part.sweep.series.oadev.deviation[i]);
      expect(measuredRatio / predictedRatio).toBeLessThan(reach);
      expect(predictedRatio / measuredRatio).toBeLessThan(reach);
    }
  });

  test('the soak report draws the prediction beside the soak and counts the agreement', async () => {
    await new Promise<void>((resolve, reject) =>
      execFile('node', [bin, 'report', out], { cwd: root, timeout: 120_000 }, (error) => (error ? reject(error) : resolve())),
    );
    const html = readFileSync(join(out, 'report.html'), 'utf8');
    expect(html).toMatch(/<h2>Noise at every time scale<\/h2>/);
    expect(html).toMatch(/data-testid="noise-facts">Linear analysis of the guiding system at pattern \d+ \(in-phase/);
    expect(html).toContain('array output, predicted');
    expect(html).toContain('single free-running part, predicted');
    // nine decade rows, 1 ms .. 1e5 s, each with the array 10 log10 4 dB = a factor 2 below one part at long taus
    const rows = [
      ...html.matchAll(
        /<tr><td class="num">([^<]+)<\/td><td class="num">([^<]+)<\/td><td class="num">([^<]+)<\/td><td class="num">([^<]+)<\/td>/g,
      ),
    ].filter((m) => html.indexOf(m[0]) > html.indexOf('data-testid="noise-table"'));
    expect(rows.length).toBeGreaterThanOrEqual(9);
    const last = rows[8];
    expect(Number(last[4]) / Number(last[2])).toBeCloseTo(2, 1);
    const agreement = /Of the soak's (\d+) reliable ADEV values inside the analysis's range, (\d+) have the prediction/.exec(html);
    expect(agreement).not.toBeNull();
    expect(Number(agreement![1])).toBeGreaterThan(10);
    expect(html).toMatch(/data-testid="noise-caution"/);
  }, 180_000);
});
