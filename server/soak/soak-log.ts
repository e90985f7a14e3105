import type { NewLogRecord } from '../../src/protocol/log-records.js';
import { SEGMENT_PREFIX } from '../../src/protocol/soak-files.js';
import { SegmentedLog, cutAfter, listSegments, segmentPathFor } from '../log/segments.js';
import { soakLogDir, type ResumePoint } from './resume.js';

const DEFAULT_SEGMENT_BYTES = 4 * 1024 * 1024;

/**
 * A soak's log as the runner writes it: the crash-safe segmented log of DIR/log, opened fresh or
 * cut back to a resume point's checkpoint and continued after it. While it writes again the
 * records a killed run had written after that checkpoint, it compares each with the line it
 * replaces and counts the mismatches (none when the engine is deterministic, as it must be).
 */
export class SoakLog {
  private readonly log: SegmentedLog;
  private readonly discarded: Map<number, string>;
  private readonly discardedAtStart: number;
  private mismatches = 0;
  /** The first write or sync error; the log stops at it. */
  error: Error | null = null;

  constructor(
    readonly out: string,
    options: { segmentBytes?: number; from?: ResumePoint } = {},
  ) {
    const dir = soakLogDir(out);
    const segmentPath = segmentPathFor(dir, SEGMENT_PREFIX);
    const segmentBytes = options.segmentBytes ?? DEFAULT_SEGMENT_BYTES;
    const onError = (error: Error) => (this.error ??= error);
    const point = options.from;
    if (point?.checkpoint && point.checkpointAt) {
      const firstSegment = cutAfter(dir, SEGMENT_PREFIX, point.checkpointAt);
      this.log = new SegmentedLog({ segmentPath, segmentBytes, firstSeq: point.checkpoint.seq + 1, firstSegment, onError });
      this.discarded = new Map(point.discarded);
    } else {
      this.log = new SegmentedLog({ segmentPath, segmentBytes, onError });
      this.discarded = new Map();
    }
    this.discardedAtStart = this.discarded.size;
  }

  /** Queue a record; resolves with its sequence number once it is on disk. */
  append(record: NewLogRecord): Promise<number> {
    if (this.discarded.size > 0) {
      const seq = this.log.nextSeq;
      const before = this.discarded.get(seq);
      if (before !== undefined) {
        this.discarded.delete(seq);
        if (before !== JSON.stringify({ ...record, seq })) this.mismatches++;
      }
    }
    const written = this.log.append(record);
    written.catch(() => undefined);
    return written;
  }

  /** Lines queued but not yet on disk. */
  get pending(): number {
    return this.log.pending;
  }

  drain(): Promise<void> {
    return this.log.drain();
  }

  async close(): Promise<void> {
    await this.log.drain();
    await this.log.close();
  }

  /** What the summary says about the log and the replay check. */
  facts(): { log: { dir: string; segments: number; records: number }; resumeCheck: { recordsCompared: number; mismatches: number } } {
    const dir = soakLogDir(this.out);
    return {
      log: { dir, segments: listSegments(dir, SEGMENT_PREFIX).length, records: this.log.nextSeq },
      resumeCheck: { recordsCompared: this.discardedAtStart - this.discarded.size, mismatches: this.mismatches },
    };
  }
}
