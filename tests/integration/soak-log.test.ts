import { describe, expect, test } from 'vitest';
import { appendFileSync, mkdtempSync, readdirSync, readFileSync, statSync, truncateSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { SegmentedLog, cutAfter, readSegments, segmentPathFor } from '../../server/log/segments.js';
import { SessionLog } from '../../server/log/session-log.js';
import { logHeader } from '../../src/protocol/log-records.js';
import { loadBuiltInScenario } from '../../src/scenarios/index.js';

/**
 * The crash-safe segmented log (README, crash safety): in-order lines with seq,
 * group commit, size-based segments, a torn last line tolerated, corruption reported with its
 * position, and the cut a resume makes.
 */
const PREFIX = 'soak';
/** The writer's mechanics are tested on records of its own, not on the soak's. */
type TestRecord = { record: string; [key: string]: unknown };
const fresh = () => mkdtempSync(join(tmpdir(), 'syncring-seglog-'));

async function writeLog(dir: string, count: number, segmentBytes: number): Promise<number[]> {
  const log = new SegmentedLog<TestRecord>({ segmentPath: segmentPathFor(dir, PREFIX), segmentBytes });
  const acks = [log.append({ record: 'header', format: 'syncring-log', formatVersion: 1 })];
  for (let i = 1; i < count; i++) {
    acks.push(log.append({ record: 'event', event: { n: i, text: 'x'.repeat(40) } }));
    // let a batch go out now and then, as a running soak does between slices
    if (i % 10 === 0) await acks[i];
  }
  const seqs = await Promise.all(acks);
  await log.close();
  return seqs;
}

describe('segmented log writer', () => {
  test('every append resolves with its seq once durable; lines stay in order across size-based segments', async () => {
    const dir = fresh();
    const seqs = await writeLog(dir, 300, 2000);
    expect(seqs).toEqual(Array.from({ length: 300 }, (_, i) => i));
    const files = readdirSync(dir).sort();
    expect(files.length).toBeGreaterThan(5);
    expect(files[0]).toBe('soak-000000.ndjson');
    // a segment is closed once it holds >= 2000 bytes; one group-commit batch may overshoot
    for (const f of files.slice(0, -1)) expect(statSync(join(dir, f)).size).toBeGreaterThanOrEqual(2000);
    const read = readSegments(dir, PREFIX);
    expect(read.problems).toEqual([]);
    expect(read.tornTail).toBeNull();
    expect(read.records.map((r) => r.record.seq)).toEqual(seqs);
    expect(read.records.every((r, i) => i === 0 || r.record.record === 'event')).toBe(true);
    // no line straddles two files
    for (const f of files) expect(readFileSync(join(dir, f), 'utf8').endsWith('\n')).toBe(true);
  });

  test('a failed open is reported and every pending append is rejected', async () => {
    const dir = fresh();
    writeFileSync(join(dir, 'soak-000000.ndjson'), ''); // the writer never reuses a file
    const errors: Error[] = [];
    const log = new SegmentedLog<TestRecord>({
      segmentPath: segmentPathFor(dir, PREFIX),
      segmentBytes: 1e6,
      onError: (e) => errors.push(e),
    });
    await expect(log.append({ record: 'event' })).rejects.toThrow(/EEXIST/);
    expect(errors).toHaveLength(1);
    await expect(log.append({ record: 'event' })).rejects.toThrow(/EEXIST/);
  });

  test('SessionLog keeps its single-file API on the shared writer', async () => {
    const dir = fresh();
    const log = new SessionLog(join(dir, 'live.ndjson'));
    const event = { seq: 1, tau: 0, kind: 'control' as const, message: 'paused', by: 'test' };
    const seqs = await Promise.all([
      log.append(logHeader(loadBuiltInScenario('pair-adler'), {}, 'test')),
      log.append({ record: 'event', event }),
    ]);
    expect(seqs).toEqual([0, 1]);
    expect(log.durableSeq).toBe(1);
    await log.close();
    expect(log.bytes).toBe(statSync(log.path).size);
    expect(readdirSync(dir)).toEqual(['live.ndjson']);
  });
});

describe('reading a segmented log back', () => {
  test('a torn last line (a crash mid-write) is dropped quietly and everything before it is read', async () => {
    const dir = fresh();
    await writeLog(dir, 120, 1500);
    const files = readdirSync(dir).sort();
    const last = join(dir, files.at(-1)!);
    appendFileSync(last, '{"record":"event","event":{"n":1');
    const read = readSegments(dir, PREFIX);
    expect(read.problems).toEqual([]);
    expect(read.tornTail).toEqual({ path: last, bytes: 32 });
    expect(read.records).toHaveLength(120);
  });

  test('a last segment truncated at any byte reads back as the lines that were complete', async () => {
    const dir = fresh();
    await writeLog(dir, 60, 1500);
    const files = readdirSync(dir).sort();
    const last = join(dir, files.at(-1)!);
    const full = readFileSync(last, 'utf8');
    const before = readSegments(dir, PREFIX).records.length - full.split('\n').filter(Boolean).length;
    for (let cut = full.length; cut >= 0; cut -= 7) {
      truncateSync(last, cut);
      const read = readSegments(dir, PREFIX);
      const complete = full.slice(0, cut).split('\n').length - 1;
      expect(read.problems).toEqual([]);
      expect(read.records).toHaveLength(before + complete);
      expect(read.tornTail?.bytes ?? 0).toBe(cut - (full.slice(0, cut).lastIndexOf('\n') + 1));
    }
  });

  test('a corrupt line in the middle is reported with its file, line and byte offset; the rest is still read', async () => {
    const dir = fresh();
    await writeLog(dir, 80, 1500);
    const second = join(dir, readdirSync(dir).sort()[1]);
    const lines = readFileSync(second, 'utf8').split('\n');
    const offset = Buffer.byteLength(lines.slice(0, 2).join('\n')) + 1;
    lines[2] = lines[2].slice(0, 10) + '#garbage#' + lines[2].slice(10);
    writeFileSync(second, lines.join('\n'));
    const read = readSegments(dir, PREFIX);
    expect(read.problems).toHaveLength(2);
    expect(read.problems[0]).toMatchObject({ path: second, line: 3, offset });
    expect(read.problems[0].reason).toMatch(/not valid JSON/);
    // the next good line shows the gap in the sequence
    expect(read.problems[1]).toMatchObject({ path: second, line: 4 });
    expect(read.problems[1].reason).toMatch(/sequence number \d+ where \d+ was expected/);
    expect(read.records).toHaveLength(79);
  });

  test('a torn line at the end of a middle segment is corruption, not a crash tail', async () => {
    const dir = fresh();
    await writeLog(dir, 80, 1500);
    const first = join(dir, readdirSync(dir).sort()[0]);
    truncateSync(first, statSync(first).size - 5);
    const read = readSegments(dir, PREFIX);
    expect(read.tornTail).toBeNull();
    expect(read.problems[0]).toMatchObject({ path: first });
    expect(read.problems[0].reason).toMatch(/unterminated line.*only the last segment may/);
  });

  test('cutting after a record drops the later segments and lines, and a new writer continues the sequence', async () => {
    const dir = fresh();
    await writeLog(dir, 100, 1500);
    const read = readSegments(dir, PREFIX);
    const kept = read.records[41];
    const next = cutAfter(dir, PREFIX, kept);
    expect(next).toBe(kept.segment + 1);
    const after = readSegments(dir, PREFIX);
    expect(after.records.map((r) => r.record.seq)).toEqual(Array.from({ length: 42 }, (_, i) => i));
    const log = new SegmentedLog<TestRecord>({
      segmentPath: segmentPathFor(dir, PREFIX),
      segmentBytes: 1500,
      firstSeq: 42,
      firstSegment: next,
    });
    await Promise.all([log.append({ record: 'event' }), log.append({ record: 'event' })]);
    await log.close();
    const resumed = readSegments(dir, PREFIX);
    expect(resumed.problems).toEqual([]);
    expect(resumed.records.map((r) => r.record.seq)).toEqual(Array.from({ length: 44 }, (_, i) => i));
  });
});
