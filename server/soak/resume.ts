import { join } from 'node:path';
import type { FaultVerdict, PhaseSample } from '../../src/campaign/index.js';
import type { HeaderRecord } from '../../src/protocol/log-records.js';
import { readSegments, type RecordAt, type SegmentedRead } from '../log/segments.js';
import { UsageError } from '../usage-error.js';
import { LOG_FOLDER, SEGMENT_PREFIX, stabilitySamples, type CheckpointLine, type EndLine, type SampleLine, type SoakHeader, type VerdictLine } from './soak-records.js';

export type SoakHeaderRecord = HeaderRecord & { soak: SoakHeader };

/** Where a killed soak picks up: its last checkpoint and what the log holds before it. */
export interface ResumePoint {
  header: SoakHeaderRecord;
  /** null: the log has no checkpoint yet, so the soak starts over. */
  checkpoint: (CheckpointLine & { seq: number }) | null;
  checkpointAt: RecordAt | null;
  samples: PhaseSample[];
  sampleLines: SampleLine[];
  verdicts: FaultVerdict[];
  /** Records after the checkpoint, by seq, as the lines they were: the resumed run must write them again exactly. */
  discarded: Map<number, string>;
  /** The soak had finished: its deterministic summary. */
  end: EndLine | null;
  tornTailBytes: number;
}

export function soakLogDir(out: string): string {
  return join(out, LOG_FOLDER);
}

export function readSoakLog(out: string): SegmentedRead {
  return readSegments(soakLogDir(out), SEGMENT_PREFIX);
}

/** Describe log corruption with file, line and byte offset. */
export function describeProblems(read: SegmentedRead, limit = 5): string {
  const shown = read.problems.slice(0, limit).map((p) => `${p.path} line ${p.line} (byte ${p.offset}): ${p.reason}`);
  if (read.problems.length > limit) shown.push(`... and ${read.problems.length - limit} more`);
  return shown.join('\n  ');
}

/** The resume point of the soak log in `out`, or null when there is no log there. */
export function findResumePoint(out: string): ResumePoint | null {
  const read = readSoakLog(out);
  if (read.segments.length === 0) return null;
  if (read.problems.length > 0) {
    throw new UsageError(`cannot resume: the soak log in ${soakLogDir(out)} is damaged\n  ${describeProblems(read)}`);
  }
  const first = read.records[0]?.record;
  if (!first || first.record !== 'header' || !('soak' in first)) {
    throw new UsageError(`cannot resume: ${soakLogDir(out)} does not start with a soak header`);
  }
  const header = first as unknown as SoakHeaderRecord;
  let lastCheckpoint = -1;
  let end: EndLine | null = null;
  read.records.forEach((r, i) => {
    if (r.record.record === 'checkpoint') lastCheckpoint = i;
    if (r.record.record === 'end') end = r.record as unknown as EndLine;
  });
  const point: ResumePoint = {
    header,
    checkpoint: null,
    checkpointAt: null,
    samples: [],
    sampleLines: [],
    verdicts: [],
    discarded: new Map(),
    end,
    tornTailBytes: read.tornTail?.bytes ?? 0,
  };
  if (lastCheckpoint < 0) return point;
  point.checkpointAt = read.records[lastCheckpoint];
  point.checkpoint = point.checkpointAt.record as unknown as CheckpointLine & { seq: number };
  read.records.forEach((r, i) => {
    const line = r.record;
    if (i > lastCheckpoint) point.discarded.set(line.seq, JSON.stringify(line));
    else if (line.record === 'soak-sample') point.sampleLines.push(line as unknown as SampleLine);
    else if (line.record === 'verdict') point.verdicts.push((line as unknown as VerdictLine).verdict);
  });
  point.samples = stabilitySamples(point.sampleLines);
  return point;
}
