/**
 * The files of a yield study folder (`syncring yield STUDY --out DIR`) and the records that cross
 * between the engine, the workers (threads or queue workers), the coordinator and the dashboard:
 * one typed home for their formats. Field names are a contract (scripts read them).
 */
import type { PatternKind } from '../pattern/classify.js';
import type { Verdict } from '../predict/locked-state.js';

export const STUDY_FILE = 'study.json';
export const SAMPLES_FILE = 'samples.ndjson';
export const YIELD_SUMMARY_FILE = 'summary.json';
export const YIELD_STATUS_FILE = 'status.json';

/** The pattern a board settled into: the classifier's kind, or a strained twisted state (pattern/twist.ts). */
export interface SamplePattern {
  kind: PatternKind;
  q: number | null;
  mode: number;
  /** "in-phase q=0 on mode 0": the pattern's identity, as the lock detector names it. */
  label: string;
  /** The snapshot classified as a cluster and was named by the twisted state it is a strained copy of. */
  strained: boolean;
}

/** How one board fared in one system (the guiding system, or the full equations when confirmed). */
export interface SampleOutcome {
  pass: boolean;
  /** Why it failed (empty when it passed). */
  reasons: string[];
  /** It locked (the look-ahead settled on a stable locked state; the full system's lock detector locked). */
  locked: boolean;
  pattern: SamplePattern | null;
  /** Slow time (eps tau) after which the phase differences stayed within the lock tolerance of the locked state. */
  lockTime: number | null;
  /** Largest real part of the locked state's reduced Jacobian (slow time; negative is stable); null unless the guide locked. */
  margin: number | null;
  stability: Verdict | null;
  /** Output frequency against the wanted mode's nominal frequency, ppm. */
  outputOffsetPpm: number | null;
}

/** One line of samples.ndjson. */
export interface YieldSampleRecord {
  /** Position in the study: point * samples + sample. */
  index: number;
  /** Sweep point (0 without a sweep) and the sample within it; a sample's seed and draws are the same at every point. */
  point: number;
  sample: number;
  seed: number;
  /** The sweep parameter's value at this point, null without a sweep. */
  sweepValue: number | null;
  /** The drawn values by component (`detuning[3]`, `coupling.strength`), in each tolerance's unit. */
  parameters: Record<string, number>;
  /** The seed of the random start (null for start "scenario"). */
  startSeed: number | null;
  guide: SampleOutcome;
  /** The full equations' outcome, for the samples `confirm.fullSystem` picked. */
  full?: SampleOutcome & { agrees: boolean };
  pass: boolean;
}

export interface Interval {
  estimate: number;
  low: number;
  high: number;
  confidence: number;
  method: 'wilson';
}

export interface YieldEstimate extends Interval {
  passed: number;
  samples: number;
}

export interface PatternShare extends Interval {
  label: string;
  count: number;
}

export interface Distribution1D {
  count: number;
  min: number | null;
  max: number | null;
  mean: number | null;
  p05: number | null;
  p50: number | null;
  p95: number | null;
  histogram: { edges: number[]; counts: number[] };
}

/** Which tolerance drives the failures: the yield in each quartile of one drawn component. */
export interface SensitivityRow {
  component: string;
  /** Upper edges of the quartiles of the drawn values. */
  quartileEdges: number[];
  /** Yield within each quartile. */
  quartileYield: number[];
  /** Largest minus smallest quartile yield: how much this component alone moves the yield. */
  swing: number;
  /** Mean drawn value among the failing and among the passing samples. */
  failingMean: number | null;
  passingMean: number | null;
}

export interface YieldPointSummary {
  point: number;
  sweepValue: number | null;
  yield: YieldEstimate;
  patterns: PatternShare[];
  margin: Distribution1D;
  lockTime: Distribution1D;
  outputOffsetPpm: Distribution1D;
  sensitivity: SensitivityRow[];
  fullSystem: { samples: number; agree: number; agreement: Interval | null; disagreeing: number[] };
  /** The first failing samples (index and reasons), for the dashboard's list. */
  failing: { index: number; sample: number; reasons: string[] }[];
}

export interface YieldSweepSummary {
  parameter: string;
  unit: string;
  target: number;
  values: number[];
  yields: YieldEstimate[];
  /** Smallest value whose estimate reaches the target, and the smallest whose interval's low end does; null when none does. */
  smallestReaching: number | null;
  smallestReachingSurely: number | null;
}

/** summary.json and the stdout JSON of `syncring yield`: the first (or only) point's figures at the top, for scripts. */
export interface YieldSummary extends Omit<YieldPointSummary, 'point' | 'sweepValue'> {
  study: string;
  scenario: string;
  samples: number;
  done: number;
  engine: { kind: 'local' | 'redis'; workers: number | null };
  wallSeconds: number;
  samplesPerSecond: number;
  points: YieldPointSummary[];
  sweep: YieldSweepSummary | null;
  notes: { criteria: string; interval: string; margin: string; caution: string };
}

/** status.json: progress for the dashboard, rewritten as samples come in. */
export interface YieldStatus {
  state: 'running' | 'finished' | 'failed';
  pid: number;
  done: number;
  total: number;
  passed: number;
  samplesPerSecond: number;
  etaSeconds: number | null;
  engine: 'local' | 'redis';
  updatedAt: string;
  error?: string;
}

function isObject(value: unknown): value is Record<string, unknown> {
  return value !== null && typeof value === 'object' && !Array.isArray(value);
}

/** A parsed samples.ndjson line, or null when it is not one (a torn last line). */
export function readSampleRecord(value: unknown): YieldSampleRecord | null {
  if (!isObject(value) || typeof value.index !== 'number' || typeof value.pass !== 'boolean' || !isObject(value.guide)) return null;
  return value as unknown as YieldSampleRecord;
}

export function readYieldStatus(value: unknown): YieldStatus | null {
  if (!isObject(value) || typeof value.state !== 'string' || typeof value.done !== 'number' || typeof value.total !== 'number') return null;
  return value as unknown as YieldStatus;
}

export function readYieldSummary(value: unknown): YieldSummary | null {
  if (!isObject(value) || !isObject(value.yield) || !Array.isArray(value.points)) return null;
  return value as unknown as YieldSummary;
}
