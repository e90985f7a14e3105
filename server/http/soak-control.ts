import express, { Router, type NextFunction, type Request, type Response } from 'express';
import { scenarioToJSON } from '../../src/scenario/parse.js';
import { builtInCampaignNames, builtInScenarioNames, loadBuiltInScenario } from '../../src/scenarios/index.js';
import { describeValue, fieldChecks, has, type JsonObject } from '../../src/util/json-fields.js';
import { InputError } from '../../src/util/input-error.js';
import { HttpError, httpErrorOf, sendHttpError } from './http-error.js';
import type { LiveSession } from '../live/live-session.js';
import { LaunchError, SoakLauncher, campaignProblem, type LaunchRefusal, type LaunchRequest } from '../soak/launcher.js';
import { SAFE_NAME } from '../soak/soak-folder.js';
import { throttledMessage, type OperatorToken } from '../operator-token.js';
import { sourceOf } from '../request-source.js';
import { asServed, SERVED_SOAKS_DIR } from './served-paths.js';

/**
 * Starting, stopping and resuming soaks from the dashboard (the listing is soak-api.ts): thin
 * handlers over a SoakLauncher (server/soak/launcher.ts), which does the work.
 *   GET  /api/campaigns            the built-in campaigns with their titles and the built-in
 *                                  scenarios each one fits
 *   POST /api/soaks                { name, scenario?, campaign, until (slow units), pace? }:
 *                                  `syncring soak ... --out SOAKS/NAME` as a detached process
 *   POST /api/soaks/NAME/stop      SIGTERM to a running soak this server started
 *   POST /api/soaks/NAME/resume    { pace? }: the same soak again with --resume
 * The POSTs change things: they need the operator token (`Authorization: Bearer TOKEN`, wrong
 * ones throttled per source), and like every request they have passed the Host/Origin policy
 * (app.ts), so no other site can make a browser start soaks. Viewers can still list.
 */

export interface SoakControlOptions {
  /** The operator token of the WebSocket hub. */
  token: OperatorToken;
  /** Soaks started from the dashboard that may run at once; default 2 (one per core of the development machine). */
  maxRunning?: number;
}

/** A soak request is a handful of short fields. */
const BODY_LIMIT = '2kb';
const NAME_MAX = 80;

const STATUS_OF: Record<LaunchRefusal, number> = { invalid: 400, 'not-found': 404, conflict: 409, busy: 429, failed: 500 };

const checks = fieldChecks();

/** A field of the request that is wrong: answered 400, the field named in the message and kept as data. */
function badField(path: string, reason: string): HttpError {
  return HttpError.fromInput(new InputError(path, reason));
}

export function registerSoakControl(app: express.Express, soaksDir: string, live: LiveSession, options: SoakControlOptions): void {
  const launcher = new SoakLauncher(soaksDir, options.maxRunning);
  app.get('/api/campaigns', (_req, res) => {
    res.json(launcher.campaigns);
  });

  const router = Router();
  const guard = (req: Request, res: Response, next: NextFunction) => {
    const match = /^Bearer\s+(\S+)\s*$/i.exec(req.headers.authorization ?? '');
    if (!match) throw new HttpError(401, 'starting, stopping and resuming soaks needs the operator token (Authorization: Bearer TOKEN)');
    const verdict = options.token.check(match[1], sourceOf(req.socket.remoteAddress), `${req.method} ${req.path}`);
    if (!verdict.ok && verdict.throttled) {
      res.set('Retry-After', String(verdict.retryAfterSeconds));
      throw new HttpError(429, throttledMessage(verdict.retryAfterSeconds));
    }
    if (!verdict.ok) throw new HttpError(401, 'wrong operator token');
    next();
  };
  const body = express.json({ limit: BODY_LIMIT, strict: true });

  router.post('/api/soaks', guard, body, (req, res) => {
    const started = launcher.start(startRequest(req.body, liveBuiltIn(live)));
    res.status(202).json({ ...started, dir: `${SERVED_SOAKS_DIR}/${started.name}` });
  });
  router.post('/api/soaks/:name/stop', guard, async (req, res) => {
    res.json(await launcher.stop(String(req.params.name)));
  });
  router.post('/api/soaks/:name/resume', guard, body, (req, res) => {
    res.status(202).json(launcher.resume(String(req.params.name), resumePace(req.body)));
  });

  router.use((error: unknown, _req: Request, res: Response, next: NextFunction) => {
    if (res.headersSent) return next(error);
    const answer = httpErrorOf(answerFor(error));
    sendHttpError(res, new HttpError(answer.status, asServed(answer.message, launcher.root), answer.field));
  });
  app.use(router);
}

