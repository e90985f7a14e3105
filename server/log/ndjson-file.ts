import { closeSync, fsyncSync, openSync, writeSync } from 'node:fs';
import type { NewLogRecord } from '../../src/protocol/log-records.js';

/**
 * A plain append-only NDJSON file for headless runs: one record per line, written in order,
 * synced when closed. (Live sessions and soaks use the crash-safe segment writer instead.)
 */
export class NdjsonFile {
  private readonly fd: number;
  private seq = 0;

  constructor(readonly path: string) {
    this.fd = openSync(path, 'w');
  }

  /** Append a record, stamping it with the next sequence number. */
  append(record: NewLogRecord): number {
    const seq = this.seq++;
    writeSync(this.fd, `${JSON.stringify({ ...record, seq })}\n`);
    return seq;
  }

  get nextSeq(): number {
    return this.seq;
  }

  close(): void {
    fsyncSync(this.fd);
    closeSync(this.fd);
  }
}
