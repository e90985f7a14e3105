import { LOG_FORMAT_VERSION, type CheckpointRecord, type EventRecord, type HeaderRecord, type SampleRecord } from './log-records.js';

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
  header: HeaderRecord | null;
  events: EventRecord[];
  samples: SampleRecord[];
  checkpoints: CheckpointRecord[];
  /** Other record kinds (verdicts, summaries) in order. */
  other: { record: string; seq: number; [key: string]: unknown }[];
  /** Characters of an unterminated last line that were ignored (0 if none). */
  tornTail: number;
  problems: LogProblem[];
  /** Highest sequence number read. */
  lastSeq: number;
}

export function parseLog(text: string, options: { firstSeq?: number } = {}): ParsedLog {
  const result: ParsedLog = { header: null, events: [], samples: [], checkpoints: [], other: [], tornTail: 0, problems: [], lastSeq: -1 };
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
    let record: { record?: unknown; seq?: unknown; [key: string]: unknown };
    try {
      record = JSON.parse(line);
    } catch (error) {
      result.problems.push({ line: at, reason: `not valid JSON (${(error as Error).message})` });
      return;
    }
    if (record === null || typeof record !== 'object' || typeof record.record !== 'string' || typeof record.seq !== 'number') {
      result.problems.push({ line: at, reason: 'not a log record (needs "record" and "seq")' });
      return;
    }
    if (expected !== null && record.seq !== expected) {
      result.problems.push({ line: at, reason: `sequence number ${record.seq} where ${expected} was expected` });
    }
    expected = record.seq + 1;
    result.lastSeq = Math.max(result.lastSeq, record.seq);
    switch (record.record) {
      case 'header': {
        const header = record as unknown as HeaderRecord;
        if (header.format !== 'syncring-log') result.problems.push({ line: at, reason: 'header: not a syncring log' });
        else if (header.formatVersion > LOG_FORMAT_VERSION) result.problems.push({ line: at, reason: `header: format version ${header.formatVersion} is newer than this reader (${LOG_FORMAT_VERSION})` });
        if (result.header === null) result.header = header;
        break;
      }
      case 'event':
        result.events.push(record as unknown as EventRecord);
        break;
      case 'sample':
        result.samples.push(record as unknown as SampleRecord);
        break;
      case 'checkpoint':
        result.checkpoints.push(record as unknown as CheckpointRecord);
        break;
      default:
        result.other.push(record as ParsedLog['other'][number]);
    }
  });
  if (result.header === null && lines.length > 0) result.problems.unshift({ line: 1, reason: 'the log has no header record' });
  return result;
}