/** The HTTP answer to a failure: a refusal of the launcher, bad input, or what the body parser found. */
function answerFor(error: unknown): unknown {
  if (error instanceof HttpError) return error;
  if (error instanceof LaunchError) return new HttpError(STATUS_OF[error.kind], error.message);
  if (error instanceof InputError) return HttpError.fromInput(error);
  const e = error as { status?: number; type?: string; message?: string };
  if (e.type === 'entity.parse.failed') return new HttpError(400, `body: not valid JSON (${e.message})`, 'body');
  if (e.type === 'entity.too.large')
    return new HttpError(413, `body: larger than ${BODY_LIMIT}; a soak request is a few short fields`, 'body');
  if (typeof e.type === 'string' && typeof e.status === 'number' && e.status >= 400 && e.status < 500)
    return new HttpError(e.status, `body: ${e.message}`, 'body');
  return error;
}

/** The fields of POST /api/soaks, each checked; `fallbackScenario` stands in for a missing scenario. */
function startRequest(body: unknown, fallbackScenario: string | null): LaunchRequest {
  if (body === undefined) throw badField('body', 'send the soak as a JSON object with Content-Type: application/json');
  const obj = checks.expectObject(body, 'body', ['name', 'scenario', 'campaign', 'until', 'pace']);
  const name = checks.required(obj, 'name', '');
  if (typeof name !== 'string') throw badField('name', `must be a string (got ${describeValue(name)})`);
  if (name.length > NAME_MAX || !SAFE_NAME.test(name)) {
    throw badField(
      'name',
      `must be 1 to ${NAME_MAX} letters, digits, '.', '_' or '-', starting with a letter or digit (got ${describeValue(name)})`,
    );
  }
  let scenario: unknown = obj.scenario;
  if (!has(obj, 'scenario')) {
    if (fallbackScenario === null)
      throw badField(
        'scenario',
        `is required (the live session does not run a built-in scenario); one of ${builtInScenarioNames.join(', ')}`,
      );
    scenario = fallbackScenario;
  }
  if (typeof scenario !== 'string' || !builtInScenarioNames.includes(scenario)) {
    throw badField('scenario', `must be a built-in scenario, one of ${builtInScenarioNames.join(', ')} (got ${describeValue(scenario)})`);
  }
  const campaign = checks.required(obj, 'campaign', '');
  if (typeof campaign !== 'string' || !builtInCampaignNames.includes(campaign)) {
    throw badField('campaign', `must be a built-in campaign, one of ${builtInCampaignNames.join(', ')} (got ${describeValue(campaign)})`);
  }
  const problem = campaignProblem(campaign, loadBuiltInScenario(scenario));
  if (problem) throw badField('campaign', `${campaign} does not fit scenario ${scenario}: ${problem}`);
  const until = checks.required(obj, 'until', '');
  if (typeof until !== 'number' || !Number.isFinite(until) || !(until > 0)) {
    throw badField('until', `must be a positive number of slow time units (got ${describeValue(until)})`);
  }
  return { name, scenario, campaign, untilSlow: until, pace: paceField(obj) ?? null };
}

/** The optional body of a resume: { pace } (a number, or null for as fast as possible); undefined: the pace it was started with. */
function resumePace(body: unknown): number | null | undefined {
  if (body === undefined) return undefined;
  return paceField(checks.expectObject(body, 'body', ['pace']));
}

function paceField(obj: JsonObject): number | null | undefined {
  if (!Object.prototype.hasOwnProperty.call(obj, 'pace')) return undefined;
  const pace = obj.pace;
  if (pace === null) return null;
  if (typeof pace !== 'number' || !Number.isFinite(pace) || !(pace > 0)) {
    throw badField(
      'pace',
      `must be a positive number of slow time units per second, or null for as fast as possible (got ${describeValue(pace)})`,
    );
  }
  return pace;
}

/** The built-in scenario the live session runs (as loaded), or null when it runs another one. */
function liveBuiltIn(live: LiveSession): string | null {
  let running: string;
  try {
    running = JSON.stringify(live.info().scenario);
  } catch {
    return null;
  }
  return builtInScenarioNames.find((name) => JSON.stringify(scenarioToJSON(loadBuiltInScenario(name))) === running) ?? null;
}
