/**
 * The coordinator of a yield study: owns the --out folder, hands the samples not yet done to an
 * engine (the local thread pool or the Redis queue), writes each record to samples.ndjson in index
 * order as soon as every record before it is in, keeps status.json current for the dashboard,
 * and at the end writes summary.json (formats in src/protocol/yield-files.ts).
 *
 * Records are idempotent per (study, sample index): the same index always gives the same record,
 * and an index already written is never written again, so an engine may deliver a chunk twice
 * (a queue's at-least-once delivery) and nothing is counted twice. A killed coordinator resumes
 * with `resume`: samples.ndjson is read back (a torn last line dropped), checked to be the same
 * study (study.json's fingerprint), and the run continues after the last whole line.
 */
import { createHash } from 'node:crypto';
import { closeSync, existsSync, fsyncSync, mkdirSync, openSync, readFileSync, truncateSync, writeSync } from 'node:fs';
import { join } from 'node:path';
import { YIELD_CAUTION } from '../../src/campaign/cautions.js';
import {
  SAMPLES_FILE,
  STUDY_FILE,
  YIELD_STATUS_FILE,
  YIELD_SUMMARY_FILE,
  readSampleRecord,
  type YieldSampleRecord,
  type YieldStatus,
  type YieldSummary,
} from '../../src/protocol/yield-files.js';
import { studyToJSON, totalSamples, type Study, type StudyJSON } from '../../src/yield/study.js';
import { pointSummaries, sweepSummary } from '../../src/yield/summary.js';
import { UsageError } from '../usage-error.js';
import { Progress } from '../progress.js';
import { writeJsonAtomically } from '../soak/outputs.js';
import { lockFolder } from '../soak/dir-lock.js';

/** Samples per chunk handed to an engine: small enough to balance the load over the workers, large enough that handing out costs nothing beside a sample (tens of ms). */
export const CHUNK_SAMPLES = 8;
/** status.json is rewritten at most this often (ms): the dashboard polls every 2 s. */
const STATUS_EVERY_MS = 1000;
/** samples.ndjson is synced to disk at most this often (ms): a kill loses at most that much, which the resume recomputes. */
const SYNC_EVERY_MS = 2000;

export interface SampleEngine {
  readonly kind: 'local' | 'redis';
  readonly workers: number | null;
  /** Runs every index of `pending` in chunks, calling `onRecords` as each chunk's records arrive (possibly twice). */
  run(studyId: string, study: StudyJSON, chunks: number[][], onRecords: (records: YieldSampleRecord[]) => void): Promise<void>;
  close(): Promise<void>;
}

export interface StudyFolderFile {
  fingerprint: string;
  study: StudyJSON;
}

/** The study's identity: a hash of its normalised JSON (the scenario inline), so a resume can tell it is the same study. */
export function studyFingerprint(json: StudyJSON): string {
  return createHash('sha256').update(JSON.stringify(json)).digest('hex').slice(0, 24);
}

/** The whole lines of samples.ndjson, in order from index 0; stops at the first line that is not the next record (a torn tail). */
export function readSamples(path: string): { records: YieldSampleRecord[]; bytes: number } {
  if (!existsSync(path)) return { records: [], bytes: 0 };
  const text = readFileSync(path, 'utf8');
  const records: YieldSampleRecord[] = [];
  let bytes = 0;
  let start = 0;
  for (;;) {
    const end = text.indexOf('\n', start);
    if (end < 0) break;
    let record: YieldSampleRecord | null;
    try {
      record = readSampleRecord(JSON.parse(text.slice(start, end)));
    } catch {
      record = null;
    }
    if (!record || record.index !== records.length) break;
    records.push(record);
    start = end + 1;
    bytes = Buffer.byteLength(text.slice(0, start));
  }
  return { records, bytes };
}

export function chunksOf(pending: readonly number[], size = CHUNK_SAMPLES): number[][] {
  const chunks: number[][] = [];
  for (let i = 0; i < pending.length; i += size) chunks.push(pending.slice(i, i + size));
  return chunks;
}

export interface RunOptions {
  out: string;
  resume: boolean;
  engine: SampleEngine;
  /** Where progress goes (stderr unless told otherwise). */
  progress?: NodeJS.WriteStream;
}

