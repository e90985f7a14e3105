/**
 * The crash-safe log: one writer, one queue, lines appended strictly in order with a sequence
 * number, group commit (everything queued while a batch is written goes out in the next single
 * write + fdatasync), and size-based segments. Every `append` promise resolves only once its
 * line is on disk, so a caller that waits for it before telling anyone has "synced before
 * acknowledged".
 *
 * Segments: once the open segment holds at least `segmentBytes`, the next batch goes into a new
 * file (opened with 'wx', its directory synced); the full one is never renamed or reopened.
 * Lines never straddle segments. A failed write, sync or rotation is fatal for the writer: it
 * rejects everything pending and reports the error (after EIO the kernel may have dropped the
 * pages, and a retried fsync can falsely succeed, so nothing is retried into the same file).
 */
import { closeSync, fsyncSync, mkdirSync, openSync, readdirSync, readFileSync, statSync, truncateSync, unlinkSync } from 'node:fs';
import { open, type FileHandle } from 'node:fs/promises';
import { dirname, join } from 'node:path';
import { parseLog, type LogProblem } from '../../src/protocol/log-reader.js';
import type { LogRecord, NewLogRecord } from '../../src/protocol/log-records.js';

export interface SegmentedLogOptions {
  /** File of segment `index` (0, 1, 2, ...). */
  segmentPath: (index: number) => string;
  /** Start a new segment once the open one holds at least this many bytes (Infinity: never). */
  segmentBytes: number;
  /** Sequence number of the first line this writer appends (continuing a log); default 0. */
  firstSeq?: number;
  /** Index of the first segment this writer creates; default 0. */
  firstSegment?: number;
  onError?: (error: Error) => void;
  /** Names the writer in error messages; default "log". */
  label?: string;
}

