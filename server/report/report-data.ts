import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyzeStability, type FaultVerdict, type PhaseSample, type StabilityReport } from '../../src/campaign/index.js';
import { DEFAULT_NOMINAL_FREQUENCY_HZ, tauToSeconds } from '../../src/scenario/units.js';
import { UsageError } from '../usage-error.js';
import { describeProblems, readSoakLog, type SoakHeaderRecord } from '../soak/resume.js';
import { SUMMARY_FILE } from '../soak/outputs.js';
import { stabilitySamples, type SampleLine } from '../soak/soak-records.js';

/** Everything the report shows, read from a soak folder (its log, and its summary once finished). */
export interface ReportData {
  dir: string;
  header: SoakHeaderRecord;
  /** null while the soak runs or after a kill before its end. */
  summary: Record<string, unknown> | null;
  /** Trace points from the start of the run (stability phases null before the record starts). */
  samples: SampleLine[];
  /** The stability samples among them. */
  stabilitySamples: PhaseSample[];
  verdicts: FaultVerdict[];
  stability: StabilityReport | null;
  epsilon: number;
  secondsPerTau: number;
  nominalFrequencyHz: number;
  /** The scenario gave no nominal frequency (its JSON in the log header leaves it out): seconds rest on the default. */
  nominalFrequencyAssumed: boolean;
  campaignName: string;
  campaignUnit: string;
  tauPerUnit: number;
  problems: string | null;
  lastTau: number;
}

export function loadReportData(dir: string): ReportData {
  if (!existsSync(dir)) throw new UsageError(`${dir}: no such folder`);
  const read = readSoakLog(dir);
  if (read.segments.length === 0) throw new UsageError(`${dir}: no soak log here (expected ${join(dir, 'log')}/soak-NNNNNN.ndjson)`);
  const first = read.records[0]?.record;
  if (!first || first.record !== 'header' || !('soak' in first)) throw new UsageError(`${dir}: the log does not start with a soak header`);
  const header = first as unknown as SoakHeaderRecord;
  const summaryPath = join(dir, SUMMARY_FILE);
  const summary = existsSync(summaryPath) ? (JSON.parse(readFileSync(summaryPath, 'utf8')) as Record<string, unknown>) : null;
  const samples: SampleLine[] = [];
  const verdicts: FaultVerdict[] = [];
  let lastTau = 0;
  for (const { record } of read.records) {
    if (record.record === 'soak-sample') samples.push(record as unknown as SampleLine);
    else if (record.record === 'verdict') verdicts.push((record as unknown as { verdict: FaultVerdict }).verdict);
    if (typeof record.tau === 'number') lastTau = Math.max(lastTau, record.tau);
  }
  const scenario = header.scenario as { epsilon: number; nominalFrequencyHz?: number; modes: { omega: number }[] };
  const nominalFrequencyHz = scenario.nominalFrequencyHz ?? DEFAULT_NOMINAL_FREQUENCY_HZ;
  const campaign = header.soak.campaign as { name?: string; timeUnit?: string };
  const timeBase = (summary?.timeBase ?? null) as { secondsPerTau: number; tauPerCampaignUnit: number } | null;
  const secondsPerTau = timeBase?.secondsPerTau ?? tauToSeconds(1, nominalFrequencyHz, scenario.modes[0].omega);
  const unit = campaign.timeUnit ?? 'tau';
  const tauPerUnit = timeBase?.tauPerCampaignUnit ?? (unit === 'slow' ? 1 / scenario.epsilon : unit === 'seconds' ? 1 / secondsPerTau : 1);
  const stability =
    (summary?.stability as StabilityReport | null | undefined) ??
    analyzeStability(stabilitySamples(samples), header.soak.stride * header.soak.macroStep * secondsPerTau, nominalFrequencyHz);
  return {
    dir,
    header,
    summary,
    samples,
    stabilitySamples: stabilitySamples(samples),
    verdicts: (summary?.verdicts as FaultVerdict[] | undefined) ?? verdicts,
    stability,
    epsilon: scenario.epsilon,
    secondsPerTau,
    nominalFrequencyHz,
    nominalFrequencyAssumed: scenario.nominalFrequencyHz === undefined,
    campaignName: campaign.name ?? 'Untitled campaign',
    campaignUnit: unit,
    tauPerUnit,
    problems: read.problems.length > 0 ? describeProblems(read) : null,
    lastTau,
  };
}
