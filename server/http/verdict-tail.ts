import { open, stat } from 'node:fs/promises';
import type { FaultVerdict } from '../../src/campaign/index.js';
import { listSegments } from '../log/segments.js';
import { soakLogDir } from '../soak/resume.js';
import { SEGMENT_PREFIX } from '../../src/protocol/soak-files.js';

const VERDICT_LINE = '{"record":"verdict"';

/**
 * The verdicts of a soak that is still running, read from its log as it grows: each poll reads
 * only the bytes appended since the last one (status.json carries just id and pass; the full
 * verdicts reach summary.json only at the end). A line without its newline yet is kept for the
 * next read; records are keyed by their sequence number, so lines a resumed soak writes again
 * replace the old ones instead of doubling them.
 */
export class VerdictTail {
  private readonly files = new Map<string, { offset: number; rest: Buffer }>();
  private readonly bySeq = new Map<number, FaultVerdict>();

  constructor(private readonly soakDir: string) {}

  async read(): Promise<FaultVerdict[]> {
    for (const segment of listSegments(soakLogDir(this.soakDir), SEGMENT_PREFIX)) await this.readSegment(segment.path);
    return [...this.bySeq.entries()].sort((a, b) => a[0] - b[0]).map(([, verdict]) => verdict);
  }

  private async readSegment(path: string): Promise<void> {
    const size = (await stat(path)).size;
    let seen = this.files.get(path) ?? { offset: 0, rest: Buffer.alloc(0) };
    // Shorter than before: a resume cut the torn tail off; read the segment again.
    if (size < seen.offset) seen = { offset: 0, rest: Buffer.alloc(0) };
    if (size === seen.offset) return;
    const handle = await open(path, 'r');
    try {
      const bytes = Buffer.alloc(size - seen.offset);
      const { bytesRead } = await handle.read(bytes, 0, bytes.length, seen.offset);
      // Split on the last newline in bytes, so a character cut by the end of the read stays whole.
      const joined = Buffer.concat([seen.rest, bytes.subarray(0, bytesRead)]);
      const end = joined.lastIndexOf(0x0a);
      for (const line of joined
        .subarray(0, end + 1)
        .toString('utf8')
        .split('\n'))
        this.take(line);
      this.files.set(path, { offset: seen.offset + bytesRead, rest: Buffer.from(joined.subarray(end + 1)) });
    } finally {
      await handle.close();
    }
  }

  private take(line: string): void {
    if (!line.startsWith(VERDICT_LINE)) return;
    try {
      const record = JSON.parse(line) as { seq?: unknown; verdict?: FaultVerdict };
      if (typeof record.seq === 'number' && record.verdict && typeof record.verdict === 'object')
        this.bySeq.set(record.seq, record.verdict);
    } catch {
      // a corrupt line: the report and --resume name it; the listing just skips it
    }
  }
}
