import { parentPort } from 'node:worker_threads';
import { parseScenario } from '../../src/scenario/parse.js';
import { parseStudy, type Study, type StudyJSON } from '../../src/yield/study.js';
import { runIndex } from '../../src/yield/sample.js';
import type { ChunkReply, ChunkRequest } from './pool.js';

/**
 * Worker-thread home of a yield study's samples: each request is a chunk of sample indices of one
 * study (its normalised JSON, sent with the first chunk of that study only); the answer is their
 * records, in index order, or the error that stopped them.
 */
if (!parentPort) throw new Error('sample-worker must run in a worker thread');
const port = parentPort;
const studies = new Map<string, Study>();

port.on('message', (message: ChunkRequest) => {
  try {
    let study = studies.get(message.studyId);
    if (!study) {
      if (!message.study) throw new Error(`study ${message.studyId} was not sent to this worker`);
      const json: StudyJSON = message.study;
      study = parseStudy(json, parseScenario(json.scenario, 'the study'), 'the study');
      studies.set(message.studyId, study);
    }
    const records = message.indices.map((index) => runIndex(study, index));
    port.postMessage({ id: message.id, ok: true, records } satisfies ChunkReply);
  } catch (error) {
    port.postMessage({ id: message.id, ok: false, error: (error as Error).message } satisfies ChunkReply);
  }
});
