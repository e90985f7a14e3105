import type { FaultVerdict, VerdictOutcome } from '../campaign/index.js';
import type { TimeUnit } from '../campaign/types.js';
import type { SoakOutcome } from './soak-records.js';

/**
 * The files of a soak folder (`syncring soak --out DIR`) and the dashboard's view of them: one
 * typed home for their formats, shared by the soak that writes them, the server that lists and
 * controls soaks, the report and the dashboard. Each reader narrows what it parsed with the
 * `read...` function of its file here, once.
 */

export const SUMMARY_FILE = 'summary.json';
export const STATUS_FILE = 'status.json';
export const RESUMES_FILE = 'resumes.json';
/** Written by the server into the folder of a soak it started from the dashboard. */
export const START_FILE = 'start.json';
export const REPORT_FILE = 'report.html';
/** The log segments: LOG_FOLDER/SEGMENT_PREFIX-NNNNNN.ndjson. */
export const LOG_FOLDER = 'log';
export const SEGMENT_PREFIX = 'soak';
/**
 * Each analysed stability series at the end of a soak: SERIES_FOLDER/NAME.txt, two columns t (s)
 * and time error x (s) with '#' header lines, the plain-text format `syncring stability` reads
 * (src/stability/data-file.ts writes and reads it).
 */
export const SERIES_FOLDER = 'series';
/** Where a soak started from the dashboard writes its stdout and stderr. */
export const SOAK_OUT = 'soak.out';
export const SOAK_ERR = 'soak.err';

/** A verdict as status.json lists it: enough for a progress line (the log has the rest). */
export interface DurableVerdict {
  id: string;
  pass: boolean;
  outcome: VerdictOutcome;
}

/** status.json: progress for anyone watching, replaced atomically about once a second. */
export interface SoakStatus {
  state: 'running' | 'finished' | 'halted';
  pid: number;
  tau: number;
  until: number;
  slowTime: number;
  slowUntil: number;
  fraction: number;
  wallSeconds: number;
  eta: string;
  faults: { started: number; judged: number; failed: number; incomplete: number };
  /** The newest durable verdicts. */
  verdicts: DurableVerdict[];
  /** null in the status of soaks written before it was recorded. */
  nominalFrequencyHz: number | null;
  nominalFrequencyAssumed: boolean;
  secondsNote?: string;
  updatedAt: string;
}

/** How the soak's times convert, for readers of the summary. */
export interface SoakTimeBase {
  epsilon: number;
  secondsPerTau: number;
  nominalFrequencyHz: number;
  /** The scenario gave no nominal frequency: seconds rest on the default (secondsNote says so). */
  nominalFrequencyAssumed: boolean;
  secondsNote?: string;
  campaignUnit: TimeUnit;
  tauPerCampaignUnit: number;
  macroStep: number;
  sampleStrideTicks: number;
}

/** One entry of resumes.json per resume of the soak. */
export interface ResumeEntry {
  at: string;
  fromTick: number;
  fromTau: number;
  checkpointSeq: number;
  discardedRecords: number;
  tornTailBytes: number;
  engine: string;
  sameEngine: boolean;
}

/** summary.json: the soak's outcome (the log's end record) with how to read it. */
export interface SoakSummary extends SoakOutcome {
  format: 'syncring-soak-summary';
  formatVersion: 1;
  /** What a PASS does not mean. */
  caution: string;
  scenario: string;
  campaign: string;
  until: number;
  timeBase: SoakTimeBase;
  resumes: ResumeEntry[];
  /** Set when the summary was rewritten from the log of a soak that had finished. */
  note?: string;
  log?: { dir: string; segments: number; records: number };
  resumeCheck?: { recordsCompared: number; mismatches: number };
  wallSeconds?: number;
}

/** start.json: the arguments of a soak the server started (so it can resume it) and its processes. */
export interface StartRecord {
  format: 'syncring-soak-start';
  formatVersion: 1;
  scenario: string;
  campaign: string;
  /** End of the soak in slow time units, as asked for, and in tau, as passed to --until. */
  untilSlow: number;
  until: number;
  epsilon: number;
  pace: number | null;
  /** The `syncring soak` arguments (without --resume and --pace). */
  args: string[];
  /** The newest process; one entry per start and resume. */
  pid: number;
  runs: { pid: number; at: string; resume: boolean; pace: number | null }[];
}

/** 'starting': launched from the dashboard, its process is up but has not written status.json yet. */
export type SoakState = 'starting' | 'running' | 'finished' | 'halted' | 'interrupted' | 'unknown';

/** The fields of a verdict the dashboard's table shows (the raw perturbation records stay out). */
export const VERDICT_ROW_FIELDS = [
  'id',
  'source',
  'action',
  'appliedAt',
  'restoredAt',
  'before',
  'persisted',
  'slipped',
  'maxPhaseExcursion',
  'shift',
  'settled',
  'settledAfter',
  'fromContinued',
  'became',
  'recovered',
  'timeToRelock',
  'final',
  'divergence',
  'prediction',
  'cutShort',
  'complete',
  'outcome',
  'pass',
  'reasons',
  'notes',
] as const satisfies readonly (keyof FaultVerdict)[];
export type VerdictRow = Pick<FaultVerdict, (typeof VERDICT_ROW_FIELDS)[number]>;

