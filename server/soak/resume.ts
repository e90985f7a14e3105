import { join } from 'node:path';
import { parseCampaign, type Campaign, type FaultVerdict, type PhaseSample } from '../../src/campaign/index.js';
import { isSoakCheckpoint, isSoakHeader, type SoakCheckpointRecord, type SoakHeaderRecord } from '../../src/protocol/log-records.js';
import { stabilitySamples, type EndRecord, type SoakSampleRecord } from '../../src/protocol/soak-records.js';
import { LOG_FOLDER, SEGMENT_PREFIX } from '../../src/protocol/soak-files.js';
import { scenarioToJSON } from '../../src/scenario/parse.js';
import type { Scenario } from '../../src/scenario/types.js';
import { readSegments, type RecordAt, type SegmentedRead } from '../log/segments.js';
import { UsageError } from '../usage-error.js';

/** Where a killed soak picks up: its last checkpoint and what the log holds before it. */
export interface ResumePoint {
  header: SoakHeaderRecord;
  /** null: the log has no checkpoint yet, so the soak starts over. */
  checkpoint: SoakCheckpointRecord | null;
  checkpointAt: RecordAt | null;
  samples: PhaseSample[];
  sampleLines: SoakSampleRecord[];
  verdicts: FaultVerdict[];
  /** Records after the checkpoint, by seq, as the lines they were: the resumed run must write them again exactly. */
  discarded: Map<number, string>;
  /** The soak had finished: its deterministic summary. */
  end: EndRecord | null;
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

/** The soak header a soak log starts with, or the error saying it does not. */
export function soakHeaderOf(read: SegmentedRead, where: string): SoakHeaderRecord {
  const first = read.records[0]?.record;
  if (!isSoakHeader(first)) throw new UsageError(`${where} does not start with a soak header`);
  return first;
}

/** The resume point of the soak log in `out`, or null when there is no log there. */
export function findResumePoint(out: string): ResumePoint | null {
  const read = readSoakLog(out);
  if (read.segments.length === 0) return null;
  if (read.problems.length > 0) {
    throw new UsageError(`cannot resume: the soak log in ${soakLogDir(out)} is damaged\n  ${describeProblems(read)}`);
  }
  const header = soakHeaderOf(read, `cannot resume: ${soakLogDir(out)}`);
  let last = -1;
  let end: EndRecord | null = null;
  read.records.forEach(({ record }, i) => {
    if (record.record === 'checkpoint') last = i;
    if (record.record === 'end') end = record;
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
  if (last < 0) return point;
  const at = read.records[last];
  if (!isSoakCheckpoint(at.record))
    throw new UsageError(`cannot resume: the last checkpoint in ${soakLogDir(out)} is not a soak checkpoint`);
  point.checkpointAt = at;
  point.checkpoint = at.record;
  read.records.forEach(({ record }, i) => {
    if (i > last) point.discarded.set(record.seq, JSON.stringify(record));
    else if (record.record === 'soak-sample') point.sampleLines.push(record);
    else if (record.record === 'verdict') point.verdicts.push(record.verdict);
  });
  point.samples = stabilitySamples(point.sampleLines);
  return point;
}

/** A resume must continue the same soak: the same scenario, campaign and end. */
export function checkSameSoak(
  point: ResumePoint,
  scenario: Scenario,
  campaign: Campaign,
  asked: { scenario: string; campaign: string; out: string; until?: number },
): void {
  const header = point.header;
  if (JSON.stringify(header.scenario) !== JSON.stringify(scenarioToJSON(scenario))) {
    throw new UsageError(`cannot resume: ${asked.scenario} is not the scenario the soak in ${asked.out} was started with`);
  }
  const started = parseCampaign(header.soak.campaign, scenario, 'the log header');
  if (JSON.stringify(started) !== JSON.stringify(campaign)) {
    throw new UsageError(`cannot resume: ${asked.campaign} is not the campaign the soak in ${asked.out} was started with`);
  }
  if (asked.until !== undefined && asked.until !== header.soak.until) {
    throw new UsageError(`cannot resume: the soak in ${asked.out} was started with --until ${header.soak.until}, not ${asked.until}`);
  }
}
