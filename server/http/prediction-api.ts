import { createHash } from 'node:crypto';
import type { CatalogueResponse, ComputedFor, PredictOutput } from '../../src/protocol/predict-output.js';
import type { Express, Request, Response } from 'express';
import { ModelParameters } from '../../src/model/parameters.js';
import { parameterFingerprint } from '../../src/predict/guide-model.js';
import { parseScenario, type ScenarioJSON } from '../../src/scenario/parse.js';
import type { SessionInfo } from '../../src/protocol/messages.js';
import type { LiveSession } from '../live/live-session.js';
import { HttpError, sendHttpError } from './http-error.js';
import { whatIfArguments } from './prediction-query.js';
import type { PredictionRequest } from './prediction-worker.js';
import { BackgroundWorker, compiledHttpWorker, type WorkerLimits } from './worker-client.js';
import { sourceOf } from '../request-source.js';
import { AnswerCache } from './answer-cache.js';

/**
 * Prediction for the dashboard, always on a copy of the live parameters (never the live run):
 *   GET /api/catalogue  the locked patterns of the guiding system for the live detuning, link
 *                       weights and coupling, with their stability (`syncring predict`'s JSON)
 *   GET /api/what-if?param=PARAM[&pattern=INDEX][&range=MIN:MAX][&maxSteps=N]
 *                       one pattern continued in one parameter, with the branch and its limits
 * Both run in a worker thread (prediction-worker.ts) and are cached by the parameter set. The
 * query is bounded (prediction-query.ts); the worker gives each request a time budget and keeps
 * a queue with a share per source (worker-client.ts).
 */

/** Cached answers (catalogues and branches together); the oldest is dropped first. */
const CACHE_SIZE = 24;

/** The scenario as it stands now: the loaded one with the live detuning, link weights, coupling and noise. */
export function liveScenarioJson(info: SessionInfo): ScenarioJSON {
  const base = info.scenario as ScenarioJSON;
  return {
    ...base,
    topology: { edges: info.links.map((l): [number, number, number] => [l.from, l.to, l.weight]) },
    detuning: [...info.detuning],
    coupling: { ...info.coupling },
    noise: { ...base.noise, intensity: info.noise.intensity, detuningWalk: info.noise.detuningWalk },
  };
}

/**
 * Names the scenario's fixed parts (sizes, modes, integrator, initial state) and the parameters
 * the locked states depend on (parameterFingerprint); noise is left out, it changes no prediction.
 */
export function predictionFingerprint(scenario: ScenarioJSON, params: ModelParameters): string {
  const { noise: _noise, detuning: _detuning, coupling: _coupling, topology: _topology, ...fixed } = scenario;
  return createHash('sha256').update(JSON.stringify(fixed)).update('\n').update(parameterFingerprint(params)).digest('hex').slice(0, 16);
}

interface Current {
  scenario: ScenarioJSON;
  params: ModelParameters;
  fingerprint: string;
  info: SessionInfo;
}

/** What a prediction that overran its budget is told. */
const OVERRUN_ADVICE = 'ask for a narrower range or fewer steps (maxSteps)';

export function registerPredictionApi(app: Express, live: LiveSession, limits: Partial<WorkerLimits> = {}): { close(): Promise<void> } {
  const worker = new BackgroundWorker<PredictionRequest, PredictOutput>(compiledHttpWorker('prediction-worker'), 'prediction', {
    overrunAdvice: OVERRUN_ADVICE,
    ...limits,
  });
  const cache = new AnswerCache<PredictOutput>(CACHE_SIZE);

  const current = (): Current => {
    const info = live.info();
    const scenario = liveScenarioJson(info);
    const params = new ModelParameters(parseScenario(scenario, 'live scenario'));
    return { scenario, params, fingerprint: predictionFingerprint(scenario, params), info };
  };

  const reply = async (req: Request, res: Response, now: Current, key: string, args: PredictionRequest['args']) => {
    const source = sourceOf(req.socket.remoteAddress);
    const { result, fromCache } = cache.ask(key, res, (signal) => worker.request({ scenario: now.scenario, args }, source, signal));
    try {
      const value = await result;
      res.json({ fingerprint: now.fingerprint, fromCache, computedFor: computedFor(now.info), ...value } satisfies CatalogueResponse);
    } catch (error) {
      sendHttpError(res, error);
    }
  };

  app.get('/api/catalogue', async (req, res) => {
    const now = current();
    await reply(req, res, now, `catalogue|${now.fingerprint}`, {});
  });

  app.get('/api/what-if', async (req, res) => {
    const now = current();
    let args: PredictionRequest['args'];
    try {
      args = whatIfArguments(req, now.params);
    } catch (error) {
      if (error instanceof HttpError) {
        sendHttpError(res, error);
        return;
      }
      throw error;
    }
    await reply(req, res, now, `what-if|${now.fingerprint}|${JSON.stringify(args)}`, args);
  });

  return { close: () => worker.close() };
}

/** The live parameters a prediction was made for, so a reader can tell whether it is still current. */
function computedFor(info: SessionInfo): ComputedFor {
  return {
    scenarioName: info.scenarioName,
    detuning: info.detuning,
    detuningPpm: info.detuningPpm,
    coupling: info.coupling,
    links: info.links.map((l) => ({ from: l.from, to: l.to, weight: l.weight })),
  };
}
