import type { SessionEvent, Frame } from '../session/session.js';
import type { ModeState, Scenario } from '../scenario/types.js';
import type { EndRecord, SoakCheckpointFields, SoakHeader, SoakSampleRecord, VerdictRecord } from './soak-records.js';

/**
 * Records of a session log (newline-delimited JSON, one record per line): the live server's
 * session logs, `syncring simulate --out` and soak logs. Every record has a `record` tag and a
 * `seq` number that increases by one per line; readers check both. The union `LogRecord` is
 * closed: a reader narrows a parsed line to it once (`asLogRecord`) and works with types after.
 */
export const LOG_FORMAT_VERSION = 1;

export interface HeaderRecord {
  record: 'header';
  seq: number;
  format: 'syncring-log';
  formatVersion: number;
  software: { name: 'syncring'; version: string };
  createdAt: string;
  scenario: unknown;
  seeds: { noise: number; initial: number | null };
  /** Present in soak logs. */
  soak?: SoakHeader;
}

/** The header of a soak log. */
export type SoakHeaderRecord = HeaderRecord & { soak: SoakHeader };

export interface EventRecord {
  record: 'event';
  seq: number;
  event: SessionEvent;
}

/** A decimated sample: the frame without bulky per-tick history. */
export interface SampleRecord {
  record: 'sample';
  seq: number;
  frame: Frame;
}

/** The full state in the original coordinates; a soak's checkpoint adds what it needs to continue. */
export interface CheckpointRecord extends Partial<SoakCheckpointFields> {
  record: 'checkpoint';
  seq: number;
  tau: number;
  tick: number;
  state: ModeState[][];
}

export type SoakCheckpointRecord = CheckpointRecord & SoakCheckpointFields;

export type LogRecord = HeaderRecord | EventRecord | SampleRecord | CheckpointRecord | SoakSampleRecord | VerdictRecord | EndRecord;

export type LogRecordKind = LogRecord['record'];

const KINDS: ReadonlySet<string> = new Set<LogRecordKind>(['header', 'event', 'sample', 'checkpoint', 'soak-sample', 'verdict', 'end']);

/** A record as a writer hands it over: the writer stamps `seq`. */
export type NewLogRecord = LogRecord extends infer R ? (R extends LogRecord ? Omit<R, 'seq'> : never) : never;

/**
 * A parsed line as a log record, or the reason it is not one. Only the tag and the sequence
 * number are checked here: the writer is this program, and each record's body is read by the
 * code that knows it.
 */
export function asLogRecord(value: unknown): LogRecord | string {
  if (value === null || typeof value !== 'object' || Array.isArray(value)) return 'not a log record (needs "record" and "seq")';
  const { record, seq } = value as { record?: unknown; seq?: unknown };
  if (typeof record !== 'string' || typeof seq !== 'number') return 'not a log record (needs "record" and "seq")';
  if (!KINDS.has(record)) return `unknown record kind ${JSON.stringify(record)}`;
  return value as LogRecord;
}

export function isSoakHeader(record: LogRecord | undefined): record is SoakHeaderRecord {
  return record?.record === 'header' && record.soak !== undefined;
}

export function isSoakCheckpoint(record: LogRecord): record is SoakCheckpointRecord {
  return record.record === 'checkpoint' && record.session !== undefined && record.campaign !== undefined && record.phases !== undefined;
}

/** The one header every log starts with (`soak` in soak logs); the caller's software version. */
export function logHeader(
  scenario: Scenario,
  scenarioJson: unknown,
  version: string,
  soak?: SoakHeader,
  createdAt = new Date(),
): Omit<HeaderRecord, 'seq'> {
  return {
    record: 'header',
    format: 'syncring-log',
    formatVersion: LOG_FORMAT_VERSION,
    software: { name: 'syncring', version },
    createdAt: createdAt.toISOString(),
    scenario: scenarioJson,
    seeds: { noise: scenario.noise.seed, initial: 'random' in scenario.initial ? scenario.initial.random.seed : null },
    ...(soak ? { soak } : {}),
  };
}

/** A frame as a sample record (the writer stamps seq): events are logged on their own. */
export function sampleOf(frame: Frame): Omit<SampleRecord, 'seq'> {
  return { record: 'sample', frame: { ...frame, events: [] } };
}