export function verdictRowOf(v: FaultVerdict): VerdictRow {
  return Object.fromEntries(VERDICT_ROW_FIELDS.filter((key) => key in v).map((key) => [key, v[key]])) as VerdictRow;
}

/** One soak as GET /api/soaks lists it. */
export interface SoakListing {
  name: string;
  state: SoakState;
  progress: { tau: number; until: number; slowTime: number; slowUntil: number; fraction: number; eta: string; wallSeconds: number } | null;
  faults: { started: number; judged: number; failed: number; incomplete?: number } | null;
  /** From summary.json, once the soak has finished. */
  pass: boolean | null;
  exitCode: number | null;
  scenario: string | null;
  campaign: string | null;
  epsilon: number | null;
  /** What the soak's seconds rest on: its scenario's nominal frequency, or the default it assumed (null: not known yet). */
  nominalFrequency: { hz: number; assumed: boolean } | null;
  /** The newest verdicts; rows read from an older soak's status.json may carry only id and pass. */
  verdicts: (VerdictRow | DurableVerdict)[];
  verdictsTotal: number;
  updatedAt: string;
  report: { url: string; file: boolean };
  /** Started from the dashboard (START_FILE): what with, how often, and whether its newest process is up. */
  launch: { scenario: string; campaign: string; untilSlow: number; pace: number | null; runs: number; alive: boolean } | null;
  problems: string[];
}

/** GET /api/soaks */
export interface SoaksResponse {
  /** The soaks folder as the server serves it ("soaks", the prefix of the report URLs), never its path on disk. */
  dir: string;
  soaks: SoakListing[];
  note?: string;
}

// -------------------------------------------------------------------------------------------
// Readers: a parsed file narrowed to its format, or null when it is not one.

type Fields = Record<string, unknown>;

const isObject = (value: unknown): value is Fields => value !== null && typeof value === 'object' && !Array.isArray(value);
const isNumber = (value: unknown): value is number => typeof value === 'number' && Number.isFinite(value);

export function readStartRecord(value: unknown): StartRecord | null {
  if (!isObject(value) || value.format !== 'syncring-soak-start') return null;
  const ok =
    typeof value.scenario === 'string' &&
    typeof value.campaign === 'string' &&
    isNumber(value.untilSlow) &&
    isNumber(value.until) &&
    (value.pace === null || isNumber(value.pace)) &&
    Array.isArray(value.args) &&
    value.args.every((a) => typeof a === 'string') &&
    Number.isInteger(value.pid) &&
    (value.pid as number) > 0 &&
    Array.isArray(value.runs);
  return ok ? (value as unknown as StartRecord) : null;
}

/**
 * status.json as written by this version; older soaks wrote fewer fields (no incomplete count,
 * no nominal frequency, verdicts without an outcome), which are filled in as they then were.
 */
export function readSoakStatus(value: unknown): SoakStatus | null {
  if (
    !isObject(value) ||
    !['running', 'finished', 'halted'].includes(value.state as string) ||
    !isNumber(value.tau) ||
    !Number.isInteger(value.pid)
  )
    return null;
  const faults = isObject(value.faults) ? value.faults : {};
  const count = (key: string) => (isNumber(faults[key]) ? (faults[key] as number) : 0);
  const verdicts = (Array.isArray(value.verdicts) ? value.verdicts : []).filter(isObject).map((v) => {
    const pass = v.pass === true;
    return { id: String(v.id), pass, outcome: (v.outcome as VerdictOutcome | undefined) ?? (pass ? 'pass' : 'fail') };
  });
  return {
    state: value.state as SoakStatus['state'],
    pid: value.pid as number,
    tau: value.tau,
    until: isNumber(value.until) ? value.until : 0,
    slowTime: isNumber(value.slowTime) ? value.slowTime : 0,
    slowUntil: isNumber(value.slowUntil) ? value.slowUntil : 0,
    fraction: isNumber(value.fraction) ? value.fraction : 0,
    wallSeconds: isNumber(value.wallSeconds) ? value.wallSeconds : 0,
    eta: typeof value.eta === 'string' ? value.eta : '--',
    faults: { started: count('started'), judged: count('judged'), failed: count('failed'), incomplete: count('incomplete') },
    verdicts,
    nominalFrequencyHz: isNumber(value.nominalFrequencyHz) ? value.nominalFrequencyHz : null,
    nominalFrequencyAssumed: value.nominalFrequencyAssumed === true,
    ...(typeof value.secondsNote === 'string' ? { secondsNote: value.secondsNote } : {}),
    updatedAt: typeof value.updatedAt === 'string' ? value.updatedAt : new Date(0).toISOString(),
  };
}

/** summary.json (older summaries lack the time base's nominal-frequency fields; they read as given). */
export function readSoakSummary(value: unknown): SoakSummary | null {
  if (
    !isObject(value) ||
    value.format !== 'syncring-soak-summary' ||
    typeof value.pass !== 'boolean' ||
    !Array.isArray(value.verdicts) ||
    !isObject(value.timeBase)
  )
    return null;
  return value as unknown as SoakSummary;
}
