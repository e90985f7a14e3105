/**
 * What a study's sample records add up to (README, 'Yield studies'): per sweep point the yield
 * with its Wilson interval, the share of boards that settled in each pattern (the start-up
 * probabilities), the distributions of margin, lock time and output frequency over the boards
 * that locked, the sensitivity view, and the full system's agreement; across the points the yield
 * against the swept parameter and the smallest value that reaches the target. Pure: records in,
 * summary out, so the coordinator, a resumed run and the dashboard all count alike.
 */
import type {
  Distribution1D,
  PatternShare,
  SensitivityRow,
  YieldEstimate,
  YieldPointSummary,
  YieldSampleRecord,
  YieldSweepSummary,
} from '../protocol/yield-files.js';
import { wilsonInterval } from './interval.js';
import type { Study } from './study.js';

/** Bins of the histograms: enough to show a shape at a few hundred samples, few enough to read. */
export const HISTOGRAM_BINS = 20;
/** Failing samples listed per point (the rest are in samples.ndjson). */
export const FAILING_LISTED = 50;
/** The sensitivity view splits each drawn component into quartiles: four bins keep each bin's yield readable at a few hundred samples. */
const SENSITIVITY_BINS = 4;
/** Label of the boards that did not lock, in the pattern shares. */
export const UNLOCKED_LABEL = 'unlocked';

function quantile(sorted: readonly number[], p: number): number {
  const position = p * (sorted.length - 1);
  const low = Math.floor(position);
  const high = Math.ceil(position);
  return sorted[low] + (sorted[high] - sorted[low]) * (position - low);
}

export function distributionOf(values: readonly number[]): Distribution1D {
  const finite = values.filter((v) => Number.isFinite(v)).sort((a, b) => a - b);
  if (finite.length === 0) {
    return { count: 0, min: null, max: null, mean: null, p05: null, p50: null, p95: null, histogram: { edges: [], counts: [] } };
  }
  const min = finite[0];
  const max = finite[finite.length - 1];
  const width = max > min ? (max - min) / HISTOGRAM_BINS : 1;
  const bins = max > min ? HISTOGRAM_BINS : 1;
  const edges = Array.from({ length: bins + 1 }, (_, i) => (i === bins ? max : min + i * width));
  const counts = new Array<number>(bins).fill(0);
  for (const v of finite) counts[Math.min(bins - 1, Math.floor((v - min) / width))]++;
  return {
    count: finite.length,
    min,
    max,
    mean: finite.reduce((s, v) => s + v, 0) / finite.length,
    p05: quantile(finite, 0.05),
    p50: quantile(finite, 0.5),
    p95: quantile(finite, 0.95),
    histogram: { edges, counts },
  };
}

function estimate(passed: number, samples: number, confidence: number): YieldEstimate {
  return { ...wilsonInterval(passed, samples, confidence), passed, samples };
}

function patternShares(records: readonly YieldSampleRecord[], confidence: number): PatternShare[] {
  const counts = new Map<string, number>();
  for (const r of records) {
    const label = r.guide.pattern && r.guide.locked ? r.guide.pattern.label : UNLOCKED_LABEL;
    counts.set(label, (counts.get(label) ?? 0) + 1);
  }
  return [...counts.entries()]
    .sort((a, b) => b[1] - a[1] || a[0].localeCompare(b[0]))
    .map(([label, count]) => ({ label, count, ...wilsonInterval(count, records.length, confidence) }));
}

/** Per drawn component: the yield in each quartile of its values, and how far apart the quartiles are. */
export function sensitivityOf(records: readonly YieldSampleRecord[]): SensitivityRow[] {
  if (records.length === 0) return [];
  const components = Object.keys(records[0].parameters);
  const rows = components.map((component): SensitivityRow => {
    const pairs = records.map((r) => ({ value: r.parameters[component], pass: r.pass })).sort((a, b) => a.value - b.value);
    const quartileEdges: number[] = [];
    const quartileYield: number[] = [];
    for (let b = 0; b < SENSITIVITY_BINS; b++) {
      const slice = pairs.slice(Math.floor((b * pairs.length) / SENSITIVITY_BINS), Math.floor(((b + 1) * pairs.length) / SENSITIVITY_BINS));
      if (slice.length === 0) continue;
      quartileEdges.push(slice[slice.length - 1].value);
      quartileYield.push(slice.filter((p) => p.pass).length / slice.length);
    }
    const mean = (xs: number[]): number | null => (xs.length ? xs.reduce((s, v) => s + v, 0) / xs.length : null);
    return {
      component,
      quartileEdges,
      quartileYield,
      swing: Math.max(...quartileYield) - Math.min(...quartileYield),
      failingMean: mean(pairs.filter((p) => !p.pass).map((p) => p.value)),
      passingMean: mean(pairs.filter((p) => p.pass).map((p) => p.value)),
    };
  });
  return rows.sort((a, b) => b.swing - a.swing || a.component.localeCompare(b.component));
}

export function pointSummary(study: Study, point: number, records: readonly YieldSampleRecord[]): YieldPointSummary {
  const locked = records.filter((r) => r.guide.locked);
  const confirmed = records.filter((r) => r.full !== undefined);
  const agree = confirmed.filter((r) => r.full!.agrees).length;
  return {
    point,
    sweepValue: study.sweep ? study.sweep.values[point] : null,
    yield: estimate(records.filter((r) => r.pass).length, records.length, study.confidence),
    patterns: patternShares(records, study.confidence),
    margin: distributionOf(locked.map((r) => r.guide.margin ?? Number.NaN)),
    lockTime: distributionOf(locked.map((r) => r.guide.lockTime ?? Number.NaN)),
    outputOffsetPpm: distributionOf(locked.map((r) => r.guide.outputOffsetPpm ?? Number.NaN)),
    sensitivity: sensitivityOf(records),
    fullSystem: {
      samples: confirmed.length,
      agree,
      agreement: confirmed.length > 0 ? wilsonInterval(agree, confirmed.length, study.confidence) : null,
      disagreeing: confirmed.filter((r) => !r.full!.agrees).map((r) => r.index),
    },
    failing: records
      .filter((r) => !r.pass)
      .slice(0, FAILING_LISTED)
      .map((r) => ({ index: r.index, sample: r.sample, reasons: r.guide.reasons })),
  };
}

export function sweepSummary(study: Study, points: readonly YieldPointSummary[]): YieldSweepSummary | null {
  const sweep = study.sweep;
  if (!sweep) return null;
  const reaching = (ok: (p: YieldPointSummary) => boolean): number | null => {
    const values = points.filter(ok).map((p) => p.sweepValue as number);
    return values.length ? Math.min(...values) : null;
  };
  return {
    parameter: sweep.spec.parameter,
    unit: sweep.spec.unit,
    target: sweep.target,
    values: [...sweep.values],
    yields: points.map((p) => p.yield),
    smallestReaching: reaching((p) => p.yield.estimate >= sweep.target),
    smallestReachingSurely: reaching((p) => p.yield.low >= sweep.target),
  };
}

/** Every point's summary from the records (any order; each global index once). */
export function pointSummaries(study: Study, records: readonly YieldSampleRecord[]): YieldPointSummary[] {
  const points = study.sweep ? study.sweep.values.length : 1;
  const byPoint: YieldSampleRecord[][] = Array.from({ length: points }, () => []);
  for (const r of records) byPoint[r.point].push(r);
  return byPoint.map((rs, point) =>
    pointSummary(
      study,
      point,
      rs.sort((a, b) => a.index - b.index),
    ),
  );
}
