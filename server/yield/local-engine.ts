import type { YieldSampleRecord } from '../../src/protocol/yield-files.js';
import type { StudyJSON } from '../../src/yield/study.js';
import type { SampleEngine } from './coordinator.js';
import { SamplePool } from './pool.js';

/** The embedded engine: the chunks go to a pool of worker threads on this machine. */
export class LocalEngine implements SampleEngine {
  readonly kind = 'local' as const;
  private readonly pool: SamplePool;

  constructor(workers?: number) {
    this.pool = new SamplePool(workers);
  }

  get workers(): number {
    return this.pool.size;
  }

  async run(studyId: string, study: StudyJSON, chunks: number[][], onRecords: (records: YieldSampleRecord[]) => void): Promise<void> {
    await Promise.all(chunks.map((chunk) => this.pool.run(studyId, study, chunk).then(onRecords)));
  }

  close(): Promise<void> {
    return this.pool.close();
  }
}
