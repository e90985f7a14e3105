import { mkdirSync, openSync, closeSync, fsyncSync } from 'node:fs';
import { open, type FileHandle } from 'node:fs/promises';
import { dirname, join } from 'node:path';

/**
 * The session log writer: one writer, one queue, lines appended strictly in order, each stamped
 * with the next sequence number. Group commit: whatever has queued while the previous batch was
 * being written goes out in one write followed by one fdatasync, and every `append` promise
 * resolves only once its line is on disk. A failed write or sync is fatal for the file: the
 * writer stops, rejects what is pending and reports the error (engineering notes: a retried
 * fsync after EIO can falsely succeed).
 */
export class SessionLog {
  private handle: FileHandle | null = null;
  private readonly opening: Promise<void>;
  private queue: { line: string; resolve: () => void; reject: (error: Error) => void }[] = [];
  private flushing: Promise<void> | null = null;
  private seq = 0;
  private failure: Error | null = null;
  /** Highest sequence number known to be on disk (-1 before the first sync). */
  durableSeq = -1;
  bytes = 0;

  constructor(readonly path: string, private readonly onError: (error: Error) => void = () => {}) {
    mkdirSync(dirname(path), { recursive: true });
    this.opening = open(path, 'wx').then(async (handle) => {
      this.handle = handle;
      // a new file's directory entry must be durable too
      const dir = openSync(dirname(path), 'r');
      try {
        fsyncSync(dir);
      } finally {
        closeSync(dir);
      }
    });
    this.opening.catch((error: Error) => this.fail(error));
  }

  /** A fresh file name in `dir` for a run of `label`. */
  static fileFor(dir: string, label: string, now = new Date()): string {
    const stamp = now.toISOString().replace(/[:.]/g, '-');
    const safe = label.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '').slice(0, 40) || 'run';
    return join(dir, `${stamp}-${safe}.ndjson`);
  }

  /** Queue a record; resolves with its sequence number once it is durable. */
  append(record: { record: string; [key: string]: unknown }): Promise<number> {
    if (this.failure) return Promise.reject(this.failure);
    const seq = this.seq++;
    const line = `${JSON.stringify({ ...record, seq })}\n`;
    return new Promise<number>((resolve, reject) => {
      this.queue.push({ line, resolve: () => resolve(seq), reject });
      this.flushing ??= this.flush();
    });
  }

  /** Resolves when everything appended so far is durable. */
  async drain(): Promise<void> {
    while (this.flushing) await this.flushing;
  }

  async close(): Promise<void> {
    await this.opening.catch(() => undefined);
    await this.drain();
    await this.handle?.close();
    this.handle = null;
  }

  private async flush(): Promise<void> {
    try {
      await this.opening;
      while (this.queue.length > 0 && !this.failure) {
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
        this.bytes += Buffer.byteLength(text);
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
    this.failure = new Error(`session log ${this.path}: ${error.message}`);
    this.onError(this.failure);
  }
}
