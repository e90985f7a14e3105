import { existsSync, readFileSync, statSync } from 'node:fs';
import { basename, join } from 'node:path';
import {
  analyzeStability,
  type FaultVerdict,
  type MeasuredStability,
  type PhaseSample,
  type StabilityAnalysisOptions,
  type StabilityReport,
} from '../../src/campaign/index.js';
import { builtInMaskNames, builtInMaskRaw } from '../../src/scenarios/masks.js';
import { parseMask } from '../../src/stability/index.js';
import { analyzeMeasuredFile } from './measured-file.js';
import { predictSoakNoise, type ReportNoisePrediction } from './noise-prediction.js';
import { DEFAULT_NOMINAL_FREQUENCY_HZ, tauToSeconds } from '../../src/scenario/units.js';
import { UsageError } from '../usage-error.js';
import { describeProblems, readSoakLog, soakHeaderOf } from '../soak/resume.js';
import type { SoakHeaderRecord } from '../../src/protocol/log-records.js';
import { stabilitySamples, type SoakSampleRecord } from '../../src/protocol/soak-records.js';
import { SUMMARY_FILE, readSoakSummary, type SoakSummary } from '../../src/protocol/soak-files.js';

/** Everything the report shows, read from a soak folder (its log, and its summary once finished). */
export interface ReportData {
  dir: string;
  header: SoakHeaderRecord;
  /** null while the soak runs or after a kill before its end. */
  summary: SoakSummary | null;
  /** Trace points from the start of the run (stability phases null before the record starts). */
  samples: SoakSampleRecord[];
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
  /** A second soak's array output or a measured file, drawn on the ADEV plot. */
  overlay: ReportOverlay | null;
  /** The linear noise analysis of the soaked scenario, drawn beside the soak's statistics. */
  prediction: ReportNoisePrediction;
}

export interface ReportOverlay {
  label: string;
  source: string;
  kind: 'soak' | 'file';
  stability: MeasuredStability;
}

/** `syncring report --overlay ...`: another soak folder or a measured data file (README, "Stability statistics"). */
export interface ReportOptions {
  overlay?: string;
  overlayLabel?: string;
  overlayTau0?: number;
  overlayType?: string;
}

export function loadReportData(dir: string, options: ReportOptions = {}): ReportData {
  if (!existsSync(dir)) throw new UsageError(`${dir}: no such folder`);
  const read = readSoakLog(dir);
  if (read.segments.length === 0) throw new UsageError(`${dir}: no soak log here (expected ${join(dir, 'log')}/soak-NNNNNN.ndjson)`);
  const header = soakHeaderOf(read, `${dir}: the log`);
  const summaryPath = join(dir, SUMMARY_FILE);
  const summary = existsSync(summaryPath) ? readSoakSummary(JSON.parse(readFileSync(summaryPath, 'utf8'))) : null;
  const samples: SoakSampleRecord[] = [];
  const verdicts: FaultVerdict[] = [];
  let lastTau = 0;
  for (const { record } of read.records) {
    if (record.record === 'soak-sample') samples.push(record);
    else if (record.record === 'verdict') verdicts.push(record.verdict);
    if ('tau' in record) lastTau = Math.max(lastTau, record.tau);
  }
  const scenario = header.scenario as { epsilon: number; nominalFrequencyHz?: number; modes: { omega: number }[] };
  const nominalFrequencyHz = scenario.nominalFrequencyHz ?? DEFAULT_NOMINAL_FREQUENCY_HZ;
  const campaign = header.soak.campaign as { name?: string; timeUnit?: string };
  const timeBase = summary?.timeBase ?? null;
  const secondsPerTau = timeBase?.secondsPerTau ?? tauToSeconds(1, nominalFrequencyHz, scenario.modes[0].omega);
  const unit = campaign.timeUnit ?? 'tau';
  const tauPerUnit = timeBase?.tauPerCampaignUnit ?? (unit === 'slow' ? 1 / scenario.epsilon : unit === 'seconds' ? 1 / secondsPerTau : 1);
  const stability =
    summary?.stability ??
    analyzeStability(
      stabilitySamples(samples),
      header.soak.stride * header.soak.macroStep * secondsPerTau,
      nominalFrequencyHz,
      campaignMaskOptions(header.soak.campaign),
    );
  return {
    dir,
    header,
    summary,
    samples,
    stabilitySamples: stabilitySamples(samples),
    verdicts: summary?.verdicts ?? verdicts,
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
    overlay: options.overlay === undefined ? null : loadOverlay(options),
    prediction: predictSoakNoise(header.scenario),
  };
}

/** The mask of the campaign in the log header (inline, or a built-in name), for a report made from the log alone. */
function campaignMaskOptions(raw: unknown): StabilityAnalysisOptions {
  const stability = (raw as { stability?: { mask?: unknown; mustMeetMask?: unknown } } | null)?.stability;
  const ref = stability?.mask;
  if (ref === undefined) return {};
  const rawMask = typeof ref === 'string' && builtInMaskNames.includes(ref) ? builtInMaskRaw(ref) : ref;
  // the header's campaign was validated when the soak started
  return { mask: parseMask(rawMask, 'the log header'), mustMeetMask: stability?.mustMeetMask !== false };
}

function loadOverlay(options: ReportOptions): ReportOverlay {
  const path = options.overlay!;
  if (!existsSync(path)) throw new UsageError(`--overlay ${path}: no such soak folder or data file`);
  if (statSync(path).isDirectory()) {
    if (options.overlayTau0 !== undefined || options.overlayType !== undefined)
      throw new UsageError('--overlay-tau0 and --overlay-type are for a data file, not a soak folder');
    const other = loadReportData(path);
    const series = other.stability?.series.find((s) => s.name === 'ensemble');
    if (!series) throw new UsageError(`--overlay ${path}: that soak has no stability record yet`);
    return { label: options.overlayLabel ?? `${basename(path)}: array output`, source: path, kind: 'soak', stability: series };
  }
  const type = options.overlayType ?? 'phase';
  if (type !== 'phase' && type !== 'frequency')
    throw new UsageError(`--overlay-type must be phase or frequency (got ${JSON.stringify(type)})`);
  const measured = analyzeMeasuredFile(path, { tau0: options.overlayTau0, type });
  return { label: options.overlayLabel ?? basename(path), source: path, kind: 'file', stability: measured.stability };
}