export async function runStudy(study: Study, options: RunOptions): Promise<YieldSummary> {
  const { out, engine } = options;
  const json = studyToJSON(study);
  const fingerprint = studyFingerprint(json);
  mkdirSync(out, { recursive: true });
  const unlock = lockFolder(out, 'yield');
  try {
    const studyPath = join(out, STUDY_FILE);
    const samplesPath = join(out, SAMPLES_FILE);
    if (options.resume) {
      if (!existsSync(studyPath)) throw new UsageError(`--resume: ${out} holds no ${STUDY_FILE}; start the study without --resume`);
      const saved = JSON.parse(readFileSync(studyPath, 'utf8')) as StudyFolderFile;
      if (saved.fingerprint !== fingerprint) {
        throw new UsageError(
          `--resume: ${out} holds another study (fingerprint ${saved.fingerprint}, this one is ${fingerprint}); use another --out`,
        );
      }
    } else if (existsSync(samplesPath) && readFileSync(samplesPath).length > 0) {
      throw new UsageError(`${out} already holds ${SAMPLES_FILE}; continue it with --resume or choose another --out`);
    } else {
      writeJsonAtomically(out, STUDY_FILE, { fingerprint, study: json } satisfies StudyFolderFile);
    }
    const { records, bytes } = options.resume ? readSamples(samplesPath) : { records: [], bytes: 0 };
    if (existsSync(samplesPath)) truncateSync(samplesPath, bytes);
    const total = totalSamples(study);
    const started = Date.now();
    const firstDone = records.length;
    let passed = records.filter((r) => r.pass).length;
    const fd = openSync(samplesPath, 'a');
    const waiting = new Map<number, YieldSampleRecord>();
    const progress = new Progress('yield', total, options.progress);
    let lastStatus = 0;
    let lastSync = Date.now();
    const status = (state: YieldStatus['state'], error?: string): void => {
      const seconds = (Date.now() - started) / 1000;
      const rate = seconds > 0 ? (records.length - firstDone) / seconds : 0;
      writeJsonAtomically(out, YIELD_STATUS_FILE, {
        state,
        pid: process.pid,
        done: records.length,
        total,
        passed,
        samplesPerSecond: rate,
        etaSeconds: rate > 0 ? (total - records.length) / rate : null,
        engine: engine.kind,
        updatedAt: new Date().toISOString(),
        ...(error !== undefined ? { error } : {}),
      } satisfies YieldStatus);
    };
    const accept = (incoming: YieldSampleRecord[]): void => {
      for (const r of incoming) if (r.index >= records.length && !waiting.has(r.index)) waiting.set(r.index, r);
      let next = waiting.get(records.length);
      let text = '';
      while (next) {
        waiting.delete(next.index);
        records.push(next);
        if (next.pass) passed++;
        text += `${JSON.stringify(next)}\n`;
        next = waiting.get(records.length);
      }
      if (text) writeSync(fd, text);
      const now = Date.now();
      if (now - lastSync >= SYNC_EVERY_MS) {
        fsyncSync(fd);
        lastSync = now;
      }
      if (now - lastStatus >= STATUS_EVERY_MS) {
        lastStatus = now;
        status('running');
      }
      progress.update(records.length, `${records.length}/${total} samples, ${passed} passed`);
    };
    status('running');
    const pending = Array.from({ length: total - records.length }, (_, i) => records.length + i);
    try {
      await engine.run(fingerprint, json, chunksOf(pending), accept);
    } catch (error) {
      status('failed', (error as Error).message);
      throw error;
    } finally {
      fsyncSync(fd);
      closeSync(fd);
      progress.finish();
    }
    if (records.length !== total) throw new Error(`the engine finished with ${records.length} of ${total} samples`);
    status('finished');
    const wallSeconds = (Date.now() - started) / 1000;
    const summary = summaryOf(study, records, { kind: engine.kind, workers: engine.workers }, wallSeconds, records.length - firstDone);
    writeJsonAtomically(out, YIELD_SUMMARY_FILE, summary);
    return summary;
  } finally {
    unlock();
  }
}

export function summaryOf(
  study: Study,
  records: readonly YieldSampleRecord[],
  engine: YieldSummary['engine'],
  wallSeconds: number,
  computed: number,
): YieldSummary {
  const points = pointSummaries(study, records);
  const { point: _point, sweepValue: _value, ...figures } = points[0];
  const criteria = study.criteria;
  const wanted =
    criteria.pattern === null ? 'any locked pattern' : criteria.q !== null ? `${criteria.pattern} q=${criteria.q}` : criteria.pattern;
  return {
    study: study.name,
    scenario: study.scenario.name,
    samples: study.samples,
    done: records.length,
    engine,
    wallSeconds,
    samplesPerSecond: wallSeconds > 0 ? computed / wallSeconds : 0,
    ...figures,
    points,
    sweep: sweepSummary(study, points),
    notes: {
      criteria:
        `a board passes when the guiding system, from its start, settles on a stable lock into ${wanted} on mode ${criteria.mode} ` +
        `within ${criteria.within} slow time units` +
        (criteria.minMargin !== null
          ? `, decaying at ${criteria.minMargin} per slow time unit or faster (margin <= -${criteria.minMargin})`
          : ''),
      interval: `Wilson score interval at ${study.confidence * 100} % confidence`,
      margin:
        "margin: largest real part of the locked state's reduced Jacobian per slow time unit (negative is stable); lockTime in slow time units",
      caution: YIELD_CAUTION,
    },
  };
}
