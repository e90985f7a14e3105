import type { Express, Request } from 'express';
import type { NoiseOutput, NoiseResponse } from '../../src/protocol/noise-output.js';
import { ModelParameters } from '../../src/model/parameters.js';
import { parseScenario } from '../../src/scenario/parse.js';
import type { LiveSession } from '../live/live-session.js';
import { AnswerCache } from './answer-cache.js';
import { HttpError, sendHttpError } from './http-error.js';
import type { NoiseRequest } from './noise-worker.js';
import { WHAT_IF_BOUNDS, integerQuery, oneText } from './prediction-query.js';
import { sourceOf } from '../request-source.js';
import { liveScenarioJson, predictionFingerprint } from './prediction-api.js';
import { BackgroundWorker, compiledHttpWorker, type WorkerLimits } from './worker-client.js';

/**
 * GET /api/noise[?pattern=INDEX][&bandwidth=HZ][&partNoise=h0=..,h-1=..]: `syncring noise` on a
 * copy of the live parameters (the live detuning, links, coupling and noise), in its own worker
 * thread with a time budget and a fair queue per source (worker-client.ts), cached by the parameters
 * and the query.
 */

/** Answers kept; each is a few hundred numbers per node. */
const CACHE_SIZE = 12;
/** Longest accepted partNoise text: five coefficients with their names fit in well under this. */
const PART_NOISE_MAX_LENGTH = 200;
/** Bandwidths beyond this are refused before any work (the analysis caps it at f0 / 2 in any case). */
const BANDWIDTH_MAX_HZ = 1e12;

export function registerNoiseApi(app: Express, live: LiveSession, limits: Partial<WorkerLimits> = {}): { close(): Promise<void> } {
  const worker = new BackgroundWorker<NoiseRequest, NoiseOutput>(compiledHttpWorker('noise-worker'), 'noise', limits);
  const cache = new AnswerCache<NoiseOutput>(CACHE_SIZE);

  app.get('/api/noise', async (req, res) => {
    let args: NoiseRequest['args'];
    try {
      args = noiseArguments(req);
    } catch (error) {
      sendHttpError(res, error);
      return;
    }
    const info = live.info();
    const scenario = liveScenarioJson(info);
    const fingerprint = predictionFingerprint(scenario, new ModelParameters(parseScenario(scenario, 'live scenario')));
    // noise is what this answer is about, so it joins the key the catalogue's fingerprint leaves it out of
    const key = `${fingerprint}|${JSON.stringify(scenario.noise)}|${JSON.stringify(args)}`;
    const { result, fromCache } = cache.ask(key, res, (signal) =>
      worker.request({ scenario, args }, sourceOf(req.socket.remoteAddress), signal),
    );
    try {
      const value = await result;
      res.json({ fingerprint, fromCache, scenarioName: info.scenarioName, ...value } satisfies NoiseResponse);
    } catch (error) {
      sendHttpError(res, error);
    }
  });

  return { close: () => worker.close() };
}

/** The query read into noise's arguments; what can be checked without the catalogue is checked here. */
export function noiseArguments(req: Request): NoiseRequest['args'] {
  const args: NoiseRequest['args'] = {};
  const pattern = integerQuery(req, 'pattern', WHAT_IF_BOUNDS.pattern);
  if (pattern !== undefined) args.pattern = pattern;
  const bandwidth = oneText(req, 'bandwidth');
  if (bandwidth !== undefined) {
    const hz = Number(bandwidth);
    if (bandwidth.trim() === '' || !Number.isFinite(hz) || hz <= 0 || hz > BANDWIDTH_MAX_HZ)
      throw new HttpError(
        400,
        `bandwidth must be a number of Hz in (0, ${BANDWIDTH_MAX_HZ}] (got ${JSON.stringify(bandwidth)})`,
        'bandwidth',
      );
    args.bandwidth = hz;
  }
  const partNoise = oneText(req, 'partNoise');
  if (partNoise !== undefined && partNoise.trim() !== '') {
    if (partNoise.length > PART_NOISE_MAX_LENGTH)
      throw new HttpError(400, `partNoise must be at most ${PART_NOISE_MAX_LENGTH} characters`, 'partNoise');
    args.partNoise = partNoise;
  }
  return args;
}