/** Sync a directory so a file just created (or removed) in it survives a crash. */
export function syncDirectory(dir: string): void {
  const fd = openSync(dir, 'r');
  try {
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
}

/** Writes records of type R (the log records of src/protocol unless a caller says otherwise). */
export class SegmentedLog<R extends { record: string } = NewLogRecord> {
  private handle: FileHandle | null = null;
  private opening: Promise<void>;
  private queue: { line: string; resolve: () => void; reject: (error: Error) => void }[] = [];
  private flushing: Promise<void> | null = null;
  private seq: number;
  private failure: Error | null = null;
  private segmentIndex: number;
  private segmentFill = 0;
  /** Highest sequence number known to be on disk (firstSeq - 1 before the first sync). */
  durableSeq: number;
  /** Bytes this writer has made durable, over all its segments. */
  bytes = 0;
  /** Segment files this writer created, in order. */
  readonly created: string[] = [];

  constructor(private readonly options: SegmentedLogOptions) {
    this.seq = options.firstSeq ?? 0;
    this.durableSeq = this.seq - 1;
    this.segmentIndex = options.firstSegment ?? 0;
    this.opening = this.openSegment(this.segmentIndex);
    this.opening.catch((error: Error) => this.fail(error));
  }

  /** The segment being written. */
  get path(): string {
    return this.options.segmentPath(this.segmentIndex);
  }

  /** Lines queued and not yet durable. */
  get pending(): number {
    return this.seq - 1 - this.durableSeq;
  }

  get failed(): Error | null {
    return this.failure;
  }

  /** Queue a record; resolves with its sequence number once it is durable. */
  append(record: R): Promise<number> {
    if (this.failure) return Promise.reject(this.failure);
    const seq = this.seq++;
    const line = `${JSON.stringify({ ...record, seq })}\n`;
    return new Promise<number>((resolve, reject) => {
      this.queue.push({ line, resolve: () => resolve(seq), reject });
      this.flushing ??= this.flush();
    });
  }

  /** The sequence number the next append will get. */
  get nextSeq(): number {
    return this.seq;
  }

  /** Resolves when everything appended so far is durable (or the writer has failed). */
  async drain(): Promise<void> {
    while (this.flushing) await this.flushing;
  }

  async close(): Promise<void> {
    await this.opening.catch(() => undefined);
    await this.drain();
    await this.handle?.close();
    this.handle = null;
  }

  private async openSegment(index: number): Promise<void> {
    const path = this.options.segmentPath(index);
    mkdirSync(dirname(path), { recursive: true });
    this.handle = await open(path, 'wx');
    this.segmentIndex = index;
    this.segmentFill = 0;
    this.created.push(path);
    syncDirectory(dirname(path));
  }

  private async flush(): Promise<void> {
    try {
      await this.opening;
      while (this.queue.length > 0 && !this.failure) {
        if (this.segmentFill >= this.options.segmentBytes) {
          try {
            await this.handle!.close();
            this.handle = null;
            await this.openSegment(this.segmentIndex + 1);
          } catch (error) {
            this.fail(error as Error);
            break;
          }
        }
        const batch = this.queue;
        this.queue = [];
        const text = batch.map((b) => b.line).join('');
        try {
          await this.handle!.write(text);
          await this.handle!.datasync();
        } catch (error) {
          this.fail(error as Error);
          for (const b of batch) b.reject(this.failure!);
          break;
        }
        const size = Buffer.byteLength(text);
        this.bytes += size;
        this.segmentFill += size;
        this.durableSeq += batch.length;
        for (const b of batch) b.resolve();
      }
    } catch {
      // opening failed: fail() has already recorded it
    } finally {
      for (const b of this.queue.splice(0)) b.reject(this.failure ?? new Error('log closed'));
      this.flushing = null;
    }
  }

  private fail(error: Error): void {
    if (this.failure) return;
    this.failure = new Error(`${this.options.label ?? 'log'} ${this.path}: ${error.message}`);
    this.options.onError?.(this.failure);
  }
}

// ---------------------------------------------------------------------------------------------
// Reading a segmented log back

/** Segment files are `<prefix>-NNNNNN.ndjson` in one folder. */
export function segmentPathFor(dir: string, prefix: string): (index: number) => string {
  return (index) => join(dir, `${prefix}-${String(index).padStart(6, '0')}.ndjson`);
}

export interface SegmentInfo {
  path: string;
  index: number;
  bytes: number;
  /** Complete lines. */
  lines: number;
  firstSeq: number | null;
  lastSeq: number | null;
  /** Bytes after the last newline (a torn line), ignored. */
  tornTail: number;
}

export interface SegmentProblem extends LogProblem {
  /** The segment file. */
  path: string;
  /** Byte offset of the line's start in that file. */
  offset: number;
}

export interface RecordAt {
  record: LogRecord;
  /** Index of the segment it is in. */
  segment: number;
}

export interface SegmentedRead {
  segments: SegmentInfo[];
  /** Every readable record, in log order. */
  records: RecordAt[];
  /** Corruption: unparsable lines, sequence gaps, torn lines before the last segment. */
  problems: SegmentProblem[];
  /** A torn tail of the last segment (a crash mid-write): ignored, not a problem. */
  tornTail: { path: string; bytes: number } | null;
}

/** The segment files of `prefix` in `dir`, by index. */
export function listSegments(dir: string, prefix: string): { path: string; index: number }[] {
  let names: string[];
  try {
    names = readdirSync(dir);
  } catch {
    return [];
  }
  const pattern = new RegExp(`^${prefix.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}-(\\d{6,})\\.ndjson$`);
  return names
    .map((name) => ({ name, match: pattern.exec(name) }))
    .filter((entry) => entry.match)
    .map((entry) => ({ path: join(dir, entry.name), index: Number(entry.match![1]) }))
    .sort((a, b) => a.index - b.index);
}

/**
 * Read every segment in order. Only a record whose line ends with a newline counts; the last
 * segment's torn tail is dropped quietly, a torn line anywhere else is reported. Sequence
 * numbers must run on without a gap across segments; every problem names its file, line and
 * byte offset, and reading goes on so that everything intact stays available.
 */
export function readSegments(dir: string, prefix: string): SegmentedRead {
  const files = listSegments(dir, prefix);
  const result: SegmentedRead = { segments: [], records: [], problems: [], tornTail: null };
  let expected = 0;
  files.forEach((file, position) => {
    const text = readFileSync(file.path, 'utf8');
    const parsed = parseLog(text, { firstSeq: expected });
    const starts = lineStarts(text);
    const isLast = position === files.length - 1;
    for (const problem of parsed.problems) {
      // only the first segment carries the header
      if (position > 0 && problem.reason === 'the log has no header record') continue;
      result.problems.push({ ...problem, path: file.path, offset: starts[problem.line - 1] ?? 0 });
    }
    if (parsed.tornTail > 0) {
      const offset = text.length - parsed.tornTail;
      if (isLast) result.tornTail = { path: file.path, bytes: Buffer.byteLength(text.slice(offset)) };
      else
        result.problems.push({
          path: file.path,
          line: starts.length,
          offset: Buffer.byteLength(text.slice(0, offset)),
          reason: `segment ends in an unterminated line of ${parsed.tornTail} characters (only the last segment may)`,
        });
    }
    const ordered = parsed.records;
    for (const record of ordered) result.records.push({ record, segment: file.index });
    if (ordered.length > 0) expected = ordered[ordered.length - 1].seq + 1;
    result.segments.push({
      path: file.path,
      index: file.index,
      bytes: statSync(file.path).size,
      lines: starts.length,
      firstSeq: ordered[0]?.seq ?? null,
      lastSeq: ordered[ordered.length - 1]?.seq ?? null,
      tornTail: parsed.tornTail,
    });
  });
  return result;
}

/** Byte offset at which each complete line starts. */
function lineStarts(text: string): number[] {
  const starts: number[] = [];
  let byte = 0;
  let from = 0;
  for (;;) {
    const nl = text.indexOf('\n', from);
    if (nl < 0) break;
    starts.push(byte);
    byte += Buffer.byteLength(text.slice(from, nl + 1));
    from = nl + 1;
  }
  return starts;
}

/**
 * Cut the log back to just after the record `kept` (everything later is dropped): later
 * segments are removed newest first, then the kept record's segment is truncated and synced,
 * so a crash at any point leaves a prefix of the log. Returns the index for the next segment.
 */
export function cutAfter(dir: string, prefix: string, kept: RecordAt): number {
  const files = listSegments(dir, prefix);
  for (const file of [...files].reverse()) {
    if (file.index > kept.segment) unlinkSync(file.path);
  }
  const path = segmentPathFor(dir, prefix)(kept.segment);
  truncateSync(path, endOfRecord(path, kept.record.seq));
  const fd = openSync(path, 'r+');
  try {
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
  syncDirectory(dir);
  return kept.segment + 1;
}

/** Byte offset just past the newline of the line holding record `seq` (the writer puts seq last). */
function endOfRecord(path: string, seq: number): number {
  const text = readFileSync(path, 'utf8');
  const suffix = `"seq":${seq}}`;
  let from = 0;
  let byte = 0;
  for (;;) {
    const nl = text.indexOf('\n', from);
    if (nl < 0) break;
    const line = text.slice(from, nl);
    byte += Buffer.byteLength(line) + 1;
    if (line.endsWith(suffix)) {
      try {
        if ((JSON.parse(line) as { seq?: unknown }).seq === seq) return byte;
      } catch {
        // not this one
      }
    }
    from = nl + 1;
  }
  throw new Error(`${path}: record ${seq} not found; the log changed while it was being resumed`);
}
