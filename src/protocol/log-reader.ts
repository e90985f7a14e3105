import {
  LOG_FORMAT_VERSION,
  asLogRecord,
  type CheckpointRecord,
  type EventRecord,
  type HeaderRecord,
  type LogRecord,
  type SampleRecord,
} from './log-records.js';

/**
 * Reads a session log (NDJSON text) back. A record counts only when its line ends with a
 * newline: a torn last line (a crash mid-write) is dropped and reported, not an error. An
 * unparsable or out-of-sequence line in the middle is corruption and is reported with its line
 * number; reading goes on so that everything intact is still available.
 */
export interface LogProblem {
  /** 1-based line number. */
  line: number;
  reason: string;
}

export interface ParsedLog {
  /** Every readable record, in order. */
  records: LogRecord[];
  header: HeaderRecord | null;
  events: EventRecord[];
  samples: SampleRecord[];
  checkpoints: CheckpointRecord[];
  /** Characters of an unterminated last line that were ignored (0 if none). */
  tornTail: number;
  problems: LogProblem[];
  /** Highest sequence number read. */
  lastSeq: number;
}

export function parseLog(text: string, options: { firstSeq?: number } = {}): ParsedLog {
  const result: ParsedLog = { records: [], header: null, events: [], samples: [], checkpoints: [], tornTail: 0, problems: [], lastSeq: -1 };
  const end = text.lastIndexOf('\n') + 1;
  result.tornTail = text.length - end;
  const lines = text.slice(0, end).split('\n');
  lines.pop();
  let expected = options.firstSeq ?? null;
  lines.forEach((line, index) => {
    const at = index + 1;
    if (line.trim() === '') {
      result.problems.push({ line: at, reason: 'empty line' });
      return;
    }
    let parsed: unknown;
    try {
      parsed = JSON.parse(line);
    } catch (error) {
      result.problems.push({ line: at, reason: `not valid JSON (${(error as Error).message})` });
      return;
    }
    const record = asLogRecord(parsed);
    if (typeof record === 'string') {
      result.problems.push({ line: at, reason: record });
      return;
    }
    if (expected !== null && record.seq !== expected) {
      result.problems.push({ line: at, reason: `sequence number ${record.seq} where ${expected} was expected` });
    }
    expected = record.seq + 1;
    result.lastSeq = Math.max(result.lastSeq, record.seq);
    result.records.push(record);
    switch (record.record) {
      case 'header':
        if (record.format !== 'syncring-log') result.problems.push({ line: at, reason: 'header: not a syncring log' });
        else if (record.formatVersion > LOG_FORMAT_VERSION)
          result.problems.push({
            line: at,
            reason: `header: format version ${record.formatVersion} is newer than this reader (${LOG_FORMAT_VERSION})`,
          });
        if (result.header === null) result.header = record;
        break;
      case 'event':
        result.events.push(record);
        break;
      case 'sample':
        result.samples.push(record);
        break;
      case 'checkpoint':
        result.checkpoints.push(record);
        break;
    }
  });
  if (result.header === null && lines.length > 0) result.problems.unshift({ line: 1, reason: 'the log has no header record' });
  return result;
}
