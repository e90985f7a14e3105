import { join } from 'node:path';
import { SegmentedLog } from './segments.js';
import type { NewLogRecord } from '../../src/protocol/log-records.js';

/**
 * The live session's log: the crash-safe writer of segments.ts on a single file (no rotation).
 * One writer, one queue, lines appended strictly in order with the next sequence number, group
 * commit with fdatasync, and every `append` promise resolves only once its line is on disk. A
 * failed write or sync is fatal for the file: the writer stops, rejects what is pending and
 * reports the error.
 */
export class SessionLog {
  private readonly writer: SegmentedLog;

  constructor(
    readonly path: string,
    onError: (error: Error) => void = () => {},
  ) {
    this.writer = new SegmentedLog({ segmentPath: () => path, segmentBytes: Infinity, onError, label: 'session log' });
  }

  /** A fresh file name in `dir` for a run of `label`. */
  static fileFor(dir: string, label: string, now = new Date()): string {
    const stamp = now.toISOString().replace(/[:.]/g, '-');
    const safe =
      label
        .toLowerCase()
        .replace(/[^a-z0-9]+/g, '-')
        .replace(/^-|-$/g, '')
        .slice(0, 40) || 'run';
    return join(dir, `${stamp}-${safe}.ndjson`);
  }

  /** Highest sequence number known to be on disk (-1 before the first sync). */
  get durableSeq(): number {
    return this.writer.durableSeq;
  }

  get bytes(): number {
    return this.writer.bytes;
  }

  /** Queue a record; resolves with its sequence number once it is durable. */
  append(record: NewLogRecord): Promise<number> {
    return this.writer.append(record);
  }

  /** Resolves when everything appended so far is durable. */
  drain(): Promise<void> {
    return this.writer.drain();
  }

  close(): Promise<void> {
    return this.writer.close();
  }
}
