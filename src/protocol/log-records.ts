import type { SessionEvent, Frame } from '../session/session.js';
import type { ModeState } from '../scenario/types.js';

/**
 * Records of a session log (newline-delimited JSON, one record per line). Every record has a
 * `record` tag and a `seq` number that increases by one per line; readers check both.
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
}

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

export interface CheckpointRecord {
  record: 'checkpoint';
  seq: number;
  tau: number;
  tick: number;
  state: ModeState[][];
}

export type LogRecord = HeaderRecord | EventRecord | SampleRecord | CheckpointRecord | { record: string; seq: number; [key: string]: unknown };

/** A frame as a sample record (the writer stamps seq): events are logged on their own. */
export function sampleOf(frame: Frame): Omit<SampleRecord, 'seq'> {
  return { record: 'sample', frame: { ...frame, events: [] } };
}
