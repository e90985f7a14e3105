import { UsageError } from '../usage-error.js';

/** The one queue every yield study uses; jobs carry their study's fingerprint, so studies share it safely. */
export const QUEUE_NAME = 'syncring-yield';

/** BullMQ's connection options for a redis:// or rediss:// URL, refused with a clear error otherwise. */
export function redisConnection(url: string): { url: string; maxRetriesPerRequest: null } {
  let parsed: URL;
  try {
    parsed = new URL(url);
  } catch {
    throw new UsageError(`--redis must be a URL such as redis://HOST:6379 (got ${JSON.stringify(url)})`);
  }
  if (parsed.protocol !== 'redis:' && parsed.protocol !== 'rediss:') {
    throw new UsageError(`--redis must be a redis:// or rediss:// URL (got ${JSON.stringify(url)})`);
  }
  // BullMQ's blocking commands need ioredis to retry forever rather than give up after a few tries
  return { url, maxRetriesPerRequest: null };
}

export interface ChunkJobData {
  studyId: string;
  study: import('../../src/yield/study.js').StudyJSON;
  indices: number[];
}
